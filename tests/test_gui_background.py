"""Long work in the background: the report (progress, Cancel, no partial file) and the comparison with a revision."""

from __future__ import annotations

from pathlib import Path

import pytest

pytest.importorskip("pyvistaqt")

from PySide6.QtCore import Qt, QTimer  # noqa: E402

from app.qt import review_actions  # noqa: E402
from app.qt import window as window_module  # noqa: E402
from app.qt.settings_store import WindowMemory  # noqa: E402
from app.qt.window import MainWindow  # noqa: E402
from app.state import Mode, Session  # noqa: E402
from app.state.demo import demo_model  # noqa: E402

pytestmark = [pytest.mark.gui, pytest.mark.skipif(not window_module.report_available(), reason="no report writer")]

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
ARTIFACTS = Path(__file__).resolve().parent / "artifacts"
EXPORT_MS = 300_000  # a loaded CI machine: the child imports, checks, renders and lays out


@pytest.fixture
def window(qtbot, tmp_path):
    w = MainWindow(Session(), multi_samples=0, memory=WindowMemory(tmp_path / "window.ini"))
    qtbot.addWidget(w)
    w.resize(1280, 800)
    w.show()
    qtbot.waitExposed(w)
    w.session.show_model(demo_model())
    yield w
    w.close()


def leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if ".part" in p.name)


def test_report_is_written_while_the_window_keeps_working(qtbot, window, tmp_path):
    target = tmp_path / "plate-fairness-report.pdf"
    ticks = []
    timer = QTimer(interval=20)
    timer.timeout.connect(lambda: ticks.append(export.running))
    export = window.write_report(str(target))
    assert export is not None and export.running and not target.exists()  # the call returned at once
    assert window.export_status.isVisible() and window.export_status.cancel.isEnabled()
    timer.start()
    window.session.set_display(mode=Mode.CURVATURE)  # the user goes on working meanwhile
    seen = []
    export.progress.connect(lambda percent, text: seen.append((percent, text)))
    with qtbot.waitSignal(export.written, timeout=EXPORT_MS) as written:
        qtbot.waitUntil(lambda: len(seen) >= 2, timeout=EXPORT_MS)
        window.grab().save(str(ARTIFACTS / "export-in-progress.png")) if ARTIFACTS.is_dir() else None
    timer.stop()
    assert written.args == [str(target)]
    assert target.read_bytes()[:5] == b"%PDF-" and b"%%EOF" in target.read_bytes()[-1024:]
    assert sum(ticks) > 3  # the event loop ran while the report was being written
    assert [p for p, _ in seen] == sorted(p for p, _ in seen) and seen[-1][0] == 100
    assert any("pictures" in text for _, text in seen) and any("seams 1 of 1" in text for _, text in seen)
    assert not window.export_status.isVisible()
    assert leftovers(tmp_path) == []


def test_cancel_leaves_no_file_and_keeps_the_old_one(qtbot, window, tmp_path):
    target = tmp_path / "review.pdf"
    target.write_bytes(b"the previous report")
    export = window.write_report(str(target))
    started = []
    export.progress.connect(lambda percent, text: started.append(text))
    qtbot.waitUntil(lambda: any(t != "starting the report" for t in started), timeout=EXPORT_MS)
    with qtbot.waitSignal(export.cancelled, timeout=EXPORT_MS):
        qtbot.mouseClick(window.export_status.cancel, Qt.MouseButton.LeftButton)
    assert not export.running
    assert target.read_bytes() == b"the previous report"
    assert leftovers(tmp_path) == []
    assert "cancelled" in window.statusBar().currentMessage()
    fresh = tmp_path / "fresh.html"
    export = window.write_report(str(fresh))
    with qtbot.waitSignal(export.cancelled, timeout=EXPORT_MS):
        export.cancel()
    assert not fresh.exists() and leftovers(tmp_path) == []


def test_one_export_at_a_time_and_a_bad_folder_says_why(qtbot, window, tmp_path, monkeypatch):
    messages = []
    monkeypatch.setattr(window_module.QMessageBox, "critical", lambda parent, title, text: messages.append(text))
    assert window.write_report(str(tmp_path / "missing" / "r.pdf")) is None
    assert len(messages) == 1 and "missing" in messages[0]
    first = window.write_report(str(tmp_path / "a.html"))
    assert window.write_report(str(tmp_path / "b.html")) is None
    assert "still being written" in window.statusBar().currentMessage()
    with qtbot.waitSignal(first.written, timeout=EXPORT_MS):
        pass
    assert (tmp_path / "a.html").is_file() and not (tmp_path / "b.html").exists()


def test_closing_the_window_stops_the_export(qtbot, tmp_path):
    w = MainWindow(Session(), multi_samples=0, memory=WindowMemory(tmp_path / "window.ini"))
    qtbot.addWidget(w)
    w.show()
    w.session.show_model(demo_model())
    export = w.write_report(str(tmp_path / "r.pdf"))
    w.close()
    assert not export.running
    assert not (tmp_path / "r.pdf").exists() and leftovers(tmp_path) == []


def test_a_comparison_that_fails_says_why_and_keeps_the_model(qtbot, window, tmp_path, monkeypatch):
    messages = []
    monkeypatch.setattr(window_module.QMessageBox, "critical", lambda parent, title, text: messages.append(text))
    shown = window.session.model
    bad = tmp_path / "older.stp"
    bad.write_text("not a model\n")
    comparing = review_actions.compare_now(window, str(bad))
    with qtbot.waitSignal(comparing.ended, timeout=EXPORT_MS):
        pass
    assert len(messages) == 1 and "older.stp" in messages[0] and "kept" in messages[0]
    assert window.session.model is shown and window.session.review.comparison is None
    assert window.comparing is None


def test_a_comparison_can_be_cancelled_and_keeps_what_is_shown(qtbot, window):
    # The large sample takes seconds to check: Cancel in the status bar stops it at its next step.
    shown = window.session.model
    comparing = review_actions.compare_now(window, str(SAMPLES / "appliance_range.stp"))
    status = window.compare_status
    assert status.isVisible() and status.cancel.isEnabled() and status.task is comparing
    steps = []
    comparing.progress.connect(lambda percent, text: steps.append((percent, text)))
    qtbot.waitUntil(lambda: len(steps) >= 1, timeout=EXPORT_MS)
    with qtbot.waitSignal(comparing.ended, timeout=EXPORT_MS):
        qtbot.mouseClick(status.cancel, Qt.MouseButton.LeftButton)
    assert steps[0][0] == -1 and "appliance_range.stp" in steps[0][1]  # busy bar: no percent to give
    assert "cancelled" in window.statusBar().currentMessage()
    assert window.session.model is shown and window.session.review.comparison is None
    assert window.comparing is None and not status.isVisible()
    assert review_actions.compare_now(window, str(SAMPLES / "hood_visor.stp")) is not None  # a new one may start
