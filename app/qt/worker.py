"""Loading a model off the GUI thread: read, sample, prepare sections, measure seams."""

from __future__ import annotations

import threading

from PySide6.QtCore import QObject, QThread, Signal, Slot

from app.state.loading import prepare, with_seams_judged
from app.state.revisions import comparison_for
from geometry.errors import BattenError


class LoadJob(QObject):
    """Prepares one file in a worker thread; the result is adopted on the GUI thread.

    Signals
    -------
    progress(int, str)
        Percent done and what is being done.
    finished(object)
        The :class:`app.state.Loaded` bundle, seams not yet measured: the
        window shows it at once.
    seams_ready(object)
        The same bundle with its seams measured (the job's last signal).
    failed(str)
        A message that names the file and the cause.
    """

    progress = Signal(int, str)
    finished = Signal(object)
    seams_ready = Signal(object)
    failed = Signal(str)

    def __init__(self, path: str, profile=None, model=None):
        super().__init__()
        self.path = path
        self.profile = profile  # the session's Profile: the seams are judged by it
        self.model = model  # already read (by the command line), or None to read ``path``

    @Slot()
    def run(self) -> None:
        report = lambda f, m: self.progress.emit(int(round(100 * f)), m)  # noqa: E731
        try:
            loaded = prepare(self.path, model=self.model, progress=report, seams=False)
            self.finished.emit(loaded)
            self.seams_ready.emit(with_seams_judged(loaded, report, self.profile))
        except BattenError as exc:
            self.failed.emit(str(exc))
        except Exception as exc:  # a bug of ours must not kill the window; say what happened
            self.failed.emit(f"{self.path}: internal error while opening ({type(exc).__name__}: {exc})")


class SeamJob(QObject):
    """Measures the seams of the model on screen again under another profile, in a worker thread.

    Signals
    -------
    seams_ready(object)
        The bundle with its seams measured under ``profile``.
    failed(str)
    """

    seams_ready = Signal(object)
    failed = Signal(str)

    def __init__(self, loaded, profile):
        super().__init__()
        self.loaded = loaded
        self.profile = profile

    @Slot()
    def run(self) -> None:
        try:
            self.seams_ready.emit(with_seams_judged(self.loaded, profile=self.profile))
        except BattenError as exc:
            self.failed.emit(str(exc))
        except Exception as exc:  # a bug of ours must not kill the window; say what happened
            self.failed.emit(f"internal error while measuring the seams ({type(exc).__name__}: {exc})")


class CompareJob(QObject):
    """Compares the model on screen with an earlier revision in a worker thread.

    Signals
    -------
    progress(str)
        What is being done.
    compared(object)
        ``(model, comparison, deviation)``: the model it was compared for, and
        what :func:`app.state.revisions.comparison_for` returns.
    failed(str)
        A message naming the file and the cause.
    cancelled()
        Stopped on request (:meth:`cancel`) at its next step; nothing is shown.
    """

    progress = Signal(str)
    compared = Signal(object)
    failed = Signal(str)
    cancelled = Signal()

    def __init__(self, model, samples, settings, old_path: str):
        super().__init__()
        self.model, self.samples, self.settings, self.old_path = model, samples, settings, old_path
        self._stop = threading.Event()

    def cancel(self) -> None:
        """Ask the job to stop; it does at its next step (a batch of seams, a stage; a read runs to its end)."""
        self._stop.set()

    def _check(self) -> None:
        if self._stop.is_set():
            raise _Stopped

    def _step(self, line: str) -> None:
        self._check()
        self.progress.emit(line)

    @Slot()
    def run(self) -> None:
        try:
            found = comparison_for(self.model, self.samples, self.settings, self.old_path, self._step)
            self._check()  # cancelled during the last step: show nothing
            self.compared.emit((self.model, *found))
        except _Stopped:
            self.cancelled.emit()
        except BattenError as exc:
            self.failed.emit(str(exc))
        except Exception as exc:  # a bug of ours must not kill the window; say what happened
            self.failed.emit(f"{self.old_path}: internal error while comparing ({type(exc).__name__}: {exc})")


class _Stopped(Exception):
    """Raised at a comparison's next step once it is cancelled: unwinds the work, caught by its job."""


def start_job(job: LoadJob | SeamJob | CompareJob, parent: QObject) -> QThread:
    """Run ``job`` in a new thread that ends (and is deleted) when the job reports its last signal."""
    thread = QThread(parent)
    job.moveToThread(thread)
    thread.started.connect(job.run)
    last = job.compared if isinstance(job, CompareJob) else job.seams_ready
    last.connect(thread.quit)
    job.failed.connect(thread.quit)
    if isinstance(job, CompareJob):
        job.cancelled.connect(thread.quit)
    thread.finished.connect(thread.deleteLater)
    thread.start()
    return thread
