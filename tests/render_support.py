"""An off-screen scene for render tests: the window's Scene on a pyvista plotter that needs no display (EGL)."""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager

import pyvista as pv

from app.render.scene import Scene
from app.state import Session


@contextmanager
def offscreen_scene(session: Session, size: tuple[int, int]) -> Iterator[Scene]:
    """A Scene showing ``session``'s model, rebuilt, on an off-screen plotter of ``size`` pixels; closed after."""
    plotter = pv.Plotter(off_screen=True, window_size=size)
    try:
        scene = Scene(plotter, session)
        scene.rebuild()
        yield scene
    finally:
        plotter.close()
