"""``batten [open] [FILE]``: the inspection window, empty or with FILE loaded.

FILE is read before any window opens: a file that cannot be read gives one line
naming it and the cause, and exit status 2, as every other command does.
"""

from __future__ import annotations

import os
import sys

from geometry.errors import BattenError


def add_arguments(parser) -> None:
    parser.add_argument("file", nargs="?", help="STEP, IGES or JSON surface model to open")


def has_display(environ=os.environ, platform: str = sys.platform) -> bool:
    """Whether Qt has a screen to open a window on (X11 or Wayland on Linux)."""
    if not platform.startswith("linux"):
        return True
    return bool(environ.get("DISPLAY") or environ.get("WAYLAND_DISPLAY") or environ.get("QT_QPA_PLATFORM"))


def read_first(path: str):
    """The model in ``path``, read before the window opens.

    Raises
    ------
    ReadError
        Missing, unreadable or foreign file, or a file without faces.
    """
    from geometry.errors import ReadError
    from geometry.io import read_model

    model = read_model(path)
    if not model.faces:
        raise ReadError(path, "the model holds no faces")
    return model


def run(args) -> int:
    if args.file and not os.path.exists(args.file):
        from geometry.errors import ReadError

        raise ReadError(args.file, "no such file")
    if not has_display():
        # Without this, Qt aborts the process with a page of plugin messages.
        raise BattenError(
            "no display to open the window on (DISPLAY is not set); run it in a desktop session or under "
            "'xvfb-run -a', or use the headless commands: batten summary, probe, section, check"
        )
    model = read_first(args.file) if args.file else None
    from PySide6.QtWidgets import QApplication

    from app.qt.window import MainWindow

    app = QApplication.instance() or QApplication(["batten"])
    app.setApplicationName("Batten")
    window = MainWindow()
    window.show()
    if model is not None:
        window.open_file(args.file, model=model)
    return int(app.exec())
