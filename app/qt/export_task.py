"""Exporting the report without holding up the window: a process of its own, progress, Cancel.

The report is written by ``python -m app.report.window_export`` (see there):
the window keeps turning and answering while the model is checked, pictured
and laid out, and Cancel stops the process. No partial file is left: the
writer only ever replaces the target whole, and after a cancel any temporary
file of the writer's in the target folder is removed as well.
"""

from __future__ import annotations

import os
import pickle
import shutil
import sys
import tempfile
from pathlib import Path

from PySide6.QtCore import QObject, QProcess, QProcessEnvironment, QTimer, Signal

from app.report.window_export import ExportRequest

# How long a cancelled export may take to remove its temporary file before it is killed (ms).
STOP_GRACE_MS = 10_000


class ReportExport(QObject):
    """One report being written by a background process.

    Signals
    -------
    progress(int, str)
        Percent done and what is being done.
    written(str)
        The report's path: it is complete.
    failed(str)
        A message naming the file and the cause; no file was written.
    cancelled()
        Stopped on request; no file was written.
    """

    progress = Signal(int, str)
    written = Signal(str)
    failed = Signal(str)
    cancelled = Signal()

    def __init__(self, request: ExportRequest, parent: QObject | None = None):
        super().__init__(parent)
        self.request = request
        self.path = request.path
        self._stopping = False
        self._error = ""
        self._buffer = b""
        self._folder = tempfile.mkdtemp(prefix="batten-export-")  # private (0700): the model stays ours
        self._request_file = os.path.join(self._folder, "request.pickle")
        with open(self._request_file, "wb") as fh:
            pickle.dump(request, fh, protocol=pickle.HIGHEST_PROTOCOL)
        self.process = QProcess(self)
        self.process.setProgram(sys.executable)
        self.process.setArguments(["-m", "app.report.window_export", self._request_file])
        env = QProcessEnvironment.systemEnvironment()
        env.insert("QT_QPA_PLATFORM", "offscreen")  # the PDF layout needs Qt, not a screen
        self.process.setProcessEnvironment(env)
        self.process.readyReadStandardOutput.connect(self._read)
        self.process.finished.connect(self._ended)
        self.process.errorOccurred.connect(self._not_started)

    def start(self) -> None:
        self.progress.emit(0, "starting the report")
        self.process.start()

    @property
    def running(self) -> bool:
        return self.process.state() != QProcess.ProcessState.NotRunning

    def cancel(self) -> None:
        """Stop the export; the target is left as it was."""
        if not self.running:
            return
        self._stopping = True
        self.process.terminate()  # SIGTERM: the writer discards its temporary file on the way out
        QTimer.singleShot(STOP_GRACE_MS, self, self._kill)

    def _kill(self) -> None:
        if self.running:
            self.process.kill()  # its temporary file, if any, is removed when it has ended

    def wait(self, ms: int = -1) -> bool:
        """Block until the process ends (tests, closing the window); False on time-out."""
        return not self.running or self.process.waitForFinished(ms)

    def _read(self) -> None:
        self._buffer += bytes(self.process.readAllStandardOutput())
        *lines, self._buffer = self._buffer.split(b"\n")
        for raw in lines:
            kind, _, rest = raw.decode("utf-8", "replace").partition(" ")
            if kind == "progress":
                fraction, _, text = rest.partition(" ")
                try:
                    self.progress.emit(round(100 * float(fraction)), text)
                except ValueError:
                    continue
            elif kind == "error":
                self._error = rest

    def _ended(self, code: int, status: QProcess.ExitStatus) -> None:
        self._read()
        shutil.rmtree(self._folder, ignore_errors=True)
        if self._stopping:
            remove_partial_files(self.path)
            self.cancelled.emit()
        elif status == QProcess.ExitStatus.NormalExit and code == 0 and os.path.isfile(self.path):
            self.progress.emit(100, "report written")
            self.written.emit(self.path)
        else:
            remove_partial_files(self.path)
            detail = bytes(self.process.readAllStandardError()).decode("utf-8", "replace").strip().splitlines()
            self.failed.emit(
                self._error or f"{self.path}: the report writer stopped ({(detail or ['no message'])[-1]})"
            )

    def _not_started(self, error: QProcess.ProcessError) -> None:
        if error == QProcess.ProcessError.FailedToStart:
            shutil.rmtree(self._folder, ignore_errors=True)
            self.failed.emit(f"{self.path}: cannot start the report writer ({self.process.errorString()})")


def remove_partial_files(path: str) -> None:
    """Remove temporary files the atomic writer may have left for ``path`` (a killed process cannot)."""
    target = Path(path)
    for leftover in target.parent.glob(f".{target.stem}.*.part{target.suffix}"):
        leftover.unlink(missing_ok=True)


def start_report(window, path: str) -> ReportExport | None:
    """Write the report of ``window``'s model to ``path`` in the background, shown in its status bar.

    Returns the running export, or None when none was started (one is already
    running, or the target cannot be written: a dialog said why).
    """
    from PySide6.QtWidgets import QMessageBox

    from app.report.window_export import request_for
    from geometry.errors import BattenError
    from geometry.io.files import check_writable

    status = window.export_status
    if status.task is not None:
        window.statusBar().showMessage("a report is still being written: wait for it or cancel it", 5000)
        return None
    request = request_for(window.session, path)
    try:
        check_writable(path, request.inputs)  # before the work, not after
    except (BattenError, OSError) as exc:
        QMessageBox.critical(window, "Cannot write the report", str(exc))
        return None
    export = ReportExport(request, window)
    export.written.connect(lambda written: window.statusBar().showMessage(f"report written: {written}", 8000))
    export.failed.connect(lambda message: QMessageBox.critical(window, "Cannot write the report", message))
    export.cancelled.connect(lambda: window.statusBar().showMessage("report cancelled: no file written", 5000))
    status.follow(export, "report", (export.written, export.failed, export.cancelled))
    export.start()
    return export
