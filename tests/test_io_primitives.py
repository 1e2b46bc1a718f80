"""Exact primitives written by the kernel's STEP and IGES writers, read back and probed.

Expected curvatures: do Carmo, *Differential Geometry of Curves and Surfaces*
(1976), sec. 3-3: sphere of radius R, k1 = k2 = 1/R (Example 1 of 3-3 and
3-2); right circular cylinder, principal curvatures 1/R and 0 (sec. 3-2,
Example 2 / 3-3); torus with tube radius r and centre-circle radius R,
K = cos(phi) / (r (R + r cos phi)) (sec. 3-3, Example 4), phi measured from the
outer equator. Signs follow Batten's convention (DEVELOPERS.md): II = S_ij . n,
so with the outward normals of a solid's faces the curvatures are negative.
"""

from __future__ import annotations

import numpy as np
import pytest
from test_io_support import cylinder, sphere, torus, write_iges, write_step

from geometry.io import read_model
from geometry.model import probe_point

# Probed at parameters refined to ~1e-15 on exact rational surfaces: only the
# rounding of the written file and of the evaluation remain.
CURVATURE_RTOL = 1e-8
POINT_ATOL_MM = 1e-8

WRITERS = {"step": write_step, "iges": write_iges}


@pytest.fixture(params=sorted(WRITERS))
def fmt(request):
    return request.param


def _read(shape, tmp_path, fmt, name):
    return read_model(WRITERS[fmt](shape, tmp_path / f"{name}.{fmt}"))


def test_sphere_curvature(tmp_path, fmt):
    radius = 12.5
    model = _read(sphere(radius), tmp_path, fmt, "sphere")
    rng = np.random.default_rng(7)
    for direction in rng.normal(size=(5, 3)):
        d = direction / np.linalg.norm(direction)
        res = probe_point(model, 1.3 * radius * d)
        np.testing.assert_allclose(res.point, radius * d, atol=POINT_ATOL_MM)
        np.testing.assert_allclose(res.normal, d, atol=1e-9)  # outward: the solid's face orientation
        np.testing.assert_allclose([res.k1, res.k2], [-1 / radius, -1 / radius], rtol=CURVATURE_RTOL)
        np.testing.assert_allclose(res.gaussian, 1 / radius**2, rtol=CURVATURE_RTOL)
        assert res.distance == pytest.approx(0.3 * radius, rel=1e-9)


def test_cylinder_curvature(tmp_path, fmt):
    radius, height = 4.0, 30.0
    model = _read(cylinder(radius, height), tmp_path, fmt, "cylinder")
    for angle, z in ((0.3, 5.0), (2.0, 17.0), (4.5, 26.0)):
        d = np.array([np.cos(angle), np.sin(angle), 0.0])
        res = probe_point(model, 1.5 * radius * d + [0, 0, z])
        np.testing.assert_allclose(res.point, radius * d + [0, 0, z], atol=POINT_ATOL_MM)
        np.testing.assert_allclose(res.normal, d, atol=1e-9)
        assert res.k1 == pytest.approx(0.0, abs=1e-10)
        assert res.k2 == pytest.approx(-1 / radius, rel=CURVATURE_RTOL)
        assert res.gaussian == pytest.approx(0.0, abs=1e-10)
        # dir2 (of k2 = -1/R) runs round the circle, dir1 along the axis.
        assert abs(res.dir1[2]) == pytest.approx(1.0, abs=1e-9)


def test_torus_curvature(tmp_path, fmt):
    major, minor = 20.0, 5.0
    model = _read(torus(major, minor), tmp_path, fmt, "torus")
    for theta, phi in ((0.4, 0.0), (1.7, 0.9), (3.0, np.pi / 2), (5.1, 2.5), (2.2, np.pi)):
        ring = major + minor * np.cos(phi)
        outward = np.array([np.cos(phi) * np.cos(theta), np.cos(phi) * np.sin(theta), np.sin(phi)])
        centre = major * np.array([np.cos(theta), np.sin(theta), 0.0])
        res = probe_point(model, centre + 1.2 * minor * outward)
        np.testing.assert_allclose(res.point, centre + minor * outward, atol=POINT_ATOL_MM)
        np.testing.assert_allclose(res.normal, outward, atol=1e-9)
        expected_k = np.sort([-1 / minor, -np.cos(phi) / ring])[::-1]
        np.testing.assert_allclose([res.k1, res.k2], expected_k, rtol=CURVATURE_RTOL, atol=1e-12)
        assert res.gaussian == pytest.approx(np.cos(phi) / (minor * ring), rel=CURVATURE_RTOL, abs=1e-13)


def test_faces_are_exact_nurbs(tmp_path, fmt):
    """Every primitive arrives as one rational NURBS face (common practice: conics are rational)."""
    for name, shape, n_faces in (("sphere", sphere(3.0), 1), ("cylinder", cylinder(2.0, 5.0), 3)):
        model = _read(shape, tmp_path, fmt, name)
        assert len(model.faces) == n_faces
        assert any(f.surface.is_rational for f in model.faces)
