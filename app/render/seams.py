"""Seams and free edges as lines coloured by verdict."""

from __future__ import annotations

import numpy as np
import pyvista as pv

from app.state.results import SeamView

from .colours import verdict_colour
from .combs import polylines


def seam_lines(seams: tuple[SeamView, ...]) -> pv.PolyData:
    """All seams in one line set; cell data ``colour`` (RGB uint8) from each verdict."""
    kept = [s for s in seams if s.points.shape[0] >= 2]
    lines = polylines([s.points for s in kept])
    if kept:
        lines.cell_data["colour"] = np.stack([verdict_colour(s.verdict) for s in kept])
    return lines
