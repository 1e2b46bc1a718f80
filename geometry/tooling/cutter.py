"""Cutter reach: where a ball-end cutter of radius r cannot follow the surface.

With the sign convention of DEVELOPERS.md (outward normal; a surface bending
towards its normal has positive curvature) a surface is concave seen from the
outside where it bends towards the normal, i.e. where ``k1 > 0``. A ball of
radius r rolls over a concave region only if every normal curvature there is at
most ``1 / r`` (its own curvature): it cannot reach the bottom of a tighter
hollow without gouging the walls (common practice; the largest normal
curvature is ``k1``, Euler's theorem, do Carmo, *Differential Geometry of
Curves and Surfaces*, 1976, sec. 3-2). Convex regions never limit a ball-end
cutter.
"""

from __future__ import annotations

import numpy as np


def out_of_reach(k1: np.ndarray, radius: float) -> np.ndarray:
    """Samples a ball-end cutter of ``radius`` mm cannot mill.

    Parameters
    ----------
    k1 : ndarray of shape (...)
        Largest principal curvature, 1/mm, sign convention of DEVELOPERS.md.
    radius : float
        Cutter radius, mm (> 0).

    Returns
    -------
    mask : ndarray of bool, shape (...)
        ``k1 > 1 / radius`` (NaN counts as reachable).
    """
    with np.errstate(invalid="ignore"):
        return np.asarray(k1) > 1.0 / float(radius)


def concave_radius(k1: np.ndarray) -> np.ndarray:
    """Radius of the tightest concave bend at each sample, mm: ``1 / k1`` where ``k1 > 0``, else inf.

    Parameters
    ----------
    k1 : ndarray of shape (...)

    Returns
    -------
    radius : ndarray of shape (...)
    """
    k1 = np.asarray(k1, float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(k1 > 0.0, 1.0 / np.where(k1 > 0.0, k1, 1.0), np.inf)
