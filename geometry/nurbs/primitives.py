"""Exact rational NURBS forms of elementary surfaces.

Circles and arcs are the quadratic rational forms of The NURBS Book (Piegl &
Tiller, 2nd ed.), sec. 7.5 (the nine-point circle, weights 1 and sqrt(2)/2);
surfaces of revolution follow sec. 8.5 (algorithm A8.1): the tensor product
of a meridian (profile) with the circle, weights multiplied. Used by tests as
exact references and by the sample builder.
"""

from __future__ import annotations

import numpy as np

from .surface import NurbsSurface

_W = np.sqrt(0.5)
# Nine-point unit circle (NURBS Book Fig. 7.16 / Ex. 7.2 as commonly tabulated).
CIRCLE_POLES = np.array([[1, 0], [1, 1], [0, 1], [-1, 1], [-1, 0], [-1, -1], [0, -1], [1, -1], [1, 0]], float)
CIRCLE_WEIGHTS = np.array([1, _W, 1, _W, 1, _W, 1, _W, 1], float)
CIRCLE_KNOTS = np.array([0, 0, 0, 0.25, 0.25, 0.5, 0.5, 0.75, 0.75, 1, 1, 1], float)
# Half circle from angle -90 to +90 degrees (five poles).
HALF_POLES = np.array([[0, -1], [1, -1], [1, 0], [1, 1], [0, 1]], float)
HALF_WEIGHTS = np.array([1, _W, 1, _W, 1], float)
HALF_KNOTS = np.array([0, 0, 0, 0.5, 0.5, 1, 1, 1], float)


def revolve(profile: np.ndarray, profile_weights: np.ndarray, profile_knots: np.ndarray, degree: int) -> NurbsSurface:
    """Surface of revolution of a meridian about the z axis.

    Parameters
    ----------
    profile : ndarray of shape (n, 2)
        Meridian poles as (radius, z).
    profile_weights : ndarray of shape (n,)
    profile_knots : ndarray of shape (n + degree + 1,)
    degree : int
        Degree of the meridian.

    Returns
    -------
    NurbsSurface
        u runs once round the axis (counter-clockwise seen from +z), v along the
        meridian; where the meridian moves away from the axis in +z the normal
        Su x Sv points away from the axis.

    Notes
    -----
    NURBS Book sec. 8.5: ``P_ij = (r_j c_i, z_j)``, ``w_ij = w_i w_j``.
    """
    profile = np.asarray(profile, float)
    poles = np.empty((9, profile.shape[0], 3))
    poles[..., 0] = CIRCLE_POLES[:, None, 0] * profile[None, :, 0]
    poles[..., 1] = CIRCLE_POLES[:, None, 1] * profile[None, :, 0]
    poles[..., 2] = profile[None, :, 1]
    weights = CIRCLE_WEIGHTS[:, None] * np.asarray(profile_weights, float)[None, :]
    return NurbsSurface(2, degree, CIRCLE_KNOTS, profile_knots, poles, weights)


def sphere(radius: float) -> NurbsSurface:
    """Sphere about the origin; v from the south pole (v=0) to the north pole (v=1).

    The two poles are collapsed edges (degenerate tangent plane); normals point outwards.
    """
    return revolve(HALF_POLES * radius, HALF_WEIGHTS, HALF_KNOTS, 2)


def cylinder(radius: float, height: float) -> NurbsSurface:
    """Circular cylinder about the z axis from z=0 to z=height, normals outwards."""
    return revolve(np.array([[radius, 0.0], [radius, height]]), np.ones(2), np.array([0, 0, 1, 1.0]), 1)


def torus(major: float, minor: float) -> NurbsSurface:
    """Torus about the z axis; v starts on the outer equator and climbs over the top.

    Normals point away from the tube's centre circle.
    """
    profile = np.column_stack([major + minor * CIRCLE_POLES[:, 0], minor * CIRCLE_POLES[:, 1]])
    return revolve(profile, CIRCLE_WEIGHTS, CIRCLE_KNOTS, 2)


def bilinear(corners: np.ndarray) -> NurbsSurface:
    """Degree (1, 1) patch through four corners ordered (u0v0, u0v1, u1v0, u1v1).

    Parameters
    ----------
    corners : ndarray of shape (4, 3)
    """
    poles = np.asarray(corners, float).reshape(2, 2, 3)
    knots = np.array([0, 0, 1, 1.0])
    return NurbsSurface(1, 1, knots, knots, poles)
