"""Principal curvatures against exact answers and invariances.

Analytic values: do Carmo, *Differential Geometry of Curves and Surfaces* (1976),
sec. 3-3 (sphere, cylinder) and sec. 3-3 Example 4 (torus, K = cos(phi) / (r (R + r cos(phi)))),
quoted from memory. Sign convention of DEVELOPERS.md: outward normals give a sphere
k1 = k2 = -1/R.
"""

import numpy as np
import pytest
from geomdl import operations
from numpy.testing import assert_allclose

import geometry.nurbs
from geometry.nurbs import NurbsSurface, curvature_at, curvature_on_grid, primitives
from tests.surface_factories import random_geomdl_nurbs

RTOL = 1e-10
GRID = np.linspace(0, 1, 41)


def test_sphere_curvature_and_umbilics():
    radius = 25.0
    f = curvature_on_grid(primitives.sphere(radius), GRID, GRID)
    inner = f.valid
    assert_allclose(f.k1[inner], -1 / radius, rtol=RTOL)
    assert_allclose(f.k2[inner], -1 / radius, rtol=RTOL)
    assert_allclose(f.gaussian[inner], 1 / radius**2, rtol=RTOL)
    assert_allclose(f.mean[inner], -1 / radius, rtol=RTOL)
    assert f.umbilic[inner].all()  # every point of a sphere is umbilic
    # Outward normal: n = p / R.
    assert_allclose(f.normals[inner], f.points[inner] / radius, atol=1e-12)


def test_sphere_poles_are_flagged_not_poisoning():
    f = curvature_on_grid(primitives.sphere(10.0), GRID, GRID)
    # v = 0 and v = 1 are the collapsed edges (south and north pole).
    assert not f.valid[:, 0].any() and not f.valid[:, -1].any()
    assert f.valid[:, 1:-1].all()
    # Values at the poles come from a parameter nudged 1e-4 of the domain inwards:
    # curvature -1/R (constant on a sphere) and the normal within the nudge angle.
    assert np.isfinite(f.k1).all() and np.isfinite(f.normals).all()
    assert_allclose(f.k1[:, 0], -0.1, rtol=1e-6)
    assert_allclose(f.normals[:, -1], np.tile([0, 0, 1.0], (41, 1)), atol=1e-3)


def test_fully_collapsed_patch_is_nan_only_where_degenerate():
    # A patch whose v = 1 edge is a single point and whose u = 1 row is collapsed too.
    poles = np.zeros((3, 3, 3))
    poles[:, :, 0] = [[0, 1, 2], [0, 1, 2], [0, 1, 2]]
    poles[:, :, 1] = [[0, 0, 0], [1, 1, 1], [2, 2, 2]]
    poles[:, 2] = poles[0, 2]  # v = 1 collapses to one point
    s = NurbsSurface(2, 2, [0, 0, 0, 1, 1, 1], [0, 0, 0, 1, 1, 1], poles)
    f = curvature_on_grid(s, GRID, GRID)
    assert f.valid[:, :-1].any()
    good = f.valid
    assert np.isfinite(f.k1[good]).all() and np.isfinite(f.gaussian[good]).all()


def test_cylinder():
    radius = 12.5
    f = curvature_on_grid(primitives.cylinder(radius, 40.0), GRID, GRID)
    assert f.valid.all()
    # Outward normal, bending away from it: k2 = -1/R along the circle, k1 = 0 along the rulings.
    assert_allclose(f.k1, 0.0, atol=1e-12)
    assert_allclose(f.k2, -1 / radius, rtol=RTOL)
    assert_allclose(f.mean, -1 / (2 * radius), rtol=RTOL)
    assert_allclose(f.gaussian, 0.0, atol=1e-14)
    assert_allclose(np.abs(f.dir1[..., 2]), 1.0, atol=1e-12)  # k1 direction along the axis


def test_reversed_face_flips_normal_and_curvature_signs():
    s = primitives.cylinder(5.0, 10.0)
    a = curvature_on_grid(s, GRID, GRID)
    b = curvature_on_grid(s, GRID, GRID, reversed=True)
    assert_allclose(b.normals, -a.normals)
    assert_allclose(b.k1, -a.k2, atol=1e-14)  # k1 >= k2 is kept after the flip
    assert_allclose(b.k2, -a.k1, atol=1e-14)
    assert_allclose(b.gaussian, a.gaussian)
    assert_allclose(b.mean, -a.mean)


def test_torus_gaussian_curvature_and_directions():
    big, small = 3.0, 1.0
    f = curvature_on_grid(primitives.torus(big, small), GRID, np.linspace(0, 1, 81))
    rho = np.hypot(f.points[..., 0], f.points[..., 1])
    phi = np.arctan2(f.points[..., 2], rho - big)
    expected_k = np.cos(phi) / (small * (big + small * np.cos(phi)))
    assert_allclose(f.gaussian, expected_k, atol=1e-12)
    outer = np.cos(phi) > 1e-6
    inner = np.cos(phi) < -1e-6
    assert (f.gaussian[outer] > 0).all() and (f.gaussian[inner] < 0).all()
    top = np.isclose(np.abs(f.points[..., 2]), small, atol=1e-12)
    assert top.any()
    assert_allclose(f.gaussian[top], 0.0, atol=1e-12)
    # Tube circle curvature is -1/r with the normal away from the tube centre.
    assert_allclose(np.minimum(f.k1, f.k2), -1 / small, rtol=1e-10)
    # Principal directions orthogonal to each other and to the normal.
    assert_allclose(np.einsum("...i,...i", f.dir1, f.dir2), 0.0, atol=1e-12)
    assert_allclose(np.einsum("...i,...i", f.dir1, f.normals), 0.0, atol=1e-12)
    assert_allclose(np.linalg.norm(f.dir1, axis=-1), 1.0, atol=1e-12)


