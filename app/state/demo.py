"""A small in-memory model of our own for trying the window without a file (and for tests).

Two faces of an invented "tray lid": a wavy bicubic panel whose profile has
an inflection, and a flat flange joined to it along x = 100 mm with a slope
break (a G0-only seam), plus its free boundary edges.
"""

from __future__ import annotations

import numpy as np

from geometry.model import Edge, EdgeUse, Face, Model
from geometry.nurbs import NurbsSurface

BEZIER3 = [0, 0, 0, 0, 1, 1, 1, 1]


def wavy_panel(length: float = 100.0, width: float = 60.0, wave: float = 8.0) -> NurbsSurface:
    """Bicubic Bezier panel, z rises then falls along x (one inflection per x-profile)."""
    x = np.linspace(0, length, 4)
    y = np.linspace(0, width, 4)
    z = np.array([0.0, wave, -wave, 0.0])
    poles = np.stack(np.broadcast_arrays(x[:, None], y[None, :], z[:, None]), axis=-1)
    return NurbsSurface(3, 3, BEZIER3, BEZIER3, poles)


def flange(start: float = 100.0, length: float = 60.0, width: float = 60.0) -> NurbsSurface:
    poles = np.array([[[start, 0, 0], [start, width, 0]], [[start + length, 0, 0], [start + length, width, 0]]])
    return NurbsSurface(1, 1, [0, 0, 1, 1], [0, 0, 1, 1], poles)


def demo_model() -> Model:
    panel, plate = wavy_panel(), flange()
    t = np.linspace(0, 1, 21)
    seam = np.stack([np.full_like(t, 100.0), 60 * t, np.zeros_like(t)], axis=-1)
    edges = [Edge(seam, (EdgeUse(0, np.stack([np.ones_like(t), t], -1)), EdgeUse(1, np.stack([0 * t, t], -1))))]
    end = np.stack([np.full_like(t, 160.0), 60 * t, 0 * t], -1)
    edges.append(Edge(end, (EdgeUse(1, np.stack([1 + 0 * t, t], -1)),)))
    return Model((Face(panel, name="panel"), Face(plate, name="flange")), tuple(edges), source="demo tray lid")
