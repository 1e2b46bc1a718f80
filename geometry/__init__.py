"""Batten's numerical core: exact NURBS evaluation and surface analysis.

numpy, scipy and numba only; nothing here imports Qt, VTK, pyvista or the app.
This package itself loads nothing heavy, so the CAD kernel's helper process
(:mod:`geometry.kernel`) starts without the compiled kernels: import the
surface type and curvature from :mod:`geometry.nurbs`.
"""

from .errors import BattenError, ReadError, SurfaceError

__all__ = ["BattenError", "ReadError", "SurfaceError"]
__version__ = "0.1.0"
