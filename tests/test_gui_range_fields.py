"""The colour range fields show a range only where a colour map has one; elsewhere a note says so."""

from __future__ import annotations

import pytest
from shapes import plane_model

from app.qt.controls import DisplayPanel
from app.render.legend import tick_decimals
from app.state import Measure, Mode, Session

pytestmark = pytest.mark.gui


@pytest.mark.parametrize("mode", [Mode.SHADED, Mode.REFLECTION, Mode.HIGHLIGHT, Mode.ISOPHOTE, Mode.DRAFT])
def test_modes_without_a_map_hide_the_range(qtbot, mode):
    # shaded and draft showed From/To as 0.00000000, a range that meant nothing
    session = Session()
    session.show_model(plane_model())
    panel = DisplayPanel(session)
    qtbot.addWidget(panel)
    session.set_display(mode=Mode.CURVATURE)
    form = panel._surface_form
    assert form.isRowVisible(panel.low) and form.isRowVisible(panel.high)
    assert (panel.low.value(), panel.high.value()) == pytest.approx(session.colour_limits())
    assert not form.isRowVisible(panel.range_note)
    session.set_display(mode=mode)
    assert not form.isRowVisible(panel.low) and not form.isRowVisible(panel.high)
    assert form.isRowVisible(panel.range_note) and "Colour range" in panel.range_note.text()


def test_range_fields_carry_the_legends_digits(qtbot):
    # 8 decimals showed a radius range as 0.00000000 to 200.00000000
    session = Session()
    session.show_model(plane_model())
    panel = DisplayPanel(session)
    qtbot.addWidget(panel)
    session.set_display(mode=Mode.CURVATURE, measure=Measure.MIN_RADIUS)
    assert panel.high.decimals() == 4 and panel.high.value() == pytest.approx(session.colour_limits()[1])
    session.set_display(measure=Measure.MEAN)
    low, high = session.colour_limits()
    assert panel.high.decimals() == tick_decimals(low, high) + 2
