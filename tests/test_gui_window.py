"""The inspection window under a real X server (pytest-xvfb): open, show, section, findings, errors.

Screenshots of every display mode of every sample go to tests/artifacts/ for a
person to look at.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("pyvistaqt")

from PySide6.QtCore import QMimeData, QPointF, Qt, QUrl  # noqa: E402
from PySide6.QtGui import QDropEvent  # noqa: E402

from app.profiles import get_profile  # noqa: E402
from app.qt import file_dialogs  # noqa: E402
from app.qt import window as window_module  # noqa: E402
from app.qt.window import MainWindow, camera_state  # noqa: E402
from app.state import Mode  # noqa: E402
from app.state.demo import demo_model  # noqa: E402
from tests.gui_support import shoot, show_window  # noqa: E402

pytestmark = pytest.mark.gui

ROOT = Path(__file__).resolve().parents[1]
SAMPLES = ROOT / "sample_surfaces"
LOAD_MS = 120_000  # a loaded CI machine; the benchmark reports real times


def sample_files(kind: str) -> list[Path]:
    manifest = SAMPLES / "manifest.json"
    if not manifest.is_file():
        return []
    entries = json.loads(manifest.read_text())["samples"]
    return [SAMPLES / e["files"][kind] for e in entries if kind in e.get("files", {})]


@pytest.fixture
def window(qtbot):
    w = show_window(qtbot, (1280, 800))
    yield w
    w.close()


def open_and_wait(qtbot, w: MainWindow, path: Path) -> None:
    """Open and wait until the model is shown and its seams are measured."""
    with qtbot.waitSignals([w.model_shown, w.seams_measured], timeout=LOAD_MS, raising=True):
        w.open_file(str(path))


@pytest.mark.parametrize("path", sample_files("step"), ids=lambda p: p.stem)
def test_each_sample_in_every_mode(qtbot, window, path):
    open_and_wait(qtbot, window, path)
    assert window.session.path == str(path)
    assert f"{len(window.session.model.faces)} faces" in window.model_label.text()
    for mode in Mode:
        window.session.set_display(mode=mode)
        qtbot.wait(30)
        assert window.scene.surface_actor is not None
        assert shoot(window, f"{path.stem}-{mode.name.lower()}").stat().st_size > 10_000
    assert window.recent_menu.actions()[0].text() == str(path)
    assert window.session.loaded.seams_measured
    assert len(window.findings_panel.entries()) == len(window.session.findings)


@pytest.mark.parametrize("path", sample_files("iges")[:2], ids=lambda p: p.stem)
def test_iges_samples_open(qtbot, window, path):
    open_and_wait(qtbot, window, path)
    window.session.set_display(mode=Mode.CURVATURE)
    shoot(window, f"{path.stem}-iges-curvature")
    assert window.session.model.faces


def test_section_plane_moves_combs_and_markers(qtbot, window):
    window.session.show_model(demo_model())
    window.session.set_section(enabled=True, normal=(0.0, 1.0, 0.0), count=2, spacing=12.0)
    qtbot.wait(30)
    assert window.plane_handle.shown
    teeth = window.scene.lines["teeth"].points.copy()
    marks = window.scene.points["inflections"].points.copy()
    window.move_section((80.0, 15.0, 0.0))
    qtbot.wait(30)
    assert window.scene.lines["teeth"].n_points > 0
    assert not np.allclose(window.scene.lines["teeth"].points[:, 1].mean(), teeth[:, 1].mean())
    assert not np.allclose(window.scene.points["inflections"].points, marks)
    assert np.allclose(window.plane_handle.plane()[0], (80.0, 15.0, 0.0))
    window.session.set_display(mode=Mode.CURVATURE)
    shoot(window, "demo-section-combs")
    qtbot.waitUntil(lambda: not window._exact_timer.isActive(), timeout=2000)  # exact pass after the drag
    assert window.graph.curve is window.session.selected_section is not None


def test_clicking_a_finding_focuses_the_camera(qtbot, window):
    window.session.show_model(demo_model())
    window.session.set_display(mode=Mode.CURVATURE)
    tree = window.findings_panel.tree
    assert len(window.findings_panel.entries()) == len(window.session.findings)
    before = camera_state(window)
    item = window.findings_panel.item_for(0)
    qtbot.mouseClick(tree.viewport(), Qt.MouseButton.LeftButton, pos=tree.visualItemRect(item).center())
    qtbot.waitUntil(lambda: window.session.selection == 0, timeout=2000)
    finding = window.session.findings[0]
    assert not np.allclose(camera_state(window), before)
    seen = window.scene.to_display(np.vstack([finding.path, finding.position]))
    width, height = window.view.render_window.GetSize()
    assert ((seen >= 0) & (seen <= (width, height))).all()  # the whole seam in view
    assert window.scene.actors["mark_point"].GetVisibility()
    shoot(window, "demo-finding-focused")


def test_findings_filter_by_verdict(qtbot, window):
    window.session.show_model(demo_model())
    panel = window.findings_panel
    panel.verdict.setCurrentIndex(panel.verdict.findData("fail"))
    assert 0 < len(panel.entries()) < len(window.session.findings)
    assert all(item.text(0) == "fail" for item in panel.entries())


def test_broken_file_shows_a_dialog_and_keeps_the_model(qtbot, window, tmp_path, monkeypatch):
    window.session.show_model(demo_model())
    shown, faces_actor = window.session.model, window.scene.surface_actor
    messages = []
    monkeypatch.setattr(window_module.QMessageBox, "critical", lambda parent, title, text: messages.append(text))
    bad = tmp_path / "truncated.stp"
    bad.write_bytes(b"ISO-10303-21;\nHEADER;\nFILE_DESCRIPTION((''),'2;1');\n")
    with qtbot.waitSignal(window.open_failed, timeout=LOAD_MS):
        window.open_file(str(bad))
    assert len(messages) == 1 and "truncated.stp" in messages[0]
    assert window.session.model is shown
    assert window.scene.surface_actor is faces_actor
    assert window.open_action.isEnabled()


def test_probe_reports_the_value_under_the_cursor(qtbot, window):
    window.session.show_model(demo_model())
    window.session.set_display(mode=Mode.CURVATURE)
    window.view.update()
    qtbot.wait(50)
    size = window.view.render_window.GetSize()
    window._probe_at = (size[0] // 2, size[1] // 2)
    window._probe()
    text = window.probe_label.text()
    assert text.split()[0] in ("panel", "flange") and "mean" in text  # the demo's face names


def test_drop_a_file_opens_it(qtbot, window):
    path = sample_files("step")[0] if sample_files("step") else None
    if path is None:
        pytest.skip("no sample files")
    mime = QMimeData()
    mime.setUrls([QUrl.fromLocalFile(str(path))])
    event = QDropEvent(
        QPointF(10, 10), Qt.DropAction.CopyAction, mime, Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier
    )
    with qtbot.waitSignals([window.model_shown, window.seams_measured], timeout=LOAD_MS):
        window.dropEvent(event)
    assert window.session.path == str(path)


def test_export_image_writes_a_whole_file(qtbot, window, tmp_path):
    window.session.show_model(demo_model())
    target = tmp_path / "view.png"
    window.save_image(str(target))
    assert target.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".batten-")] == []


def test_report_action_state_matches_the_build(window):
    assert window.report_action.isEnabled() == window_module.report_available()


@pytest.mark.skipif(not window_module.report_available(), reason="no report writer in this build")
def test_export_report_from_the_window(qtbot, window, tmp_path, monkeypatch):
    window.session.show_model(demo_model())
    messages = []
    monkeypatch.setattr(window_module.QMessageBox, "critical", lambda parent, title, text: messages.append(text))
    target = tmp_path / "review.html"
    with qtbot.waitSignal(window.write_report(str(target)).written, timeout=LOAD_MS):
        pass
    assert messages == []
    assert target.stat().st_size > 1000 and b"<html" in target.read_bytes()[:2000].lower()


def test_reflection_lines_follow_a_camera_move(qtbot, window):
    window.session.show_model(demo_model())
    window.session.set_display(mode=Mode.REFLECTION)
    qtbot.wait(30)
    before = np.array(window.scene.surface.point_data["stripe"])
    window.view.camera.azimuth = window.view.camera.azimuth + 25.0  # as a mouse rotation would
    qtbot.waitUntil(lambda: not np.allclose(window.scene.surface.point_data["stripe"], before), timeout=3000)
    assert window.session.camera is not None and window.session.camera.eye is not None
    shoot(window, "demo-reflection-after-turn")


def designed_inflections():
    manifest = SAMPLES / "manifest.json"
    if not manifest.is_file():
        return []
    cases = []
    for entry in json.loads(manifest.read_text())["samples"]:
        for item in entry.get("inflections", []):
            cases.append(pytest.param(SAMPLES / entry["files"]["step"], item, id=f"{entry['name']}-{item['count']}"))
    return cases


INFLECTION_MM = 1e-3  # the manifest gives exact roots; the section engine refines to far below this


@pytest.mark.parametrize(("path", "designed"), designed_inflections())
def test_designed_inflections_show_in_the_window(qtbot, window, path, designed):
    open_and_wait(qtbot, window, path)
    plane = designed["plane"]
    window.session.set_section(enabled=True, origin=tuple(plane["point"]), normal=tuple(plane["normal"]), count=1)
    marks = [f for f in window.session.findings if f.kind == "inflection" and f.verdict == "note"]
    assert len(marks) == designed["count"]
    found = np.array([f.position for f in marks])
    for point in designed["points"]:
        assert np.min(np.linalg.norm(found - point, axis=1)) < INFLECTION_MM
    assert window.scene.points["inflections"].n_points == designed["count"]
    window.session.set_display(mode=Mode.CURVATURE)
    shoot(window, f"{path.stem}-designed-inflections-{designed['count']}")


# -- profile, findings, graph, curve picking, report settings ---------------------------------------

HOOD = SAMPLES / "hood_visor.stp"  # its visor_flat / visor_bend seam is G1 by design (manifest.json)
TOASTER = SAMPLES / "toaster_panel.stp"


def seam_verdicts(w: MainWindow) -> list[str]:
    return [f.verdict for f in w.session.findings if f.kind == "seam"]


@pytest.mark.skipif(not HOOD.is_file(), reason="samples not built")
def test_profile_chooser_rejudges_without_reloading(qtbot, window):
    open_and_wait(qtbot, window, HOOD)
    chooser = window.findings_panel.profile
    names = [chooser.itemData(i) for i in range(chooser.count())]
    assert names == ["class-a", "technical", window_module.FROM_FILE]
    assert window.profile_label.text() == "profile class-a"
    assert seam_verdicts(window) == ["fail"]  # class-A wants G2
    shown, actor = window.session.model, window.scene.surface_actor
    # as a user's choice in the list; the seams are measured again in a worker thread
    with qtbot.waitSignal(window.seams_measured, timeout=LOAD_MS, raising=True):
        chooser.activated.emit(names.index("technical"))
        assert window.profile_label.text() == "profile technical"  # at once: the window does not wait
    assert chooser.currentData() == "technical"
    assert seam_verdicts(window) == ["pass"]  # G1 is enough for technical surfaces
    assert window.session.model is shown and window.scene.surface_actor is actor
    assert "profile technical" in window.findings_panel.summary.text()
    shoot(window, "hood_visor-technical-profile")


def test_a_bad_profile_file_keeps_the_profile_in_force(qtbot, window, tmp_path, monkeypatch):
    window.session.show_model(demo_model())
    bad = tmp_path / "ours.toml"
    bad.write_text("this is = not toml [")
    messages = []
    monkeypatch.setattr(window_module.QMessageBox, "critical", lambda parent, title, text: messages.append(text))
    monkeypatch.setattr(file_dialogs.QFileDialog, "getOpenFileName", lambda *a, **k: (str(bad), ""))
    window.choose_profile(window_module.FROM_FILE)
    assert len(messages) == 1 and "ours.toml" in messages[0]
    assert window.session.profile.name == "class-a"
    assert window.findings_panel.profile.currentData() == "class-a"


def test_findings_name_faces_and_filter_section_extrema(qtbot, window):
    if not TOASTER.is_file():
        pytest.skip("samples not built")
    open_and_wait(qtbot, window, TOASTER)
    window.session.set_section(enabled=True, normal=(0.0, 1.0, 0.0))
    panel = window.findings_panel
    panel.kind.setCurrentIndex(panel.kind.findData("section_extremum"))
    shown = panel.entries()
    assert len(shown) == sum(len(c.extrema) for c in window.session.sections) > 0
    assert all(": curvature m" in item.text(1) for item in shown)
    panel.kind.setCurrentIndex(panel.kind.findData("free_edge"))
    assert panel.entries()[0].text(1).startswith("free edge of side_panel")  # the face's name in the file


def test_graph_draws_every_point_of_the_curve(qtbot, window):
    if not TOASTER.is_file():
        pytest.skip("samples not built")
    open_and_wait(qtbot, window, TOASTER)
    window.session.set_display(mode=Mode.CURVATURE)
    window.session.set_section(enabled=True, normal=(0.0, 1.0, 0.0))
    curve = window.session.selected_section
    assert window.graph.curve is curve
    xs, ys = window.graph.polyline()
    assert xs.shape == ys.shape == (curve.points.shape[0],) and curve.points.shape[0] > 200
    assert np.all(np.diff(xs) >= 0)  # arc length runs left to right
    assert window.graph.title == "section 1, curve 1"
    shoot(window, "toaster_panel-graph")


def test_clicking_a_section_curve_shows_it_in_the_graph(qtbot, window):
    from vtkmodules.vtkRenderingCore import vtkCoordinate

    window.session.show_model(demo_model())
    window.session.set_section(enabled=True, normal=(0.0, 1.0, 0.0), count=3, spacing=12.0)
    window.view.update()
    qtbot.wait(50)
    curve = window.session.sections[2]
    # display pixel of a point on the third curve, by VTK's own world -> display conversion
    coordinate = vtkCoordinate()
    coordinate.SetCoordinateSystemToWorld()
    coordinate.SetValue(*curve.points[len(curve.points) // 3])
    x, y = coordinate.GetComputedDoubleDisplayValue(window.view.renderer)
    assert window.pick_curve(x, y)
    assert window.session.section.selected == 2 and window.graph.curve is curve
    assert window.section_panel.curve.currentText() == "section 3, curve 1"
    assert not window.pick_curve(2, 2)  # a corner of the view: no curve there
    window.section_panel.curve.setCurrentIndex(0)  # choosing it in the list
    assert window.graph.curve is window.session.sections[0]


@pytest.mark.skipif(not window_module.report_available(), reason="no report writer in this build")
def test_export_report_uses_the_profile_and_planes_on_screen(qtbot, window, tmp_path, monkeypatch):
    window.session.show_model(demo_model())
    window.set_profile("technical")
    window.session.set_section(enabled=True, normal=(0.0, 1.0, 0.0), count=2, spacing=12.0)
    target = tmp_path / "review.html"
    export = window.write_report(str(target))  # written by a process of its own, from this request
    seen = [export.request.settings]
    with qtbot.waitSignal(export.written, timeout=LOAD_MS):
        pass
    assert seen == [window.session.review_settings]
    assert seen[0].profile == "technical"
    assert [item.kind for item in seen[0].sections] == ["plane", "plane"]  # typed, the planes on screen
    text = target.read_text()
    # The profile by its title and the planes in words: no spec strings on the page (issue 14).
    assert get_profile("technical").title in text
    assert "plane 1 through" in text and "plane 2 through" in text and "plane:" not in text


def test_curvature_map_is_smooth_point_data_on_the_dense_grid(qtbot, window):
    if not TOASTER.is_file():
        pytest.skip("samples not built")
    open_and_wait(qtbot, window, TOASTER)
    window.session.set_display(mode=Mode.CURVATURE)
    a, b = window.session.samples[0].inside.shape
    assert min(a, b) >= 250  # one face: a few hundred samples a side (common practice for smooth maps)
    surface, mapper = window.scene.surface, window.scene.surface_actor.mapper
    assert surface.point_data["value"].shape == (surface.n_points,) == (a * b,)  # a value per node, not per cell
    assert mapper.GetScalarModeAsString() in ("Default", "UsePointData")
    assert mapper.GetInterpolateScalarsBeforeMapping()  # colours interpolated across each triangle
    assert window.scene.surface_actor.prop.interpolation.name in ("GOURAUD", "PHONG")


def typed(qtbot, box, value: float) -> None:
    """Replace a spin box's text by typing, as a person would, and commit it with Enter."""
    box.lineEdit().selectAll()
    qtbot.keyClicks(box.lineEdit(), f"{value:g}")
    qtbot.keyClick(box.lineEdit(), Qt.Key_Return)


