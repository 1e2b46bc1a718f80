"""The report's colours: the window's diverging ramp and stripe shades as 0..1 floats."""

from __future__ import annotations

import numpy as np

from app.render.colours import DIVERGING, hex_rgb
from app.render.colours import STRIPE_DARK as _STRIPE_DARK_RGB
from app.render.colours import STRIPE_LIGHT as _STRIPE_LIGHT_RGB

# The window's colours, so a report and the screen it came from look alike.
DIVERGING_STOPS = tuple((position, tuple(float(c) for c in hex_rgb(hex_colour))) for position, hex_colour in DIVERGING)
STRIPE_LIGHT = (*(c / 255.0 for c in _STRIPE_LIGHT_RGB), 1.0)
STRIPE_DARK = (*(c / 255.0 for c in _STRIPE_DARK_RGB), 1.0)


def ramp(stops, count: int) -> np.ndarray:
    """RGBA table of ``count`` colours interpolated linearly between ``stops``.

    Parameters
    ----------
    stops : sequence of (position, (r, g, b))
        Positions in [0, 1], increasing.
    count : int

    Returns
    -------
    ndarray of shape (count, 4)
        Values in [0, 1].
    """
    at = np.array([s[0] for s in stops])
    rgb = np.array([s[1] for s in stops])
    x = np.linspace(0.0, 1.0, count)
    channels = [np.interp(x, at, rgb[:, c]) for c in range(3)]
    return np.column_stack([*channels, np.ones(count)])
