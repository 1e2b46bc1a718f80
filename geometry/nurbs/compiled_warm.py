"""Load every compiled kernel once, optionally in a background thread.

The first call of a numba kernel in a process loads it from the on-disk cache
(or compiles it on a fresh install) and initialises numba itself: about a second
on an idle machine, longer on a busy one. Readers start this in a thread while
the kernel's helper process reads the file, so the wait overlaps (the thread
waits on a pipe meanwhile, releasing the interpreter lock).
"""

from __future__ import annotations

import threading
from collections.abc import Callable

import numpy as np

_STARTED = threading.Event()


def warm_up() -> None:
    """Call each compiled kernel on a tiny input (loads or compiles it)."""
    from .compiled_eval import basis_rows, derivatives, grid_derivatives, knot_spans
    from .compiled_inversion import invert
    from .compiled_regions import points_in_loops
    from .differential import curvature_at, curvature_on_grid
    from .primitives import bilinear

    surface = bilinear(np.array([[0, 0, 0], [0, 1, 0], [1, 0, 0], [1, 1, 0.5]], float))
    u = np.array([0.25, 0.75])
    basis_rows(surface.knots_u, 1, 2, u, 2)
    derivatives(surface.pack, 0, u, u, 2)
    knot_spans(surface.pack, 0, u, u)
    grid_derivatives(surface, u, u, 1)
    invert(surface.pack, 0, np.zeros((2, 3)), u, u)
    points_in_loops(np.zeros((1, 2)), (np.array([[0, 0], [1, 0], [0, 1.0]]),))
    curvature_at(surface, u, u)
    curvature_on_grid(surface, u, u, workers=1)


def warm_up_in_background(*more: Callable[[], None]) -> None:
    """Start :func:`warm_up`, then each of ``more`` (kernels of higher layers), in a daemon thread, once."""
    if _STARTED.is_set():
        return
    _STARTED.set()

    def run() -> None:
        for step in (warm_up, *more):
            step()

    threading.Thread(target=run, name="batten-warm-up", daemon=True).start()
