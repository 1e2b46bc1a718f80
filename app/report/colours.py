"""The report's colours (our own choice): a diverging ramp and stripe shades."""

from __future__ import annotations

import numpy as np

# Negative curvature towards deep teal, zero near white, positive towards brick red.
DIVERGING_STOPS = (
    (0.00, (0.05, 0.25, 0.45)),
    (0.25, (0.25, 0.60, 0.75)),
    (0.50, (0.96, 0.96, 0.93)),
    (0.75, (0.93, 0.62, 0.30)),
    (1.00, (0.60, 0.12, 0.08)),
)
STRIPE_LIGHT = (0.97, 0.97, 0.97, 1.0)
STRIPE_DARK = (0.10, 0.10, 0.12, 1.0)


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
