"""The status-bar strip of long work running in the background: what it does, how far, and Cancel.

One strip serves every such task (the report export, the comparison with a
revision): a task is a QObject with a ``progress(int, str)`` signal (percent,
or -1 when the work cannot say how far it is), signals that say it ended, and
``cancel()`` and ``wait()``.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QHBoxLayout, QLabel, QProgressBar, QToolButton, QWidget

# Characters of the task's current step shown in the status bar (the rest in its tooltip).
LABEL_CHARACTERS = 44


class TaskStatus(QWidget):
    """Status-bar strip of one running task: a label, a progress bar and Cancel.

    Parameters
    ----------
    cancel_tip : str
        What Cancel does to this kind of task (its tooltip).
    """

    def __init__(self, cancel_tip: str, parent: QWidget | None = None):
        super().__init__(parent)
        self.label = QLabel()
        self.bar = QProgressBar()
        self.bar.setMaximumWidth(160)
        self.cancel = QToolButton()
        self.cancel.setText("Cancel")
        self.cancel.setToolTip(cancel_tip)
        layout = QHBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.label)
        layout.addWidget(self.bar)
        layout.addWidget(self.cancel)
        self.task = None
        self.cancel.clicked.connect(self._cancel)
        self.setVisible(False)

    def follow(self, task, title: str, ends) -> None:
        """Show ``task`` until one of the signals in ``ends`` fires."""
        self.task = task
        self.bar.setRange(0, 100)
        self.bar.setValue(0)
        self.label.setText(title)
        self.cancel.setEnabled(True)
        task.progress.connect(self._progress)
        for ended in ends:
            ended.connect(self._ended)
        self.setVisible(True)

    def _progress(self, percent: int, text: str) -> None:
        if percent < 0:
            self.bar.setRange(0, 0)  # busy: the work cannot say how far it is
        else:
            self.bar.setRange(0, 100)
            self.bar.setValue(percent)
        # a permanent status widget keeps its first width: give the words room, the whole line in the tip
        width = self.label.fontMetrics().horizontalAdvance("x" * LABEL_CHARACTERS)
        self.label.setMinimumWidth(width)
        self.label.setText(self.label.fontMetrics().elidedText(text, Qt.TextElideMode.ElideMiddle, width))
        self.label.setToolTip(text)

    def _cancel(self) -> None:
        if self.task is not None:
            self.label.setText("stopping...")
            self.cancel.setEnabled(False)
            self.task.cancel()

    def _ended(self, *_) -> None:
        self.task = None
        self.setVisible(False)

    def stop(self) -> None:
        """Cancel a running task and wait for it (the window is closing)."""
        task = self.task
        if task is not None:
            task.cancel()
            task.wait()
