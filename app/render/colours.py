"""The window's colours (our own choice): curvature ramps, stripe shades, verdict colours.

Signed measures use a diverging ramp centred on zero (teal for negative,
near-white at zero, brick red for positive), so flat reads as white and the
sign reads at a glance; unsigned measures use a one-sided ramp.
"""

from __future__ import annotations

import numpy as np
import pyvista as pv

# (position in [0, 1], hex colour) stops
DIVERGING = ((0.0, "#0d4073"), (0.25, "#4099bf"), (0.5, "#f5f5ee"), (0.75, "#ed9e4d"), (1.0, "#991f14"))
ONE_SIDED = ((0.0, "#f5f5ee"), (0.35, "#9fd3c7"), (0.7, "#2f7f9a"), (1.0, "#17324f"))
MISSING = "#7f7f7f"  # samples with no value (degenerate, outside a light)
# Light on a colour map: mostly ambient, so a face shows its value's colour at any angle (a flat face in the
# zero colour, not grey), with enough diffuse light to read the shape. Our choice, checked by a pixel test.
MAP_LIGHT = dict(ambient=0.82, diffuse=0.25, specular=0.0)
# Light on the plain shaded surface: walls seen at a grazing angle stay light enough to read.
SHADED_LIGHT = dict(ambient=0.4, diffuse=0.65, specular=0.1)
SURFACE = "#c9ccd1"  # plain shaded faces
STRIPE_LIGHT = (250, 250, 250)
STRIPE_DARK = (22, 22, 26)
VERDICT = {"fail": "#e0301e", "pass": "#2e9e4f", "free": "#d98b00", "unmeasured": "#5a6fa8", "note": "#5a6fa8"}
COMB = "#6a3d9a"
ENVELOPE = "#b15928"
SECTION = "#1a1a1a"
INFLECTION = "#ff00aa"
EXTREMUM = "#00a0c0"
MARK = "#ffd400"
BACKGROUND_BOTTOM = "#aeb7c2"  # a soft gradient, so white stripes and the white of flat never vanish
BACKGROUND_TOP = "#e8ecf0"


def hex_rgb(hex_colour: str) -> np.ndarray:
    """RGB in 0..1 of a "#rrggbb" colour, shape (3,)."""
    return np.array([int(hex_colour[i : i + 2], 16) for i in (1, 3, 5)], float) / 255.0


def ramp_table(stops, count: int = 256) -> np.ndarray:
    """RGBA colours (0..255) sampled evenly along colour stops, shape (count, 4)."""
    where = np.array([p for p, _ in stops])
    colours = np.stack([hex_rgb(c) for _, c in stops])
    x = np.linspace(0.0, 1.0, count)
    rgb = np.stack([np.interp(x, where, colours[:, c]) for c in range(3)], axis=-1)
    return np.concatenate([np.round(rgb * 255), np.full((count, 1), 255)], axis=-1).astype(np.uint8)


def lookup_table(signed: bool, limits: tuple[float, float], reverse: bool = False) -> pv.LookupTable:
    """Colour map for a curvature measure over ``limits`` (values outside take the end colours).

    ``reverse`` runs the one-sided ramp from strong to calm: the minimum radius,
    whose tight radii must read as strongly as large curvature does.
    """
    values = ramp_table(DIVERGING if signed else ONE_SIDED)
    table = pv.LookupTable(values=values[::-1] if reverse else values)
    table.scalar_range = limits
    table.nan_color = MISSING
    # values beyond the range: the end colours, drawn as swatches at the legend's ends when present
    table.below_range_color = tuple(values[-1 if reverse else 0, :3] / 255.0)
    table.above_range_color = tuple(values[0 if reverse else -1, :3] / 255.0)
    return table


def verdict_colour(verdict: str) -> np.ndarray:
    """RGB (0..255) of a seam verdict, shape (3,)."""
    return np.round(hex_rgb(VERDICT.get(verdict, VERDICT["note"])) * 255).astype(np.uint8)
