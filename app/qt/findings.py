"""The findings list (seams, free edges, inflections, curvature extrema, tooling) and the profile that judges them."""

from __future__ import annotations

from PySide6.QtCore import QSignalBlocker, Qt, Signal
from PySide6.QtGui import QBrush, QColor
from PySide6.QtWidgets import QComboBox, QHBoxLayout, QLabel, QTreeWidget, QTreeWidgetItem, QVBoxLayout, QWidget

from app.profiles import shipped_names
from app.render.colours import VERDICT
from app.review.result import Kind
from app.state import Session
from app.state.revisions import decision_mark
from app.state.session import KIND_ORDER, VERDICT_ORDER

from .dispositions import DispositionEditor

ANY = "any"
FROM_FILE = "from file…"
KIND_WORDS = {
    Kind.FACE: "faces not checked",
    Kind.SEAM: "seams",
    Kind.FREE_EDGE: "free edges",
    Kind.INFLECTION: "inflections",
    Kind.SECTION_EXTREMUM: "curvature extrema of sections",
    Kind.CURVATURE: "tightest spot of each face",
    Kind.DRAFT: "faces short of draft",
    Kind.UNDERCUT: "undercut regions",
    Kind.CUTTER_REACH: "out of the cutter's reach",
}


class ProfileChooser(QComboBox):
    """The tolerance profile in force: the shipped ones by name, the one in force if from a file, and "from file…".

    Signals
    -------
    wanted(str)
        A shipped profile's name; ``FROM_FILE`` when the user asks for a file
        (the window opens the dialog). The list shows the session's profile
        again until the session reports a change.
    """

    wanted = Signal(str)

    def __init__(self, session: Session, parent=None):
        super().__init__(parent)
        self.session = session
        self.setToolTip("Tolerances the findings are judged against (as batten check --profile)")
        self.activated.connect(lambda i: self.wanted.emit(self.itemData(i)))
        session.subscribe("profile", self.refresh)
        self.refresh()

    def refresh(self, *_):
        blocker = QSignalBlocker(self)
        self.clear()
        for name in shipped_names():
            self.addItem(name, name)
        current = self.session.profile.name
        if self.findData(current) < 0:  # a user's file: show it by its name
            self.addItem(f"{current} (file)", current)
        self.addItem(FROM_FILE, FROM_FILE)
        self.setCurrentIndex(self.findData(current))
        del blocker


class FindingsPanel(QWidget):
    """Filterable list; choosing an entry selects it in the session (the window then shows it).

    Signals
    -------
    chosen(int)
        Index of the finding in ``session.findings``.
    """

    chosen = Signal(int)

    def __init__(self, session: Session, parent=None):
        super().__init__(parent)
        self.session = session
        self.kind = QComboBox()
        self.kind.addItem("all kinds", ANY)
        for kind in KIND_ORDER:
            self.kind.addItem(KIND_WORDS[kind], str(kind))
        self.verdict = QComboBox()
        self.verdict.addItem("any verdict", ANY)
        for verdict in VERDICT_ORDER:
            self.verdict.addItem(str(verdict), str(verdict))
        self.tree = QTreeWidget()
        self.tree.setHeaderLabels(["Verdict", "Finding"])
        self.tree.setRootIsDecorated(False)
        self.tree.setColumnWidth(0, 56)
        self.summary = QLabel()
        self.profile = ProfileChooser(session)
        chooser = QHBoxLayout()
        chooser.addWidget(QLabel("Judged by profile"))
        chooser.addWidget(self.profile, 1)
        filters = QHBoxLayout()
        filters.addWidget(self.kind)
        filters.addWidget(self.verdict)
        layout = QVBoxLayout(self)
        layout.addLayout(chooser)
        layout.addLayout(filters)
        layout.addWidget(self.tree, 1)
        layout.addWidget(self.summary)
        self.decision = DispositionEditor(session)
        layout.addWidget(self.decision)
        self.kind.currentIndexChanged.connect(self.refresh)
        self.verdict.currentIndexChanged.connect(self.refresh)
        self.tree.currentItemChanged.connect(self._current_changed)
        self.tree.itemClicked.connect(lambda item, _col: self._current_changed(item))
        session.subscribe("findings", self.refresh)
        session.subscribe("model", self.refresh)
        session.subscribe("review", self.refresh)
        self.refresh()

    def _filters(self):
        kind, verdict = self.kind.currentData(), self.verdict.currentData()
        return (None if kind == ANY else (kind,)), (None if verdict == ANY else (verdict,))

    def refresh(self, *_):
        kinds, verdicts = self._filters()
        shown = self.session.filtered_findings(kinds, verdicts)
        blocker = QSignalBlocker(self.tree)
        self.tree.clear()
        for index, finding in shown:
            item = QTreeWidgetItem([finding.verdict, finding.title + decision_mark(self.session, finding)])
            item.setData(0, Qt.ItemDataRole.UserRole, index)
            item.setToolTip(1, finding.detail or finding.title)
            item.setForeground(0, QBrush(QColor(VERDICT.get(finding.verdict, VERDICT["note"]))))
            self.tree.addTopLevelItem(item)
        del blocker
        failing = sum(1 for f in self.session.findings if f.verdict == "fail")
        self.summary.setText(
            f"{len(shown)} shown of {len(self.session.findings)}; {failing} failing"
            f" (profile {self.session.profile.name})"
        )

    def item_for(self, index: int) -> QTreeWidgetItem | None:
        for row in range(self.tree.topLevelItemCount()):
            item = self.tree.topLevelItem(row)
            if item.data(0, Qt.ItemDataRole.UserRole) == index:
                return item
        return None

    def _current_changed(self, item, *_):
        if item is not None:
            self.chosen.emit(int(item.data(0, Qt.ItemDataRole.UserRole)))
