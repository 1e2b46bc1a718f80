"""Whole-model tooling checks: insufficient draft, cutter reach and undercuts on built shapes.

Sources (named beside each check):
- a ball-end cutter of radius r cannot finish a concave bend of radius below r: it must
  touch the surface with its own sphere (common practice); the bend's radius is 1/k1 with
  k1 the largest principal curvature (do Carmo, Differential Geometry of Curves and
  Surfaces, 1976, sec. 3-2, Euler's theorem);
- a plane wall's area is its width times its slant height (exact);
- an overhanging lip over a pocket floor blocks the floor's straight path out of the mould
  (common practice: the textbook undercut that needs a side action).
"""

from __future__ import annotations

import numpy as np
import pytest
from shapes import cylinder

from geometry.model import Face, Model
from geometry.nurbs.primitives import bilinear
from geometry.tooling import analyse_tooling

WALL_DRAFT = 3.0  # degrees, the tray's walls lean out by this
DEPTH, LENGTH, WIDTH = 40.0, 100.0, 60.0
AREA_RTOL = 1e-8  # the grid's end samples sit 1e-9 of the range inside the face
BUDGET = 60_000


def _patch(corners, outward) -> Face:
    """A bilinear face whose normal points along ``outward``."""
    s = bilinear(np.array(corners, float))
    n = s.derivatives_at(np.array([0.5]), np.array([0.5]), 1)
    normal = np.cross(n[1, 0, 0], n[0, 1, 0])
    return Face(s, reversed=bool(normal @ np.asarray(outward, float) < 0))


def tray(hook: bool) -> Model:
    """Open tray seen from its pocket side: floor at z = 0, four walls leaning out, optional lip.

    Normals point into the pocket (the side the core half of the mould touches).
    """
    lean = DEPTH * np.tan(np.radians(WALL_DRAFT))
    lo = np.array([[0, 0, 0], [LENGTH, 0, 0], [LENGTH, WIDTH, 0], [0, WIDTH, 0]], float)
    hi = lo + [[-lean, -lean, DEPTH], [lean, -lean, DEPTH], [lean, lean, DEPTH], [-lean, lean, DEPTH]]
    faces = [_patch([lo[0], lo[3], lo[1], lo[2]], (0, 0, 1))]
    inward = [(0, 1, 0), (-1, 0, 0), (0, -1, 0), (1, 0, 0)]
    for k in range(4):
        a, b = k, (k + 1) % 4
        faces.append(_patch([lo[a], hi[a], lo[b], hi[b]], inward[k]))
    if hook:  # a lip from the x = LENGTH wall back over the floor: a hook-shaped pocket
        x0 = LENGTH + lean
        faces.append(
            _patch(
                [[x0, -lean, DEPTH], [x0, WIDTH + lean, DEPTH], [70, -lean, DEPTH], [70, WIDTH + lean, DEPTH]],
                (0, 0, -1),
            )
        )
    return Model(tuple(faces))


def test_plain_tray_has_no_undercut_and_enough_draft():
    result = analyse_tooling(tray(False), (0, 0, 1), 1.0, None, budget=BUDGET)
    assert result.undercut_area == 0.0 and result.regions == ()
    assert result.insufficient_area == 0.0
    walls = result.faces[1:]
    for wall in walls:  # the plane walls lean by exactly the designed draft
        assert wall.least_draft_deg == pytest.approx(WALL_DRAFT, abs=1e-9)
        assert wall.draft_max_deg == pytest.approx(WALL_DRAFT, abs=1e-9)


def test_walls_below_a_stricter_minimum_count_their_whole_area():
    result = analyse_tooling(tray(False), (0, 0, 1), 5.0, None, undercuts=False, budget=BUDGET, curves=False)
    slant = DEPTH / np.cos(np.radians(WALL_DRAFT))
    lean = DEPTH * np.tan(np.radians(WALL_DRAFT))
    # each wall is a trapezoid: mean width (bottom + top) / 2 times the slant height (exact)
    expected = 2 * slant * (LENGTH + lean) + 2 * slant * (WIDTH + lean)
    assert result.insufficient_area == pytest.approx(expected, rel=AREA_RTOL)
    assert result.faces[0].insufficient_area == 0.0  # the floor has 90 degrees


def test_hook_pocket_has_an_undercut_under_its_lip():
    result = analyse_tooling(tray(True), (0, 0, 1), 1.0, None, budget=BUDGET, curves=False)
    assert result.regions, "the lip must be found"
    by_face = {r.face: r for r in result.regions}
    floor, lip = by_face[0], by_face[5]
    # the floor is blocked under the lip: x in [70, 100], all the width (30 x 60 mm)
    assert floor.area == pytest.approx(30 * WIDTH, rel=0.1)
    assert 70 < floor.centre[0] < LENGTH
    # the lip's underside looks down at the floor: blocked all over
    assert lip.area == pytest.approx(result.faces[5].area, rel=0.05)
    # the rest of the floor is free
    assert result.faces[0].undercut_area < 0.6 * result.faces[0].area


@pytest.mark.parametrize(("cutter", "fails"), [(5.0, True), (2.0, False), (3.5, True), (2.9, False)])
def test_fillet_of_radius_3_against_ball_end_cutters(cutter, fails):
    # a concave fillet: the inside of a cylinder of radius 3, normals towards the axis (k1 = +1/3)
    model = Model((Face(cylinder(3.0, 0.0, 20.0), reversed=True),))
    result = analyse_tooling(model, (0, 0, 1), None, cutter, undercuts=False, budget=BUDGET, curves=False)
    face = result.faces[0]
    assert face.concave_radius_mm == pytest.approx(3.0, rel=1e-9)
    assert (face.out_of_reach_area > 0) is fails
    if fails:  # the whole fillet is out of reach: 2 pi r h (exact), trapezoid quadrature
        assert face.out_of_reach_area == pytest.approx(2 * np.pi * 3.0 * 20.0, rel=1e-3)


def test_convex_surfaces_never_limit_the_cutter():
    model = Model((Face(cylinder(3.0, 0.0, 20.0)),))  # outward normals: convex, k1 = 0, k2 = -1/3
    result = analyse_tooling(model, (0, 0, 1), None, 5.0, undercuts=False, budget=BUDGET, curves=False)
    assert result.faces[0].out_of_reach_area == 0.0
    assert result.concave_radius_mm == np.inf
