"""Seam measures on constructed joins whose answers are known exactly.

Sources: the dihedral and gap values are elementary geometry; the cylinder's
normal curvature 1/R is do Carmo, Differential Geometry of Curves and Surfaces
(1976), sec. 3-3 (cited from memory); the split surface is geomdl's knot
insertion (geomdl.operations.split_surface_u), a reference library.
"""

import numpy as np
import pytest
from geomdl import NURBS, BSpline, operations
from numpy.testing import assert_allclose

import geometry.nurbs
from geometry.model import Face, Model
from geometry.seams import SeamTolerance
from geometry.seams.check import check_seams, refine_maxima
from tests.test_seams_shapes import dihedral, offset_pair, plane_on_cylinder, tilting_join

ROUNDING = 1e-9  # "rounding level" for lengths in mm and angles in degrees
ANGLE_DEG = 1e-6  # the accuracy for dihedral angles
TOL = SeamTolerance(name="test", crease_deg=None)


def only_seam(model, **kw):
    report = check_seams(model, TOL, **kw)
    assert len(report.seams) == 1, [s.faces for s in report.seams]
    return report.seams[0]


@pytest.mark.parametrize("radius", [5.0, 40.0])
def test_plane_tangent_to_cylinder_is_g1_with_jump_one_over_r(radius):
    seam = only_seam(plane_on_cylinder(radius))
    assert seam.worst["gap"].value < ROUNDING
    assert seam.worst["angle"].value < ROUNDING
    assert_allclose(seam.curvature_jump, 1 / radius, rtol=1e-12)
    assert_allclose(seam.curvature_b, -1 / radius, rtol=1e-12)  # outward normal: bends away
    assert_allclose(seam.curvature_jump_rel, 1.0, rtol=1e-12)
    assert seam.continuity == "G1"
    assert seam.verdict == "fail"  # the profile wants G2
    assert seam.orientation_consistent


@pytest.mark.parametrize("exterior", [0.05, 12.5, 30.0, 90.0, 135.0])
def test_dihedral_angle_is_the_exterior_angle(exterior):
    seam = only_seam(dihedral(exterior))
    assert_allclose(seam.angle, exterior, atol=ANGLE_DEG)
    assert abs(seam.worst["angle"].value - exterior) < ANGLE_DEG
    assert seam.orientation_consistent  # beyond 90 degrees too: the rule is the edge's direction
    assert seam.continuity == ("G2" if exterior <= TOL.tangent_deg else "G0")


def test_reversed_face_is_recognised_not_measured_as_a_fold():
    model = dihedral(10.0)
    flipped = Model((model.faces[0], Face(model.faces[1].surface, reversed=True)))
    seam = only_seam(flipped)
    assert not seam.orientation_consistent
    assert_allclose(seam.angle, 10.0, atol=ANGLE_DEG)


@pytest.mark.parametrize("gap", [0.02, 0.2, 0.45])
@pytest.mark.parametrize("step", [False, True])
def test_gap_equals_the_offset(gap, step):
    seam = only_seam(offset_pair(gap, step))
    assert_allclose(seam.gap, gap, rtol=1e-12)
    assert abs(seam.worst["gap"].value - gap) < ROUNDING
    assert seam.continuity == "broken"
    assert seam.reasons and seam.reasons[0].startswith("gap")


def _spline(degrees, knots_u, knots_v, seed, rational=False):
    """A geomdl height-field spline with a seeded random net (test data, not a reference)."""
    surf = NURBS.Surface() if rational else BSpline.Surface()
    surf.degree_u, surf.degree_v = degrees
    nu, nv = len(knots_u) - degrees[0] - 1, len(knots_v) - degrees[1] - 1
    rng = np.random.default_rng(seed)
    poles = np.zeros((nu, nv, 3))
    poles[..., 0] = np.arange(nu)[:, None] * 10.0
    poles[..., 1] = np.arange(nv)[None, :] * 10.0
    poles[..., 2] = rng.normal(scale=4.0, size=(nu, nv))
    surf.ctrlpts_size_u, surf.ctrlpts_size_v = nu, nv
    surf.ctrlpts = poles.reshape(-1, 3).tolist()
    if rational:
        surf.weights = rng.uniform(0.7, 1.5, nu * nv).tolist()
    surf.knotvector_u, surf.knotvector_v = knots_u, knots_v
    return surf


def _split_model(surf, at):
    """The two halves of a geomdl surface split at u = at (geomdl's knot insertion)."""
    return Model(tuple(Face(geometry.nurbs.from_geomdl(h)) for h in operations.split_surface_u(surf, at)))


def _split_halves(rational: bool):
    knots_u = [0, 0, 0, 0, 0.3, 0.5, 0.7, 1, 1, 1, 1]
    return _split_model(_spline((3, 3), knots_u, [0, 0, 0, 0, 0.5, 1, 1, 1, 1], 5, rational), 0.5)


@pytest.mark.parametrize("rational", [False, True])
def test_halves_of_one_surface_split_at_a_knot_are_g2(rational):
    seam = only_seam(_split_halves(rational))
    assert seam.continuity == "G2"
    assert seam.worst["gap"].value < ROUNDING
    assert seam.worst["angle"].value < ROUNDING
    assert seam.worst["curvature_jump"].value < ROUNDING
    assert seam.worst["curvature_jump_rel"].value < ROUNDING
    # the same parametrisation on both sides: the cross iso-curves are one C2 curve
    assert seam.worst["iso_curvature_jump"].value < ROUNDING
    assert seam.verdict == "pass"


