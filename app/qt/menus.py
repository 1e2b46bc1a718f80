"""The View and Help menus and the display-mode toolbar.

The mode actions form one exclusive group shared by the View menu and the
toolbar; they follow the session's display mode (whoever changed it: the side
panel, a shortcut, a script) with their signals blocked, and a user's choice
goes to the session.
"""

from __future__ import annotations

from PySide6.QtGui import QAction, QActionGroup, QKeySequence
from PySide6.QtWidgets import QMainWindow, QMenu, QToolBar

from app.state import Mode, Session

from . import help as help_windows
from .camera_views import STANDARD_VIEWS, is_parallel, look_from, set_parallel

MODE_KEYS = {mode: f"Ctrl+{i + 1}" for i, mode in enumerate(Mode)}
VIEW_KEYS = {"front": "Alt+1", "top": "Alt+2", "right": "Alt+3", "isometric": "Alt+4"}
VIEW_TIPS = {
    "front": "look along +y, z up",
    "top": "look down along -z, y up",
    "right": "look along -x, z up",
    "isometric": "look from the front, right and top at once",
}


class ModeActions:
    """One checkable action per display mode, in an exclusive group.

    Parameters
    ----------
    session : Session
    parent : QMainWindow
    """

    def __init__(self, session: Session, parent: QMainWindow):
        self.session = session
        self.group = QActionGroup(parent)
        self.group.setExclusive(True)
        self.actions: dict[Mode, QAction] = {}
        for mode, key in MODE_KEYS.items():
            action = QAction(mode.value.capitalize(), parent, checkable=True)
            action.setShortcut(QKeySequence(key))
            action.setData(mode.value)
            action.setToolTip(f"show {mode.value} ({key})")
            action.triggered.connect(lambda _=False, m=mode: self.session.set_display(mode=m))
            self.group.addAction(action)
            self.actions[mode] = action
        session.subscribe("display", self.refresh)
        self.refresh()

    def refresh(self, *_) -> None:
        # setChecked does not fire ``triggered``: the session is not told its own change back.
        # (Blocking the action's signals would keep the group from unchecking the others.)
        self.actions[self.session.display.mode].setChecked(True)

    @property
    def checked(self) -> Mode | None:
        action = self.group.checkedAction()
        return None if action is None else Mode(action.data())


def mode_toolbar(window: QMainWindow, modes: ModeActions) -> QToolBar:
    """The display modes as a row of buttons, under the menu bar."""
    bar = QToolBar("Display modes", window)
    bar.setObjectName("display-modes")
    bar.addActions(modes.group.actions())
    window.addToolBar(bar)
    return bar


class ViewActions:
    """Standard views and the projection toggle of a plotter.

    Parameters
    ----------
    plotter : pyvistaqt.QtInteractor
    parent : QMainWindow
    fit : callable()
        Fits the model in the view once it is turned (the scene's, which leaves room for the legend).
    on_projection : callable(bool), optional
        Told when the user switches the projection (to remember it).
    """

    def __init__(self, plotter, parent: QMainWindow, fit, on_projection=None):
        self.plotter = plotter
        self.views: dict[str, QAction] = {}
        for name in STANDARD_VIEWS:
            action = QAction(f"{name.capitalize()} view", parent)
            action.setShortcut(QKeySequence(VIEW_KEYS[name]))
            action.setToolTip(VIEW_TIPS[name])
            action.setStatusTip(VIEW_TIPS[name])
            action.triggered.connect(lambda _=False, n=name: look_from(self.plotter, n, fit))
            self.views[name] = action
        self.parallel = QAction("Parallel projection", parent, checkable=True)
        self.parallel.setShortcut(QKeySequence("Ctrl+Shift+P"))
        tip = "true lengths across the screen (ticked) or perspective (not ticked)"
        self.parallel.setToolTip(tip)
        self.parallel.setStatusTip(tip)
        self.parallel.setChecked(is_parallel(plotter))
        self._on_projection = on_projection
        self.parallel.toggled.connect(self._projection)

    def _projection(self, parallel: bool) -> None:
        set_parallel(self.plotter, parallel)
        if self._on_projection is not None:
            self._on_projection(parallel)

    def add_to(self, menu: QMenu) -> None:
        menu.addActions(list(self.views.values()))
        menu.addAction(self.parallel)


def panel_toggle(panel, parent: QMainWindow) -> QAction:
    """A checked menu entry that shows and hides a dock or tool bar, made here rather than taken from Qt.

    ``toggleViewAction()`` hands back an action Qt made; on PySide6 6.11 its
    wrapper could come back as a stale wrapper of another type at the same
    address (a ``QSurface``, seen once in CI), so the window builds its own.
    """
    action = QAction(panel.windowTitle(), parent, checkable=True)
    action.setChecked(not panel.isHidden())
    action.toggled.connect(panel.setVisible)
    panel.visibilityChanged.connect(action.setChecked)
    return action


def help_menu(window: QMainWindow) -> QMenu:
    """Help: the guide (F1) and what Batten is built on."""
    menu = window.menuBar().addMenu("&Help")
    guide = QAction("Batten &guide", window)
    guide.setShortcut(QKeySequence(QKeySequence.StandardKey.HelpContents))
    guide.triggered.connect(lambda: help_windows.show_guide(window))
    about = QAction("&About Batten", window)
    about.triggered.connect(lambda: help_windows.show_about(window))
    menu.addAction(guide)
    menu.addAction(about)
    return menu