def shown_range(w: MainWindow) -> tuple[np.ndarray, np.ndarray]:
    """The range the map's mapper colours by, and the one the legend's lookup table labels."""
    bar = w.view.scalar_bars[w.scene.legend]
    return np.array(w.scene.surface_actor.mapper.scalar_range), np.array(bar.GetLookupTable().GetRange())


def test_typed_colour_range_narrows_map_and_legend(qtbot, window):
    open_and_wait(qtbot, window, SAMPLES / "steamer_body.stp")
    panel = window.display_panel
    window.session.set_display(mode=Mode.CURVATURE)
    auto = np.array(window.session.colour_limits())
    panel.auto_range.setChecked(False)
    for reach in (float(f"{share * auto[1]:.3g}") for share in (0.5, 2.0, 0.25)):
        typed(qtbot, panel.low, -reach)
        typed(qtbot, panel.high, reach)
        qtbot.wait(30)
        mapper, legend = shown_range(window)
        np.testing.assert_allclose(mapper, (-reach, reach), rtol=1e-6)
        np.testing.assert_allclose(legend, (-reach, reach), rtol=1e-6)
        assert panel.range_message.text() == ""
    shoot(window, "steamer_body-narrowed-range")
    # an inverted range is not applied and the window says why
    typed(qtbot, panel.low, 1.0)
    assert "must be below" in panel.range_message.text()
    np.testing.assert_allclose(shown_range(window)[1], (-reach, reach), rtol=1e-6)
    shoot(window, "steamer_body-inverted-range")
    panel.auto_range.setChecked(True)
    qtbot.wait(30)
    assert panel.range_message.text() == ""
    np.testing.assert_allclose((panel.low.value(), panel.high.value()), auto, rtol=1e-6)
    mapper, legend = shown_range(window)
    np.testing.assert_allclose(mapper, auto, rtol=1e-6)
    np.testing.assert_allclose(legend, auto, rtol=1e-6)