def test_principal_directions_diagonalise_the_second_form():
    # Euler's theorem: the normal curvature along dir1 is k1 and along dir2 is k2.
    geo, s = random_geomdl_nurbs(3)
    u = np.linspace(0.05, 0.95, 15)
    f = curvature_on_grid(s, u, u)
    d = s.derivatives_grid(u, u, 2)
    su, sv = d[1, 0], d[0, 1]
    second = np.stack([d[2, 0], d[1, 1], d[0, 2]])
    for direction, k in ((f.dir1, f.k1), (f.dir2, f.k2)):
        # Solve direction = a Su + b Sv, then kn = II(a, b) / I(a, b).
        e, ff, g = (np.einsum("...i,...i", x, y) for x, y in ((su, su), (su, sv), (sv, sv)))
        r1, r2 = np.einsum("...i,...i", direction, su), np.einsum("...i,...i", direction, sv)
        det = e * g - ff * ff
        a, b = (g * r1 - ff * r2) / det, (e * r2 - ff * r1) / det
        ll, mm, nn = (np.einsum("...i,...i", x, f.normals) for x in second)
        kn = (ll * a * a + 2 * mm * a * b + nn * b * b) / (e * a * a + 2 * ff * a * b + g * b * b)
        assert_allclose(kn, k, rtol=1e-8, atol=1e-12)


def test_invariant_under_knot_insertion():
    # geomdl.operations.insert_knot changes the net, not the surface.
    geo, s = random_geomdl_nurbs(8)
    refined = operations.insert_knot(geo.__deepcopy__({}), [0.37, 0.61], [2, 1])
    s2 = geometry.nurbs.from_geomdl(refined)
    assert s2.shape != s.shape
    u = np.linspace(0, 1, 23)
    a, b = curvature_on_grid(s, u, u), curvature_on_grid(s2, u, u)
    for name in ("points", "k1", "k2", "gaussian", "mean", "normals"):
        assert_allclose(getattr(b, name), getattr(a, name), rtol=1e-8, atol=1e-10)


def test_invariant_under_affine_reparametrisation_and_rigid_motion():
    _, s = random_geomdl_nurbs(9)
    scale_u, shift_u, scale_v, shift_v = 7.0, -3.0, 0.25, 10.0
    s2 = NurbsSurface(
        s.degree_u, s.degree_v, s.knots_u * scale_u + shift_u, s.knots_v * scale_v + shift_v, s.poles, s.weights
    )
    u = np.linspace(0, 1, 17)
    a = curvature_on_grid(s, u, u)
    b = curvature_on_grid(s2, u * scale_u + shift_u, u * scale_v + shift_v)
    assert_allclose(b.k1, a.k1, rtol=1e-9)
    assert_allclose(b.k2, a.k2, rtol=1e-9)
    assert_allclose(b.dir1, a.dir1, atol=1e-9)
    # Rigid motion: rotation about an arbitrary axis plus a translation.
    axis = np.array([1.0, 2.0, -0.5]) / np.linalg.norm([1.0, 2.0, -0.5])
    angle = 0.8
    k = np.array([[0, -axis[2], axis[1]], [axis[2], 0, -axis[0]], [-axis[1], axis[0], 0]])
    rot = np.eye(3) + np.sin(angle) * k + (1 - np.cos(angle)) * k @ k
    m = np.eye(4)
    m[:3, :3], m[:3, 3] = rot, [10, -20, 5]
    c = curvature_on_grid(s.transformed(m), u, u)
    assert_allclose(c.k1, a.k1, rtol=1e-9, atol=1e-12)
    assert_allclose(c.gaussian, a.gaussian, rtol=1e-8, atol=1e-14)
    assert_allclose(c.normals, a.normals @ rot.T, atol=1e-10)


def test_scattered_equals_grid():
    _, s = random_geomdl_nurbs(4)
    u = np.linspace(0, 1, 9)
    g = curvature_on_grid(s, u, u)
    uu, vv = np.meshgrid(u, u, indexing="ij")
    p = curvature_at(s, uu.ravel(), vv.ravel())
    for name in ("points", "normals", "k1", "k2", "dir1", "dir2", "gaussian", "mean"):
        assert_allclose(getattr(p, name).reshape(getattr(g, name).shape), getattr(g, name), atol=1e-9)


@pytest.mark.parametrize("workers", [1, 2])
def test_blocked_and_threaded_paths_agree(workers):
    _, s = random_geomdl_nurbs(6)
    u = np.linspace(0, 1, 301)  # several row blocks
    v = np.linspace(0, 1, 257)
    a = curvature_on_grid(s, u, v, workers=workers)
    b = curvature_at(s, np.repeat(u, v.size), np.tile(v, u.size))
    assert_allclose(a.k1.ravel(), b.k1, rtol=1e-9, atol=1e-12)
    assert a.points.shape == (301, 257, 3) and a.k1.shape == (301, 257)


def test_result_arrays_are_read_only():
    f = curvature_on_grid(primitives.cylinder(1.0, 1.0), GRID, GRID)
    with pytest.raises(ValueError):
        f.k1[0, 0] = 0.0
