"""The batched measuring at the shared edge against the straightforward one seam at a time.

Each seeded random join (a tilting join with random angles, a plane tangent to a
cylinder of random radius, a dihedral of random angle) is measured twice: with
its shared edge as the file would give it (every seam of the model batched,
measured between the surfaces at the edge) and by geometric matching alone (one
seam at a time, boundary to boundary, :class:`geometry.seams.measures.SeamGeometry`).
Where the faces meet, both definitions agree, so the figures must too.
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from geometry.model import Edge, EdgeUse, Model
from geometry.seams import SeamTolerance, check_seams
from tests.test_seams_shapes import dihedral, plane_on_cylinder, tilting_join

TOL = SeamTolerance(name="test", crease_deg=None)
ANGLE_DEG = 1e-7
RELATIVE = 1e-7


def _with_shared_edge(model: Model, samples: int = 33) -> Model:
    """The model with its seam (face 0's side u = 1 against face 1's side u = 0) as a file edge."""
    t = np.linspace(0.0, 1.0, samples)
    uv_a = np.stack([np.ones_like(t), t], 1)
    uv_b = np.stack([np.zeros_like(t), t], 1)
    points = model.faces[0].surface.points_at(uv_a[:, 0], uv_a[:, 1])
    return Model(model.faces, (Edge(points, (EdgeUse(0, uv_a), EdgeUse(1, uv_b))),))


def _random_joins(seed: int) -> list[Model]:
    rng = np.random.default_rng(seed)
    b0, b1, b2 = rng.uniform(-0.2, 0.2, 3)
    return [
        tilting_join(b0, b1, b2, length=rng.uniform(5.0, 40.0)),
        plane_on_cylinder(rng.uniform(2.0, 50.0)),
        dihedral(rng.uniform(0.5, 150.0)),
    ]


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_batched_at_the_edge_equals_one_seam_at_a_time(seed):
    for model in _random_joins(seed):
        (batched,) = check_seams(_with_shared_edge(model), TOL, geometry=False).seams
        (single,) = check_seams(model, TOL, topology=False).seams
        assert batched.source == "topology" and single.source == "geometry"
        assert batched.worst["gap"].value < 1e-9 and single.worst["gap"].value < 1e-9
        assert_allclose(batched.length, single.length, rtol=1e-9)
        assert abs(batched.worst["angle"].value - single.worst["angle"].value) < ANGLE_DEG
        assert abs(batched.angle_min - single.angle_min) < ANGLE_DEG
        for key in ("curvature_jump", "curvature_jump_rel"):
            assert_allclose(batched.worst[key].value, single.worst[key].value, rtol=RELATIVE, atol=1e-12)
        assert_allclose(batched.curvature_a, single.curvature_a, rtol=RELATIVE, atol=1e-12)
        assert batched.continuity == single.continuity
        assert batched.orientation_consistent == single.orientation_consistent


def test_many_seams_in_one_batch_equal_each_alone():
    models = [_with_shared_edge(m) for seed in (4, 5) for m in _random_joins(seed)]
    # All joins side by side in one model: one batch measures every seam.
    faces, edges = [], []
    for m in models:
        base = len(faces)
        faces += m.faces
        (edge,) = m.edges
        edges.append(Edge(edge.points, tuple(EdgeUse(u.face + base, u.uv) for u in edge.uses)))
    together = check_seams(Model(tuple(faces), tuple(edges)), TOL, geometry=False).seams
    alone = [check_seams(m, TOL, geometry=False).seams[0] for m in models]
    assert len(together) == len(alone)
    for a, b in zip(together, alone, strict=True):
        for key in ("gap", "angle", "curvature_jump_rel"):
            assert_allclose(a.worst[key].value, b.worst[key].value, rtol=1e-12, atol=1e-12)
