"""Side panel: what the faces show (the section tool is in :mod:`app.qt.section_panel`).

Each panel listens to the session and updates itself with its signals
blocked; a user change goes to the session, never straight to the view.
"""

from __future__ import annotations

from PySide6.QtCore import QSignalBlocker
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QDoubleSpinBox,
    QFormLayout,
    QGroupBox,
    QLabel,
    QPushButton,
    QSpinBox,
    QVBoxLayout,
    QWidget,
)

from app.render.legend import tick_decimals
from app.state import Measure, Mode, Session
from app.state.settings import AXES, STRIPE_MODES, VALUE_MODES
from app.state.tooling import SUGGESTIONS
from geometry.errors import BattenError

RANGE_DECIMALS = 8


def range_note(mode: Mode) -> str:
    """What stands in the colour range's place in a mode without a typed range (empty where it has one)."""
    if mode in VALUE_MODES:
        return ""
    if mode == Mode.DRAFT:
        return "Colour range: the draft map is centred on the profile's draft limit (see its legend)."
    return "Colour range: set in the curvature and deviation views."


def _blocked(*widgets):
    return [QSignalBlocker(w) for w in widgets]


def _spin(low, high, step, decimals=None) -> QDoubleSpinBox | QSpinBox:
    box = QSpinBox() if decimals is None else QDoubleSpinBox()
    box.setRange(low, high)
    box.setSingleStep(step)
    if decimals is not None:
        box.setDecimals(decimals)
    box.setKeyboardTracking(False)  # act on Enter or arrows, not on every typed digit
    return box


