"""geometry.vectors against numpy's own cross and dot (the reference), in both component layouts."""

import numpy as np
from numpy.testing import assert_allclose

from geometry.vectors import cross, dot, norm, unit

TOL = 1e-12


def test_components_last_and_first_agree_with_numpy():
    rng = np.random.default_rng(7)
    a, b = rng.normal(size=(2, 50, 3))
    assert_allclose(dot(a, b), np.einsum("ij,ij->i", a, b), rtol=TOL)
    assert_allclose(cross(a, b), np.cross(a, b), rtol=TOL, atol=TOL)
    assert_allclose(dot(a.T, b.T, axis=0), np.einsum("ij,ij->i", a, b), rtol=TOL)
    assert_allclose(cross(a.T, b.T, axis=0), np.cross(a, b).T, rtol=TOL, atol=TOL)
    assert_allclose(norm(a), np.linalg.norm(a, axis=1), rtol=TOL)
    assert_allclose(np.linalg.norm(unit(a.T, axis=0), axis=0), 1.0, rtol=TOL)


def test_unit_keeps_zero_vectors_zero_and_writes_in_place():
    assert_allclose(unit(np.zeros((2, 3))), 0.0)
    out = np.empty(4)
    a = np.ones((4, 3))
    assert dot(a, 2 * a, out=out) is out
    assert_allclose(out, 6.0)
