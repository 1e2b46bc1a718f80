"""The findings as a tree (kind, then face or section curve) and a pane with the chosen entry's full text.

The grouping is :mod:`app.state.finding_groups`'; the widgets only draw it.
Groups with a failing entry start open, the others (notes, passes) folded; a
group the user opens or closes stays so while the list is redrawn (a drag of
the plane redraws it).
"""

from __future__ import annotations

import html

from PySide6.QtCore import QSignalBlocker, Qt, Signal
from PySide6.QtGui import QBrush, QColor
from PySide6.QtWidgets import QAbstractItemView, QHeaderView, QTextBrowser, QTreeWidget, QTreeWidgetItem

from app.render.colours import VERDICT
from app.review.result import Verdict
from app.state import FindingEntry, Session
from app.state.finding_groups import KindGroup, place_of
from app.state.revisions import decision_mark

ROLE = Qt.ItemDataRole.UserRole
# The verdict stands first, narrow, where it cannot be pushed out of sight by a long title.
VERDICT_COLUMN, TEXT_COLUMN = 0, 1
VERDICT_PIXELS = 48


def _count(total: int, failing: int) -> str:
    return f"{total}, {failing} failing" if failing else f"{total}"


def _verdict_cell(item: QTreeWidgetItem, verdict: str) -> None:
    item.setText(VERDICT_COLUMN, verdict)
    item.setForeground(VERDICT_COLUMN, QBrush(QColor(VERDICT.get(verdict, VERDICT["note"]))))


class FindingsTree(QTreeWidget):
    """Kind groups, place groups, entries; choosing an entry emits its index in ``session.findings``.

    Signals
    -------
    chosen(int)
    """

    chosen = Signal(int)

    def __init__(self, session: Session, kind_words: dict, parent=None):
        super().__init__(parent)
        self.session = session
        self.kind_words = kind_words
        self._folding: dict[tuple, bool] = {}  # groups the user opened or closed, by (kind, place)
        self.setHeaderLabels(["Verdict", "Finding"])
        self.setTreePosition(TEXT_COLUMN)  # the branches open in the text's column
        self.setTextElideMode(Qt.TextElideMode.ElideNone)  # never cut a title: scroll sideways instead
        self.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAsNeeded)
        self.setHorizontalScrollMode(QAbstractItemView.ScrollMode.ScrollPerPixel)
        header = self.header()
        header.setStretchLastSection(False)
        header.setSectionResizeMode(VERDICT_COLUMN, QHeaderView.ResizeMode.Fixed)
        header.resizeSection(VERDICT_COLUMN, VERDICT_PIXELS)
        header.setSectionResizeMode(TEXT_COLUMN, QHeaderView.ResizeMode.ResizeToContents)
        self.setUniformRowHeights(True)
        self.currentItemChanged.connect(lambda item, _previous: self._choose(item))
        self.itemClicked.connect(lambda item, _col: self._choose(item))
        self.itemExpanded.connect(lambda item: self._remember(item, True))
        self.itemCollapsed.connect(lambda item: self._remember(item, False))

    def _choose(self, item) -> None:
        if item is not None and item.data(TEXT_COLUMN, ROLE) is not None:
            self.chosen.emit(int(item.data(TEXT_COLUMN, ROLE)))

    def _remember(self, item, open_: bool) -> None:
        key = item.data(VERDICT_COLUMN, ROLE)
        if key is not None:
            self._folding[tuple(key)] = open_

    def _group_item(self, parent, text: str, key: tuple, failing: int, default_open: bool) -> QTreeWidgetItem:
        item = QTreeWidgetItem(parent, ["", text])
        item.setData(VERDICT_COLUMN, ROLE, list(key))
        if failing:
            _verdict_cell(item, str(Verdict.FAIL))
        font = item.font(TEXT_COLUMN)
        font.setBold(parent is self)
        item.setFont(TEXT_COLUMN, font)
        item.setExpanded(self._folding.get(key, default_open))
        return item

    def _entry_item(self, parent, index: int, finding: FindingEntry) -> QTreeWidgetItem:
        item = QTreeWidgetItem(parent, ["", finding.title + decision_mark(self.session, finding)])
        _verdict_cell(item, str(finding.verdict))
        item.setData(TEXT_COLUMN, ROLE, index)
        item.setToolTip(TEXT_COLUMN, finding.detail or finding.title)
        return item

    def show_groups(self, groups: list[KindGroup]) -> None:
        """Redraw from ``groups``, keeping the entry chosen in the session current."""
        blocker = QSignalBlocker(self)
        self.clear()
        for group in groups:
            entries = group.entries
            words = self.kind_words.get(group.kind, str(group.kind))
            text = f"{words} ({_count(len(entries), group.failing)})"
            top = self._group_item(self, text, (str(group.kind),), group.failing, group.failing > 0)
            for place in group.places:
                parent = top
                if len(place.entries) > 1:  # one entry needs no group of its own
                    key = (str(group.kind), place.place)
                    text = f"{place.place} ({_count(len(place.entries), place.failing)})"
                    parent = self._group_item(top, text, key, place.failing, place.failing > 0)
                for index, finding in place.entries:
                    self._entry_item(parent, index, finding)
        current = self.item_for(self.session.selection) if self.session.selection is not None else None
        if current is not None:
            self.setCurrentItem(current)
        del blocker

    def leaves(self) -> list[QTreeWidgetItem]:
        """Every entry (not the group rows), in the order shown."""
        found, stack = [], [self.topLevelItem(i) for i in reversed(range(self.topLevelItemCount()))]
        while stack:
            item = stack.pop()
            if item.data(TEXT_COLUMN, ROLE) is not None:
                found.append(item)
            stack.extend(item.child(i) for i in reversed(range(item.childCount())))
        return found

    def item_for(self, index: int) -> QTreeWidgetItem | None:
        return next((item for item in self.leaves() if item.data(TEXT_COLUMN, ROLE) == index), None)


class FindingDetail(QTextBrowser):
    """The whole text of the finding chosen in the session: title, verdict, place, measures, decisions."""

    def __init__(self, session: Session, kind_words: dict, parent=None):
        super().__init__(parent)
        self.session = session
        self.kind_words = kind_words
        self.setOpenLinks(False)
        lines = self.fontMetrics().lineSpacing()
        self.setMinimumHeight(4 * lines + 12)
        self.setMaximumHeight(8 * lines + 12)
        for topic in ("selection", "findings", "model", "review"):
            session.subscribe(topic, self.refresh)
        self.refresh()

    def text_for(self, finding: FindingEntry) -> str:
        """Plain lines of the full text (the pane shows them as HTML)."""
        where = ", ".join(f"{x:.3f}" for x in finding.position)
        kind = self.kind_words.get(finding.kind, str(finding.kind))
        lines = [finding.title, f"{finding.verdict} · {kind} · {place_of(finding)}"]
        if finding.detail:
            lines.append(finding.detail)
        lines.append(f"at ({where}) mm")
        mark = decision_mark(self.session, finding).strip(" []")
        if mark:
            lines.append(f"decisions: {mark}")
        return "\n".join(lines)

    def refresh(self, *_) -> None:
        finding = self.session.selected_finding
        if finding is None:
            self.setPlainText("Choose a finding to read all of it here.")
            return
        first, *rest = self.text_for(finding).split("\n")
        body = "<br>".join(html.escape(line) for line in rest)
        self.setHtml(f"<b>{html.escape(first)}</b><br>{body}")
