"""The findings list (seams, free edges, inflections, curvature extrema, tooling) and the profile that judges them."""

from __future__ import annotations

from PySide6.QtCore import QSignalBlocker, Qt, Signal
from PySide6.QtWidgets import QComboBox, QHBoxLayout, QLabel, QSplitter, QTreeWidgetItem, QVBoxLayout, QWidget

from app.profiles import shipped_names
from app.review.result import Kind
from app.state import Session
from app.state.finding_groups import group_findings
from app.state.session import KIND_ORDER, VERDICT_ORDER

from .dispositions import DispositionEditor
from .findings_tree import FindingDetail, FindingsTree

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
    """Filterable tree of findings, the chosen one's full text and the decision on it.

    Choosing an entry selects it in the session (the window then shows it).

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
        self.tree = FindingsTree(session, KIND_WORDS)
        self.detail = FindingDetail(session, KIND_WORDS)
        self.summary = QLabel()
        self.summary.setWordWrap(True)
        self.summary.setMinimumHeight(2 * self.summary.fontMetrics().lineSpacing() + 4)  # room to wrap
        self.profile = ProfileChooser(session)
        chooser = QHBoxLayout()
        chooser.addWidget(QLabel("Judged by profile"))
        chooser.addWidget(self.profile, 1)
        filters = QHBoxLayout()
        filters.addWidget(self.kind)
        filters.addWidget(self.verdict)
        split = QSplitter(Qt.Orientation.Vertical)
        split.addWidget(self.tree)
        split.addWidget(self.detail)
        split.setStretchFactor(0, 3)
        split.setStretchFactor(1, 1)
        layout = QVBoxLayout(self)
        layout.addLayout(chooser)
        layout.addLayout(filters)
        layout.addWidget(split, 1)
        layout.addWidget(self.summary)
        self.decision = DispositionEditor(session)
        layout.addWidget(self.decision)
        self.kind.currentIndexChanged.connect(self.refresh)
        self.verdict.currentIndexChanged.connect(self.refresh)
        self.tree.chosen.connect(self.chosen.emit)
        for topic in ("findings", "model", "review", "loading"):
            session.subscribe(topic, self.refresh)
        self.refresh()

    def _filters(self):
        kind, verdict = self.kind.currentData(), self.verdict.currentData()
        return (None if kind == ANY else (kind,)), (None if verdict == ANY else (verdict,))

    def refresh(self, *_):
        if self.session.loading is not None:
            # the findings on record belong to the model shown, not to the one opening: show none
            self.tree.show_groups([])
            self.summary.setText(f"Opening {self.session.loading}: its findings follow.")
            return
        kinds, verdicts = self._filters()
        shown = self.session.filtered_findings(kinds, verdicts)
        self.tree.show_groups(group_findings(shown, KIND_ORDER))
        failing = sum(1 for f in self.session.findings if f.verdict == "fail")
        text = (
            f"{len(shown)} shown of {len(self.session.findings)}; {failing} failing"
            f" (profile {self.session.profile.name})"
        )
        if self.session.loaded is not None and not self.session.loaded.seams_measured:
            text += "; the seams are still being measured"
        self.summary.setText(text)

    def entries(self) -> list[QTreeWidgetItem]:
        """The rows of findings (not their groups), in the order shown."""
        return self.tree.leaves()

    def item_for(self, index: int) -> QTreeWidgetItem | None:
        return self.tree.item_for(index)
