"""The compiled core against slow, obvious references (test-only) on random seeded models.

References: scipy's ``BSpline`` for the basis functions (de Boor's recurrence),
geomdl 5.4 for rational surface derivatives (The NURBS Book A3.6 / A4.4), and a
per-point evaluation of the shape operator ``I^-1 II`` with ``numpy.linalg.eig``
for principal curvatures (do Carmo 1976, sec. 3-3).
"""

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy.interpolate import BSpline

import geometry.nurbs
from geometry.nurbs.compiled_eval import SurfacePack, basis_rows, derivatives
from geometry.nurbs.compiled_inversion import invert, invert_with_derivatives
from tests.surface_factories import random_geomdl_nurbs

RTOL = 1e-9
CURVATURE_RTOL = 1e-7


def _random_knots(rng, degree, n, clamped):
    inner = np.sort(rng.uniform(0.0, 1.0, n - degree - 1))
    if inner.size >= 3:
        inner[2] = inner[1]  # a double interior knot
    if clamped:
        return np.concatenate([[0.0] * (degree + 1), inner, [1.0] * (degree + 1)])
    step = 1.0 / (n - degree)
    return np.arange(n + degree + 1, dtype=float) * step - degree * step  # uniform, unclamped


@pytest.mark.parametrize("seed", range(6))
@pytest.mark.parametrize("clamped", [True, False])
def test_basis_rows_match_scipy(seed, clamped):
    # scipy BSpline with identity coefficients gives every basis function and its derivatives.
    rng = np.random.default_rng(seed)
    degree = int(rng.integers(1, 6))
    n = degree + 1 + int(rng.integers(0, 6))
    knots = _random_knots(rng, degree, n, clamped)
    lo, hi = knots[degree], knots[n]
    u = np.concatenate([rng.uniform(lo, hi, 50), [lo, hi], knots[degree : n + 1]])
    ders, spans = basis_rows(knots, degree, n, u, 3)
    full = np.zeros((4, u.size, n))
    rows = np.arange(u.size)[:, None]
    full[:, rows, spans[:, None] - degree + np.arange(degree + 1)] = ders.transpose(1, 0, 2)
    spline = BSpline(knots, np.eye(n), degree, extrapolate=True)
    for d in range(4):
        expected = spline(u, nu=d) if d <= degree else np.zeros((u.size, n))
        scale = 1.0 + np.abs(expected).max()
        assert_allclose(full[d], expected, atol=RTOL * scale * 10 ** (d))


def test_pack_of_many_equals_each_alone():
    surfaces = [random_geomdl_nurbs(s, degrees=(1 + s % 3, 1 + (s + 1) % 4), counts=(6, 7))[1] for s in range(5)]
    pack = SurfacePack.of(surfaces)
    rng = np.random.default_rng(7)
    sids = rng.integers(0, 5, 300)
    u, v = rng.uniform(0, 1, 300), rng.uniform(0, 1, 300)
    together = derivatives(pack, sids, u, v, 2)
    for s, surf in enumerate(surfaces):
        mine = sids == s
        assert_allclose(together[:, :, mine], surf.derivatives_at(u[mine], v[mine], 2), rtol=0, atol=0)


def _reference_curvature(geo, u, v, sign):
    """Per point: geomdl derivatives, shape operator I^-1 II, numpy eig (slow, obvious)."""
    out = []
    for a, b in zip(u, v, strict=True):
        d = geo.derivatives(float(a), float(b), 2)
        su, sv = np.array(d[1][0]), np.array(d[0][1])
        n = sign * np.cross(su, sv)
        n /= np.linalg.norm(n)
        first = np.array([[su @ su, su @ sv], [su @ sv, sv @ sv]])
        second = np.array([[d[2][0] @ n, d[1][1] @ n], [d[1][1] @ n, d[0][2] @ n]])
        vals, vecs = np.linalg.eig(np.linalg.solve(first, second))
        order = np.argsort(vals.real)[::-1]
        vals, vecs = vals.real[order], vecs.real[:, order]
        dir1 = vecs[0, 0] * su + vecs[1, 0] * sv
        out.append((np.array(d[0][0]), n, vals[0], vals[1], dir1 / np.linalg.norm(dir1)))
    return out


