"""The section tool's panel: the family of planes, the combs, and exact placement of the plane.

The panel shows the session's section settings with its signals blocked and
sends what the user types to :mod:`app.state.plane`; it keeps no state of its
own. The nudge keys are actions the window puts in its menu.
"""

from __future__ import annotations

from collections.abc import Callable

from PySide6.QtCore import QSignalBlocker
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QDoubleSpinBox,
    QFormLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QSpinBox,
    QVBoxLayout,
    QWidget,
)

from app.state import Session
from app.state import plane as placing
from app.state.review_findings import curve_label

NUDGE_KEYS = {1: "Alt+Up", -1: "Alt+Down"}
NUDGE_FAR = 10  # steps of the shifted keys
NUDGE_FAR_KEYS = {NUDGE_FAR: "Alt+Shift+Up", -NUDGE_FAR: "Alt+Shift+Down"}
COORDINATE_RANGE = 1e6  # mm; the readers refuse larger models
SPIN_PIXELS = 64


def _spin(low, high, step, decimals=None) -> QDoubleSpinBox | QSpinBox:
    box = QSpinBox() if decimals is None else QDoubleSpinBox()
    box.setRange(low, high)
    box.setSingleStep(step)
    if decimals is not None:
        box.setDecimals(decimals)
    box.setKeyboardTracking(False)  # act on Enter or arrows, not on every typed digit
    box.setMinimumWidth(SPIN_PIXELS)  # the range's widest text would make the panel wider than its dock
    return box


def _row(*widgets) -> QHBoxLayout:
    row = QHBoxLayout()
    for w in widgets:
        row.addWidget(w)
    return row


