"""Build Batten surfaces from geomdl objects."""

from __future__ import annotations

import numpy as np

from ..errors import SurfaceError
from .surface import NurbsSurface


def from_geomdl(obj) -> NurbsSurface:
    """The :class:`NurbsSurface` equal to a geomdl ``BSpline.Surface`` or ``NURBS.Surface``.

    Parameters
    ----------
    obj : geomdl surface
        Its ``ctrlpts`` are read in geomdl's u-major order (index ``i * nv + j``);
        a NURBS surface's ``weights`` are taken, and its cartesian ``ctrlpts``.

    Returns
    -------
    NurbsSurface
    """
    try:
        nu, nv = int(obj.ctrlpts_size_u), int(obj.ctrlpts_size_v)
        poles = np.asarray(obj.ctrlpts, dtype=float).reshape(nu, nv, -1)
        weights = getattr(obj, "weights", None)
        knots_u, knots_v = obj.knotvector_u, obj.knotvector_v
        degree_u, degree_v = obj.degree_u, obj.degree_v
    except (AttributeError, TypeError, ValueError) as exc:
        raise SurfaceError(f"not a geomdl surface with a control net: {exc}") from exc
    if poles.shape[2] != 3:
        raise SurfaceError(f"geomdl surface must be 3-D, got {poles.shape[2]}-D poles")
    w = None if not weights else np.asarray(weights, dtype=float).reshape(nu, nv)
    return NurbsSurface(degree_u, degree_v, knots_u, knots_v, poles, w)
