"""Exact rational NURBS forms of analytic shapes, shared by the tests (test-only builders).

The full circle is the nine-point rational quadratic of The NURBS Book
(Piegl & Tiller, 2nd ed., 1997), sec. 7.5, Fig. 7.16 (knots 0,0,0,1/4,1/4,
1/2,1/2,3/4,3/4,1,1,1, corner weights sqrt(2)/2). Cylinder, sphere and torus
are its tensor products with a line, a half circle and a circle (sec. 8.5,
surfaces of revolution); tests/test_section_shapes.py checks the forms against
the implicit equations of the shapes. The normals Su x Sv of the cylinders, sphere and
torus point outwards; the cubic sweep's points up (+z).
"""

from __future__ import annotations

import numpy as np

from geometry.model import Face, Model
from geometry.nurbs import NurbsSurface

S = np.sqrt(0.5)
CIRCLE_KNOTS = [0, 0, 0, 0.25, 0.25, 0.5, 0.5, 0.75, 0.75, 1, 1, 1]
CIRCLE_XY = np.array([[1, 0], [1, 1], [0, 1], [-1, 1], [-1, 0], [-1, -1], [0, -1], [1, -1], [1, 0]], float)
CIRCLE_W = np.array([1, S, 1, S, 1, S, 1, S, 1])
HALF_KNOTS = [0, 0, 0, 0.5, 0.5, 1, 1, 1]
# meridian from the south pole to the north pole: (distance from the axis, height)
HALF_RZ = np.array([[0, -1], [1, -1], [1, 0], [1, 1], [0, 1]], float)
HALF_W = np.array([1, S, 1, S, 1])


def model_of(*surfaces: NurbsSurface) -> Model:
    return Model(tuple(Face(s) for s in surfaces))


def cylinder(radius: float, z0: float, z1: float) -> NurbsSurface:
    """x^2 + y^2 = radius^2 for z0 <= z <= z1; u around the axis, v along it."""
    poles = np.zeros((9, 2, 3))
    poles[:, :, :2] = radius * CIRCLE_XY[:, None, :]
    poles[:, 0, 2], poles[:, 1, 2] = z0, z1
    weights = np.repeat(CIRCLE_W[:, None], 2, axis=1)
    return NurbsSurface(2, 1, CIRCLE_KNOTS, [0, 0, 1, 1], poles, weights)


def sphere(radius: float) -> NurbsSurface:
    """x^2 + y^2 + z^2 = radius^2 centred at the origin; u longitude, v south to north."""
    poles = np.zeros((9, 5, 3))
    poles[..., 0] = radius * CIRCLE_XY[:, None, 0] * HALF_RZ[None, :, 0]
    poles[..., 1] = radius * CIRCLE_XY[:, None, 1] * HALF_RZ[None, :, 0]
    poles[..., 2] = radius * HALF_RZ[None, :, 1]
    return NurbsSurface(2, 2, CIRCLE_KNOTS, HALF_KNOTS, poles, CIRCLE_W[:, None] * HALF_W[None, :])


def torus(major: float, minor: float, tilt: float = np.pi / 4) -> NurbsSurface:
    """(sqrt(x^2 + y^2) - major)^2 + z^2 = minor^2; the tube's seam starts ``tilt`` above the equator."""
    c, s = np.cos(tilt), np.sin(tilt)
    profile = CIRCLE_XY @ np.array([[c, s], [-s, c]])  # the tube's circle, turned about its centre
    rho = major + minor * profile[:, 0]
    poles = np.zeros((9, 9, 3))
    poles[..., 0] = CIRCLE_XY[:, None, 0] * rho[None, :]
    poles[..., 1] = CIRCLE_XY[:, None, 1] * rho[None, :]
    poles[..., 2] = minor * profile[None, :, 1]
    return NurbsSurface(2, 2, CIRCLE_KNOTS, CIRCLE_KNOTS, poles, CIRCLE_W[:, None] * CIRCLE_W[None, :])


def cubic_sweep(width: float = 1.0) -> NurbsSurface:
    """z = x^3 - x for -1 <= x <= 1, swept along y from 0 to ``width``: a degree (3, 1) Bezier face.

    Bezier ordinates by blossoming (Farin, Curves and Surfaces for CAGD, 5th ed.,
    sec. 3.3, from memory): b_i = f[-1^(3-i), 1^i] with f[x1,x2,x3] = x1 x2 x3 -
    (x1 + x2 + x3) / 3, giving 0, 4/3, -4/3, 0 over abscissae -1, -1/3, 1/3, 1.
    """
    x = np.array([-1.0, -1.0 / 3.0, 1.0 / 3.0, 1.0])
    z = np.array([0.0, 4.0 / 3.0, -4.0 / 3.0, 0.0])
    poles = np.zeros((4, 2, 3))
    poles[:, :, 0] = x[:, None]
    poles[:, :, 2] = z[:, None]
    poles[:, 1, 1] = width
    return NurbsSurface(3, 1, [0, 0, 0, 0, 1, 1, 1, 1], [0, 0, 1, 1], poles)


def quarter_cylinder(radius: float, length: float) -> NurbsSurface:
    """Quarter of the cylinder y^2 + z^2 = R^2 (axis x, from x = 0 to ``length``), from +y to +z.

    Exact rational form (The NURBS Book 2nd ed., sec. 7.3); u runs along the arc, v along x.
    """
    w = np.sqrt(0.5)
    arc = np.array([[0, radius, 0], [0, radius, radius], [0, 0, radius]], float)
    poles = np.stack([arc, arc + [length, 0, 0]], axis=1)
    weights = np.array([[1, 1], [w, w], [1, 1]], float)
    return NurbsSurface(2, 1, [0, 0, 0, 1, 1, 1], [0, 0, 1, 1], poles, weights)


PLANE_SIDE_MM = 100.0


def plane_model() -> Model:
    """The square 0 <= x, y <= 100 mm at z = 0 as a bilinear NURBS face: curvature 0 everywhere."""
    poles = np.array(
        [[[0.0, 0.0, 0.0], [0.0, PLANE_SIDE_MM, 0.0]], [[PLANE_SIDE_MM, 0.0, 0.0], [PLANE_SIDE_MM, PLANE_SIDE_MM, 0.0]]]
    )
    surface = NurbsSurface(1, 1, [0, 0, 1, 1], [0, 0, 1, 1], poles, None)
    return Model((Face(surface, name="plate"),))