@pytest.mark.parametrize("seed", range(4))
@pytest.mark.parametrize("reversed_", [False, True])
def test_curvature_matches_slow_reference(seed, reversed_):
    geo, surf = random_geomdl_nurbs(seed + 20, degrees=(3, 2 + seed % 2), counts=(6, 7))
    u = np.linspace(0.0, 1.0, 7)
    v = np.linspace(0.0, 1.0, 6)
    grid = geometry.nurbs.curvature_on_grid(surf, u, v, reversed=reversed_, workers=2)
    uu, vv = np.meshgrid(u, v, indexing="ij")
    scattered = geometry.nurbs.curvature_at(surf, uu.ravel(), vv.ravel(), reversed=reversed_)
    ref = _reference_curvature(geo, uu.ravel(), vv.ravel(), -1.0 if reversed_ else 1.0)
    for field, shape in ((grid, (-1,)), (scattered, (-1,))):
        k1, k2 = field.k1.reshape(shape), field.k2.reshape(shape)
        scale = 1.0 + np.abs([r[2] for r in ref]).max()
        assert_allclose(field.points.reshape(-1, 3), [r[0] for r in ref], atol=RTOL * 100)
        assert_allclose(field.normals.reshape(-1, 3), [r[1] for r in ref], atol=1e-9)
        assert_allclose(k1, [r[2] for r in ref], atol=CURVATURE_RTOL * scale)
        assert_allclose(k2, [r[3] for r in ref], atol=CURVATURE_RTOL * scale)
        assert_allclose(field.gaussian.reshape(shape), k1 * k2, rtol=1e-12)
        apart = np.abs(k1 - k2) > 1e-4 * scale  # away from umbilics the direction is defined
        cosines = np.einsum("ij,ij->i", field.dir1.reshape(-1, 3), [r[4] for r in ref])
        assert_allclose(np.abs(cosines[apart]), 1.0, atol=1e-6)


def test_threads_do_not_change_the_grid():
    _, surf = random_geomdl_nurbs(3, degrees=(3, 3), counts=(8, 8))
    u, v = np.linspace(0, 1, 101), np.linspace(0, 1, 77)
    one = geometry.nurbs.curvature_on_grid(surf, u, v, workers=1)
    two = geometry.nurbs.curvature_on_grid(surf, u, v, workers=2)
    for name in ("points", "normals", "k1", "k2", "dir1", "dir2", "valid"):
        assert np.array_equal(getattr(one, name), getattr(two, name))


@pytest.mark.parametrize("seed", range(3))
def test_inversion_finds_the_foot_of_a_normal_offset(seed):
    # Exact answer: a point moved along the normal by less than the radius of
    # curvature has its foot where it started (The NURBS Book sec. 6.1, eq. 6.3).
    _, surf = random_geomdl_nurbs(seed + 40, degrees=(3, 3), counts=(6, 6))
    rng = np.random.default_rng(seed)
    u, v = rng.uniform(0.05, 0.95, 200), rng.uniform(0.05, 0.95, 200)
    field = geometry.nurbs.curvature_at(surf, u, v)
    radius = 1.0 / np.maximum(field.max_abs, 1e-9)
    offset = 0.2 * np.minimum(radius, 5.0) * rng.choice([-1.0, 1.0], 200)
    targets = field.points + offset[:, None] * field.normals
    start_u = np.clip(u + rng.normal(scale=0.01, size=200), 0, 1)
    start_v = np.clip(v + rng.normal(scale=0.01, size=200), 0, 1)
    fu, fv = invert(surf.pack, 0, targets, start_u, start_v)
    assert_allclose(fu, u, atol=1e-9)
    assert_allclose(fv, v, atol=1e-9)


@pytest.mark.parametrize("seed", range(3))
def test_inversion_hands_back_the_derivatives_at_its_foot(seed):
    # The foot's derivatives come from the last Newton iteration: they must be
    # the evaluator's own at the returned parameters (which geomdl checks
    # above), and the foot of a point moved along the normal is where it
    # started (The NURBS Book sec. 6.1, eq. 6.3).
    _, surf = random_geomdl_nurbs(seed + 60, degrees=(3, 2), counts=(7, 5))
    rng = np.random.default_rng(seed)
    u, v = rng.uniform(0.05, 0.95, 150), rng.uniform(0.05, 0.95, 150)
    field = geometry.nurbs.curvature_at(surf, u, v)
    offset = 0.1 * np.minimum(1.0 / np.maximum(field.max_abs, 1e-9), 5.0)
    targets = field.points + offset[:, None] * field.normals
    orders = rng.integers(0, 4, 150)
    start_u = np.clip(u + rng.normal(scale=0.01, size=150), 0, 1)
    start_v = np.clip(v + rng.normal(scale=0.01, size=150), 0, 1)
    fu, fv, ders = invert_with_derivatives(surf.pack, 0, targets, start_u, start_v, orders)
    assert ders.shape == (4, 4, 150, 3)
    assert_allclose(fu, u, atol=1e-9)
    assert_allclose(fv, v, atol=1e-9)
    reference = derivatives(surf.pack, np.zeros(150, dtype=int), fu, fv, 3)
    for k in range(4):
        for m in range(4 - k):
            asked = orders >= k + m
            assert_allclose(ders[k, m][asked], reference[k, m][asked], rtol=1e-13, atol=1e-13)
            assert not ders[k, m][~asked].any()
    with pytest.raises(ValueError, match="orders"):
        invert_with_derivatives(surf.pack, 0, targets[:2], u[:2], v[:2], 4)
