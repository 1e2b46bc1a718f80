"""``batten [open] [FILE]``: the inspection window, empty or with FILE loaded."""

from __future__ import annotations

import os


def add_arguments(parser) -> None:
    parser.add_argument("file", nargs="?", help="STEP, IGES or geomdl JSON model to open")


def run(args) -> int:
    if args.file and not os.path.exists(args.file):
        from geometry.errors import ReadError

        raise ReadError(args.file, "no such file")
    from PySide6.QtWidgets import QApplication

    from app.qt.window import MainWindow

    app = QApplication.instance() or QApplication(["batten"])
    app.setApplicationName("Batten")
    window = MainWindow()
    window.show()
    if args.file:
        window.open_file(args.file)
    return int(app.exec())
