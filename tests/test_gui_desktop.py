"""Desktop habits of the inspection window, driven through its menus under Xvfb.

Help and About, remembered settings (in a temporary settings file), standard
views and the projection, the display-mode check marks and toolbar, the recent
list, file dialogs, exported images without tool widgets, file permissions, and
a model that cannot be read from the command line.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("pyvistaqt")

from PySide6.QtGui import QImage  # noqa: E402
from PySide6.QtWidgets import QDockWidget  # noqa: E402

from app.cli import EXIT_BAD_INPUT, main  # noqa: E402
from app.qt import file_dialogs  # noqa: E402
from app.qt import window as window_module  # noqa: E402
from app.qt.camera_views import STANDARD_VIEWS, is_parallel, view_direction  # noqa: E402
from app.qt.help import TextWindow, dependencies  # noqa: E402
from app.qt.settings_store import WindowMemory  # noqa: E402
from app.qt.window import MainWindow  # noqa: E402
from app.state import Measure, Mode, Session  # noqa: E402
from app.state.demo import demo_model  # noqa: E402
from app.state.recent import RecentFiles  # noqa: E402
from tests.gui_support import ARTIFACTS, shoot  # noqa: E402

pytestmark = pytest.mark.gui

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
SMALL_SAMPLE = SAMPLES / "hood_visor.stp"
LOAD_MS = 120_000


def make_window(qtbot, memory: WindowMemory, session: Session | None = None) -> MainWindow:
    w = MainWindow(session or Session(), multi_samples=0, memory=memory)
    qtbot.addWidget(w)
    w.show()
    qtbot.waitExposed(w)
    return w


@pytest.fixture
def memory(tmp_path) -> WindowMemory:
    return WindowMemory(tmp_path / "settings" / "window.ini")


@pytest.fixture
def window(qtbot, memory):
    w = make_window(qtbot, memory)
    w.resize(1280, 800)
    yield w
    w.close()


def menu_actions(w: MainWindow, title: str) -> dict[str, object]:
    menu = next(a.menu() for a in w.menuBar().actions() if a.text().replace("&", "") == title)
    return {a.text().replace("&", ""): a for a in menu.actions() if a.text()}


def test_the_default_settings_file_follows_the_config_folder(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path))
    assert WindowMemory().path == tmp_path / "batten" / "window.ini"


def test_help_shows_the_guide_and_what_batten_runs_on(qtbot, window):
    actions = menu_actions(window, "Help")
    actions["Batten guide"].trigger()
    guide = window.findChild(TextWindow, "guide")
    assert guide is not None and guide.isVisible()
    text = guide.browser.toPlainText()
    for words in ("Reflection lines", "Placing a section", "Reading a seam finding", "G1", "review aid"):
        assert words in text
    shoot(guide, "help-guide")
    actions["About Batten"].trigger()
    about = window.findChild(TextWindow, "about")
    text = about.browser.toPlainText()
    for words in ("Batten 0.1.0", "Python", "Qt", "VTK", "OCP", "numpy", "pyvista", "MIT", "BSD"):
        assert words in text
    shoot(about, "help-about")
    licences = {name.lower().replace("_", "-"): lic for name, _, lic in dependencies()}
    assert licences["pyvista"] == "MIT"  # as pyvista's own metadata declares it
    assert "LGPL" in licences["pyside6-essentials"]


def test_settings_come_back_in_the_next_window(qtbot, memory):
    first = make_window(qtbot, memory)
    first.resize(760, 560)  # inside pytest-xvfb's 800 x 600 screen: Qt keeps a restored window on it
    first.session.set_display(mode=Mode.CURVATURE, measure=Measure.GAUSSIAN, show_seams=False)
    first.session.set_colour_range(False, -0.002, 0.003)
    first.session.set_stripes(count=13, direction="z")
    first.views.parallel.trigger()
    size = (first.width(), first.height())  # the panels' minimum height may exceed 560
    first.close()
    assert memory.path.is_file()

    second = make_window(qtbot, memory)
    try:
        display = second.session.display
        assert display == first.session.display
        assert (display.mode, display.measure, display.stripes.count) == (Mode.CURVATURE, Measure.GAUSSIAN, 13)
        assert (second.width(), second.height()) == size and size[0] == 760  # not the first size, 1400 x 900
        assert second.views.parallel.isChecked() and is_parallel(second.view)
        assert second.modes.checked == Mode.CURVATURE
        assert second.display_panel.mode.currentData() == Mode.CURVATURE
    finally:
        second.close()


def test_a_damaged_settings_file_starts_with_the_defaults(qtbot, memory):
    memory.path.parent.mkdir(parents=True)
    memory.path.write_text('[display]\nsettings="{""mode"": ""no such mode"", ""stripes"": 7}"\n')
    w = make_window(qtbot, WindowMemory(memory.path))
    try:
        assert w.session.display.mode == Mode.SHADED
        assert w.session.display.stripes.count == 8
    finally:
        w.close()


@pytest.mark.parametrize("name", list(STANDARD_VIEWS))
def test_standard_views_turn_the_camera(qtbot, window, name):
    window.session.show_model(demo_model())
    window.views.views["front" if name != "front" else "top"].trigger()
    window.views.views[name].trigger()
    eye, up = (np.asarray(v, float) for v in STANDARD_VIEWS[name])
    assert np.allclose(view_direction(window.view), eye / np.linalg.norm(eye), atol=1e-9)
    camera_up = np.asarray(window.view.camera.up, float)
    assert np.dot(camera_up / np.linalg.norm(camera_up), up) > 0.7
    # the model is in the middle of the view
    lo, hi = window.session.model.bounds
    assert np.allclose(window.view.camera.focal_point, (lo + hi) / 2, atol=1e-6 * window.session.model.size)
    shoot(window, f"desktop-view-{name}")


def test_projection_toggles(qtbot, window):
    window.session.show_model(demo_model())
    assert not is_parallel(window.view)
    window.views.parallel.trigger()
    assert window.views.parallel.isChecked() and is_parallel(window.view)
    shoot(window, "desktop-parallel")
    window.views.parallel.trigger()
    assert not is_parallel(window.view)
    assert memory_parallel(window) is False


def memory_parallel(w: MainWindow) -> bool:
    return w.memory.parallel()


def test_mode_check_marks_follow_the_mode_whoever_changes_it(qtbot, window):
    window.session.show_model(demo_model())
    view_menu = menu_actions(window, "View")
    checkable = [a for a in view_menu.values() if a.isCheckable() and a in window.modes.group.actions()]
    assert [a.text() for a in checkable] == [m.value.capitalize() for m in Mode]
    assert window.modes.checked == Mode.SHADED
    # the side panel
    panel = window.display_panel.mode
    panel.setCurrentIndex(panel.findData(Mode.ISOPHOTE))
    panel.activated.emit(panel.currentIndex())
    assert window.session.display.mode == Mode.ISOPHOTE
    assert window.modes.checked == Mode.ISOPHOTE and sum(a.isChecked() for a in checkable) == 1
    # the menu
    view_menu["Curvature"].trigger()
    assert window.session.display.mode == Mode.CURVATURE
    assert panel.currentData() == Mode.CURVATURE
    # the toolbar holds the same actions
    assert window.mode_bar.actions() == window.modes.group.actions()
    window.mode_bar.actions()[list(Mode).index(Mode.HIGHLIGHT)].trigger()
    assert window.session.display.mode == Mode.HIGHLIGHT and window.modes.checked == Mode.HIGHLIGHT
    # a script
    window.session.set_display(mode=Mode.SHADED)
    assert window.modes.checked == Mode.SHADED
    shoot(window, "desktop-mode-toolbar")


def test_clear_recent_empties_the_list(qtbot, memory, tmp_path):
    store = tmp_path / "recent.json"
    recent = RecentFiles(store)
    for name in ("a.stp", "b.igs"):
        recent.add(str(tmp_path / name))
    w = make_window(qtbot, memory, Session(recent))
    try:
        actions = [a for a in w.recent_menu.actions() if a.text()]
        assert [a.text() for a in actions] == [str(tmp_path / "b.igs"), str(tmp_path / "a.stp"), "Clear the list"]
        actions[-1].trigger()
        assert w.session.recent.paths == [] and json.loads(store.read_text()) == []
        assert not w.recent_menu.isEnabled()
        assert [a.text() for a in w.recent_menu.actions() if a.text()] == ["Clear the list"]
    finally:
        w.close()


def test_file_dialogs_start_in_the_last_folder_with_the_models_name(qtbot, window, tmp_path, monkeypatch):
    if not SMALL_SAMPLE.is_file():
        pytest.skip("samples not built")
    asked = []

    def save_dialog(parent, title, start, filters):
        asked.append(start)
        return "", ""

    def open_dialog(parent, title, start, filters):
        asked.append(start)
        return str(chosen / "other.stp"), ""

    monkeypatch.setattr(file_dialogs.QFileDialog, "getSaveFileName", save_dialog)
    monkeypatch.setattr(file_dialogs.QFileDialog, "getOpenFileName", open_dialog)
    monkeypatch.setattr(window, "open_file", lambda path, model=None: None)
    with qtbot.waitSignals([window.model_shown, window.seams_measured], timeout=LOAD_MS):
        MainWindow.open_file(window, str(SMALL_SAMPLE))
    window.export_report()
    assert asked[-1] == str(SAMPLES / "hood_visor-fairness-report.pdf")  # no folder chosen yet: the model's
    window.export_image()
    assert asked[-1] == str(SAMPLES / "hood_visor-shaded.png")
    chosen = tmp_path / "reviews"
    chosen.mkdir()
    window.choose_file()
    assert asked[-1] == str(SAMPLES)
    window.export_report()
    assert asked[-1] == str(chosen / "hood_visor-fairness-report.pdf")  # the folder chosen last


def test_exported_image_has_no_tool_widgets(qtbot, window, tmp_path):
    window.session.show_model(demo_model())
    window.session.set_display(mode=Mode.CURVATURE)
    window.session.set_section(enabled=True, normal=(0.0, 1.0, 0.0))
    plane = window.plane_handle.widget
    assert plane is not None and plane.GetEnabled()
    view = window.view
    view.render()
    with_tools = tmp_path / "with-tools.png"
    view.screenshot(str(with_tools))
    exported = tmp_path / "exported.png"
    window.save_image(str(exported))
    assert plane.GetEnabled() and view.renderer.axes_widget.GetEnabled()  # the tools are back
    # the same view with the tools switched off by hand
    plane.EnabledOff()
    view.renderer.axes_widget.EnabledOff()
    view.render()
    bare = tmp_path / "bare.png"
    view.screenshot(str(bare))
    plane.EnabledOn()
    view.renderer.axes_widget.EnabledOn()
    pixels = {name: image_array(tmp_path / f"{name}.png") for name in ("with-tools", "exported", "bare")}
    assert np.abs(pixels["exported"].astype(int) - pixels["bare"]).max() <= 2
    assert (np.abs(pixels["with-tools"].astype(int) - pixels["bare"]).max(axis=2) > 30).sum() > 500
    ARTIFACTS.mkdir(exist_ok=True)
    for name in ("with-tools", "exported"):
        (ARTIFACTS / f"desktop-export-{name}.png").write_bytes((tmp_path / f"{name}.png").read_bytes())


def image_array(path: Path) -> np.ndarray:
    image = QImage(str(path)).convertToFormat(QImage.Format.Format_RGB888)
    width, height = image.width(), image.height()
    data = np.frombuffer(image.constBits(), np.uint8, count=image.bytesPerLine() * height)
    return data.reshape(height, image.bytesPerLine())[:, : 3 * width].reshape(height, width, 3).copy()


@pytest.mark.parametrize("umask", [0o022, 0o002])
def test_written_files_follow_the_umask(qtbot, window, tmp_path, umask):
    window.session.show_model(demo_model())
    before = os.umask(umask)
    try:
        window.save_image(str(tmp_path / "view.png"))
        export = window.write_report(str(tmp_path / "review.html"))
        with qtbot.waitSignal(export.written, timeout=LOAD_MS):
            pass
        if SMALL_SAMPLE.is_file():
            out = tmp_path / "sections.json"
            assert (
                main(["section", str(SMALL_SAMPLE), "--plane", "0", "0", "0", "1", "0", "0", "--json", str(out)]) == 0
            )
    finally:
        os.umask(before)
    for path in tmp_path.iterdir():
        if path.is_file():
            assert path.stat().st_mode & 0o777 == 0o666 & ~umask, path.name


def test_open_a_model_that_cannot_be_read_exits_2_before_any_window(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("DISPLAY", os.environ.get("DISPLAY") or ":99")

    def no_window(*_a, **_k):
        raise AssertionError("a window was opened")

    monkeypatch.setattr(MainWindow, "__init__", no_window)
    empty = tmp_path / "empty.stp"
    empty.write_bytes(b"")
    foreign = tmp_path / "notes.stp"
    foreign.write_text("these are my notes, not a model\n")
    for path in (empty, foreign):
        assert main(["open", str(path)]) == EXIT_BAD_INPUT
        assert main([str(path)]) == EXIT_BAD_INPUT
        err = capsys.readouterr().err.strip().splitlines()
        assert len(err) == 2 and all(str(path) in line for line in err), err


def test_a_bad_file_in_an_empty_window_does_not_claim_a_model_is_kept(qtbot, window, tmp_path, monkeypatch):
    messages = []
    monkeypatch.setattr(window_module.QMessageBox, "critical", lambda parent, title, text: messages.append(text))
    empty = tmp_path / "empty.stp"
    empty.write_bytes(b"")
    with qtbot.waitSignal(window.open_failed, timeout=LOAD_MS):
        window.open_file(str(empty))
    assert len(messages) == 1 and "empty.stp" in messages[0] and "kept" not in messages[0]
    window.session.show_model(demo_model())
    with qtbot.waitSignal(window.open_failed, timeout=LOAD_MS):
        window.open_file(str(empty))
    assert "already shown is kept" in messages[-1]


def test_the_panels_menu_shows_and_hides_each_panel(qtbot, window):
    entries = menu_actions(window, "Panels")
    docks = {d.windowTitle(): d for d in window.findChildren(QDockWidget)}
    assert set(docks) | {"Display modes"} <= set(entries)
    for title, dock in docks.items():
        action = entries[title]
        assert action.isChecked() and dock.isVisible(), title
        action.trigger()
        assert not dock.isVisible() and not action.isChecked(), title
        action.trigger()
        assert dock.isVisible() and action.isChecked(), title
    entries["Display modes"].trigger()
    assert window.mode_bar.isHidden()


def test_a_small_window_keeps_the_model_view(qtbot, window):
    # At 760 px wide the panels squeezed the 3-D view to nothing; they now give way first.
    window.resize(700, 600)
    qtbot.wait(100)
    assert window.view.width() >= window_module.VIEW_MIN_PX
    assert window.view.height() >= window_module.VIEW_MIN_PX * 3 // 4