def test_maximum_between_samples_is_found():
    b0, b1, b2, length = 0.01, 0.05, 0.02, 10.0
    t_star = (b0 - b1) / (b0 - 2 * b1 + b2)
    g_star = b0 * (1 - t_star) ** 2 + 2 * b1 * t_star * (1 - t_star) + b2 * t_star**2
    true_max = np.degrees(np.arctan(g_star))
    # 11 samples: 1 mm apart, and the peak at y = 5.714 mm lies between two of them
    seam = only_seam(tilting_join(b0, b1, b2, length), min_samples=11, max_spacing=1.0)
    assert seam.angle.size == 11
    assert np.max(seam.angle) < true_max * (1 - 1e-4)  # the samples alone miss it
    worst = seam.worst["angle"]
    assert abs(worst.value - true_max) <= 0.01 * true_max
    assert abs(worst.arc - t_star * length) <= 0.01 * length
    assert abs(worst.value - true_max) < 1e-9  # in fact to rounding
    assert abs(worst.xyz[1] - t_star * length) < 1e-5


def test_refine_maxima_finds_a_parabola_peak():
    tau = np.linspace(0, 1, 6)

    def evaluate(x):
        return {"f": 1.0 - (x - 0.37) ** 2}

    best = refine_maxima(evaluate, tau, evaluate(tau), ("f",))
    assert abs(best["f"][0] - 0.37) < 1e-7
    assert_allclose(best["f"][1], 1.0, atol=1e-13)


def test_plain_dict_has_the_documented_keys():
    seam = only_seam(plane_on_cylinder(10.0))
    d = seam.as_dict()
    for key in (
        "faces",
        "length",
        "gap_max",
        "angle_max_deg",
        "curvature_jump_max",
        "curvature_jump_rel_max",
        "worst",
        "continuity",
        "verdict",
    ):
        assert key in d
    assert set(d["worst"]) >= {"gap", "angle", "curvature_jump", "curvature_jump_rel"}
    assert len(d["worst"]["angle"]["xyz"]) == 3
    assert d["profile"] == "test"
    assert_allclose(d["length"], 10.0, rtol=1e-9)


def test_results_are_read_only():
    seam = only_seam(dihedral(20.0))
    with pytest.raises(ValueError):
        seam.angle[0] = 0.0
    with pytest.raises(ValueError):
        seam.worst["angle"].xyz[0] = 0.0


def _spline_for_g3(degree: int):
    knots_u = [0.0] * (degree + 1) + [0.4, 0.6] + [1.0] * (degree + 1)
    return _spline((degree, 2), knots_u, [0, 0, 0, 0.5, 1, 1, 1], 11)


def test_g3_split_quintic_is_g3():
    # A simple knot of a degree-p spline is C^(p-1) there (de Boor, A Practical Guide
    # to Splines, 1978, ch. IX; from memory): a quintic is C4, so G3 holds.
    seam = only_seam(_split_model(_spline_for_g3(5), 0.4))
    assert seam.worst["curvature_derivative_jump"].value < 1e-9


def test_g3_split_cubic_jumps_as_geomdl_says():
    # A cubic is only C2 at a simple knot: S_uuu jumps there. Within each knot span
    # S_uuu is constant in u, so geomdl's derivatives at u = 0.3 and 0.5 give the two
    # one-sided values exactly. With S_u and S_uu continuous, the jump of the third
    # arc-length derivative of the u iso-curve is the part of that jump normal to the
    # tangent, over |S_u|^3 (chain rule, see geometry.seams.measures._iso_curvature).
    surf = _spline_for_g3(3)
    seam = only_seam(_split_model(surf, 0.4))
    expected = []
    for v in np.linspace(0.0, 1.0, 2001):
        su = np.array(surf.derivatives(0.4, v, order=1)[1][0])
        jump = np.array(surf.derivatives(0.5, v, order=3)[3][0]) - np.array(surf.derivatives(0.3, v, order=3)[3][0])
        t = su / np.linalg.norm(su)
        expected.append(np.linalg.norm(jump - t * (t @ jump)) / np.linalg.norm(su) ** 3)
    assert max(expected) > 1e-4
    assert_allclose(seam.worst["curvature_derivative_jump"].value, max(expected), rtol=1e-6)
    assert seam.continuity == "G2"  # G3 is reported, not classified


def test_four_patches_of_one_surface_meet_in_four_g2_seams():
    # geomdl splits in u, then each half in v: a 2 x 2 grid whose diagonal patches touch at a point only
    surf = _spline((3, 3), [0, 0, 0, 0, 0.3, 0.5, 0.7, 1, 1, 1, 1], [0, 0, 0, 0, 0.5, 1, 1, 1, 1], 7)
    quarters = [q for half in operations.split_surface_u(surf, 0.5) for q in operations.split_surface_v(half, 0.5)]
    report = check_seams(Model(tuple(Face(geometry.nurbs.from_geomdl(q)) for q in quarters)), TOL)
    assert sorted(s.faces for s in report.seams) == [(0, 1), (0, 2), (1, 3), (2, 3)]
    assert all(s.continuity == "G2" and s.verdict == "pass" for s in report.seams)
    assert len(report.free_edges) == 8
