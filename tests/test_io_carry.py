"""Trims and edge uses carried onto the NURBS in one packed call (geometry.io.carry) agree with one face at a time."""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from geometry.io.carry import on_nurbs
from geometry.kernel.occt_model import read_shape
from geometry.kernel.shape import KernelEdge, KernelFace, KernelShape, KernelUse, SurfaceArrays
from geometry.model.probe import closest_parameters

pytest.importorskip("OCP")


def _solids():
    """A cylinder, a cone and a sphere: faces whose NURBS has other (u, v) than the input surface."""
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Fuse
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeCone, BRepPrimAPI_MakeCylinder, BRepPrimAPI_MakeSphere
    from OCP.gp import gp_Ax2, gp_Dir, gp_Pnt

    cylinder = BRepPrimAPI_MakeCylinder(8.0, 20.0).Shape()
    cone = BRepPrimAPI_MakeCone(gp_Ax2(gp_Pnt(30, 0, 0), gp_Dir(0, 0, 1)), 6.0, 2.0, 9.0).Shape()
    sphere = BRepPrimAPI_MakeSphere(gp_Pnt(0, 30, 0), 5.0).Shape()
    return BRepAlgoAPI_Fuse(BRepAlgoAPI_Fuse(cylinder, cone).Shape(), sphere).Shape()


def test_packed_carry_equals_one_face_at_a_time():
    shape = read_shape(_solids())
    moved = [f for f in shape.faces if not f.same_parameters]
    assert len(moved) >= 3
    contents = on_nurbs(shape)
    assert len(contents.faces) == len(shape.faces)
    for kernel_face, face in zip(shape.faces, contents.faces, strict=True):
        for (uv, points), loop in zip(kernel_face.loops, face.loops, strict=False):
            if kernel_face.same_parameters:
                assert_allclose(loop, uv, rtol=0, atol=0)
                continue
            # the straightforward path: this loop alone onto this surface (The NURBS Book, 2nd ed., eq. 6.6)
            u, v = closest_parameters(face.surface, points, uv[:, 0], uv[:, 1])
            assert_allclose(loop, np.stack([u, v], axis=1), atol=1e-9)
            assert_allclose(face.surface.points_at(loop[:, 0], loop[:, 1]), points, atol=1e-6)
    for kernel_edge, edge in zip(shape.edges, contents.edges, strict=True):
        for kernel_use, use in zip(kernel_edge.uses, edge.uses, strict=True):
            surface = contents.faces[use.face].surface
            assert_allclose(surface.points_at(use.uv[:, 0], use.uv[:, 1]), kernel_use.points, atol=1e-6)


def _square(z: float, nan: bool = False) -> SurfaceArrays:
    poles = np.array([[[0, 0, z], [0, 1, z]], [[1, 0, z], [1, 1, z]]], float)
    if nan:
        poles[0, 1, 2] = np.nan
    knots = np.array([0.0, 0, 1, 1])
    return SurfaceArrays(1, 1, knots, knots, poles, None)


def test_a_face_that_is_no_valid_nurbs_is_skipped_and_its_edge_uses_renumbered():
    faces = [
        KernelFace(1, _square(0.0, nan=True), True, False, "bad", "shell 1", "face 1 of 2 in the file ('bad')"),
        KernelFace(2, _square(0.0), True, False, "good", "shell 1", "face 2 of 2 in the file ('good')"),
    ]
    points = np.array([[0.0, 0, 0], [1, 0, 0]])
    uv = np.array([[0.0, 0], [1, 0]])
    edges = [KernelEdge(points, (KernelUse(0, uv, points), KernelUse(1, uv, points)), 1e-7)]
    contents = on_nurbs(KernelShape(faces, edges, [], 2, []))
    assert [f.name for f in contents.faces] == ["good"]
    (edge,) = contents.edges
    assert [use.face for use in edge.uses] == [0]
    (skipped,) = contents.skipped
    assert (skipped.place, skipped.name) == (1, "bad") and "NaN" in skipped.reason
    assert any("face 1 of 2" in w and "skipped" in w and "NaN" in w for w in contents.warnings)
