"""The classes of trouble real files bring to the seam check, on invented geometry.

Each case has an exact answer: surfaces built as polynomials (a hyperbolic
paraboloid ``z = x y / a`` contains the straight lines ``x = const`` and
``y = const``, do Carmo, 1976, sec. 3-5, example; from memory), planes at a
known angle, a cylinder of revolution (geometry.nurbs.primitives, exact rational arcs).
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from geometry.model import Edge, EdgeUse, Face, Model
from geometry.nurbs import NurbsSurface
from geometry.seams import check_seams
from geometry.seams.tolerance import CREASE_BAND_DEG, SeamTolerance, classify
from tests.test_seams_shapes import dihedral, plane

ROUNDING_MM = 1e-9
SADDLE_A = 40.0  # z = x y / a
SKEW = 1e-3  # y = v + SKEW u^2 on the skewed side
LENGTH = 60.0


def _bezier(f, degree_u: int, degree_v: int, u_range, v_range) -> NurbsSurface:
    """The polynomial surface ``f(u, v)`` of degrees (p, q) as one Bezier patch (exact: interpolation)."""
    from math import comb

    def bernstein(t, n):
        return np.array([[comb(n, i) * x**i * (1 - x) ** (n - i) for i in range(n + 1)] for x in t])

    s = np.linspace(0.0, 1.0, degree_u + 1)
    t = np.linspace(0.0, 1.0, degree_v + 1)
    u = u_range[0] + s * (u_range[1] - u_range[0])
    v = v_range[0] + t * (v_range[1] - v_range[0])
    values = np.array([[f(a, b) for b in v] for a in u])  # (p+1, q+1, 3)
    bu, bv = np.linalg.inv(bernstein(s, degree_u)), np.linalg.inv(bernstein(t, degree_v))
    poles = np.einsum("ia,abk,jb->ijk", bu, values, bv)
    knots_u = [u_range[0]] * (degree_u + 1) + [u_range[1]] * (degree_u + 1)
    knots_v = [v_range[0]] * (degree_v + 1) + [v_range[1]] * (degree_v + 1)
    return NurbsSurface(degree_u, degree_v, knots_u, knots_v, poles)


def _saddle_split_by_a_line(samples: int = 5) -> Model:
    """Two faces of one saddle meeting along the straight line y = 0, z = 0 (0 <= x <= 60).

    Face 0 (y >= 0) is parametrised with y = v + SKEW u^2, so the line is the
    curve v = -SKEW u^2 in its (u, v) and needs a trim; face 1 (y <= 0) has
    x = u, y = v and the line as its side v = 0. The edge is given as a reader
    without refinement would: ``samples`` points of the line, and the p-curve at
    the same places, whose straight (u, v) chords sag off the line on face 0.
    """

    def skewed(u, v):
        y = v + SKEW * u * u
        return np.array([u, y, u * y / SADDLE_A])

    def plain(u, v):
        return np.array([u, v, u * v / SADDLE_A])

    top = _bezier(skewed, 3, 1, (0.0, LENGTH), (-SKEW * LENGTH**2, 10.0))
    bottom = _bezier(plain, 1, 1, (0.0, LENGTH), (-10.0, 0.0))
    fine = np.linspace(0.0, LENGTH, 400)
    loop = np.concatenate([np.stack([fine, -SKEW * fine**2], 1), [[LENGTH, 10.0], [0.0, 10.0]]])
    x = np.linspace(0.0, LENGTH, samples)
    edge = Edge(
        np.stack([x, 0 * x, 0 * x], 1),
        (EdgeUse(0, np.stack([x, -SKEW * x * x], 1)), EdgeUse(1, np.stack([x, 0 * x], 1))),
    )
    return Model((Face(top, loops=(loop,)), Face(bottom)), (edge,))


def test_the_sparse_p_curve_really_sags_off_the_straight_edge():
    model = _saddle_split_by_a_line()
    use = model.edges[0].uses[0]
    middle = 0.5 * (use.uv[1:] + use.uv[:-1])
    sag = model.faces[0].surface.points_at(middle[:, 0], middle[:, 1])
    assert np.abs(sag[:, 1]).max() > 0.05  # y off the line by SKEW (15 mm)^2 / 4 = 0.056 mm


def test_straight_edge_on_a_curved_face_is_no_false_gap():
    report = check_seams(_saddle_split_by_a_line(), geometry=False)
    (seam,) = report.seams
    assert seam.source == "topology" and seam.edge == 0
    assert seam.worst["gap"].value < ROUNDING_MM
    assert_allclose(seam.length, LENGTH, rtol=1e-12)
    # one saddle on both sides: the same tangent plane and normal curvature across
    assert seam.worst["angle"].value < 1e-9
    assert seam.continuity == "G2"


def _cylinder_with_free_ends() -> Model:
    """A cylinder of revolution whose two end circles are free edges and whose seam joins it to itself."""
    from geometry.nurbs import primitives

    surface = primitives.cylinder(10.0, 30.0)
    (u0, u1), (v0, v1) = surface.domain
    t = np.linspace(0.0, 1.0, 65)
    edges = []
    for axis_value in (v0, v1):  # the end circles run round u
        uv = np.stack([u0 + t * (u1 - u0), np.full_like(t, axis_value)], 1)
        edges.append(Edge(surface.points_at(uv[:, 0], uv[:, 1]), (EdgeUse(0, uv),)))
    side = [np.stack([np.full_like(t, a), v0 + t * (v1 - v0)], 1) for a in (u0, u1)]
    edges.append(Edge(surface.points_at(side[0][:, 0], side[0][:, 1]), (EdgeUse(0, side[0]), EdgeUse(0, side[1]))))
    return Model((Face(surface),), tuple(edges))


def test_free_end_circle_of_a_periodic_face_is_not_a_seam():
    report = check_seams(_cylinder_with_free_ends())
    assert report.seams == ()  # its closure is a file edge with one face: no seam between faces
    circumference = 2 * np.pi * 10.0
    assert_allclose(sum(e.length for e in report.free_edges), 2 * circumference, rtol=1e-6)


def test_halves_of_a_free_circle_never_pair_but_the_closure_does():
    from geometry.nurbs import primitives

    # Untrimmed cylinder matched by geometry alone: its sides u = u0 and u = u1
    # meet (the closure); its end circles, cut in halves, must not.
    report = check_seams(Model((Face(primitives.cylinder(10.0, 30.0)),)))
    assert [s.faces for s in report.seams] == [(0, 0)]
    assert report.seams[0].worst["gap"].value <= report.search_distance
    assert_allclose(report.seams[0].length, 30.0, rtol=1e-9)


def test_crease_at_exactly_crease_deg_is_a_crease():
    tol = SeamTolerance()
    assert tol.crease_deg == 30.0
    report = check_seams(dihedral(30.0), tol)
    (seam,) = report.seams
    assert abs(seam.angle_min - 30.0) < 1e-9
    assert seam.crease and seam.verdict == "pass"


@pytest.mark.parametrize("angle_min", [30.0 - 2.5e-12, 30.0, 30.0 - 0.5 * CREASE_BAND_DEG])
def test_crease_band_absorbs_rounding(angle_min):
    verdict = classify(0.0, angle_min + 1.0, angle_min, 0.5, SeamTolerance())
    assert verdict.crease and verdict.verdict == "pass"


def test_a_kink_clearly_under_crease_deg_is_no_crease():
    verdict = classify(0.0, 29.9, 29.9, 0.5, SeamTolerance())
    assert not verdict.crease and verdict.verdict == "fail"


def _planes_with_a_shifted_trim(shift: float) -> Model:
    """Two planes z = 0 meeting along x = 0; face 1's p-curve lies ``shift`` mm inside it."""
    a = plane([-10.0, 0.0, 0.0], [10.0, 0.0, 0.0], [0.0, 10.0, 0.0])
    b = plane([-1.0, 0.0, 0.0], [11.0, 0.0, 0.0], [0.0, 10.0, 0.0])  # reaches past the edge
    t = np.linspace(0.0, 1.0, 9)
    u_edge_b = 1.0 / 11.0  # x = 0 on face 1
    edge = Edge(
        np.stack([0 * t, 10 * t, 0 * t], 1),
        (
            EdgeUse(0, np.stack([np.ones_like(t), t], 1)),
            EdgeUse(1, np.stack([np.full_like(t, u_edge_b + shift / 11.0), t], 1), offset=shift),
        ),
        tolerance=1.5 * shift,
    )
    loop_b = np.array([[u_edge_b + shift / 11.0, 0.0], [1.0, 0.0], [1.0, 1.0], [u_edge_b + shift / 11.0, 1.0]])
    return Model((Face(a), Face(b, loops=(loop_b,), name="skirt")), (edge,))


