"""The section plane placed exactly through the window (pytest-xvfb): typed, nudged, preset, snapped, dragged.

Heights come from the demo panel's Bezier profile, z(t) = 3 w t (1 - t) (1 - 2 t)
at x = 100 t (Farin, *Curves and Surfaces for CAGD*, 5th ed., sec. 4.1).
Screenshots go to tests/artifacts/ for a person to look at.
"""

from __future__ import annotations

import numpy as np
import pytest

pytest.importorskip("pyvistaqt")

from PySide6.QtCore import Qt  # noqa: E402

from app.state import Mode  # noqa: E402
from app.state.demo import demo_model  # noqa: E402
from tests.gui_support import shoot, show_window  # noqa: E402

pytestmark = pytest.mark.gui

WAVE = 8.0  # mm, the demo panel's wave
ON_PLANE = 1e-9  # mm


def bezier_height(x: float) -> float:
    t = x / 100.0
    return 3 * WAVE * t * (1 - t) * (1 - 2 * t)


@pytest.fixture
def window(qtbot):
    w = show_window(qtbot, (1280, 860))
    w.session.show_model(demo_model())
    w.session.set_display(mode=Mode.CURVATURE)
    w.section_panel.enabled.click()
    yield w
    w.close()


def type_into(qtbot, box, text: str) -> None:
    box.setFocus()
    box.lineEdit().selectAll()
    qtbot.keyClicks(box.lineEdit(), text)
    qtbot.keyClick(box.lineEdit(), Qt.Key.Key_Return)


def panel_curve(w):
    return next(c for c in w.session.sections if c.points[:, 0].max() < 100.0 - 1e-6)


def test_typed_position_is_where_the_section_is_cut(qtbot, window):
    panel = window.section_panel
    panel.presets["x"].click()
    type_into(qtbot, panel.origin[0], "25")
    assert window.session.section.origin[0] == 25.0
    curve = panel_curve(window)
    np.testing.assert_allclose(curve.points[:, 0], 25.0, atol=ON_PLANE)
    np.testing.assert_allclose(curve.points[:, 2], bezier_height(25.0), atol=1e-6)
    assert "(25.000," in panel.readout.text()
    assert np.allclose(window.plane_handle.plane()[0], window.session.section.origin)
    # a typed normal (any length) turns the plane about its point
    for box, text in zip(panel.normal, ("0", "3", "0"), strict=True):
        type_into(qtbot, box, text)
    panel.apply_normal.click()
    assert window.session.section.normal == (0.0, 1.0, 0.0)
    assert np.allclose(window.plane_handle.plane()[1], (0.0, 1.0, 0.0))
    shoot(window, "plane-typed")


def test_keys_nudge_the_plane_by_the_chosen_step(qtbot, window):
    panel = window.section_panel
    panel.presets["x"].click()
    type_into(qtbot, panel.origin[0], "20")
    type_into(qtbot, panel.step, "2.5")
    window.windowHandle().requestActivate()  # no window manager under Xvfb: ask X for the focus
    qtbot.waitUntil(window.isActiveWindow, timeout=3000)
    window.view.setFocus()
    for _ in range(2):
        qtbot.keyClick(window.view, Qt.Key.Key_Up, Qt.KeyboardModifier.AltModifier)
    shift = Qt.KeyboardModifier.AltModifier | Qt.KeyboardModifier.ShiftModifier
    qtbot.keyClick(window.view, Qt.Key.Key_Down, shift)
    assert window.session.section.origin[0] == pytest.approx(20.0 + 2 * 2.5 - 10 * 2.5)
    panel.forward.click()
    assert window.session.section.origin[0] == pytest.approx(2.5)
    np.testing.assert_allclose(panel_curve(window).points[:, 0], 2.5, atol=ON_PLANE)
    shoot(window, "plane-nudged")


def test_presets_and_snap_to_a_finding(qtbot, window):
    panel = window.section_panel
    panel.presets["z"].click()
    assert window.session.section.normal == (0.0, 0.0, 1.0)
    window.view.view_xy()
    panel.presets["view"].click()
    assert np.allclose(np.abs(window.session.section.normal), (0.0, 0.0, 1.0))
    panel.presets["y"].click()
    seam = next(i for i, f in enumerate(window.session.findings) if f.kind == "seam")
    where = window.session.findings[seam].position.copy()
    window.session.select(seam)
    assert panel.snap.isEnabled()
    panel.snap.click()
    assert np.allclose(window.session.section.origin, where)
    assert np.allclose(window.plane_handle.plane()[0], where)
    shoot(window, "plane-snapped")