class SectionPanel(QWidget):
    """Section tool: on/off, plane position and normal, family, combs, the curve in the graph.

    Parameters
    ----------
    session : Session
    view_direction : callable, optional
        Returns the viewing direction, shape (3,), for the "view" preset.
    """

    def __init__(self, session: Session, view_direction: Callable | None = None, parent=None):
        super().__init__(parent)
        self.session = session
        self.view_direction = view_direction
        self.enabled = QCheckBox("section plane (drag it in the view)")
        self.origin = [_spin(-COORDINATE_RANGE, COORDINATE_RANGE, 1.0, 3) for _ in range(3)]
        self.normal = [_spin(-1e3, 1e3, 0.1, 4) for _ in range(3)]
        for box in self.origin:
            box.setSuffix(" mm")
        self.apply_normal = QPushButton("Turn")
        self.apply_normal.setToolTip("Turn the plane to the normal typed (any length), about its point")
        self.presets = {name: QPushButton(name) for name in placing.PRESETS}
        self.presets["view"].setToolTip("Normal along the viewing direction")
        self.offset = _spin(-COORDINATE_RANGE, COORDINATE_RANGE, 1.0, 3)
        self.offset.setSuffix(" mm")
        self.offset.setToolTip("Distance of the plane from the model's centre, along its normal")
        self.step = _spin(1e-4, 1e5, 0.5, 4)
        self.step.setSuffix(" mm")
        self.back = QPushButton("◀ back")
        self.forward = QPushButton("forward ▶")
        self.back.setToolTip(f"Move the plane one step against its normal ({NUDGE_KEYS[-1]})")
        self.forward.setToolTip(f"Move the plane one step along its normal ({NUDGE_KEYS[1]})")
        self.snap = QPushButton("Through the selected finding")
        self.snap.setToolTip("Move the plane through the location of the finding chosen in the list")
        self.readout = QLabel()
        self.readout.setWordWrap(True)
        self.message = QLabel("")
        self.message.setStyleSheet("color: #b71c1c")
        self.message.setWordWrap(True)

        self.count = _spin(1, 50, 1)
        self.spacing = _spin(0.01, 1e5, 1.0, 2)
        self.spacing.setSuffix(" mm")
        self.gain = _spin(0.05, 50.0, 0.25, 2)
        self.density = _spin(2, 2000, 10)
        self.curve = QComboBox()  # the curve the graph shows (a click on a curve in the view chooses too)
        self.centre = QPushButton("Back to the middle")

        plane = QGroupBox("Plane")
        form = QFormLayout(plane)
        form.addRow(self.enabled)
        form.addRow(self.readout)  # first, where it stays in sight as the plane moves
        for axis, box in zip("xyz", self.origin, strict=True):
            form.addRow(f"Point {axis}", box)
        normal_row = _row(*self.normal)
        normal_row.addWidget(self.apply_normal)
        form.addRow("Normal", normal_row)
        form.addRow("Normal along", _row(*self.presets.values()))
        form.addRow("Offset", self.offset)
        form.addRow("Step", self.step)
        form.addRow(_row(self.back, self.forward))
        form.addRow(self.snap)
        form.addRow(self.centre)
        form.addRow(self.message)
        family = QGroupBox("Sections and combs")
        fform = QFormLayout(family)
        fform.addRow("Planes", self.count)
        fform.addRow("Spacing", self.spacing)
        fform.addRow("Comb scale", self.gain)
        fform.addRow("Teeth per model size", self.density)
        fform.addRow("Graph of curve", self.curve)
        layout = QVBoxLayout(self)
        layout.addWidget(plane)
        layout.addWidget(family)
        layout.addStretch(1)

        self.enabled.toggled.connect(lambda on: session.set_section(enabled=bool(on)))
        for box in self.origin:
            box.valueChanged.connect(self._origin_typed)
        self.apply_normal.clicked.connect(self._normal_typed)
        for name, button in self.presets.items():
            button.clicked.connect(lambda _=False, n=name: self.apply_preset(n))
        self.offset.valueChanged.connect(lambda d: self._try(placing.set_offset, session, float(d)))
        self.step.valueChanged.connect(lambda d: self._try(placing.set_step, session, float(d)))
        self.back.clicked.connect(lambda: self.nudge(-1))
        self.forward.clicked.connect(lambda: self.nudge(1))
        self.snap.clicked.connect(lambda: placing.snap_to_finding(session))
        self.count.valueChanged.connect(lambda n: session.set_section(count=int(n)))
        self.spacing.valueChanged.connect(lambda d: session.set_section(spacing=float(d)))
        self.gain.valueChanged.connect(lambda g: session.set_section(comb_gain=float(g)))
        self.density.valueChanged.connect(lambda n: session.set_section(comb_density=int(n)))
        self.curve.currentIndexChanged.connect(lambda n: n >= 0 and session.select_curve(int(n)))
        self.centre.clicked.connect(self._centre)
        for topic in ("section", "sections", "curve", "model", "selection"):
            session.subscribe(topic, self.refresh)
        self.refresh()

    # -- user -> session -------------------------------------------------
    def _try(self, change, *args) -> bool:
        try:
            change(*args)
        except ValueError as exc:
            self.refresh()
            self.message.setText(f"Not applied: {exc}")
            return False
        self.message.setText("")
        return True

    def _origin_typed(self, *_):
        self._try(placing.set_origin, self.session, [box.value() for box in self.origin])

    def _normal_typed(self, *_):
        self._try(placing.set_normal, self.session, [box.value() for box in self.normal])

    def apply_preset(self, name: str) -> None:
        direction = self.view_direction() if name == "view" and self.view_direction is not None else None
        self._try(placing.preset, self.session, name, direction)

    def nudge(self, steps: int) -> None:
        if self.session.model is not None and self.session.section.enabled:
            placing.nudge(self.session, steps)

    def nudge_actions(self, parent) -> list[QAction]:
        """Menu actions moving the plane by one step or ten, with their keys."""
        actions = []
        for steps, key in (*NUDGE_KEYS.items(), *NUDGE_FAR_KEYS.items()):
            words = "along" if steps > 0 else "against"
            count = "one step" if abs(steps) == 1 else f"{abs(steps)} steps"
            action = QAction(f"Move the plane {count} {words} its normal", parent)
            action.setShortcut(QKeySequence(key))
            action.triggered.connect(lambda _=False, n=steps: self.nudge(n))
            actions.append(action)
        return actions

    def _centre(self):
        if self.session.model is not None:
            lo, hi = self.session.model.bounds
            self.session.set_section(origin=tuple((lo + hi) / 2))

    # -- session -> panel ------------------------------------------------
    def refresh(self, *_):
        s = self.session.section
        widgets = (
            self.enabled,
            *self.origin,
            *self.normal,
            self.offset,
            self.step,
            self.count,
            self.spacing,
            self.gain,
            self.density,
            self.curve,
        )
        blockers = [QSignalBlocker(w) for w in widgets]
        self.enabled.setChecked(s.enabled)
        for box, value in zip(self.origin, s.origin, strict=True):
            box.setValue(value)
        for box, value in zip(self.normal, s.normal, strict=True):
            box.setValue(value)
        self.offset.setValue(placing.offset(self.session))
        self.step.setValue(s.nudge_step)
        self.count.setValue(s.count)
        self.spacing.setValue(s.spacing)
        self.gain.setValue(s.comb_gain)
        self.density.setValue(s.comb_density)
        labels = [curve_label(place) for place in self.session.section_places]
        if labels != [self.curve.itemText(i) for i in range(self.curve.count())]:
            self.curve.clear()
            self.curve.addItems(labels)
        self.curve.setCurrentIndex(min(s.selected, len(labels) - 1))
        del blockers
        self.readout.setText(f"Plane {placing.readout(self.session)}" if s.enabled else "The section tool is off.")
        self.setEnabled(self.session.model is not None)
        self.snap.setEnabled(self.session.selected_finding is not None and s.enabled)