def test_trim_off_its_edge_is_measured_at_the_edge_and_reported():
    report = check_seams(_planes_with_a_shifted_trim(0.22), geometry=False)
    (seam,) = report.seams
    assert seam.worst["gap"].value < ROUNDING_MM  # the surfaces meet along the edge
    (line,) = report.warnings
    assert "face 1 ('skirt')" in line and "edge 0" in line and "0.22 mm" in line


def test_trim_within_the_position_tolerance_is_not_reported():
    report = check_seams(_planes_with_a_shifted_trim(0.002), geometry=False)
    assert report.warnings == ()


@pytest.mark.parametrize("exterior", [3.0, 16.77, 60.0])
def test_edge_lying_off_both_surfaces_still_gives_the_gap_between_them(exterior):
    # Two planes crossing along the y axis (exact: they meet there, gap 0); the
    # file's 3-D edge lies 0.2 mm off that line, off both planes.
    model = dihedral(exterior)
    t = np.linspace(0.0, 1.0, 17)
    edge = np.stack([0.15 + 0 * t, 5.0 * t, 0.13 + 0 * t], 1)
    uses = (EdgeUse(0, np.stack([np.ones_like(t), t], 1)), EdgeUse(1, np.stack([np.zeros_like(t), t], 1)))
    report = check_seams(Model(model.faces, (Edge(edge, uses),)), geometry=False)
    (seam,) = report.seams
    assert seam.worst["gap"].value < ROUNDING_MM
    assert abs(seam.worst["angle"].value - exterior) < 1e-9
