"""Two revisions of a model: which face is which, and how far the new surfaces moved."""

from .correspondence import FacePairing, pair_faces
from .deviation import ModelDeviation, ReferenceModel, model_deviation, signed_distances

__all__ = ["FacePairing", "ModelDeviation", "ReferenceModel", "model_deviation", "pair_faces", "signed_distances"]
