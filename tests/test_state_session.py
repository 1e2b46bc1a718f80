"""The session without a window: loading, settings, notifications, sections, findings.

Expected values are closed forms: the demo panel's x-profile is a cubic Bezier
with control heights (0, w, -w, 0) over equally spaced x, whose second
derivative 6 [(P2 - 2 P1 + P0)(1 - t) + (P3 - 2 P2 + P1) t] (Farin, *Curves and
Surfaces for CAGD*, 5th ed., sec. 4.3) vanishes at t = 1/2, i.e. x = 50 mm;
the minimum radius of a circular cylinder is its radius.
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from app.state import Measure, Mode, Session
from app.state.demo import demo_model
from app.state.settings import SectionSettings, StripeSettings
from geometry import NurbsSurface
from geometry.errors import BattenError
from geometry.model import Face, Model

INFLECTION_X = 50.0
ROOT_TOL = 1e-6  # mm: the section engine's root finding is far tighter


@pytest.fixture
def session():
    s = Session()
    s.show_model(demo_model())
    return s


def quarter_cylinder(radius: float) -> NurbsSurface:
    """Exact rational quarter cylinder, axis x (The NURBS Book 2nd ed., sec. 7.3)."""
    w = np.sqrt(0.5)
    arc = np.array([[0, radius, 0], [0, radius, radius], [0, 0, radius]], float)
    poles = np.stack([arc, arc + [40.0, 0, 0]], axis=1)
    return NurbsSurface(2, 1, [0, 0, 0, 1, 1, 1], [0, 0, 1, 1], poles, np.array([[1, 1], [w, w], [1, 1]]))


def test_show_model_announces_and_describes(session):
    heard = []
    s = Session()
    for topic in ("model", "findings", "recent"):
        s.subscribe(topic, heard.append)
    s.show_model(demo_model())
    assert heard == ["model", "findings", "recent"]
    assert s.describe() == "model in memory: 2 faces, mm"
    assert all(x.inside.any() for x in s.samples)


def test_unknown_topic_and_unsubscribe():
    s = Session()
    with pytest.raises(ValueError):
        s.subscribe("everything", print)
    heard = []
    stop = s.subscribe("display", heard.append)
    s.set_display(mode=Mode.CURVATURE)
    stop()
    s.set_display(mode=Mode.SHADED)
    assert heard == ["display"]


def test_a_failing_listener_does_not_silence_the_others(session):
    heard = []

    def broken(_):
        raise RuntimeError("widget bug")

    session.subscribe("display", broken)
    session.subscribe("display", heard.append)
    with pytest.raises(RuntimeError):
        session.set_display(mode=Mode.ISOPHOTE)
    assert heard == ["display"]
    assert session.display.mode == Mode.ISOPHOTE


def test_bad_file_keeps_the_current_model(session, tmp_path):
    shown = session.model
    bad = tmp_path / "broken.stp"
    bad.write_bytes(b"ISO-10303-21;\nthis is not a model\n")
    with pytest.raises(BattenError) as info:
        session.open(str(bad))
    assert "broken.stp" in str(info.value)
    assert session.model is shown
    assert session.recent.paths == []


def test_missing_file_names_the_file(session, tmp_path):
    with pytest.raises(BattenError, match="nothing-here.igs"):
        session.open(str(tmp_path / "nothing-here.igs"))


def test_signed_measures_get_a_range_centred_on_zero(session):
    session.set_display(mode=Mode.CURVATURE, measure=Measure.MEAN)
    low, high = session.colour_limits()
    assert low == -high and high > 0
    session.set_colour_range(False, -0.5, 0.25)
    assert session.colour_limits() == (-0.5, 0.25)
    with pytest.raises(ValueError):
        session.set_colour_range(False, 1.0, 0.0)


def test_minimum_radius_of_a_cylinder_is_its_radius():
    radius = 12.5
    s = Session()
    s.show_model(Model((Face(quarter_cylinder(radius)),)))
    s.set_display(mode=Mode.CURVATURE, measure=Measure.MIN_RADIUS)
    values = s.measure_fields()[0][s.samples[0].inside]
    assert_allclose(values, radius, rtol=1e-9)
    low, high = s.colour_limits()
    assert low <= radius <= high


@pytest.mark.parametrize("mode", [Mode.REFLECTION, Mode.HIGHLIGHT, Mode.ISOPHOTE])
def test_stripe_fields_cover_every_face(session, mode):
    session.set_display(mode=mode)
    fields = session.stripe_fields()
    assert [f.shape for f in fields] == [x.inside.shape for x in session.samples]
    assert all(np.isfinite(f[x.inside]).mean() > 0.9 for f, x in zip(fields, session.samples, strict=True))


def test_isophotes_of_the_flat_flange_are_constant(session):
    # a plane has one normal, so one isophote value (Poeschl 1984)
    session.set_display(mode=Mode.ISOPHOTE)
    flange = session.stripe_fields()[1][session.samples[1].inside]
    assert np.ptp(flange) < 1e-9


def test_display_accepts_plain_names_and_refuses_unknown_ones(session):
    session.set_display(mode="curvature", measure="gaussian")
    assert session.display.mode is Mode.CURVATURE and session.display.measure is Measure.GAUSSIAN
    with pytest.raises(ValueError):
        session.set_display(measure="wobble")
    assert session.display.measure is Measure.GAUSSIAN


def test_settings_are_validated():
    with pytest.raises(ValueError):
        StripeSettings(count=0)
    with pytest.raises(ValueError):
        StripeSettings(width=1.0)
    with pytest.raises(ValueError):
        SectionSettings(normal=(0, 0, 0))
    assert_allclose(SectionSettings(normal=(0, 3, 4)).normal, (0, 0.6, 0.8))


def test_section_family_finds_the_designed_inflection(session):
    heard = []
    session.subscribe("sections", heard.append)
    session.set_section(enabled=True, normal=(0, 1, 0), count=3, spacing=10.0)
    assert heard == ["sections"]
    assert len(session.sections) == 3 and len(session.combs) == 3
    for curve in session.sections:
        assert len(curve.inflections) == 1
        assert abs(curve.inflections.points[0, 0] - INFLECTION_X) < ROOT_TOL
    kinds = [f.kind for f in session.findings]
    assert kinds.count("inflection") == 3


def test_dragging_the_plane_moves_combs_and_markers(session):
    session.set_section(enabled=True, normal=(0, 1, 0))
    tips = np.concatenate([c.tips for c in session.combs])
    marks = session.sections[0].inflections.points.copy()
    session.set_section(exact=False, origin=(80.0, 12.0, 0.0))
    assert not np.allclose(np.concatenate([c.tips for c in session.combs])[:, 1], tips[:, 1])
    assert_allclose(session.sections[0].inflections.points[:, 1], 12.0, atol=1e-9)
    assert not np.allclose(session.sections[0].inflections.points, marks)


def test_comb_gain_scales_teeth(session):
    session.set_section(enabled=True, normal=(0, 1, 0))
    comb = session.combs[0]
    length = np.linalg.norm(comb.tips - comb.roots, axis=1)
    session.set_section(comb_gain=2.0)
    doubled = np.linalg.norm(session.combs[0].tips - session.combs[0].roots, axis=1)
    assert_allclose(doubled, 2 * length, rtol=1e-12, atol=1e-12)


def test_findings_filter_and_select(session):
    fails = session.filtered_findings(verdicts=("fail",))
    assert fails and all(f.kind == "seam" for _, f in fails)  # the flange meets the panel at a slope break
    assert session.findings[0].verdict == "fail"  # failing first
    heard = []
    session.subscribe("selection", heard.append)
    session.select(fails[0][0])
    assert session.selected_finding is fails[0][1] and heard == ["selection"]
    with pytest.raises(IndexError):
        session.select(len(session.findings))


def test_curvature_extreme_is_the_tightest_sample(session):
    extreme = [f for f in session.findings if f.kind == "curvature extreme"]
    assert len(extreme) == 1  # the flange is flat: no extreme there
    panel = session.samples[0]
    assert_allclose(extreme[0].position, panel.field.points.reshape(-1, 3)[np.argmax(panel.field.max_abs)])


def test_probe_value_reads_the_current_measure(session):
    session.set_display(measure=Measure.K1)
    name, value = session.value_at(0, 3, 4)
    assert name == "k1" and value == session.samples[0].field.k1[3, 4]
