"""The inspection window: a 3-D view of the session, its panels, menus and status bar."""

from __future__ import annotations

import importlib.util
from dataclasses import replace

import numpy as np
from PySide6.QtCore import Qt, QTimer, Signal
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import (
    QApplication,
    QDockWidget,
    QLabel,
    QMainWindow,
    QMessageBox,
    QProgressBar,
    QScrollArea,
)
from pyvistaqt import QtInteractor

from app.render.scene import Scene
from app.review.result import face_account_line
from app.state import Mode, Session
from app.state.recent import RecentFiles, default_store
from geometry.io.files import write_atomically

from . import collector, file_dialogs, menus, review_actions
from .controls import DisplayPanel
from .export_task import start_report
from .findings import FROM_FILE, FindingsPanel
from .graph import CurvatureGraph
from .plane_widget import PlaneHandle
from .section_panel import SectionPanel
from .settings_store import WindowMemory
from .snapshot import screenshot_without_tools
from .task_status import TaskStatus
from .worker import LoadJob, SeamJob, start_job

MODEL_FILTER = "Design models (*.step *.stp *.p21 *.iges *.igs *.json);;All files (*)"
IMAGE_FILTER = "PNG image (*.png);;JPEG image (*.jpg)"
REPORT_FILTER = "PDF report (*.pdf);;HTML report (*.html)"
PROFILE_FILTER = "Tolerance profiles (*.toml);;All files (*)"
# After the plane stops moving this long (ms), its sections are recomputed exactly.
EXACT_AFTER_MS = 250
# While the plane is dragged, its fast sections (and the graph) follow at most this often (ms).
DRAG_EVERY_MS = 30
PROBE_EVERY_MS = 60
CLICK_PIXELS = 3  # a press and release this close is a click, not a turn of the view


def report_available() -> bool:
    return importlib.util.find_spec("app.report") is not None and importlib.util.find_spec("app.review") is not None


# Least width of the 3-D view (pixels); its least height is three quarters of it.
VIEW_MIN_PX = 300


