"""The window's review-loop actions: compare with an earlier revision, choose the review file.

Dialogs only; the work is done by :mod:`app.state.revisions` on the session.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QObject, Signal, Slot
from PySide6.QtWidgets import QFileDialog, QMessageBox

from app.state import Mode
from app.state.revisions import open_review_file, review_path_for, show_comparison

from .file_dialogs import ask_open
from .worker import CompareJob, start_job

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


class Comparing(QObject):
    """One comparison running in a worker thread; shows its result in the window when it arrives.

    Signals
    -------
    progress(int, str)
        -1 (it cannot say how far it is) and what is being done.
    shown()
        The deviation is on screen.
    ended()
        Shown, failed, cancelled, or dropped because another model was opened meanwhile.
    """

    progress = Signal(int, str)
    shown = Signal()
    ended = Signal()

    def __init__(self, window, path: str):
        super().__init__(window)
        self.window, self.path = window, path
        self._closing = False  # the window is closing: whatever the job still says is not shown
        session = window.session
        self.job = CompareJob(session.model, session.samples, session.review_settings, path)
        # bound methods of this GUI-thread object: Qt queues the job's signals to them
        self.job.progress.connect(self._progress)
        self.job.compared.connect(self._compared)
        self.job.failed.connect(self._failed)
        self.job.cancelled.connect(self._cancelled)
        self.thread = start_job(self.job, self)

    def cancel(self) -> None:
        """Stop comparing at the next step; the model and anything shown stay as they are."""
        self.job.cancel()

    @Slot(str)
    def _progress(self, line: str) -> None:
        if self._closing:
            return
        self.progress.emit(-1, f"comparing: {line}")  # the line names the file it is at

    @Slot()
    def _cancelled(self) -> None:
        if self._closing:
            return
        self.window.statusBar().showMessage("comparison cancelled: the model shown is kept", 5000)
        self.ended.emit()

    @Slot(object)
    def _compared(self, found) -> None:
        if self._closing:
            return
        model, comparison, deviation = found
        window = self.window
        if window.session.model is model:  # not another model opened meanwhile
            show_comparison(window.session, comparison, deviation)
            window.session.set_display(mode=Mode.DEVIATION)
            window.statusBar().showMessage(summary(self.path, comparison), 15000)
            self.shown.emit()
        self.ended.emit()

    @Slot(str)
    def _failed(self, message: str) -> None:
        if self._closing:
            return
        self.window.statusBar().clearMessage()
        QMessageBox.critical(self.window, "Cannot compare", f"{message}\n\nThe model shown is kept.")
        self.ended.emit()

    def wait(self) -> None:
        """Block until the worker thread has ended (the window is closing; cancel first to be quick).

        The job's own signals that end the thread are queued to this (blocked) thread and would never
        arrive: the thread is told to quit here, and its loop ends as soon as the job returns.
        """
        self._closing = True
        try:
            if self.thread.isRunning():
                self.thread.quit()
                self.thread.wait()
        except RuntimeError:
            pass  # the thread object is already deleted: it has ended


def summary(path: str, comparison) -> str:
    """One status line: the deviation and what happened to the findings."""
    d = comparison.deviation
    counts = {}
    for change in comparison.findings:
        counts[change.status] = counts.get(change.status, 0) + 1
    changes = ", ".join(f"{n} {status}" for status, n in counts.items()) or "no findings over tolerance"
    return f"compared with {path}: deviation max {d.max_mm:.4g} mm, mean {d.mean_mm:.4g} mm; findings: {changes}"


def compare_now(window, path: str) -> Comparing | None:
    """Compare with the revision in ``path`` in the background; the deviation shows when it is ready.

    Returns the running comparison, or None when one is still running (the status bar says so).
    """
    running = getattr(window, "comparing", None)
    if running is not None:
        window.statusBar().showMessage("still comparing with the previous file", 5000)
        return None
    window.comparing = comparing = Comparing(window, path)
    comparing.ended.connect(lambda: setattr(window, "comparing", None))
    window.compare_status.follow(comparing, f"comparing with {Path(path).name}", (comparing.ended,))
    return comparing


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
