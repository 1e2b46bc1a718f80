"""A model: trimmed, oriented faces and their shared edges, sample grids on them, closest points."""

from .probe import ProbeResult, closest_parameters, probe_point, probe_uv
from .sampling import FaceGrid, face_grid, model_grids, trimmed_mesh
from .topology import Edge, EdgeUse, Face, Model, SkippedFace

__all__ = [
    "Edge",
    "EdgeUse",
    "Face",
    "FaceGrid",
    "Model",
    "ProbeResult",
    "SkippedFace",
    "closest_parameters",
    "face_grid",
    "model_grids",
    "probe_point",
    "probe_uv",
    "trimmed_mesh",
]
