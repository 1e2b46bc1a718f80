"""Trim-aware sampling: budgets, densities, masks and the display mesh.

Expected values are facts of the shapes: a planar bilinear patch's mesh area is
its exact area; a square plate with a round hole has area s^2 - pi r^2 (cells
are kept only when all four corners are inside, so the mesh area is below that
by at most one cell row along the boundary: perimeter x cell diagonal).
"""

from __future__ import annotations

import numpy as np
import pytest
from test_io_support import plate_with_hole, write_step

from geometry.io import read_model
from geometry.kernel.occt_curves import EDGE_CHORD_MM
from geometry.model import Face, Model
from geometry.model.sampling import DEFAULT_BUDGET, face_grid, model_grids, trimmed_mesh
from geometry.nurbs import NurbsSurface


def _patch(size: float, bump: float, offset: float = 0.0, seed: int = 0) -> Face:
    rng = np.random.default_rng(seed)
    n = 5
    x, y = np.meshgrid(np.linspace(0, size, n), np.linspace(0, size, n), indexing="ij")
    z = bump * rng.uniform(-1, 1, (n, n))
    poles = np.stack([x + offset, y, z], axis=2)
    knots = [0, 0, 0, 0, 0.5, 1, 1, 1, 1]
    return Face(NurbsSurface(3, 3, knots, knots, poles))


def _forty_faces() -> Model:
    faces = [_patch(size=20.0 + 10.0 * (i % 7), bump=0.5 * (i % 5), offset=100.0 * i, seed=i) for i in range(40)]
    return Model(tuple(faces))


def test_forty_face_model_opens_at_a_few_hundred_thousand_samples():
    grids = model_grids(_forty_faces())
    total = sum(g.inside.size for g in grids)
    assert 0.5 * DEFAULT_BUDGET <= total <= DEFAULT_BUDGET
    assert len(grids) == 40


def test_density_follows_size_and_bending():
    small, big = _patch(20.0, 0.0), _patch(60.0, 0.0, seed=0)
    flat, bent = _patch(40.0, 0.0, seed=1), _patch(40.0, 12.0, seed=1)
    grids = model_grids(Model((small, big, flat, bent)), budget=40_000)
    counts = [g.inside.size for g in grids]
    assert counts[1] > 4 * counts[0]  # three times the width, about nine times the samples
    assert counts[3] > counts[2]


def test_grid_is_inside_the_domain_and_increasing():
    g = face_grid(_patch(30.0, 2.0), 5000)
    assert np.all(np.diff(g.u) > 0) and np.all(np.diff(g.v) > 0)
    assert g.u[0] == pytest.approx(0.0, abs=1e-8) and g.u[-1] == pytest.approx(1.0, abs=1e-8)
    assert g.inside.all() and not g.inside.flags.writeable


def test_plane_mesh_area_is_exact():
    poles = np.array([[[0, 0, 0], [0, 3, 0]], [[2, 0, 0], [2, 3, 0]]], float)
    face = Face(NurbsSurface(1, 1, [0, 0, 1, 1], [0, 0, 1, 1], poles))
    points, tris = trimmed_mesh(face, face_grid(face, 400))
    assert _area(points, tris) == pytest.approx(6.0, rel=1e-8)  # end samples sit 1e-9 inside
    assert np.all(_normals(points, tris)[:, 2] > 0)  # Su x Sv = +z
    reversed_face = Face(face.surface, reversed=True)
    points, tris = trimmed_mesh(reversed_face, face_grid(reversed_face, 400))
    assert np.all(_normals(points, tris)[:, 2] < 0)


def test_trimmed_plate_mask_and_mesh(tmp_path):
    size, radius = 40.0, 5.0
    model = read_model(write_step(plate_with_hole(size, 10.0, radius), tmp_path / "plate.step"))
    top = max((f for f in model.faces if len(f.loops) == 2), key=lambda f: f.surface.poles[0, 0, 2])
    grid = face_grid(top, 20_000)
    points, tris = trimmed_mesh(top, grid)
    exact = size**2 - np.pi * radius**2
    cell = np.hypot(*(np.ptp(top.surface.poles.reshape(-1, 3)[:, :2], axis=0) / (np.array(grid.inside.shape) - 1)))
    area = _area(points, tris)
    assert exact - 2 * np.pi * radius * cell * 2 <= area <= exact
    centre = np.array([size / 2, size / 2])
    # The trim polygon's chords stay within EDGE_CHORD_MM of the hole's circle.
    assert np.all(np.linalg.norm(points[:, :2] - centre, axis=1) >= radius - EDGE_CHORD_MM)
    assert 0 < grid.count < grid.inside.size


def _area(points, tris):
    return 0.5 * np.linalg.norm(_normals(points, tris), axis=1).sum()


def _normals(points, tris):
    a, b, c = points[tris[:, 0]], points[tris[:, 1]], points[tris[:, 2]]
    return np.cross(b - a, c - a)
