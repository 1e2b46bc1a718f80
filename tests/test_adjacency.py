"""Seam finding on constructed layouts whose seams and free edges are known.

Expected values are elementary geometry of the layouts (lengths of shared and
unshared sides); the default search distance rule is the issue's (0.5 mm, or
0.5 % of the model size if larger).
"""

import numpy as np
import pytest
from numpy.testing import assert_allclose

from geometry.model import Edge, EdgeUse, Face, Model
from geometry.seams import check_seams
from geometry.seams.adjacency import default_search_distance, find_seams
from tests.test_seams_shapes import offset_pair, plane

LENGTH = 1e-9  # mm


def strip(x0, y0, width, height):
    return Face(plane([x0, y0, 0.0], [width, 0.0, 0.0], [0.0, height, 0.0]))


def seam_lengths(adj):
    return sorted((tuple(sorted(s.faces)), round(_polyline_length(s.points), 9)) for s in adj.seams)


def _polyline_length(points):
    return float(np.linalg.norm(np.diff(points, axis=0), axis=1).sum())


def test_one_long_edge_against_two_short_ones():
    model = Model((strip(-1, 0, 1, 2), strip(0, 0, 1, 1), strip(0, 1, 1, 1)))
    adj = find_seams(model)
    assert seam_lengths(adj) == [((0, 1), 1.0), ((0, 2), 1.0), ((1, 2), 1.0)]
    # the union is the rectangle [-1, 1] x [0, 2]: its perimeter is free
    assert_allclose(sum(e.length for e in adj.free_edges), 8.0, atol=LENGTH)


def test_staggered_edges_share_their_overlap_only():
    model = Model((strip(-1, 0, 1, 2), strip(0, 1, 1, 2)))
    adj = find_seams(model)
    assert seam_lengths(adj) == [((0, 1), 1.0)]
    # everything but the 1 mm overlap, on both faces: 6 + 6 - 2
    assert_allclose(sum(e.length for e in adj.free_edges), 10.0, atol=LENGTH)


def test_a_gap_inside_the_search_distance_is_a_seam_outside_it_free_edges():
    model = offset_pair(0.3)
    assert len(find_seams(model).seams) == 1
    far = find_seams(model, search_distance=0.1)
    assert far.seams == ()
    assert len(far.free_edges) == 8


def test_default_search_distance():
    small = Model((strip(0, 0, 10, 10),))
    assert default_search_distance(small) == 0.5
    large = Model((strip(0, 0, 300, 400),))  # diagonal 500 mm
    assert_allclose(default_search_distance(large), 2.5)


def test_corner_contact_is_no_seam():
    model = Model((strip(0, 0, 1, 1), strip(1, 1, 1, 1)))  # diagonal neighbours touch at (1, 1)
    adj = find_seams(model)
    assert adj.seams == ()
    assert_allclose(sum(e.length for e in adj.free_edges), 8.0, atol=LENGTH)


def _edges_of(model):
    """Shared-edge topology of two unit strips meeting along x = 0, as a reader would give it."""
    t = np.linspace(0, 1, 5)
    zeros, ones = np.zeros_like(t), np.ones_like(t)
    shared = Edge(
        np.stack([zeros, t, zeros], -1), (EdgeUse(0, np.stack([ones, t], -1)), EdgeUse(1, np.stack([zeros, t], -1)))
    )
    free = []
    for face in (0, 1):
        for uv in (np.stack([t, zeros], -1), np.stack([t, ones], -1), np.stack([ones * face, t], -1)):
            pts = model.faces[face].surface.points_at(uv[:, 0], uv[:, 1])
            free.append(Edge(pts, (EdgeUse(face, uv),)))
    return (shared, *free)


def test_topology_seams_come_from_the_file():
    base = Model((strip(-1, 0, 1, 1), strip(0, 0, 1, 1)))
    model = Model(base.faces, _edges_of(base))
    adj = find_seams(model)
    assert [s.source for s in adj.seams] == ["topology"]
    assert adj.seams[0].faces == (0, 1)
    assert len(adj.free_edges) == 6


def test_unsewn_topology_edges_are_matched_geometrically():
    base = offset_pair(0.02, length=1.0)
    t = np.linspace(0, 1, 5)
    edges = []
    for face in (0, 1):
        for uv in (
            np.stack([t, 0 * t], -1),
            np.stack([t, 0 * t + 1], -1),
            np.stack([0 * t, t], -1),
            np.stack([0 * t + 1, t], -1),
        ):
            edges.append(Edge(base.faces[face].surface.points_at(uv[:, 0], uv[:, 1]), (EdgeUse(face, uv),)))
    adj = find_seams(Model(base.faces, tuple(edges)))
    assert [(s.source, s.faces) for s in adj.seams] == [("geometry", (0, 1))]


@pytest.mark.parametrize("vertices", [64, 257])
def test_trimmed_hole_filled_by_a_disc(vertices):
    angle = np.linspace(0, 2 * np.pi, vertices, endpoint=False)
    circle = np.stack([0.5 + 0.3 * np.cos(angle), 0.5 + 0.3 * np.sin(angle)], -1)
    outer = np.array([[0, 0], [1, 0], [1, 1], [0, 1]], float)
    sheet = plane([0, 0, 0], [10, 0, 0], [0, 10, 0])
    model = Model((Face(sheet, loops=(outer, circle[::-1])), Face(sheet, loops=(circle,))))
    report = check_seams(model)
    polygon = vertices * 2 * 3.0 * np.sin(np.pi / vertices)  # perimeter of the 3-mm polygon
    assert {s.faces for s in report.seams} == {(0, 1)}
    assert_allclose(sum(s.length for s in report.seams), polygon, rtol=1e-9)
    assert all(s.continuity == "G2" and s.worst["gap"].value < LENGTH for s in report.seams)
    assert len(report.free_edges) == 4  # the sheet's outer sides; the hole is closed by the disc


def test_closed_surface_meets_itself_along_its_closure():
    # geometry.nurbs.primitives builds exact circles of revolution (rational quadratic arcs)
    from geometry.nurbs import primitives

    radius, height = 10.0, 30.0
    report = check_seams(Model((Face(primitives.cylinder(radius, height)),)))
    (seam,) = report.seams
    assert seam.faces == (0, 0)
    assert_allclose(seam.length, height, rtol=1e-9)
    assert seam.continuity == "G2" and seam.orientation_consistent
    assert_allclose(sorted(e.length for e in report.free_edges), [2 * np.pi * radius] * 2, rtol=1e-9)


def test_sphere_poles_are_neither_seams_nor_free_edges():
    from geometry.nurbs import primitives

    report = check_seams(Model((Face(primitives.sphere(5.0)),)))
    (seam,) = report.seams  # the meridian where the surface closes
    assert_allclose(seam.length, np.pi * 5.0, rtol=1e-6)
    assert seam.continuity == "G2"
    assert report.free_edges == ()


def test_empty_model_and_bad_search_distance():
    from geometry.errors import BattenError

    empty = find_seams(Model(()))
    assert empty.seams == () and empty.free_edges == ()
    with pytest.raises(BattenError, match="positive"):
        find_seams(Model((strip(0, 0, 1, 1),)), search_distance=0.0)
