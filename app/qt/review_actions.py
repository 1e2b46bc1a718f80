"""The window's review-loop actions: compare with an earlier revision, choose the review file.

Dialogs only; the work is done by :mod:`app.state.revisions` on the session.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QApplication, QFileDialog, QMessageBox

from app.state import Mode
from app.state.revisions import compare_with, open_review_file, review_path_for

from .file_dialogs import ask_open

MODEL_FILTER = "Design models (*.step *.stp *.p21 *.iges *.igs *.json);;All files (*)"
REVIEW_FILTER = "Batten review files (*.review);;All files (*)"


def ask_compare(window) -> None:
    """Ask for the earlier revision and compare the model on screen with it."""
    if window.session.model is None:
        QMessageBox.information(window, "Compare with an earlier revision", "Open the later revision first.")
        return
    path = ask_open(window, window.memory, "Compare with the earlier revision", MODEL_FILTER, window.session.path)
    if path:
        compare_now(window, path)


def compare_now(window, path: str) -> bool:
    """Compare with the revision in ``path`` and show the deviation; a dialog says why when it cannot."""
    from geometry.errors import BattenError

    QApplication.setOverrideCursor(Qt.CursorShape.WaitCursor)
    try:
        comparison = compare_with(window.session, path, lambda line: window.statusBar().showMessage(line))
    except BattenError as exc:
        QMessageBox.critical(window, "Cannot compare", f"{exc}\n\nThe model shown is kept.")
        return False
    finally:
        QApplication.restoreOverrideCursor()
    window.session.set_display(mode=Mode.DEVIATION)
    d = comparison.deviation
    counts = {}
    for change in comparison.findings:
        counts[change.status] = counts.get(change.status, 0) + 1
    changes = ", ".join(f"{n} {status}" for status, n in counts.items()) or "no findings over tolerance"
    window.statusBar().showMessage(
        f"compared with {path}: deviation max {d.max_mm:.4g} mm, mean {d.mean_mm:.4g} mm; findings: {changes}", 15000
    )
    return True


def ask_review_file(window) -> None:
    """Choose (or name a new) review file for the model on screen."""
    from geometry.errors import BattenError

    session = window.session
    start = session.review.path or (review_path_for(session.path) if session.path else "model.review")
    path, _ = QFileDialog.getSaveFileName(
        window,
        "Review file for the decisions",
        start,
        REVIEW_FILTER,
        options=QFileDialog.Option.DontConfirmOverwrite,
    )
    if not path:
        return
    try:
        open_review_file(session, path)
    except BattenError as exc:
        QMessageBox.critical(window, "Cannot use this review file", str(exc))
