"""Combs and curvature extrema on a sample through the window (pytest-xvfb).

The steamer's cross-sections are rounded boxes (sample_surfaces/products.py): the
curvature peaks at the four corners, where the body's faces meet curvature
continuously, and is least midway along each side. Screenshots go to tests/artifacts/.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("pyvistaqt")

from app.state import Mode  # noqa: E402
from app.state.sectioning import COMB_REACH  # noqa: E402
from tests.gui_support import shoot, show_window  # noqa: E402

pytestmark = pytest.mark.gui

ROOT = Path(__file__).resolve().parents[1]
STEAMER = ROOT / "sample_surfaces" / "steamer_body.stp"
LOAD_MS = 120_000
CORNER_MM = 1e-6  # a corner extremum sits on the seam's point
TOOTH_RTOL = 0.02


@pytest.fixture
def steamer(qtbot):
    if not STEAMER.is_file():
        pytest.skip("samples not built")
    w = show_window(qtbot, (1280, 860))
    with qtbot.waitSignals([w.model_shown, w.seams_measured], timeout=LOAD_MS):
        w.open_file(str(STEAMER))
    w.session.set_display(mode=Mode.CURVATURE)
    yield w
    w.close()


def test_a_cross_section_marks_its_corner_peaks_and_its_flattest_points(qtbot, steamer):
    w = steamer
    w.session.set_section(enabled=True, origin=(45.0, 0.0, 0.0), normal=(1.0, 0.0, 0.0))
    (curve,) = w.session.sections
    ext = curve.extrema
    # the sign convention makes these shell's k negative: |k| peaks are minima of k
    assert (~ext.is_maximum).sum() == 4 and ext.is_maximum.sum() == 4
    seams = curve.points[np.flatnonzero(np.diff(curve.faces) != 0)]
    corners = ext.points[~ext.is_maximum]
    gaps = np.linalg.norm(corners[:, None] - np.vstack([seams, curve.points[:1]])[None], axis=2).min(axis=1)
    assert gaps.max() < CORNER_MM
    np.testing.assert_allclose(ext.curvature[~ext.is_maximum], curve.curvature.min(), rtol=1e-6)
    assert w.scene.points["extrema"].n_points == len(ext)
    shoot(w, "steamer-section-extrema")


def test_a_gently_curved_section_shows_its_comb(qtbot, steamer):
    w = steamer
    w.session.set_section(enabled=True, origin=(90.0, 0.0, 0.0), normal=(0.0, 1.0, 0.0))  # the long profile
    steepest = max(float(np.abs(c.curvature).max()) for c in w.session.sections)
    assert steepest < 0.25 * w.session.loaded.curvature_scale  # gentle against the model's typical bend
    teeth = np.concatenate([np.linalg.norm(c.tips - c.roots, axis=1) for c in w.session.combs])
    # teeth stand a comb spacing apart: the curve's peak may fall between two of them
    assert teeth.max() == pytest.approx(COMB_REACH * w.session.model.size, rel=TOOTH_RTOL)
    w.view.view_xz()
    shoot(w, "steamer-gentle-comb")
