"""The window and the report say the same: one curvature sign, one comb side, one stripe field, one face range.

The sign of every curvature a user reads is the colour map's (DEVELOPERS.md):
positive where the surface bends towards its normal. The reference for a
section point is the normal curvature of the face along the curve's tangent by
Euler's theorem, ``kn = k1 cos^2(theta) + k2 sin^2(theta)`` with theta the
angle from the k1 direction (do Carmo, Differential Geometry of Curves and
Surfaces, 1976, sec. 3-2), from the same principal curvatures the colour map
shows; Meusnier's theorem (same section) gives ``kn = k (sides . N)``.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from numpy.testing import assert_allclose, assert_array_equal

from app.commands.summary import face_rows
from app.report.figures import report_session
from app.review import ReviewSettings, plane_spec, review_model
from app.state import Mode, Session
from app.state.settings import StripeSettings
from app.state.stripes import Camera
from geometry.nurbs import curvature_at
from geometry.sections import SectionEngine

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
# A point counts when its normal curvature is above this share of the curve's largest:
# near an inflection the sign is the root finder's call, not the convention's.
SIGN_FLOOR = 1e-3
MEUSNIER_RTOL = 1e-6


@pytest.fixture(scope="module")
def toaster(sample_model):
    return sample_model("toaster_panel.stp")


def _colour_map_normal_curvature(model, curve) -> tuple[np.ndarray, np.ndarray]:
    """Normal curvature along the curve's tangent from the colour map's k1, k2, dir1, dir2; and N."""
    kn = np.zeros(curve.points.shape[0])
    normals = np.zeros_like(curve.points)
    for face in np.unique(curve.faces):
        at = curve.faces == face
        f = model.faces[face]
        field = curvature_at(f.surface, curve.uv[at, 0], curve.uv[at, 1], reversed=f.reversed)
        t = curve.tangents[at]
        c1 = np.einsum("ij,ij->i", t, field.dir1)
        c2 = np.einsum("ij,ij->i", t, field.dir2)
        kn[at] = (field.k1 * c1**2 + field.k2 * c2**2) / (c1**2 + c2**2)
        normals[at] = field.normals
    return kn, normals


@pytest.mark.parametrize(
    "sample, normals",
    [
        ("toaster_panel.stp", np.eye(3)),
        ("steamer_body.stp", np.eye(3)),
        ("hood_visor.stp", np.array([[1.0, 0.0, 0.0], [0.0, -1.0, 0.0], [0.3, 0.4, 0.866]])),
    ],
)
def test_section_sign_is_the_colour_maps_at_the_same_point(sample_model, sample, normals):
    model = sample_model(sample)
    engine = SectionEngine(model)
    centre = model.bounds.mean(axis=0)
    checked = 0
    for normal in normals:
        for curve in engine.plane(centre, normal).curves:
            kn, surface_normals = _colour_map_normal_curvature(model, curve)
            clear = np.abs(kn) > SIGN_FLOOR * max(float(np.abs(kn).max()), 1e-12)
            assert_array_equal(np.sign(curve.curvature[clear]), np.sign(kn[clear]))
            # Meusnier: the curvature vector's component along N is the normal curvature
            along_normal = curve.curvature * np.einsum("ij,ij->i", curve.sides, surface_normals)
            assert_allclose(along_normal[clear], kn[clear], rtol=MEUSNIER_RTOL, atol=1e-9 * np.abs(kn).max())
            checked += int(clear.sum())
    assert checked > 100


def test_the_bump_reads_the_same_sign_in_both_section_families(toaster):
    # the symptom: one bump, opposite signs in the x and the y family
    engine = SectionEngine(toaster)
    session = Session()
    session.show_model(toaster)
    top = max(session.samples, key=lambda s: np.nanmax(np.abs(np.where(s.inside, s.field.mean, 0))))
    i, j = np.unravel_index(np.nanargmax(np.abs(np.where(top.inside, top.field.mean, 0))), top.inside.shape)
    point, mean = top.field.points[i, j], top.field.mean[i, j]
    for normal in np.eye(3)[:2]:
        (curve, *_) = sorted(
            engine.plane(point, normal).curves, key=lambda c: np.min(np.linalg.norm(c.points - point, axis=1))
        )
        nearest = np.argmin(np.linalg.norm(curve.points - point, axis=1))
        assert np.sign(curve.curvature[nearest]) == np.sign(mean)


@pytest.fixture(scope="module")
def window_and_report(toaster):
    window = Session()
    window.show_model(toaster)
    lo, hi = toaster.bounds
    window.set_section(enabled=True, origin=tuple((lo + hi) / 2), normal=(1.0, 0.0, 0.0), count=3)
    review = review_model(toaster, window.review_settings)
    report = report_session(toaster, review, window.display.stripes, window.section)
    report.show_sections(review.section_curves, review.section_places)
    return window, report, review


def test_report_draws_the_windows_combs_on_the_same_side(window_and_report):
    window, report, _ = window_and_report
    assert len(window.combs) == len(report.combs) > 0
    for shown, drawn, curve in zip(window.combs, report.combs, window.sections, strict=True):
        assert_allclose(drawn.roots, shown.roots, atol=1e-9)
        assert_allclose(drawn.tips, shown.tips, atol=1e-9)
        # teeth stand on the convex side: away from the centre of curvature (k * sides points to it)
        towards_centre = np.interp(shown.arc_length, curve.arc_length, curve.curvature)[:, None] * np.stack(
            [np.interp(shown.arc_length, curve.arc_length, curve.sides[:, i]) for i in range(3)], axis=1
        )
        assert np.all(np.einsum("ij,ij->i", shown.tips - shown.roots, towards_centre) <= 1e-12)


def test_report_stripes_are_the_windows_field_and_spacing(window_and_report):
    window, report, _ = window_and_report
    camera = Camera((400.0, -300.0, 250.0), (-0.6, 0.6, -0.5))
    for session in (window, report):
        session.set_camera(camera)
        session.set_display(mode=Mode.REFLECTION)
    assert report.display.stripes == window.display.stripes
    for mine, theirs in zip(report.stripe_fields(), window.stripe_fields(), strict=True):
        assert_allclose(mine, theirs, equal_nan=True)


def test_report_follows_the_windows_stripe_settings(toaster):
    window = Session()
    window.show_model(toaster)
    window.set_stripes(count=13, width=0.2, direction="y")
    review = review_model(toaster, ReviewSettings(sections=plane_spec([])))
    report = report_session(toaster, review, window.display.stripes, window.section)
    assert report.display.stripes == StripeSettings(count=13, width=0.2, direction="y")


def test_report_colour_map_is_the_windows(window_and_report):
    window, report, _ = window_and_report
    for session in (window, report):
        session.set_display(mode=Mode.CURVATURE, measure="mean")
    assert report.colour_limits() == window.colour_limits()


def test_summary_check_and_window_give_the_same_minimum_radius(toaster, window_and_report):
    window, _, review = window_and_report
    rows = face_rows(toaster)
    check = [f.curvature.min_radius if f.curvature else None for f in review.faces]
    assert [r["min_radius_mm"] for r in rows] == check
    tightest = {f.title.split(": tightest radius ")[1] for f in window.findings if f.kind == "curvature"}
    assert tightest == {f"{r:.3g} mm" for r in check if r is not None}
