"""Basis functions (the compiled ones every evaluation uses) against published values and scipy's B-splines."""

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy.interpolate import BSpline

from geometry.nurbs.basis import basis_matrices
from geometry.nurbs.compiled_eval import basis_rows

RTOL = 1e-12
ATOL = 1e-12


def test_nurbs_book_examples_2_3_and_2_4():
    # The NURBS Book (Piegl & Tiller, 2nd ed.), Ex. 2.3 (values) and Ex. 2.4
    # (first derivatives) at u = 5/2 on U = {0,0,0,1,2,3,4,4,5,5,5}, p = 2:
    # N_{2,2} = 1/8, N_{3,2} = 6/8, N_{4,2} = 1/8; N'_{2,2} = -1/2, N'_{3,2} = 0,
    # N'_{4,2} = 1/2. Quoted from memory, hence the scipy cross-check below.
    knots = np.array([0, 0, 0, 1, 2, 3, 4, 4, 5, 5, 5], float)
    m = basis_matrices(knots, 2, 8, np.array([2.5]), 1)
    expected_values = np.array([0, 0, 1 / 8, 6 / 8, 1 / 8, 0, 0, 0])
    expected_slopes = np.array([0, 0, -0.5, 0, 0.5, 0, 0, 0])
    assert_allclose(m[0, 0], expected_values, atol=ATOL)
    assert_allclose(m[1, 0], expected_slopes, atol=ATOL)
    ref = BSpline.design_matrix(np.array([2.5]), knots, 2).toarray()
    assert_allclose(m[0], ref, atol=ATOL)


def test_span_of_domain_end_and_repeated_knots():
    knots = np.array([0, 0, 0, 1, 2, 2, 3, 3, 3], float)  # p = 2, n = 6
    _, spans = basis_rows(knots, 2, 6, np.array([0.0, 1.0, 2.0, 2.5, 3.0]), 0)
    # A point on a knot belongs to the span to its right; the end to the last span.
    assert spans.tolist() == [2, 3, 5, 5, 5]


def _random_knots(rng, degree, n_poles, repeat_interior):
    inner = np.sort(rng.uniform(0, 1, n_poles - degree - 1))
    if repeat_interior and inner.size >= 3:
        mult = min(3, degree)  # a knot of multiplicity up to 3, at most the degree
        inner[1:mult] = inner[0]
        inner = np.sort(inner)
    return np.concatenate([np.zeros(degree + 1), inner, np.ones(degree + 1)])


@pytest.mark.parametrize("degree", [1, 2, 3, 4, 5])
@pytest.mark.parametrize("repeat", [False, True])
def test_against_scipy_bspline_values_and_derivatives(degree, repeat):
    # Reference library: scipy.interpolate.BSpline (de Boor's recurrence), per basis function.
    rng = np.random.default_rng(100 + degree + 10 * repeat)
    n = degree + 7
    knots = _random_knots(rng, degree, n, repeat)
    u = np.concatenate([rng.uniform(0, 1, 40), knots[degree + 1 : n]])  # include the knots themselves
    order = min(3, degree)
    mine = basis_matrices(knots, degree, n, u, order)
    for i in range(n):
        coef = np.zeros(n)
        coef[i] = 1.0
        spline = BSpline(knots, coef, degree, extrapolate=False)
        for d in range(order + 1):
            ref = spline(u, nu=d)
            # At a knot the derivative is one-sided; scipy and we both take the right side,
            # except where the right-side interval has zero length.
            ok = np.isfinite(ref)
            assert_allclose(mine[d, ok, i], ref[ok], rtol=1e-9, atol=1e-9 * 10**d)


def test_partition_of_unity_and_derivatives_sum_to_zero():
    # Partition of unity (NURBS Book P2.4): sum_i N_i = 1, so sum_i N_i^(k) = 0.
    rng = np.random.default_rng(7)
    knots = _random_knots(rng, 3, 12, True)
    u = np.linspace(0, 1, 301)
    m = basis_matrices(knots, 3, 12, u, 3)
    assert_allclose(m[0].sum(axis=1), 1.0, atol=1e-13)
    assert_allclose(m[1:].sum(axis=2), 0.0, atol=1e-8)


def test_unclamped_periodic_knots():
    # Uniform unclamped cubic: on each span the non-zero functions are the uniform
    # cubic B-spline pieces (1-t)^3/6, (3t^3-6t^2+4)/6, (-3t^3+3t^2+3t+1)/6, t^3/6
    # (common practice; e.g. Farin, Curves and Surfaces for CAGD, 5th ed., sec. 7.x from memory).
    knots = np.arange(11, dtype=float)  # n = 7, p = 3, domain [3, 7]
    t = np.array([0.0, 0.3, 0.75])
    ders, spans = basis_rows(knots, 3, 7, 4 + t, 0)
    expected = np.column_stack([(1 - t) ** 3, 3 * t**3 - 6 * t**2 + 4, -3 * t**3 + 3 * t**2 + 3 * t + 1, t**3]) / 6
    assert_allclose(ders[:, 0], expected, atol=1e-14)
    assert spans.tolist() == [4, 4, 4]


def test_derivatives_above_degree_are_zero():
    knots = np.array([0, 0, 1, 2, 2], float)
    m = basis_matrices(knots, 1, 3, np.array([0.5, 1.5]), 3)
    assert np.all(m[2:] == 0)
