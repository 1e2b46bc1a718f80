"""Test-only joins of known continuity, built exactly as NURBS, and checks of the builders.

Exactness: a bilinear patch is a plane; the rational quadratic arc with weights
(1, sqrt(2)/2, 1) is an exact quarter circle (The NURBS Book, 2nd ed., sec. 7.3,
eq. 7.15 and Ex. 7.1; cited from memory).
"""

import numpy as np
from numpy.testing import assert_allclose

from geometry.model import Face, Model
from geometry.nurbs import NurbsSurface


def plane(origin, du, dv) -> NurbsSurface:
    """Bilinear patch origin + u du + v dv, (u, v) in [0, 1]^2; normal du x dv."""
    o, a, b = (np.asarray(x, float) for x in (origin, du, dv))
    poles = np.array([[o, o + b], [o + a, o + a + b]])
    return NurbsSurface(1, 1, [0, 0, 1, 1], [0, 0, 1, 1], poles)


def quarter_cylinder(radius: float, length: float) -> NurbsSurface:
    """Axis along y through (0, 0, 0); u runs from the top line (0, y, R) to (R, y, 0).

    The normal Su x Sv points outwards, so the cross curvature is -1/R.
    """
    r = radius
    arc = np.array([[0.0, r], [r, r], [r, 0.0]])  # (x, z)
    w = np.array([1.0, np.sqrt(0.5), 1.0])
    poles = np.zeros((3, 2, 3))
    for j, y in enumerate((0.0, length)):
        poles[:, j, 0], poles[:, j, 1], poles[:, j, 2] = arc[:, 0], y, arc[:, 1]
    weights = np.repeat(w[:, None], 2, axis=1)
    return NurbsSurface(2, 1, [0, 0, 0, 1, 1, 1], [0, 0, 1, 1], poles, weights)


def plane_on_cylinder(radius: float, length: float = 10.0, width: float = 8.0) -> Model:
    """Plane z = R over x in [-width, 0] meeting the cylinder tangentially along x = 0."""
    flat = plane([-width, 0.0, radius], [width, 0.0, 0.0], [0.0, length, 0.0])
    return Model((Face(flat), Face(quarter_cylinder(radius, length))))


def dihedral(exterior_deg: float, length: float = 5.0) -> Model:
    """Plane z = 0 (x <= 0) and a plane turned up about the y axis by the exterior angle."""
    phi = np.radians(exterior_deg)
    a = plane([-1.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, length, 0.0])
    b = plane([0.0, 0.0, 0.0], [np.cos(phi), 0.0, np.sin(phi)], [0.0, length, 0.0])
    return Model((Face(a), Face(b)))


def offset_pair(gap: float, step: bool = False, length: float = 5.0) -> Model:
    """Two unit-wide planes along x = 0 that stand ``gap`` apart (in plane, or as a step in z)."""
    a = plane([-1.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, length, 0.0])
    origin = [0.0, 0.0, gap] if step else [gap, 0.0, 0.0]
    b = plane(origin, [1.0, 0.0, 0.0], [0.0, length, 0.0])
    return Model((Face(a), Face(b)))


def tilting_join(b0: float, b1: float, b2: float, length: float = 10.0) -> Model:
    """Plane z = 0 (x <= 0) and S(u, v) = (u, v L, u g(v)) whose angle at x = 0 is atan(g(v)).

    g is the quadratic Bezier polynomial with coefficients (b0, b1, b2), so the angle
    along the seam peaks where g does: v* = (b0 - b1) / (b0 - 2 b1 + b2).
    """
    a = plane([-1.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, length, 0.0])
    poles = np.zeros((2, 3, 3))
    for j, (y, g) in enumerate(zip((0.0, length / 2, length), (b0, b1, b2), strict=True)):
        poles[0, j] = [0.0, y, 0.0]
        poles[1, j] = [1.0, y, g]
    b = NurbsSurface(1, 2, [0, 0, 1, 1], [0, 0, 0, 1, 1, 1], poles)
    return Model((Face(a), Face(b)))


def test_quarter_cylinder_is_exact():
    radius = 7.0
    u = np.linspace(0, 1, 33)
    pts = quarter_cylinder(radius, 3.0).points_grid(u, np.array([0.0, 1.0]))
    assert_allclose(np.hypot(pts[..., 0], pts[..., 2]), radius, rtol=1e-14)


def test_tilting_join_is_the_quadratic_it_claims():
    model = tilting_join(0.01, 0.05, 0.02)
    t = np.linspace(0, 1, 11)
    pts = model.faces[1].surface.points_at(np.ones_like(t), t)
    expected = 0.01 * (1 - t) ** 2 + 2 * 0.05 * t * (1 - t) + 0.02 * t**2
    assert_allclose(pts[:, 2], expected, atol=1e-15)
