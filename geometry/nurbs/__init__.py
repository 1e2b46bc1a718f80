"""NURBS surfaces: the surface type, basis functions, exact curvature, point inversion kernels.

The compiled kernels (numba, ``compiled_*``) evaluate whole parameter arrays at
once; :mod:`.differential` turns their derivatives into principal curvatures.
"""

from .differential import CurvatureField, curvature_at, curvature_on_grid
from .interop import from_geomdl
from .surface import NurbsSurface

__all__ = ["CurvatureField", "NurbsSurface", "curvature_at", "curvature_on_grid", "from_geomdl"]
