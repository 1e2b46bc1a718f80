"""Section planes that lie on a face boundary, and planes anywhere: no twins, no slivers, no warnings.

Sources (named beside each check):
- circle of radius R: k = 1/R, length 2 pi R (do Carmo, Differential Geometry of
  Curves and Surfaces, 1976, sec. 1-5; from memory);
- the cylinder and the ruled (cone) faces are exact rational NURBS (The NURBS Book,
  Piegl & Tiller, 2nd ed., 1997, sec. 7.5 and 8.5; see test_section_shapes.py);
- the steamer sample's body seams at x = 90 are G2 (sample_surfaces/manifest.json),
  and its cross-section there is convex, so the curvature keeps one sign: no
  inflection (common practice: an inflection is a sign change of the curvature).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from numpy.testing import assert_allclose
from shapes import CIRCLE_KNOTS, CIRCLE_W, CIRCLE_XY, cylinder, model_of

from geometry.io import read_model
from geometry.nurbs import NurbsSurface
from geometry.sections import SectionEngine, plane_section
from geometry.sections.march import MarchGrid, _edge_nodes

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
CURVATURE_RTOL = 1e-9
LENGTH_RTOL = 1e-8
RADIUS = 1.5
# A plane a hair off the seam cuts one side's faces only: its curve is the reference.
NUDGE_MM = 1e-7
NUDGE_RTOL = 1e-6


def _ruled(r0: float, z0: float, r1: float, z1: float) -> NurbsSurface:
    """The ruled face between the circles (r0, z0) and (r1, z1): a cone, or a flat ring when z0 = z1."""
    poles = np.zeros((9, 2, 3))
    poles[:, 0, :2], poles[:, 1, :2] = r0 * CIRCLE_XY, r1 * CIRCLE_XY
    poles[:, 0, 2], poles[:, 1, 2] = z0, z1
    return NurbsSurface(2, 1, CIRCLE_KNOTS, [0, 0, 1, 1], poles, np.repeat(CIRCLE_W[:, None], 2, axis=1))


def _turned(surface: NurbsSurface, angle: float) -> NurbsSurface:
    """The same face rotated about z: its parameter seam starts elsewhere on the circle."""
    c, s = np.cos(angle), np.sin(angle)
    rot = np.array([[c, -s, 0], [s, c, 0], [0, 0, 1]])
    return NurbsSurface(
        surface.degree_u, surface.degree_v, surface.knots_u, surface.knots_v, surface.poles @ rot.T, surface.weights
    )


# Faces meeting on the circle z = 1 of radius RADIUS, which the plane z = 1 holds.
MEETINGS = {
    "one above, one below": lambda: (cylinder(RADIUS, 0, 1), cylinder(RADIUS, 1, 2)),
    "both below (a fold)": lambda: (cylinder(RADIUS, 0, 1), _ruled(RADIUS, 1, 2 * RADIUS, 0)),
    "seams apart": lambda: (cylinder(RADIUS, 0, 1), _turned(cylinder(RADIUS, 1, 2), 0.7)),
    "open end": lambda: (cylinder(RADIUS, 0, 1),),
}


@pytest.mark.parametrize("side", [1.0, -1.0])
@pytest.mark.parametrize("meeting", MEETINGS)
def test_two_faces_meeting_on_the_plane_give_one_circle(meeting, side):
    section = plane_section(model_of(*MEETINGS[meeting]()), [0, 0, 1], [0, 0, side])
    assert len(section.curves) == 1  # the boundary once, whichever faces hold it and whichever way n points
    (curve,) = section.curves
    assert curve.closed
    assert_allclose(curve.points[:, 2], 1.0, atol=1e-12)
    assert_allclose(curve.length, 2 * np.pi * RADIUS, rtol=LENGTH_RTOL)
    # the cylinder's normal points outwards: the circle bends away from it, k < 0
    assert_allclose(curve.curvature, -1.0 / RADIUS, rtol=CURVATURE_RTOL)
    assert len(curve.inflections) == 0 and len(curve.extrema) == 0
    assert np.all(np.diff(curve.arc_length) > 0)  # no zero-length steps or pieces


@pytest.fixture(scope="module")
def steamer():
    return SectionEngine(read_model(SAMPLES / "steamer_body.stp"))


@pytest.mark.parametrize("side", [1.0, -1.0])
def test_steamer_section_on_the_grip_head_seam_is_one_clean_loop(steamer, side):
    # batten section sample_surfaces/steamer_body.stp --plane 90 0 0 1 0 0 (and the normal turned)
    (curve,) = steamer.plane([90.0, 0, 0], [side, 0, 0]).curves
    assert curve.closed
    names = {steamer.model.faces[i].name.split("_", 1)[0] for i in np.unique(curve.faces)}
    assert len(names) == 1 and len(np.unique(curve.faces)) == 4  # one ring of four faces: no twin pieces
    assert len(curve.inflections) == 0
    assert np.all(curve.curvature < 0)  # G2 seams, convex section, outward normals: bends away all round
    # where two faces' pieces join, each keeps its own sample of the seam point (a seam's
    # features need both sides), so a zero step is allowed there and nowhere else
    joins = np.diff(curve.pieces) != 0
    assert np.all(np.diff(curve.arc_length)[~joins] > 0)
    for piece in np.unique(curve.pieces):
        assert np.ptp(curve.arc_length[curve.pieces == piece]) > steamer.spacing  # no zero-length pieces
    # the curve is the limit of the sections a hair to either side (each cuts one ring of faces only)
    for x in (90.0 - NUDGE_MM, 90.0 + NUDGE_MM):
        (near,) = steamer.plane([x, 0, 0], [side, 0, 0]).curves
        assert_allclose(curve.length, near.length, rtol=NUDGE_RTOL)


def test_edge_crossings_stay_finite_for_extreme_plane_values():
    # f = (S - o) . n near the float limit (points near infinity of a degenerate rational face, or a
    # far-off plane point): the linear crossing t = d0 / (d0 - d1) must not overflow; here t = 1/2
    u = v = np.array([0.0, 1.0])
    points = np.zeros((2, 2, 3))
    points[1, :, 0] = 1.0
    grid = MarchGrid(u, v, points, points.reshape(-1, 3))
    d = np.array([[1e308, 1e308], [-1e308, -1e308]])
    with np.errstate(all="raise"):
        uv, xyz, _ = _edge_nodes(grid, d, np.array([0, 1]))  # the two u-edges
    assert_allclose(uv, [[0.5, 0.0], [0.5, 1.0]])
    assert_allclose(xyz[:, 0], 0.5)


@pytest.mark.filterwarnings("error")
@pytest.mark.parametrize("sample", ["steamer_body.stp", "hood_visor.stp", "console_lid.stp"])
def test_planes_anywhere_raise_no_floating_point_warnings(sample):
    # random planes, axis planes through grid nodes (faces edges and knot lines in the plane) and
    # planes touching the model's extremes (tangent planes): every warning is an error here
    rng = np.random.default_rng(20261201)
    engine = SectionEngine(read_model(SAMPLES / sample))
    nodes = np.concatenate([g.points.reshape(-1, 3) for g in engine.grids])
    normals = np.concatenate([np.eye(3), rng.normal(size=(6, 3))])
    normals /= np.linalg.norm(normals, axis=1, keepdims=True)
    for normal in normals:
        height = nodes @ normal
        for origin in (nodes[rng.integers(len(nodes))], nodes[np.argmax(height)], nodes[np.argmin(height)]):
            engine.plane(origin, normal)