class DisplayPanel(QWidget):
    """Mode, curvature measure and colour range, stripe settings, seam lines."""

    def __init__(self, session: Session, parent=None):
        super().__init__(parent)
        self.session = session
        self.mode = QComboBox()
        for mode in Mode:
            self.mode.addItem(mode.value.capitalize(), mode)
        self.measure = QComboBox()
        for measure in Measure:
            self.measure.addItem(measure.value, measure)
        self.auto_range = QCheckBox("automatic range")
        # Gaussian curvature of a 100 mm radius is 1e-4 1/mm^2: up to eight decimals
        self.low = _spin(-1e6, 1e6, 1e-4, RANGE_DECIMALS)
        self.high = _spin(-1e6, 1e6, 1e-4, RANGE_DECIMALS)
        # says why a typed range is not shown (empty while the range in force is the one typed)
        self.range_message = QLabel("")
        self.range_message.setStyleSheet("color: #b71c1c")
        # in the modes without a colour map the range rows give way to a note saying so
        self.range_note = QLabel("")
        self.range_note.setWordWrap(True)
        self.stripe_count = _spin(1, 200, 1)
        self.stripe_width = _spin(0.05, 0.95, 0.05, 2)
        self.stripe_direction = QComboBox()
        for axis in AXES:
            self.stripe_direction.addItem(f"along {axis}", axis)
        self.seams = QCheckBox("seam lines")
        self.pull = [_spin(-1e3, 1e3, 0.1, 4) for _ in range(3)]
        self.apply_pull = QPushButton("Set pull")
        self.suggest = QComboBox()
        self.suggest.addItem("pick a pull...", None)
        for how in SUGGESTIONS:
            self.suggest.addItem(how, how)

        surface = QGroupBox("Surface")
        form = QFormLayout(surface)
        form.addRow("Show", self.mode)
        form.addRow("Measure", self.measure)
        form.addRow(self.auto_range)
        form.addRow("From", self.low)
        form.addRow("To", self.high)
        form.addRow(self.range_message)
        form.addRow(self.range_note)
        self._surface_form = form
        form.addRow(self.seams)
        stripes = QGroupBox("Light stripes")
        sform = QFormLayout(stripes)
        sform.addRow("Count", self.stripe_count)
        sform.addRow("Light share", self.stripe_width)
        sform.addRow("Lines", self.stripe_direction)
        draft = QGroupBox("Draft (pull direction)")
        dform = QFormLayout(draft)
        for axis, box in zip("xyz", self.pull, strict=True):
            dform.addRow(f"Pull {axis}", box)
        dform.addRow(self.apply_pull)
        dform.addRow(self.suggest)
        layout = QVBoxLayout(self)
        layout.addWidget(surface)
        layout.addWidget(stripes)
        layout.addWidget(draft)
        layout.addStretch(1)

        self.mode.currentIndexChanged.connect(lambda: session.set_display(mode=self.mode.currentData()))
        self.measure.currentIndexChanged.connect(lambda: session.set_display(measure=self.measure.currentData()))
        self.auto_range.toggled.connect(self._range_changed)
        self.low.valueChanged.connect(self._range_changed)
        self.high.valueChanged.connect(self._range_changed)
        self.stripe_count.valueChanged.connect(lambda n: session.set_stripes(count=int(n)))
        self.stripe_width.valueChanged.connect(lambda w: session.set_stripes(width=float(w)))
        self.stripe_direction.currentIndexChanged.connect(
            lambda: session.set_stripes(direction=self.stripe_direction.currentData())
        )
        self.seams.toggled.connect(lambda on: session.set_display(show_seams=bool(on)))
        self.apply_pull.clicked.connect(self._pull_typed)
        self.suggest.currentIndexChanged.connect(self._pull_suggested)
        session.subscribe("display", self.refresh)
        session.subscribe("tooling", self.refresh)
        session.subscribe("model", self.refresh)
        session.subscribe("review", self.refresh)
        self.refresh()

    def _pull_typed(self, *_):
        try:
            self.session.set_pull([box.value() for box in self.pull])
        except BattenError:
            self.refresh()  # a zero vector: show the pull in force again

    def _pull_suggested(self, *_):
        how = self.suggest.currentData()
        if how is not None:
            self.session.suggest_pull(how)
        with QSignalBlocker(self.suggest):
            self.suggest.setCurrentIndex(0)

    def _range_changed(self, *_):
        low, high = self.low.value(), self.high.value()
        if self.auto_range.isChecked():
            self.range_message.setText("")
            self.session.set_colour_range(True)
        elif low < high:
            self.range_message.setText("")
            self.session.set_colour_range(False, low, high)
        else:
            # short enough for the panel's width; the whole story in the tooltip
            self.range_message.setText("Not applied: From must be below To")
            self.range_message.setToolTip(f"From {low:g} is not below To {high:g}; the map keeps its last range.")

    def refresh(self, *_):
        d = self.session.display
        widgets = (
            self.mode,
            self.measure,
            self.auto_range,
            self.low,
            self.high,
            self.stripe_count,
            self.stripe_width,
            self.stripe_direction,
            self.seams,
            *self.pull,
        )
        blockers = _blocked(*widgets)
        for box, value in zip(self.pull, self.session.pull, strict=True):
            box.setValue(value)
        self.mode.setCurrentIndex(self.mode.findData(d.mode))
        self.measure.setCurrentIndex(self.measure.findData(d.measure))
        self.auto_range.setChecked(d.colour_range.auto)
        if self.session.model is not None and d.mode in VALUE_MODES:
            low, high = self.session.colour_limits()
            # the legend's digits and two more to type a finer limit (8 decimals showed 200.00000000 mm)
            decimals = min(RANGE_DECIMALS, max(4, tick_decimals(low, high) + 2))
            for box, value in ((self.low, low), (self.high, high)):
                box.setDecimals(decimals)
                box.setValue(value)
        self.stripe_count.setValue(d.stripes.count)
        self.stripe_width.setValue(d.stripes.width)
        self.stripe_direction.setCurrentIndex(self.stripe_direction.findData(d.stripes.direction))
        self.seams.setChecked(d.show_seams)
        del blockers
        self.range_message.setText("")  # the boxes show the range in force again
        valued = d.mode in VALUE_MODES
        self.measure.setEnabled(d.mode == Mode.CURVATURE)
        self.auto_range.setEnabled(valued)
        self.low.setEnabled(valued and not d.colour_range.auto)
        self.high.setEnabled(valued and not d.colour_range.auto)
        for row in (self.auto_range, self.low, self.high):
            self._surface_form.setRowVisible(row, valued)
        self.range_note.setText(range_note(d.mode))
        self._surface_form.setRowVisible(self.range_note, not valued)
        for w in (self.stripe_count, self.stripe_width, self.stripe_direction):
            w.setEnabled(d.mode in STRIPE_MODES)
