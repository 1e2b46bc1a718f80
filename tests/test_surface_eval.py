"""Surface points and derivatives against geomdl (reference library)."""

import numpy as np
import pytest
from numpy.testing import assert_allclose

from geometry import SurfaceError
from geometry.nurbs import NurbsSurface
from tests.surface_factories import random_geomdl_nurbs

ATOL = 1e-9


@pytest.mark.parametrize("seed", range(4))
@pytest.mark.parametrize("rational", [True, False])
def test_derivatives_match_geomdl(seed, rational):
    # geomdl 5.4 NURBS.Surface.derivatives (The NURBS Book A3.6 / A4.4) up to order 2.
    geo, ours = random_geomdl_nurbs(seed, rational=rational)
    rng = np.random.default_rng(seed)
    uv = np.vstack([rng.uniform(0, 1, (12, 2)), [[0, 0], [1, 1], [0, 1]], [[geo.knotvector_u[4], 0.3]]])
    scattered = ours.derivatives_at(uv[:, 0], uv[:, 1], 2)
    for i, (u, v) in enumerate(uv):
        ref = geo.derivatives(u, v, 2)
        grid = ours.derivatives_grid(np.array([u]), np.array([v]), 2)
        for k in range(3):
            for l in range(3 - k):
                expected = np.asarray(ref[k][l], dtype=float)
                scale = 1.0 + np.abs(expected).max()
                assert_allclose(scattered[k, l, i], expected, atol=ATOL * scale)
                assert_allclose(grid[k, l, 0, 0], expected, atol=ATOL * scale)


def test_grid_and_scattered_agree_to_third_order():
    _, ours = random_geomdl_nurbs(11, degrees=(3, 3), counts=(7, 6))
    u = np.linspace(0, 1, 13)
    v = np.linspace(0, 1, 9)
    grid = ours.derivatives_grid(u, v, 3)
    uu, vv = np.meshgrid(u, v, indexing="ij")
    scat = ours.derivatives_at(uu.ravel(), vv.ravel(), 3).reshape(4, 4, 13, 9, 3)
    assert_allclose(grid, scat, atol=1e-8 * np.abs(grid).max())


def test_third_derivative_of_polynomial_matches_finite_difference_of_second():
    # Independent check of S_uuu: central difference of the exact S_uu (step h, error O(h^2)).
    _, ours = random_geomdl_nurbs(5, degrees=(3, 3), counts=(4, 4), rational=False)  # a Bezier patch
    u, v, h = np.array([0.4]), np.array([0.6]), 1e-5
    d = ours.derivatives_at(u, v, 3)
    fd = (ours.derivatives_at(u + h, v, 2)[2, 0] - ours.derivatives_at(u - h, v, 2)[2, 0]) / (2 * h)
    assert_allclose(d[3, 0], fd, rtol=1e-6)


def _net(nu=4, nv=4):
    x, y = np.meshgrid(np.arange(nu, dtype=float), np.arange(nv, dtype=float), indexing="ij")
    return np.stack([x, y, np.zeros_like(x)], axis=-1)


KNOTS = [0, 0, 0, 0, 1, 1, 1, 1.0]


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"knots_u": [0, 0, 0, 1, 0.5, 1, 1, 1]}, "non-decreasing"),
        ({"knots_u": [0, 0, 0, 1, 1, 1]}, "need 8 knots"),
        ({"weights": -np.ones((4, 4))}, "positive"),
        ({"poles": np.full((4, 4, 3), np.nan)}, "NaN"),
        ({"degree_u": 0}, "degree"),
        ({"degree_u": 30}, "degree"),
        ({"degree_u": 5}, "at least 6 poles"),
        ({"knots_u": [0, 0, 0, 0, 0, 0, 0, 0.0]}, "empty"),
        ({"poles": np.zeros((4, 4))}, "shape"),
    ],
)
def test_invalid_definitions_are_refused_with_a_reason(kwargs, message):
    args = {"degree_u": 3, "degree_v": 3, "knots_u": KNOTS, "knots_v": KNOTS, "poles": _net(), "weights": None}
    args.update(kwargs)
    with pytest.raises(SurfaceError, match=message):
        NurbsSurface(**args)


def test_arrays_are_read_only():
    s = NurbsSurface(3, 3, KNOTS, KNOTS, _net())
    with pytest.raises(ValueError):
        s.poles[0, 0, 0] = 1.0


def test_unclamped_periodic_surface_closes_smoothly():
    # A closed tube: uniform unclamped cubic in u with the first three poles wrapped
    # round (the standard periodic construction, e.g. The NURBS Book sec. 12.2 from
    # memory). Both ends of the u domain meet with equal first and second derivatives.
    n_ring, p = 8, 3
    angles = 2 * np.pi * np.arange(n_ring) / n_ring
    ring = np.column_stack([20 * np.cos(angles), 12 * np.sin(angles)])
    ring = np.vstack([ring, ring[:p]])  # wrap
    poles = np.zeros((ring.shape[0], 2, 3))
    poles[:, :, :2] = ring[:, None, :]
    poles[:, 1, 2] = 30.0
    knots_u = np.arange(ring.shape[0] + p + 1, dtype=float)
    s = NurbsSurface(p, 1, knots_u, [0, 0, 1, 1.0], poles)
    (u0, u1), _ = s.domain
    d = s.derivatives_at(np.array([u0, u1]), np.array([0.4, 0.4]), 2)
    for k in range(3):
        assert_allclose(d[k, 0, 0], d[k, 0, 1], atol=1e-12)
