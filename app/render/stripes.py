"""Light stripes that stay sharp at any zoom: the stripe parameter as a 1-D texture coordinate.

The session gives a stripe parameter per sample (an integer is the middle of a
light line). The faces are drawn with that parameter as point scalars through a
striped colour table with scalar interpolation before mapping, so VTK turns the
parameter into a 1-D texture coordinate, the GPU interpolates it per fragment
and looks the stripe up in a texture of up to :data:`TEXELS` entries. Edges stay
crisp however coarse the mesh; nothing is coloured per vertex. Each edge of a
light band ramps over :data:`EDGE_SHARE` of a period instead of jumping from one
texel to the next, so band edges do not stair-step where the parameter changes
fast (near silhouettes); the window adds FXAA over the whole picture.
"""

from __future__ import annotations

import numpy as np
import pyvista as pv

from .colours import MISSING, STRIPE_DARK, STRIPE_LIGHT

TEXELS = 4096
# Texels per stripe period at least, so a light band is never thinner than a few texels.
MIN_TEXELS_PER_PERIOD = 16
# Width of the ramp at each edge of a light band, as a share of the stripe period.
EDGE_SHARE = 0.02
# Share of samples at each end left out of the range (grazing normals send the
# highlight parameter to infinity).
CLIP_PERCENTILE = 0.5


def stripe_range(parameter: np.ndarray) -> tuple[float, float]:
    """Whole-period range covering the parameter (robust ends), at most TEXELS / 16 periods.

    Parameters
    ----------
    parameter : ndarray of shape (n,)

    Returns
    -------
    low, high : float
        Integers with ``high > low``.
    """
    finite = parameter[np.isfinite(parameter)]
    if finite.size == 0:
        return 0.0, 1.0
    low, high = np.percentile(finite, [CLIP_PERCENTILE, 100 - CLIP_PERCENTILE])
    low, high = np.floor(low) - 1, np.ceil(high) + 1
    most = TEXELS // MIN_TEXELS_PER_PERIOD
    if high - low > most:
        middle = np.round(np.median(finite))
        low, high = middle - most // 2, middle + most // 2
    return float(low), float(high)


def stripe_table(light_share: float, limits: tuple[float, float]) -> pv.LookupTable:
    """Colour table over ``limits``: light bands of ``light_share`` of a period centred on integers.

    Parameters
    ----------
    light_share : float
        In (0, 1).
    limits : (float, float)
        From :func:`stripe_range`.
    """
    low, high = limits
    x = low + (np.arange(TEXELS) + 0.5) / TEXELS * (high - low)
    # 1 inside a band, 0 outside, a linear ramp of EDGE_SHARE across each edge (centred on the edge)
    light = np.clip((light_share / 2 - np.abs(x - np.round(x))) / EDGE_SHARE + 0.5, 0.0, 1.0)
    rgb = np.asarray(STRIPE_DARK) + light[:, None] * (np.asarray(STRIPE_LIGHT) - np.asarray(STRIPE_DARK))
    table = pv.LookupTable(values=np.concatenate([np.round(rgb), np.full((TEXELS, 1), 255)], axis=1).astype(np.uint8))
    table.scalar_range = limits
    table.nan_color = MISSING
    return table
