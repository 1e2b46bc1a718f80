"""The batched evaluator against the test-only naive one (tests/naive_nurbs.py), to third order.

Random rational surfaces (seeded) with repeated interior knots, compared point by
point; and at interior knots, both sides: a degree-p spline with a knot of
multiplicity m has continuous derivatives up to order p - m there and a jump in
order p - m + 1 (de Boor, A Practical Guide to Splines, rev. ed. 2001, ch. IX;
quoted from memory). The jump the fast evaluator shows across the knot must be the
naive evaluator's right limit minus its left limit.
"""

from __future__ import annotations

import numpy as np
import pytest
from naive_nurbs import surface_derivatives
from numpy.testing import assert_allclose

from geometry.nurbs import NurbsSurface

ORDER = 3
RTOL = 1e-9
# Parameter step either side of a knot, relative to the domain: small enough that the
# continuous derivatives move by O(step), large enough to land in the neighbouring span.
KNOT_STEP = 1e-9


def _surface(seed: int, degrees=(3, 3), rational=True, multiplicity=1) -> NurbsSurface:
    rng = np.random.default_rng(seed)
    p, q = degrees
    inner_u = np.repeat(np.sort(rng.uniform(0.2, 0.8, 2)), [multiplicity, 1])
    inner_v = np.sort(rng.uniform(0.2, 0.8, 2))
    knots_u = np.concatenate([np.zeros(p + 1), inner_u, np.ones(p + 1)])
    knots_v = np.concatenate([np.zeros(q + 1), inner_v, np.ones(q + 1)])
    nu, nv = knots_u.size - p - 1, knots_v.size - q - 1
    poles = rng.normal(scale=10.0, size=(nu, nv, 3))
    poles[..., 0] += np.arange(nu)[:, None] * 20.0
    poles[..., 1] += np.arange(nv)[None, :] * 20.0
    weights = rng.uniform(0.5, 2.0, size=(nu, nv)) if rational else None
    return NurbsSurface(p, q, knots_u, knots_v, poles, weights)


def _scale(ders: np.ndarray) -> np.ndarray:
    """Per-derivative magnitude for tolerances, shape (order + 1, order + 1, 1)."""
    return np.maximum(np.linalg.norm(ders, axis=-1, keepdims=True), 1.0)


@pytest.mark.parametrize("seed", range(4))
def test_rational_derivatives_to_third_order_match_the_naive_evaluator(seed):
    surface = _surface(seed, degrees=(3, 2) if seed % 2 else (3, 3), multiplicity=2)
    rng = np.random.default_rng(100 + seed)
    uv = np.vstack([rng.uniform(0, 1, (8, 2)), [[0, 0], [1, 1], [0, 1], [surface.knots_u[4], 0.5]]])
    fast = surface.derivatives_at(uv[:, 0], uv[:, 1], ORDER)  # (4, 4, k, 3)
    for i, (u, v) in enumerate(uv):
        slow = surface_derivatives(surface, u, v, ORDER)
        for k in range(ORDER + 1):
            for l in range(ORDER + 1 - k):
                assert_allclose(fast[k, l, i], slow[k, l], rtol=RTOL, atol=RTOL * _scale(slow)[k, l, 0])


@pytest.mark.parametrize("multiplicity", [1, 2, 3])
def test_both_sides_of_an_interior_knot(multiplicity):
    p = 3
    surface = _surface(7, degrees=(p, 2), rational=False, multiplicity=multiplicity)
    knot = float(surface.knots_u[p + 1])
    v = 0.37
    smooth = p - multiplicity  # derivatives in u up to this order are continuous
    u = np.array([knot - KNOT_STEP, knot + KNOT_STEP])
    fast = surface.derivatives_at(u, np.full(2, v), ORDER)
    left = surface_derivatives(surface, knot, v, ORDER, side="left")
    right = surface_derivatives(surface, knot, v, ORDER, side="right")
    scale = _scale(right)
    for k in range(ORDER + 1):
        # a step of KNOT_STEP moves a continuous derivative by at most about KNOT_STEP times the next one
        tol = 1e-6 * scale[min(k + 1, ORDER), 0, 0]
        assert_allclose(fast[k, 0, 0], left[k, 0], atol=tol)
        assert_allclose(fast[k, 0, 1], right[k, 0], atol=tol)
        jump = np.linalg.norm(right[k, 0] - left[k, 0])
        if k <= smooth:
            assert jump <= 1e-9 * scale[k, 0, 0]
        elif k == smooth + 1:
            assert jump > 1e-3 * scale[k, 0, 0]  # a generic net: the first discontinuous derivative jumps
