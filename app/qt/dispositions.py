"""The reviewer's decision on the selected finding: accept with a reason, or mark to fix.

Shown under the findings list. The widget holds no state of its own: it reads
the session's review loop (:mod:`app.state.revisions`) and sends decisions
back to it, which saves the review file at once.
"""

from __future__ import annotations

from PySide6.QtCore import QSignalBlocker, Signal
from PySide6.QtWidgets import (
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QPushButton,
    QVBoxLayout,
)

from app.review.review_file import ACCEPTED, TO_FIX
from app.state import Session
from app.state.revisions import decide, finding_key
from geometry.io.files import write_atomically


class DispositionEditor(QGroupBox):
    """Decision on the finding selected in the session.

    Signals
    -------
    failed(str)
        A decision could not be recorded (the window shows the message).
    wants_file()
        A decision was asked for before a review file was chosen.
    """

    failed = Signal(str)
    wants_file = Signal()

    def __init__(self, session: Session, parent=None):
        super().__init__("Review decision", parent)
        self.session = session
        self.file_label = QLabel()
        self.file_label.setWordWrap(True)
        self.reviewer = QLineEdit()
        self.reviewer.setPlaceholderText("reviewer's name")
        self.current = QLabel()
        self.current.setWordWrap(True)
        # Room for two lines of decisions: the list above takes every spare pixel otherwise.
        self.current.setMinimumHeight(2 * self.current.fontMetrics().lineSpacing() + 6)
        self.reason = QLineEdit()
        self.reason.setPlaceholderText("why it is acceptable (required to accept)")
        self.accept_button = QPushButton("Accept with reason")
        self.fix_button = QPushButton("To fix")
        self.file_button = QPushButton("Review file…")
        row = QHBoxLayout()
        row.addWidget(QLabel("Reviewer"))
        row.addWidget(self.reviewer, 1)
        buttons = QHBoxLayout()
        buttons.addWidget(self.accept_button)
        buttons.addWidget(self.fix_button)
        buttons.addWidget(self.file_button)
        layout = QVBoxLayout(self)
        layout.addWidget(self.file_label)
        layout.addLayout(row)
        layout.addWidget(self.current)
        layout.addWidget(self.reason)
        layout.addLayout(buttons)
        self.reviewer.textEdited.connect(self._name_changed)
        self.accept_button.clicked.connect(lambda: self._decide(ACCEPTED))
        self.fix_button.clicked.connect(lambda: self._decide(TO_FIX))
        self.file_button.clicked.connect(self.wants_file.emit)
        for topic in ("selection", "findings", "model", "review"):
            session.subscribe(topic, self.refresh)
        self.refresh()

    def _name_changed(self, text: str) -> None:
        self.session.review.reviewer = text

    def _selected(self):
        finding = self.session.selected_finding
        return finding, (None if finding is None else finding_key(self.session, finding))

    def _decide(self, decision: str) -> None:
        from geometry.errors import BattenError

        finding, key = self._selected()
        if key is None:
            return
        if self.session.review.path is None:
            self.wants_file.emit()
            if self.session.review.path is None:
                return
        try:
            decide(self.session, finding, decision, self.reason.text(), write_atomically)
        except BattenError as exc:
            self.failed.emit(str(exc))
        else:
            self.reason.clear()

    def refresh(self, *_):
        review = self.session.review
        path = review.path or "none chosen: the first decision asks for one"
        self.file_label.setText(f"Review file: {path}")
        blocker = QSignalBlocker(self.reviewer)
        if self.reviewer.text() != review.reviewer:
            self.reviewer.setText(review.reviewer)
        del blocker
        finding, key = self._selected()
        judged = key is not None
        for w in (self.accept_button, self.fix_button, self.reason):
            w.setEnabled(judged)
        if finding is None:
            self.current.setText("Choose a finding in the list.")
        elif not judged:
            self.current.setText("Notes are not judged: nothing to decide.")
        else:
            decisions = review.decisions_on(key)
            words = "; ".join(
                f"{d.decision} by {d.reviewer} on {d.date}" + (f" ({d.reason})" if d.reason else "") for d in decisions
            )
            self.current.setText(words or "No decision yet.")
            self.current.setToolTip(f"recorded in the review file as: {key.label}")
