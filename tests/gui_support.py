"""What the window tests share: a shown window and a screenshot for a person to look at (pytest-xvfb).

Import it after ``pytest.importorskip("pyvistaqt")``. The window's settings
folder is already a private one (``tests/conftest.py``).
"""

from __future__ import annotations

from pathlib import Path

from app.qt.window import MainWindow
from app.state import Session

ARTIFACTS = Path(__file__).resolve().parent / "artifacts"


def show_window(qtbot, size: tuple[int, int], session: Session | None = None, **options) -> MainWindow:
    """A window of ``size`` pixels, shown and exposed, without multisampling (software GL under Xvfb)."""
    w = MainWindow(session or Session(), multi_samples=0, **options)
    qtbot.addWidget(w)
    w.resize(*size)
    w.show()
    qtbot.waitExposed(w)
    return w


def shoot(widget, name: str) -> Path:
    """Save ``widget`` as tests/artifacts/NAME.png (a window's 3-D view repainted first)."""
    ARTIFACTS.mkdir(exist_ok=True)
    view = getattr(widget, "view", None)
    if view is not None:
        view.update()
    target = ARTIFACTS / f"{name}.png"
    assert widget.grab().save(str(target))
    return target
