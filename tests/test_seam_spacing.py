"""How densely seams are sampled, and that the crease decision does not hang on it.

Expected counts follow from the rules in :mod:`geometry.seams.spacing` (common
practice); the turning of a polyline inscribed in a circular arc and the angle
of the tilting join are elementary geometry.
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from geometry.model import Edge, EdgeUse, Face, Model
from geometry.nurbs.surface import NurbsSurface
from geometry.seams import SeamTolerance, check_seams, find_seams
from geometry.seams.edges import EdgeSeams
from geometry.seams.spacing import MAX_SAMPLES, MIN_SAMPLES, PER_SPAN, TURN_PER_SAMPLE_DEG, sample_counts, seam_demands
from tests.test_seams_shapes import tilting_join


def test_counts_follow_length_turning_and_knot_spans():
    lengths = np.array([3.0, 100.0, 3.0, 3.0, 1e6])
    turning = np.array([0.0, 0.0, np.pi / 2, 0.0, 0.0])
    spans = np.array([1, 1, 1, 6, 1])
    counts = sample_counts(lengths, 1.0, MIN_SAMPLES, turning, spans)
    quarter = int(np.ceil(90.0 / TURN_PER_SAMPLE_DEG)) + 1
    assert counts.tolist() == [MIN_SAMPLES, 101, quarter, max(MIN_SAMPLES, PER_SPAN * 6 + 1), MAX_SAMPLES]
    assert sample_counts(np.array([3.0]), 1.0, 11).tolist() == [11]  # a smaller floor asked for


def _bent_model(n_points: int, radius: float, knots_u) -> Model:
    """Two flat faces sharing an edge drawn as a quarter circle (only the polyline's shape matters here)."""
    poles = np.zeros((len(knots_u) - 4, 2, 3))
    poles[:, 1, 1] = 1.0
    poles[:, :, 0] = np.linspace(0.0, 1.0, poles.shape[0])[:, None]
    surface = NurbsSurface(3, 1, knots_u, [0, 0, 1, 1], poles)
    t = np.linspace(0.0, np.pi / 2, n_points)
    points = radius * np.stack([np.cos(t), np.sin(t), np.zeros_like(t)], axis=1)
    uv_a = np.stack([np.linspace(0.0, 1.0, n_points), np.zeros(n_points)], axis=1)
    uv_b = np.stack([np.linspace(0.0, 1.0, n_points), np.ones(n_points)], axis=1)
    return Model((Face(surface), Face(surface)), (Edge(points, (EdgeUse(0, uv_a), EdgeUse(1, uv_b))),))


def test_demands_read_the_polyline_turning_and_the_spans_crossed():
    knots = [0, 0, 0, 0, 0.25, 0.5, 0.75, 1, 1, 1, 1]  # four spans in u
    model = _bent_model(91, 10.0, knots)
    pairs = find_seams(model, geometry=False).seams
    lengths, turning, spans = seam_demands(model, pairs)
    # A polyline of n points inscribed in a quarter circle turns by (pi / 2) (n - 2) / (n - 1) at its vertices.
    assert_allclose(turning, [np.pi / 2 * 89 / 90], rtol=1e-12)
    assert_allclose(lengths, [2 * 90 * 10.0 * np.sin(np.pi / 4 / 90)], rtol=1e-12)  # 90 chords
    assert spans.tolist() == [4]


@pytest.mark.parametrize(("crease_deg", "crease"), [(30.0, False), (29.9, True)])
def test_a_dip_between_samples_decides_the_crease(crease_deg, crease):
    # Angle atan(g(t)) with g = tan(29.9 deg) + a (t - 0.55)^2: its minimum, 29.9 deg, lies
    # between the samples at t = 0.5 and 0.6, which read 30.05 deg.
    low, a = np.tan(np.radians(29.9)), (np.tan(np.radians(30.05)) - np.tan(np.radians(29.9))) / 0.0025
    g0, g_half, g1 = (low + a * (t - 0.55) ** 2 for t in (0.0, 0.5, 1.0))
    b1 = (4 * g_half - g0 - g1) / 2  # quadratic Bezier through g(0), g(1/2), g(1)
    tolerance = SeamTolerance(name="test", crease_deg=crease_deg)
    (seam,) = check_seams(tilting_join(g0, b1, g1, 10.0), tolerance, min_samples=11, max_spacing=1.0).seams
    assert seam.angle.size == 11
    assert seam.angle.min() > 30.0  # the samples alone would call it a 30-degree crease
    assert_allclose(seam.angle_min, 29.9, atol=1e-6)
    assert seam.crease is crease


def _bend_model(radius: float = 0.01) -> Model:
    """Two flat faces sharing an edge that runs 5 mm straight, turns 90 degrees round a 0.01 mm radius, runs on."""
    corners = np.array([[[0, 0, 0], [0, 10, 0]], [[10, 0, 0], [10, 10, 0]]], float)
    surface = NurbsSurface(1, 1, [0, 0, 1, 1], [0, 0, 1, 1], corners)
    bend = np.linspace(0.0, np.pi / 2, 60)
    arc = np.stack([5.0 + radius * np.sin(bend), radius * (1.0 - np.cos(bend)), np.zeros_like(bend)], axis=1)
    first = np.stack([np.linspace(0.0, 5.0, 30), np.zeros(30), np.zeros(30)], axis=1)[:-1]
    last = np.stack([np.full(30, 5.0 + radius), np.linspace(radius, 5.0, 30), np.zeros(30)], axis=1)[1:]
    points = np.concatenate([first, arc, last])
    uv = points[:, :2] / 10.0
    return Model((Face(surface), Face(surface)), (Edge(points, (EdgeUse(0, uv), EdgeUse(1, uv))),))


def test_samples_gather_where_the_edge_turns():
    # Evenly spread in length / spacing + turning / TURN_PER_SAMPLE_DEG (common practice): the
    # 90-degree bend (0.016 mm of the seam's 10 mm) holds 45 of the 55 parts of that demand.
    model = _bend_model()
    pairs = find_seams(model, geometry=False).seams
    batch = EdgeSeams(model, pairs, 1e-3)
    lengths, turning, spans = seam_demands(model, pairs)
    counts = sample_counts(lengths, 1.0, MIN_SAMPLES, turning, spans)
    seam, tau, start = batch.sample_positions(counts, 1.0)
    arc = tau * batch.length[0]
    in_bend = (arc > 5.0 - 1e-9) & (arc < 5.0 + np.pi / 2 * 0.01 + 1e-9)
    assert counts[0] == int(np.ceil(np.degrees(turning[0]) / TURN_PER_SAMPLE_DEG)) + 1
    assert in_bend.sum() >= 0.7 * counts[0]
    assert tau[0] == 0.0 and tau[-1] == 1.0 and np.all(np.diff(tau) >= 0)


def test_a_straight_seam_is_sampled_evenly():
    model = _bend_model()
    edge = model.edges[0]
    straight = Model(model.faces, (Edge(edge.points[:29], tuple(EdgeUse(u.face, u.uv[:29]) for u in edge.uses)),))
    pairs = find_seams(straight, geometry=False).seams
    batch = EdgeSeams(straight, pairs, 1e-3)
    seam, tau, start = batch.sample_positions(np.array([21]), 1.0)
    assert_allclose(tau, np.linspace(0.0, 1.0, 21), atol=1e-12)
