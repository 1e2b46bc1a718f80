"""The review loop in the window (real X server): compare with an earlier revision, record decisions.

hood_visor (revision A) has a G1 seam that class-A fails; hood_visor_rev_b has it fixed (manifest).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("pyvistaqt")

from app.qt import review_actions  # noqa: E402
from app.review.review_file import ACCEPTED, read_review_file  # noqa: E402
from app.state import Mode  # noqa: E402
from tests.gui_support import shoot, show_window  # noqa: E402
from tests.test_gui_window import LOAD_MS, open_and_wait  # noqa: E402

pytestmark = pytest.mark.gui

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"


@pytest.fixture
def window(qtbot):
    w = show_window(qtbot, (1400, 900))
    yield w
    w.close()


def test_compare_with_shows_the_deviation_map(qtbot, window):
    open_and_wait(qtbot, window, SAMPLES / "hood_visor_rev_b.stp")
    comparing = review_actions.compare_now(window, str(SAMPLES / "hood_visor.stp"))
    assert comparing is not None and window.comparing is comparing  # running in a worker thread
    assert review_actions.compare_now(window, str(SAMPLES / "hood_visor.stp")) is None  # one at a time
    with qtbot.waitSignal(comparing.shown, timeout=LOAD_MS):
        pass
    assert window.comparing is None
    session = window.session
    assert session.display.mode == Mode.DEVIATION
    comparison = session.review.comparison
    assert [(c.status, c.key.kind) for c in comparison.findings] == [("fixed", "seam")]
    fields = session.measure_fields()
    flat = session.model.faces[0].name == "visor_flat"
    values = fields[0 if flat else 1]
    assert np.nanmax(np.abs(values)) < 1e-6  # the flat did not change (manifest)
    low, high = session.colour_limits()
    assert low == -high and high == pytest.approx(session.review.deviation.reach)
    window.session.set_colour_range(False, -1.0, 1.0)  # a user range, still centred on 0
    assert session.colour_limits() == (-1.0, 1.0)
    assert "deviation" in window.scene.legend.lower()
    assert shoot(window, "review-deviation-map").stat().st_size > 10_000


def test_accepting_a_finding_saves_the_review_file(qtbot, window, tmp_path):
    target = tmp_path / "visor.review"
    open_and_wait(qtbot, window, SAMPLES / "hood_visor.stp")
    window.session.review.open(str(target))
    editor = window.findings_panel.decision
    editor.reviewer.setText("Ada Example")
    editor.reviewer.textEdited.emit("Ada Example")
    (index,) = [i for i, f in enumerate(window.session.findings) if f.kind == "seam" and f.verdict == "fail"]
    window.session.select(index)
    assert editor.accept_button.isEnabled()
    editor.reason.setText("the soft break is the design's")
    editor.accept_button.click()
    (decision,) = read_review_file(str(target)).dispositions
    assert decision.decision == ACCEPTED and decision.reviewer == "Ada Example"
    assert decision.measure == "curvature jump" and decision.value == pytest.approx(1.0)
    assert "accepted by Ada Example" in editor.current.text()
    titles = [item.text(1) for item in window.findings_panel.entries()]
    assert any("[accepted: Ada Example]" in t for t in titles)
    shoot(window, "review-decision")
    # The window's decision applies to the check of the same model.
    from app.review import ReviewSettings, review_model
    from app.review.dispositions import apply_review

    gated = apply_review(
        review_model(window.session.model, ReviewSettings(sections="none")), read_review_file(str(target))
    )
    assert gated.verdict == "pass"


def test_accepting_without_a_reason_is_refused(qtbot, window, tmp_path, monkeypatch):
    messages = []
    monkeypatch.setattr("app.qt.window.QMessageBox.warning", lambda parent, title, text, *a: messages.append(text))
    open_and_wait(qtbot, window, SAMPLES / "hood_visor.stp")
    window.session.review.open(str(tmp_path / "v.review"))
    window.findings_panel.decision.reviewer.textEdited.emit("Ben Sample")
    (index,) = [i for i, f in enumerate(window.session.findings) if f.kind == "seam" and f.verdict == "fail"]
    window.session.select(index)
    window.findings_panel.decision.accept_button.click()
    assert messages and "reason" in messages[0]
    assert not (tmp_path / "v.review").exists()
