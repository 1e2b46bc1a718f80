"""Batten's numerical core: exact NURBS evaluation and surface analysis.

numpy and scipy only; nothing here imports Qt, VTK, pyvista or the app.
"""

from .errors import BattenError, ReadError, SurfaceError
from .nurbs.differential import CurvatureField, curvature_at, curvature_on_grid
from .nurbs.interop import from_geomdl
from .nurbs.surface import NurbsSurface

__all__ = [
    "BattenError",
    "CurvatureField",
    "NurbsSurface",
    "ReadError",
    "SurfaceError",
    "curvature_at",
    "curvature_on_grid",
    "from_geomdl",
]
__version__ = "0.1.0"
