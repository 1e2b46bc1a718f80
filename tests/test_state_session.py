"""The session without a window: loading, settings, notifications, sections, findings.

Expected values are closed forms: the demo panel's x-profile is a cubic Bezier
with control heights (0, w, -w, 0) over equally spaced x, whose second
derivative 6 [(P2 - 2 P1 + P0)(1 - t) + (P3 - 2 P2 + P1) t] (Farin, *Curves and
Surfaces for CAGD*, 5th ed., sec. 4.3) vanishes at t = 1/2, i.e. x = 50 mm;
the minimum radius of a circular cylinder is its radius.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from numpy.testing import assert_allclose
from shapes import quarter_cylinder

from app.state import Measure, Mode, Session
from app.state.demo import demo_model
from app.state.settings import SectionSettings, StripeSettings
from geometry.errors import BattenError
from geometry.model import Face, Model

INFLECTION_X = 50.0
ROOT_TOL = 1e-6  # mm: the section engine's root finding is far tighter


@pytest.fixture
def session():
    s = Session()
    s.show_model(demo_model())
    return s


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
    s.show_model(Model((Face(quarter_cylinder(radius, 40.0)),)))
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
    marks = [f for f in session.findings if f.kind == "inflection" and f.verdict == "note"]
    assert len(marks) == 3  # one note per point; a profile limit adds a judged entry per curve


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
    extreme = [f for f in session.findings if f.kind == "curvature"]
    assert len(extreme) == 1  # the flange is flat: no extreme there
    panel = session.samples[0]
    assert_allclose(extreme[0].position, panel.field.points.reshape(-1, 3)[np.argmax(panel.field.max_abs)])


def test_probe_value_reads_the_current_measure(session):
    session.set_display(measure=Measure.K1)
    name, value = session.value_at(0, 3, 4)
    assert name == "k1" and value == session.samples[0].field.k1[3, 4]


# -- findings judged by the check's own review code ----------------------------------------------

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
HOOD = SAMPLES / "hood_visor.stp"  # its visor_flat / visor_bend seam is G1 by design (manifest.json)
TOASTER = SAMPLES / "toaster_panel.stp"  # a raised bump: the curvature along a section has extrema


def judged(findings) -> list[tuple[str, str]]:
    """(kind, verdict) of the entries a profile judges (notes are not judged), sorted: the window and the
    check share the Kind and Verdict enums, so their entries compare directly."""
    return sorted((f.kind, f.verdict) for f in findings if f.verdict in ("pass", "fail"))


def test_faces_are_named_from_the_file_or_counted_from_zero(session):
    seam = next(f for f in session.findings if f.kind == "seam")
    assert seam.title.startswith("seam panel / flange: ")  # the demo's face names
    unnamed = Session()
    unnamed.show_model(Model((Face(quarter_cylinder(12.5, 40.0)),)))
    assert unnamed.face_label(0) == "face 0"  # as `batten probe --face 0`
    assert [f.title.split(":")[0] for f in unnamed.findings if f.kind == "curvature"] == ["face 0"]


@pytest.mark.skipif(not TOASTER.is_file(), reason="samples not built")
def test_section_extrema_are_listed_as_their_own_kind():
    session = Session()
    session.open(str(TOASTER))
    session.set_section(enabled=True, normal=(0, 1, 0), count=2, spacing=10.0)
    extrema = session.filtered_findings(kinds=("section_extremum",))
    assert len(extrema) == sum(len(c.extrema) for c in session.sections) > 0
    assert_allclose(extrema[0][1].position, session.sections[0].extrema.points[0])
    assert extrema[0][1].title.startswith("section 1, curve 1: curvature m")
    assert all(f.verdict == "note" for _, f in extrema)  # the check does not judge them


@pytest.mark.skipif(not HOOD.is_file(), reason="samples not built")
def test_window_verdicts_are_the_checks_and_follow_the_profile():
    from app.review import review_model

    s = Session()
    s.open(str(HOOD))
    s.set_section(enabled=True, origin=tuple(s.model.bounds.mean(axis=0)), normal=(1, 0, 0), count=2, spacing=20.0)
    shown = s.model
    for profile in ("class-a", "technical"):
        s.set_profile(profile)
        check = review_model(shown, s.review_settings)
        assert judged(s.findings) == judged_check(check.findings), profile
        assert check.profile["name"] == s.profile.name == profile
    assert s.model is shown  # re-judged, not reloaded
    seam = next(f for f in s.findings if f.kind == "seam")
    assert seam.verdict == "pass" and "profile technical" in seam.detail  # G1 is enough for technical surfaces
    s.set_profile("class-a")
    assert next(f for f in s.findings if f.kind == "seam").verdict == "fail"  # class-A wants G2


def judged_check(findings) -> list[tuple[str, str]]:
    return sorted((f.kind, f.verdict) for f in findings)


def test_a_profile_limit_on_inflections_fails_the_curve_as_the_check_does(session, monkeypatch):
    from dataclasses import replace

    from app.profiles import get_profile
    from app.review import findings as review
    from app.review.section_entries import CutSections
    from app.state import session as session_module

    strict = replace(get_profile("class-a"), section_inflections_max=0)
    monkeypatch.setattr(session_module, "get_profile", lambda name: strict)
    session.set_profile("class-a")
    session.set_section(enabled=True, normal=(0, 1, 0), count=2, spacing=10.0)
    failing = [f for f in session.findings if f.kind == "inflection" and f.verdict == "fail"]
    assert [f.title for f in failing] == [
        "section 1, curve 1: 1 inflection, limit 0",
        "section 2, curve 1: 1 inflection, limit 0",
    ]
    places = tuple((i, 0) for i in range(len(session.sections)))
    sections = CutSections(tuple(str(i + 1) for i in range(len(places))), tuple(session.sections), places)
    assert [f.verdict for f in review.inflection_findings(sections, strict)] == ["fail", "fail"]


def test_bad_profile_keeps_the_one_in_force(session, tmp_path):
    bad = tmp_path / "mine.toml"
    bad.write_text("name = 'mine'\n[tolerance]\nposition_mm = 'tight'\n")
    before = session.profile
    with pytest.raises(BattenError, match="mine.toml"):
        session.set_profile(str(bad))
    assert session.profile is before and session.profile_choice is None


def test_review_settings_carry_the_profile_and_the_planes_on_screen(session):
    from app.review import parse_spec, spec_text

    assert session.review_settings.sections == ()  # section tool off
    assert spec_text(session.review_settings.sections) == "none"  # as the JSON names it
    session.set_profile("technical")
    session.set_section(enabled=True, normal=(0, 1, 0), count=3, spacing=10.0)
    settings = session.review_settings
    assert settings.profile == "technical"
    items = settings.sections  # typed, exactly the planes on screen (no text in between)
    assert len(items) == 3
    for item, (origin, normal) in zip(items, session.section.planes(), strict=True):
        assert item.kind == "plane"
        assert item.values == (*map(float, origin), *map(float, normal))
    # the JSON's SPEC names the same planes
    for parsed, item in zip(parse_spec(spec_text(items)), items, strict=True):
        assert_allclose(parsed.values, item.values, rtol=1e-11)


def test_choosing_a_curve_for_the_graph_recomputes_nothing(session):
    session.set_section(enabled=True, normal=(0, 1, 0), count=3, spacing=10.0)
    curves, heard = session.sections, []
    session.subscribe("curve", heard.append)
    session.select_curve(2)
    assert session.sections is curves and session.selected_section is curves[2]
    assert session.selected_curve_label == "section 3, curve 1" and heard == ["curve"]
    with pytest.raises(IndexError):
        session.select_curve(3)


def test_display_grids_are_dense_enough_for_smooth_maps():
    # common practice: a few hundred samples per side of a single face; the sampler shares one budget
    s = Session()
    s.show_model(Model((Face(quarter_cylinder(12.5, 40.0)),)))
    a, b = s.samples[0].inside.shape
    assert min(a, b) >= 250 and a * b <= 300_000


MENGER_SHARE = 0.02  # three-point circle vs exact curvature at 0.5 mm spacing: well under 2 % of the peak


@pytest.mark.skipif(not TOASTER.is_file(), reason="samples not built")
def test_the_graphs_corners_are_the_panels_knot_lines_not_sparse_points():
    # The toaster panel is one bicubic B-spline face. Along a section its curvature is
    # continuous with a derivative that jumps at each simple knot (de Boor, A Practical
    # Guide to Splines, rev. ed. 2001, ch. IX: a cubic spline's second derivative is
    # piecewise linear), so the graph has corners there however densely it is drawn.
    s = Session()
    s.open(str(TOASTER))
    s.set_section(enabled=True, normal=(0, 1, 0))
    curve = s.selected_section
    knots = np.unique(s.model.faces[0].surface.knots_u)
    assert len(curve.extrema) > 0 and np.all(curve.extrema.at_knot)
    assert np.min(np.abs(curve.extrema.uv[:, :1] - knots), axis=1).max() < 1e-6
    # independent check of the plotted values: the circle through three consecutive
    # points (Menger curvature, 4 * area / product of the sides; common practice)
    a, b, c = curve.points[:-2], curve.points[1:-1], curve.points[2:]
    sides = np.linalg.norm(b - a, axis=1) * np.linalg.norm(c - b, axis=1) * np.linalg.norm(c - a, axis=1)
    menger = 2 * np.linalg.norm(np.cross(b - a, c - a), axis=1) / sides
    peak = np.abs(curve.curvature).max()
    assert np.abs(menger - np.abs(curve.curvature[1:-1])).max() < MENGER_SHARE * peak
    assert curve.points.shape[0] > 200  # every one of these goes into the graph (see the GUI test)


def test_seams_measured_under_an_old_profile_are_judged_again(session):
    from app.state.loading import with_seams_judged

    stale = with_seams_judged(session.loaded)  # as a worker thread still running under class-A would
    session.set_profile("technical")
    session.adopt_seams(stale)
    assert session.loaded.seam_review.profile.name == "technical"
    assert all("profile technical" in f.detail for f in session.findings if f.kind == "seam")