def _model_on_screen(window) -> tuple[np.ndarray, np.ndarray, float, int]:
    """Display x and y of the model's mesh points, the x where the legend starts and the view's height."""
    plotter = window.view
    plotter.render()
    width, height = plotter.render_window.GetSize()
    points = np.asarray(window.scene.faces.mesh.points)
    matrix = plotter.renderer.GetActiveCamera().GetCompositeProjectionTransformMatrix(width / height, -1, 1)
    m = np.array([[matrix.GetElement(i, j) for j in range(4)] for i in range(4)])
    clip = np.c_[points, np.ones(len(points))] @ m.T
    x = (clip[:, 0] / clip[:, 3] + 1) / 2 * width
    y = (clip[:, 1] / clip[:, 3] + 1) / 2 * height
    left_of_bar = plotter.scalar_bars[window.scene.legend].GetPositionCoordinate().GetValue()[0] * width
    return x, y, left_of_bar, height


def test_an_opened_model_is_whole_in_the_view_beside_the_legend(qtbot, window):
    """Fitted after the isometric turn and again when the legend comes (it was cut at the left edge)."""
    open_and_wait(qtbot, window, SAMPLES / "appliance_range.stp")
    window.session.set_display(mode=Mode.CURVATURE)
    qtbot.wait(50)
    x, y, left_of_bar, height = _model_on_screen(window)
    shoot(window, "appliance_range-opened")
    assert x.min() >= 0 and x.max() <= left_of_bar + 1
    assert y.min() >= 0 and y.max() <= height
    # a narrower window, the view not moved: still whole
    window.resize(1000, 800)
    qtbot.wait(200)
    x, y, left_of_bar, height = _model_on_screen(window)
    shoot(window, "appliance_range-narrower")
    assert x.min() >= 0 and x.max() <= left_of_bar + 1
    assert y.min() >= 0 and y.max() <= height