class MainWindow(QMainWindow):
    """Shows one :class:`Session`.

    Signals
    -------
    model_shown(str)
        A model was loaded and drawn (its path); its seams follow.
    seams_measured(str)
        The seams of that model are measured and shown.
    open_failed(str)
        The message shown to the user.
    """

    model_shown = Signal(str)
    seams_measured = Signal(str)
    open_failed = Signal(str)

    def __init__(
        self, session: Session | None = None, multi_samples: int | None = None, memory: WindowMemory | None = None
    ):
        super().__init__()
        collector.hold()  # worker threads must never destroy Qt or VTK objects (app/qt/collector.py)
        self._holds_collector = True
        self.session = session or Session(RecentFiles(default_store()))
        self.memory = memory or WindowMemory()
        self.setWindowTitle("Batten")
        self.resize(1400, 900)
        self.setAcceptDrops(True)
        # No timed redraws (pyvistaqt's default is 5 a second, whether anything changed or not: under a
        # software GL that kept the GUI thread busy). The scene asks for a paint after each change.
        self.view = QtInteractor(self, multi_samples=multi_samples, auto_update=False)
        # the panels give way before the model does: in a small window they squeezed the view to nothing
        self.view.setMinimumSize(VIEW_MIN_PX, VIEW_MIN_PX * 3 // 4)
        self.setCentralWidget(self.view)
        self.scene = Scene(self.view, self.session)
        self.view.add_axes(interactive=False)
        self._job_thread = None
        self._job = None
        self._seam_jobs: list[tuple[SeamJob, object]] = []  # re-measures after a profile change
        self._job_path = ""
        self._job_shown = False
        self.comparing = None  # a comparison running in the background (review_actions.Comparing)
        self.plane_handle = PlaneHandle(self.view, self._plane_moved, self.scene.to_display)
        self._placing_plane = False
        self._dragged_to = None  # the latest plane of a drag, not yet sectioned
        self._last_camera = None
        self._probe_at = None

        self._build_docks()
        self._build_menus()
        self._build_status()
        self._exact_timer = QTimer(self, singleShot=True, interval=EXACT_AFTER_MS)
        self._exact_timer.timeout.connect(lambda: self.session.set_section(exact=True))
        self._drag_timer = QTimer(self, singleShot=True, interval=DRAG_EVERY_MS)
        self._drag_timer.timeout.connect(self._follow_drag)
        self._probe_timer = QTimer(self, singleShot=True, interval=PROBE_EVERY_MS)
        self._probe_timer.timeout.connect(self._probe)
        self._camera_timer = QTimer(self, singleShot=True, interval=0)
        self._camera_timer.timeout.connect(self._camera_moved)

        s = self.session
        s.subscribe("model", self._model_changed)
        s.subscribe("display", self._display_changed)
        s.subscribe("sections", self._sections_changed)
        s.subscribe("section", self._section_settings_changed)
        s.subscribe("selection", self._selection_changed)
        s.subscribe("seams", lambda _: self.scene.update_seams())
        s.subscribe("tooling", self._tooling_changed)
        s.subscribe("profile", lambda _: self._update_status())
        s.subscribe("curve", lambda _: self._show_graph())
        s.subscribe("recent", self._fill_recent)
        s.subscribe("camera", lambda _: self.scene.update_stripes())
        self.view.iren.add_observer("MouseMoveEvent", self._mouse_moved)
        self._press_at = None
        self.view.iren.add_observer("LeftButtonPressEvent", self._left_pressed)
        self.view.iren.add_observer("LeftButtonReleaseEvent", self._left_released)
        self.view.camera.AddObserver("ModifiedEvent", lambda *_: self._camera_timer.start())
        self._fill_recent()
        self._update_status()
        self._restore_memory()

    # -- layout ----------------------------------------------------------
    def _dock(self, title: str, widget, area, name: str) -> QDockWidget:
        dock = QDockWidget(title, self)
        dock.setObjectName(name)
        dock.setWidget(widget)
        self.addDockWidget(area, dock)
        return dock

    def _build_docks(self) -> None:
        self.display_panel = DisplayPanel(self.session)
        self.section_panel = SectionPanel(self.session, view_direction=lambda: self.scene.camera().direction)
        panels = (("Display", self.display_panel, "display"), ("Sections", self.section_panel, "sections"))
        for title, panel, name in panels:
            scroll = QScrollArea()
            scroll.setWidgetResizable(True)
            scroll.setWidget(panel)
            self._dock(title, scroll, Qt.DockWidgetArea.LeftDockWidgetArea, name)
        self.findings_panel = FindingsPanel(self.session)
        self.findings_panel.chosen.connect(self.session.select)
        self.findings_panel.profile.wanted.connect(self.choose_profile)
        self.findings_panel.decision.wants_file.connect(lambda: review_actions.ask_review_file(self))
        self.findings_panel.decision.failed.connect(
            lambda message: QMessageBox.warning(self, "Decision not recorded", message)
        )
        self.findings_panel.setMinimumWidth(360)
        self._dock("Findings", self.findings_panel, Qt.DockWidgetArea.RightDockWidgetArea, "findings")
        self.graph = CurvatureGraph()
        self._dock("Curvature along the section", self.graph, Qt.DockWidgetArea.BottomDockWidgetArea, "graph")

    def _action(self, text: str, slot, shortcut=None, tip: str = "") -> QAction:
        action = QAction(text, self)
        action.triggered.connect(slot)
        if shortcut is not None:
            action.setShortcut(QKeySequence(shortcut))
        if tip:
            action.setToolTip(tip)
            action.setStatusTip(tip)
        return action

    def _build_menus(self) -> None:
        menu = self.menuBar().addMenu("&File")
        self.open_action = self._action("&Open…", self.choose_file, QKeySequence.StandardKey.Open)
        menu.addAction(self.open_action)
        self.recent_menu = menu.addMenu("Open &recent")
        menu.addSeparator()
        self.compare_action = self._action(
            "&Compare with…",
            lambda: review_actions.ask_compare(self),
            tip="deviation from an earlier revision and what changed in the findings",
        )
        menu.addAction(self.compare_action)
        menu.addAction(
            self._action(
                "Re&view file…",
                lambda: review_actions.ask_review_file(self),
                tip="the file the reviewers' decisions are saved to",
            )
        )
        menu.addSeparator()
        self.report_action = self._action("Export &report…", self.export_report, "Ctrl+R")
        if not report_available():
            self.report_action.setEnabled(False)
            self.report_action.setToolTip("the report writer is not part of this build")
        menu.addAction(self.report_action)
        self.image_action = self._action("Export &image…", self.export_image, "Ctrl+E")
        menu.addAction(self.image_action)
        menu.addSeparator()
        menu.addAction(self._action("&Close window", self.close, QKeySequence.StandardKey.Close))
        menu.addAction(self._action("&Quit", QApplication.closeAllWindows, QKeySequence.StandardKey.Quit))
        menu.setToolTipsVisible(True)

        view = self.menuBar().addMenu("&View")
        self.modes = menus.ModeActions(self.session, self)
        view.addActions(self.modes.group.actions())
        view.addSeparator()
        self.views = menus.ViewActions(self.view, self, self.scene.fit, on_projection=self.memory.save_parallel)
        self.views.add_to(view)
        view.addAction(self._action("Fit model in view", self._fit, "Ctrl+0"))
        self.mode_bar = menus.mode_toolbar(self, self.modes)
        self.menuBar().addMenu("&Section").addActions(self.section_panel.nudge_actions(self))
        docks = self.menuBar().addMenu("&Panels")
        for panel in (*self.findChildren(QDockWidget), self.mode_bar):
            docks.addAction(menus.panel_toggle(panel, self))
        menus.help_menu(self)

    def _build_status(self) -> None:
        self.model_label = QLabel()
        self.profile_label = QLabel()
        self.probe_label = QLabel()
        self.progress = QProgressBar()
        self.progress.setMaximumWidth(220)
        self.progress.setVisible(False)
        bar = self.statusBar()
        bar.addWidget(self.model_label)
        bar.addWidget(self.probe_label, 1)
        bar.addPermanentWidget(self.profile_label)
        bar.addPermanentWidget(self.progress)
        self.export_status = TaskStatus("stop writing the report; no file is left behind")
        self.compare_status = TaskStatus("stop comparing; the model shown is kept as it is")
        bar.addPermanentWidget(self.compare_status)
        bar.addPermanentWidget(self.export_status)

    # -- opening ---------------------------------------------------------
    def choose_file(self) -> None:
        path = file_dialogs.ask_open(self, self.memory, "Open a design model", MODEL_FILTER, self.session.path)
        if path:
            self.open_file(path)

    def open_file(self, path: str, model=None) -> None:
        """Load ``path`` in a worker thread; the current model stays until the new one is ready.

        ``model`` is the file already read (the command line reads it before the window opens).
        """
        if self._job is not None:
            self.statusBar().showMessage("still opening the previous file", 3000)
            return
        self._job = LoadJob(str(path), self.session.profile, model=model)
        self._job_shown = False
        self._job.progress.connect(self._loading_progress)
        self._job_path = str(path)
        # bound methods of this window: Qt queues them onto the GUI thread (a lambda would run in the worker)
        self._job.finished.connect(self._loaded)
        self._job.seams_ready.connect(self._seams_measured)
        self._job.failed.connect(self._load_failed)
        self.progress.setValue(0)
        self.progress.setVisible(True)
        self.open_action.setEnabled(False)
        self.session.begin_loading(path)
        self._job_thread = start_job(self._job, self)

    def wait_for_job(self) -> None:
        """Block until a running load and seam re-measures have ended (the kernel cannot be interrupted)."""
        thread, self._job_thread = self._job_thread, None
        seam_threads = [t for _, t in self._seam_jobs]
        for t in [thread, *seam_threads]:
            try:
                if t is not None and t.isRunning():
                    if t in seam_threads:
                        # its quit is queued to this (waiting) thread: ask now; the
                        # measuring under way still ends before the thread does
                        t.quit()
                    t.wait()
            except RuntimeError:
                pass  # the thread object is already deleted: it has ended

    def _loading_progress(self, percent: int, message: str) -> None:
        self.progress.setValue(percent)
        self.statusBar().showMessage(message)

    def _job_done(self) -> None:
        self._job = None
        self.progress.setVisible(False)
        self.open_action.setEnabled(True)
        self.statusBar().clearMessage()

    def _loaded(self, loaded) -> None:
        self._job_shown = True
        self.session.adopt(loaded, self._job_path)
        account = face_account_line(loaded.model.face_account())
        for warning in loaded.model.warnings[:1]:
            account += f"; read with warnings: {warning}"
        self.statusBar().showMessage(account, 8000)
        self.model_shown.emit(self._job_path)

    def _seams_measured(self, loaded) -> None:
        self._job_done()
        self.statusBar().showMessage(face_account_line(loaded.model.face_account()), 8000)
        review = loaded.seam_review
        if review is not None and review.profile.values != self.session.profile.values:
            # The profile changed while the file was opening: measure again, off the GUI thread.
            self.session.adopt_seams(replace(loaded, seam_review=None))
            self._remeasure_seams()
            return
        self.session.adopt_seams(loaded)
        self.seams_measured.emit(self._job_path)

    def _tooling_changed(self, _=None) -> None:
        # Only the draft view draws the tooling analysis; other views keep their surface (and camera) as they are.
        if self.session.display.mode == Mode.DRAFT:
            self.scene.update_surface()

    def _remeasure_seams(self) -> None:
        """Measure the seams on screen under the profile in force, in a worker thread."""
        loaded = self.session.loaded
        if loaded is None or self._job is not None:
            return  # nothing shown, or the file still opening: its seams are measured again when they arrive
        job = SeamJob(loaded, self.session.profile)
        job.seams_ready.connect(self._remeasured)
        job.failed.connect(self._remeasure_failed)
        self._seam_jobs.append((job, start_job(job, self)))
        self.statusBar().showMessage(f"measuring the seams under profile {self.session.profile.name}")

    def _remeasured(self, loaded) -> None:
        done = loaded.seam_review.profile.values if loaded.seam_review is not None else None
        finished = next((i for i, (j, _) in enumerate(self._seam_jobs) if j.profile.values == done), 0)
        del self._seam_jobs[finished : finished + 1]
        if done is not None and done == self.session.profile.values:
            self.session.adopt_seams(loaded)  # an older profile's result is dropped: a newer job follows
            self.statusBar().showMessage(f"findings judged by profile {self.session.profile.name}", 5000)
            self.seams_measured.emit(loaded.model.source)

    def _remeasure_failed(self, message: str) -> None:
        QMessageBox.critical(self, "Cannot measure the seams", message)

    def _load_failed(self, message: str) -> None:
        shown = self._job_shown
        self._job_done()
        self.session.end_loading()
        self.open_failed.emit(message)
        if shown:  # the model is on screen; only its seam analysis failed
            QMessageBox.critical(self, "Cannot measure the seams", message + "\n\nThe model is shown without seams.")
        elif self.session.model is not None:
            QMessageBox.critical(self, "Cannot open the file", message + "\n\nThe model already shown is kept.")
        else:
            QMessageBox.critical(self, "Cannot open the file", message)

    def dragEnterEvent(self, event):  # noqa: N802 - Qt's name
        if event.mimeData().hasUrls():
            event.acceptProposedAction()

    def dropEvent(self, event):  # noqa: N802 - Qt's name
        urls = [u.toLocalFile() for u in event.mimeData().urls() if u.isLocalFile()]
        if urls:
            self.open_file(urls[0])
            event.acceptProposedAction()

    def _fill_recent(self, *_) -> None:
        self.recent_menu.clear()
        for path in self.session.recent.paths:
            self.recent_menu.addAction(self._action(path, lambda _=False, p=path: self.open_file(p)))
        self.recent_menu.addSeparator()
        self.recent_menu.addAction(self._action("Clear the list", self.session.clear_recent))
        self.recent_menu.setEnabled(bool(self.session.recent.paths))

    # -- session -> view -------------------------------------------------
    def _model_changed(self, _topic) -> None:
        self._remove_plane_widget()
        self.scene.rebuild()
        # the isometric direction, then the fit that leaves the legend its room (pyvista's own fit
        # after a view change does not: a wide model ran past the left edge of the view)
        self.view.view_isometric(render=False)
        self.scene.fit()
        self._remember_camera()
        if self.session.section.enabled:
            self._add_plane_widget()
        self._update_status()
        self.setWindowTitle(f"Batten: {self.session.describe()}")

    def _display_changed(self, _topic) -> None:
        if self.session.display.mode == Mode.REFLECTION:
            self.session.camera = self.scene.camera()
        self.scene.update_surface()
        self.scene.update_seams()

    def _sections_changed(self, _topic) -> None:
        self.scene.update_sections()
        self._show_graph()

    def _show_graph(self) -> None:
        self.graph.set_curve(self.session.selected_section, self.session.selected_curve_label)

    def _section_settings_changed(self, _topic) -> None:
        if not self.session.section.enabled:
            self._remove_plane_widget()
        elif not self.plane_handle.shown:
            self._add_plane_widget()
        elif not self._placing_plane:
            self.plane_handle.place(self.session.section.origin, self.session.section.normal)

    def _selection_changed(self, _topic) -> None:
        finding = self.session.selected_finding
        if finding is None:
            self.scene.mark(None)
        else:
            self.scene.focus(finding)
            self.statusBar().showMessage(finding.detail or finding.title, 10000)

    def _fit(self) -> None:
        self.scene.fit()
        self.view.update()

    # -- section plane widget --------------------------------------------
    def _add_plane_widget(self) -> None:
        if self.session.model is None:
            return
        lo, hi = self.session.model.bounds
        pad = 0.05 * self.session.model.size
        bounds = [lo[0] - pad, hi[0] + pad, lo[1] - pad, hi[1] + pad, lo[2] - pad, hi[2] + pad]
        self.plane_handle.show(bounds, self.session.section.origin, self.session.section.normal)

    def _remove_plane_widget(self) -> None:
        self.plane_handle.hide()

    def _plane_moved(self, origin, normal) -> None:
        """The user drags or turns the plane: fast sections as it goes (throttled), exact ones once it rests."""
        self._dragged_to = (tuple(origin), tuple(normal))
        if not self._drag_timer.isActive():
            self._drag_timer.start()
        self._exact_timer.start()

    def _follow_drag(self) -> None:
        if self._dragged_to is None:
            return
        (origin, normal), self._dragged_to = self._dragged_to, None
        self._placing_plane = True
        try:
            self.session.set_section(exact=False, origin=origin, normal=normal)
        finally:
            self._placing_plane = False
        self.graph.repaint()  # now, not after the drag: the graph follows the plane

    def move_section(self, origin, normal=None) -> None:
        """Move the plane from code (tests, scripts): one fast drag step; the widget follows."""
        normal = self.session.section.normal if normal is None else normal
        self.session.set_section(exact=False, origin=tuple(origin), normal=tuple(normal))
        self._exact_timer.start()

    # -- camera and probe ------------------------------------------------
    def _remember_camera(self) -> None:
        cam = self.view.camera
        self._last_camera = (cam.position, cam.focal_point, cam.up)

    def _camera_moved(self) -> None:
        cam = self.view.camera
        now = (cam.position, cam.focal_point, cam.up)
        if now == self._last_camera:
            return  # clipping-range updates modify the camera on every frame
        self._last_camera = now
        if self.session.display.mode == Mode.REFLECTION:
            self.session.set_camera(self.scene.camera())

    def _left_pressed(self, *_):
        self._press_at = self.view.iren.get_event_position()

    def _left_released(self, *_):
        """A click (not a drag that turned the view) on a section curve shows it in the graph."""
        start, self._press_at = self._press_at, None
        end = self.view.iren.get_event_position()
        if start is not None and np.hypot(end[0] - start[0], end[1] - start[1]) <= CLICK_PIXELS:
            self.pick_curve(*end)

    def pick_curve(self, x: float, y: float) -> bool:
        """Choose the section curve under display pixel (x, y) for the graph; False when there is none."""
        index = self.scene.curve_at(x, y)
        if index is None:
            return False
        self.session.select_curve(index)
        self.statusBar().showMessage(f"graph shows {self.session.selected_curve_label}", 4000)
        return True

    def _mouse_moved(self, *_):
        self._probe_at = self.view.iren.get_event_position()
        if not self._probe_timer.isActive():
            self._probe_timer.start()

    def _probe(self) -> None:
        if self._probe_at is None or self.session.model is None:
            return
        hit = self.scene.pick(*self._probe_at)
        if hit is None:
            self.probe_label.setText("")
            return
        face, i, j = hit
        samples = self.session.samples[face]
        point = samples.field.points[i, j]
        name, value = self.session.value_at(face, i, j)
        where = ", ".join(f"{x:.2f}" for x in point)
        self.probe_label.setText(
            f"{self.session.face_label(face)}  ({where}) mm   {name} {value:.4g}   k1 {samples.field.k1[i, j]:.4g}  "
            f"k2 {samples.field.k2[i, j]:.4g} 1/mm"
        )

    def _update_status(self) -> None:
        model = self.session.model
        if model is None:
            self.model_label.setText("no model: File > Open, or drop a STEP, IGES or JSON file here")
        else:
            self.model_label.setText(f"{len(model.faces)} faces · units {model.units} · size {model.size:.1f} mm")
        profile = self.session.profile
        self.profile_label.setText(f"profile {profile.name}")
        # a permanent status widget keeps its first width unless told: make room for the whole name
        self.profile_label.setMinimumWidth(
            self.profile_label.fontMetrics().horizontalAdvance(self.profile_label.text()) + 16
        )
        self.profile_label.setToolTip(str(profile.values.get("title", profile.name)))

    # -- tolerance profile -----------------------------------------------
    def choose_profile(self, wanted: str) -> None:
        """The profile chooser asked for a shipped profile, or for a file (a dialog)."""
        if wanted == FROM_FILE:
            wanted = file_dialogs.ask_open(self, self.memory, "Judge by the tolerance profile in", PROFILE_FILTER)
            if not wanted:
                self.findings_panel.profile.refresh()
                return
        self.set_profile(wanted)

    def set_profile(self, name_or_path: str) -> None:
        """Judge the model on screen against another profile; a bad file leaves the current one in force."""
        from geometry.errors import BattenError

        try:
            # The seams are measured again in a worker thread: the window never waits for them.
            self.session.set_profile(name_or_path, remeasure=False)
        except BattenError as exc:
            self.findings_panel.profile.refresh()
            QMessageBox.critical(self, "Cannot use this profile", f"{exc}\n\nThe profile in force is kept.")
        else:
            self._remeasure_seams()

    # -- export ----------------------------------------------------------
    def export_image(self) -> None:
        name = file_dialogs.image_name(self.session.path, self.session.display.mode.value)
        path = file_dialogs.ask_save(
            self, self.memory, "Export the view as an image", name, IMAGE_FILTER, self.session.path
        )
        if path:
            self.save_image(path)

    def save_image(self, path: str) -> None:
        """Screenshot of the 3-D view without the tool widgets, written whole or not at all."""
        inputs = [self.session.model.source] if self.session.model is not None else []
        try:
            write_atomically(path, lambda tmp: screenshot_without_tools(self.view, tmp), inputs=inputs)
        except Exception as exc:
            QMessageBox.critical(self, "Cannot write the image", str(exc))

    def export_report(self) -> None:
        if self.session.model is None:
            QMessageBox.information(self, "Export report", "Open a model first.")
            return
        name = file_dialogs.report_name(self.session.path)
        path = file_dialogs.ask_save(
            self, self.memory, "Export the review report", name, REPORT_FILTER, self.session.path
        )
        if path:
            self.write_report(path)

    def write_report(self, path: str):
        """Write the report in a background process (status bar: progress, Cancel); returns the export or None."""
        return start_report(self, path)

    def _restore_memory(self) -> None:
        """The size, panels, display settings and projection of the last window."""
        geometry, state = self.memory.layout()
        if geometry is not None:
            self.restoreGeometry(geometry)
        if state is not None:
            self.restoreState(state)
        display = self.memory.display()
        if display is not None:
            self.session.set_display(**{name: getattr(display, name) for name in display.__dataclass_fields__})
        self.views.parallel.setChecked(self.memory.parallel())

    def remember(self) -> None:
        """Keep the window's size, panels and display settings for the next one."""
        self.memory.save_layout(self.saveGeometry(), self.saveState())
        self.memory.save_display(self.session.display)
        self.memory.sync()

    def closeEvent(self, event):  # noqa: N802 - Qt's name
        self.remember()
        self.export_status.stop()
        self.compare_status.stop()
        self.wait_for_job()
        self.view.close()
        super().closeEvent(event)
        if self._holds_collector:
            self._holds_collector = False
            collector.release()


def camera_state(window: MainWindow) -> np.ndarray:
    """Camera position and focal point, shape (2, 3) (for tests and scripts)."""
    cam = window.view.camera
    return np.array([cam.position, cam.focal_point])
