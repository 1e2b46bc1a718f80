"""Trims, orientation, shared edges and placements as the kernel's BRep gives them.

Facts checked are those of the shapes themselves (common practice for a BRep
solid): a box has 6 faces and 12 edges, each between two faces; a sphere's
only non-degenerate edge is its seam; a plate with a through-hole has trimmed
planar faces whose hole is outside the face; every face of a closed solid has
its normal pointing out.
"""

from __future__ import annotations

import numpy as np
import pytest
from test_io_support import box, plate_with_hole, sphere, write_iges, write_step

from geometry.io import read_model
from geometry.nurbs import curvature_at

EDGE_ATOL_MM = 1e-9


def _check_uses_on_edges(model):
    for edge in model.edges:
        for use in edge.uses:
            on_face = model.faces[use.face].surface.points_at(use.uv[:, 0], use.uv[:, 1])
            np.testing.assert_allclose(on_face, edge.points, atol=EDGE_ATOL_MM)


def test_box_edges_join_two_faces(tmp_path):
    model = read_model(write_step(box(10, 20, 30), tmp_path / "box.step"))
    assert len(model.faces) == 6
    assert len(model.edges) == 12
    assert all(len(set(e.faces)) == 2 for e in model.edges)
    assert sorted(round(e.length, 9) for e in model.edges) == [10.0] * 4 + [20.0] * 4 + [30.0] * 4
    _check_uses_on_edges(model)


def test_normals_point_out_of_the_solid(tmp_path):
    model = read_model(write_step(box(10, 20, 30), tmp_path / "box.step"))
    centre = np.array([5.0, 10.0, 15.0])
    for face in model.faces:
        (u0, u1), (v0, v1) = face.surface.domain
        field = curvature_at(face.surface, np.array([(u0 + u1) / 2]), np.array([(v0 + v1) / 2]), face.reversed)
        assert np.dot(field.normals[0], field.points[0] - centre) > 0


def test_sphere_seam_is_one_face_twice(tmp_path):
    model = read_model(write_step(sphere(5.0), tmp_path / "sphere.step"))
    assert len(model.edges) == 1
    seam = model.edges[0]
    assert seam.faces == (0, 0)
    # The two uses run along opposite ends of the periodic direction.
    (u0, u1), _ = model.faces[0].surface.domain
    assert sorted(float(use.uv[:, 0].mean()) for use in seam.uses) == pytest.approx([u0, u1], abs=1e-9)
    _check_uses_on_edges(model)


def test_plate_with_hole_is_trimmed(tmp_path):
    model = read_model(write_step(plate_with_hole(), tmp_path / "plate.step"))
    holed = [f for f in model.faces if len(f.loops) == 2]
    assert len(holed) == 2  # top and bottom
    for face in holed:
        s = face.surface
        # Parameters of the hole's centre and of a point between hole and rim.
        centre_uv = _uv_of(face, np.array([20.0, 20.0]))
        solid_uv = _uv_of(face, np.array([20.0, 32.0]))
        assert not face.inside(*centre_uv)
        assert face.inside(*solid_uv)
        assert s.degree_u == 1 and s.degree_v == 1
    _check_uses_on_edges(model)
    # A closed solid: every edge has two sides, two faces or the hole's seam twice.
    assert all(len(e.uses) == 2 for e in model.edges)
    assert sum(len(set(e.faces)) == 1 for e in model.edges) == 1


def _uv_of(face, xy):
    """(u, v) of the point above xy on a planar face (degree-1 net: bilinear in u, v)."""
    from geometry.model import closest_parameters

    z = face.surface.poles[0, 0, 2]
    (u0, u1), (v0, v1) = face.surface.domain
    u, v = closest_parameters(face.surface, np.array([[*xy, z]]), [(u0 + u1) / 2], [(v0 + v1) / 2])
    return u[0], v[0]


def test_assembly_placements_applied(tmp_path):
    """Two placed instances of one solid in a compound: both appear, each where it was put."""
    from OCP.BRep import BRep_Builder
    from OCP.gp import gp_Trsf, gp_Vec
    from OCP.TopLoc import TopLoc_Location
    from OCP.TopoDS import TopoDS_Compound

    part = box(1, 2, 3)
    builder, compound = BRep_Builder(), TopoDS_Compound()
    builder.MakeCompound(compound)
    for offset in ((0, 0, 0), (100, 0, 0)):
        trsf = gp_Trsf()
        trsf.SetTranslation(gp_Vec(*offset))
        builder.Add(compound, part.Moved(TopLoc_Location(trsf)))
    for path in (write_step(compound, tmp_path / "pair.step"), write_iges(compound, tmp_path / "pair.igs")):
        model = read_model(path)
        assert len(model.faces) == 12
        np.testing.assert_allclose(model.bounds, [[0, 0, 0], [101, 2, 3]], atol=1e-9)
        assert len({f.body for f in model.faces}) == (2 if path.endswith("step") else 1)


def test_iges_loose_faces_get_shared_edges(tmp_path):
    """IGES faces mode writes loose trimmed surfaces; the reader recovers the box's 12 shared edges."""
    model = read_model(write_iges(box(10, 20, 30), tmp_path / "box.igs"))
    assert len(model.edges) == 12
    assert all(len(set(e.faces)) == 2 for e in model.edges)
    _check_uses_on_edges(model)


def _two_squares(gap: float):
    from OCP.BRep import BRep_Builder
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace
    from OCP.gp import gp_Pln
    from OCP.TopoDS import TopoDS_Compound

    builder, compound = BRep_Builder(), TopoDS_Compound()
    builder.MakeCompound(compound)
    builder.Add(compound, BRepBuilderAPI_MakeFace(gp_Pln(), 0.0, 10.0, 0.0, 10.0).Face())
    builder.Add(compound, BRepBuilderAPI_MakeFace(gp_Pln(), 10.0 + gap, 20.0, 0.0, 10.0).Face())
    return compound


def test_iges_gap_is_not_sewn_shut(tmp_path):
    """A 0.02 mm gap stays a gap (SEW_TOLERANCE_MM is far below it); touching faces share their edge."""
    touching = read_model(write_iges(_two_squares(0.0), tmp_path / "touching.igs"))
    assert sum(len(set(e.faces)) == 2 for e in touching.edges) == 1
    gapped = read_model(write_iges(_two_squares(0.02), tmp_path / "gapped.igs"))
    assert not any(len(set(e.faces)) == 2 for e in gapped.edges)
    assert len(gapped.faces) == 2


def test_sewn_edges_sampled_from_their_source_edges_match_a_fresh_sampling(monkeypatch):
    """Seeding a sewn edge with its source edge's sampling saves work and changes no point (bundled IGES sample)."""
    from pathlib import Path

    from geometry.kernel import occt_curves
    from geometry.kernel.iges import read_iges

    path = str(Path(__file__).parents[1] / "sample_surfaces" / "console_lid.igs")
    seeded, _ = read_iges(path)
    monkeypatch.setattr(occt_curves.EdgeParams, "seed", lambda self, edge, ts: None)
    fresh, _ = read_iges(path)
    assert len(seeded.edges) == len(fresh.edges) > 0
    assert sum(len(e.uses) == 2 for e in seeded.edges) > 0
    for a, b in zip(seeded.edges, fresh.edges, strict=True):
        assert a.points.shape == b.points.shape
        np.testing.assert_allclose(a.points, b.points, rtol=0, atol=1e-9)
        for ua, ub in zip(a.uses, b.uses, strict=True):
            np.testing.assert_allclose(ua.uv, ub.uv, rtol=0, atol=1e-12)
