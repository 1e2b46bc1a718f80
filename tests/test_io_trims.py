"""Trim wires that cannot bound a region, as some exporters write them, built with OCP.

A face is never silently reduced to nothing: a face whose outer wire is open
(one open edge) or encloses no area in (u, v) (a closed edge that runs once
round a periodic surface) is analysed untrimmed, with a warning naming it.
The expected areas are exact: a 10 x 10 plane square, a cylinder of radius r
and height h with area 2 pi r h.
"""

from __future__ import annotations

import numpy as np
from numpy.testing import assert_allclose

from geometry.io.carry import on_nurbs, polyline_offset
from geometry.kernel.occt_model import read_shape


def _face_with_wires(surface, wires):
    from OCP.BRep import BRep_Builder
    from OCP.TopoDS import TopoDS_Face

    builder = BRep_Builder()
    face = TopoDS_Face()
    builder.MakeFace(face, surface, 1e-7)
    for wire in wires:
        builder.Add(face, wire)
    return face


def _edge_on(surface, curve2d, first, last):
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge
    from OCP.BRepLib import BRepLib

    edge = BRepBuilderAPI_MakeEdge(curve2d, surface, first, last).Edge()
    BRepLib.BuildCurves3d_s(edge)
    return edge


def _wire(*edges):
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeWire

    maker = BRepBuilderAPI_MakeWire()
    for edge in edges:
        maker.Add(edge)
    return maker.Wire()


def test_face_whose_outer_wire_is_one_open_edge_is_used_untrimmed_with_a_warning():
    from OCP.Geom import Geom_Plane
    from OCP.Geom2d import Geom2d_Line
    from OCP.gp import gp_Dir, gp_Dir2d, gp_Pln, gp_Pnt, gp_Pnt2d

    plane = Geom_Plane(gp_Pln(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1)))
    diagonal = Geom2d_Line(gp_Pnt2d(0, 0), gp_Dir2d(1, 1))
    face = _face_with_wires(plane, [_wire(_edge_on(plane, diagonal, 0.0, 10.0))])
    contents = on_nurbs(read_shape(face))
    (read,) = contents.faces
    assert read.loops == ()  # untrimmed: the whole surface, not a zero-area sliver
    (warning,) = [w for w in contents.warnings if "open" in w]
    assert "face 1 of 1" in warning and "untrimmed" in warning
    assert contents.skipped == []


def test_face_bounded_by_end_circles_only_is_used_untrimmed_with_a_warning():
    from OCP.Geom import Geom_CylindricalSurface
    from OCP.Geom2d import Geom2d_Line
    from OCP.gp import gp_Ax3, gp_Dir, gp_Dir2d, gp_Pnt, gp_Pnt2d

    radius, height = 5.0, 12.0
    cylinder = Geom_CylindricalSurface(gp_Ax3(gp_Pnt(0, 0, 0), gp_Dir(0, 0, 1)), radius)
    ends = [
        _wire(_edge_on(cylinder, Geom2d_Line(gp_Pnt2d(0, v), gp_Dir2d(1, 0)), 0.0, 2 * np.pi)) for v in (0.0, height)
    ]
    contents = on_nurbs(read_shape(_face_with_wires(cylinder, ends)))
    (read,) = contents.faces
    assert read.loops == ()
    assert any("no area" in w and "untrimmed" in w for w in contents.warnings)


def test_polyline_offset_is_the_distance_to_the_edge_polyline():
    # points 0.2 above a polyline along x, sampled at the same places: exactly 0.2 off
    x = np.linspace(0.0, 10.0, 11)
    edge = np.stack([x, 0 * x, 0 * x], 1)
    trace = edge + [0.0, 0.0, 0.2]
    assert_allclose(polyline_offset(trace, edge), 0.2, rtol=1e-12)
    # slid along the edge by half a segment: still on it
    assert_allclose(polyline_offset(edge + [0.5, 0.0, 0.0], edge)[:-1], 0.0, atol=1e-12)
    # two polylines one after the other: each point is measured against its own only
    other = edge + [0.0, 5.0, 0.0]
    both = polyline_offset(np.concatenate([trace, other + [0.0, 0.0, 0.3]]), np.concatenate([edge, other]), [11, 11])
    assert_allclose(both, np.repeat([0.2, 0.3], 11), rtol=1e-12)
