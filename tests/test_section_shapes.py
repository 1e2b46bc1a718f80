"""The exact forms of tests/shapes.py against the implicit equations of the shapes they build."""

from __future__ import annotations

import numpy as np
from numpy.testing import assert_allclose
from shapes import cubic_sweep, cylinder, sphere, torus

from geometry.nurbs import NurbsSurface

SHAPE_TOL = 1e-12


def _grid_points(surface: NurbsSurface, n: int = 23) -> np.ndarray:
    (u0, u1), (v0, v1) = surface.domain
    return surface.points_grid(np.linspace(u0, u1, n), np.linspace(v0, v1, n)).reshape(-1, 3)


def test_cylinder_form_is_exact():
    p = _grid_points(cylinder(3.0, -1.0, 2.0))
    assert_allclose(np.hypot(p[:, 0], p[:, 1]), 3.0, rtol=SHAPE_TOL)


def test_sphere_form_is_exact():
    assert_allclose(np.linalg.norm(_grid_points(sphere(2.5)), axis=1), 2.5, rtol=SHAPE_TOL)


def test_torus_form_is_exact():
    p = _grid_points(torus(5.0, 1.5))
    assert_allclose(np.hypot(np.hypot(p[:, 0], p[:, 1]) - 5.0, p[:, 2]), 1.5, rtol=SHAPE_TOL)


def test_cubic_sweep_form_is_exact():
    p = _grid_points(cubic_sweep())
    assert_allclose(p[:, 2], p[:, 0] ** 3 - p[:, 0], atol=SHAPE_TOL)