def test_the_graph_follows_a_drag_and_a_facing_plane_still_moves(qtbot, window):
    panel = window.section_panel
    panel.presets["x"].click()
    type_into(qtbot, panel.origin[0], "30")
    handle = window.plane_handle
    # looking along the normal: VTK's own push would be zero; the vertical motion moves the plane
    window.view.view_yz()
    origin, normal = np.array(window.session.section.origin), np.array(window.session.section.normal)
    pixel = handle.pixel_size(origin)
    moved = handle.push_for(origin, normal, np.array([0.0, 64.0]))
    assert abs(moved) == pytest.approx(64 * pixel)
    # side on: the plane's trace follows the cursor along the normal's direction on screen
    window.view.view_xz()
    along = window.scene.to_display(np.array([origin, origin + normal]))
    screen = (along[1] - along[0]) / np.linalg.norm(along[1] - along[0])
    moved = handle.push_for(origin, normal, 64 * screen)
    trace = window.scene.to_display(np.array([origin, origin + moved * normal]))
    assert np.linalg.norm(trace[1] - trace[0]) == pytest.approx(64.0, rel=1e-6)
    # a drag step: the graph shows the moved section before the plane rests
    before = window.graph.curve
    window._exact_timer.setInterval(600_000)  # the plane never rests in this test: only drag steps run
    window._plane_moved((60.0, 30.0, 0.0), (1.0, 0.0, 0.0))
    qtbot.waitUntil(lambda: window.session.section.origin[0] == 60.0, timeout=2000)
    assert window.graph.curve is window.session.selected_section
    assert window.graph.curve is not before
    assert np.allclose(window.graph.curve.points[:, 0], 60.0) or window.graph.curve.points[:, 0].min() >= 100.0
    shoot(window, "plane-dragged")


def drag(qtbot, window, start, motion, steps: int = 8) -> None:
    """Press on the plane at world point ``start``, move the cursor by ``motion`` pixels, release."""
    iren = window.view.iren.interactor
    x, y = window.scene.to_display(np.asarray(start, float)[None])[0]
    iren.SetEventInformation(int(x), int(y))
    iren.InvokeEvent("MouseMoveEvent")
    iren.InvokeEvent("LeftButtonPressEvent")
    for k in range(1, steps + 1):
        iren.SetEventInformation(int(x + motion[0] * k / steps), int(y + motion[1] * k / steps))
        iren.InvokeEvent("MouseMoveEvent")
        qtbot.wait(10)
    iren.InvokeEvent("LeftButtonReleaseEvent")
    qtbot.waitUntil(lambda: not window._drag_timer.isActive(), timeout=2000)


@pytest.mark.parametrize("view", ["facing", "side on"])
def test_dragging_the_plane_moves_it_with_the_cursor(qtbot, window, view):
    window.session.set_section(origin=(40.0, 30.0, 0.0), normal=(1.0, 0.0, 0.0))
    if view == "facing":
        window.view.view_yz()  # the normal looks along the view: VTK alone would hardly move it
        start, motion = (40.0, 45.0, 2.0), (0, 64)
    else:
        window.view.view_xz()
        start, motion = (40.0, 30.0, 9.5), (64, 0)  # on the plane, clear of its origin ball
    window.view.render()
    pixel = window.plane_handle.pixel_size(np.array(window.session.section.origin))
    drag(qtbot, window, start, motion)
    moved = abs(window.session.section.origin[0] - 40.0)
    assert moved == pytest.approx(64 * pixel, rel=0.05)  # one pixel of cursor, one pixel of plane
    assert window.session.section.origin[1:] == (30.0, 0.0)
    assert window.graph.curve is window.session.selected_section  # the graph followed the drag
    assert np.allclose(window.plane_handle.plane()[0], window.session.section.origin)
    shoot(window, f"plane-drag-{view.replace(' ', '-')}")
