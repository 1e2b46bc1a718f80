"""Compiled point-in-region test against trimming loops (numba).

Crossing-number test (Shimrat 1962, Algorithm 112): a point is inside when a
ray from it crosses the boundary an odd number of times; holes need no special
case under this even-odd rule. Each point walks the loop edges in compiled
code, skipping at once the edges whose y-range misses it.
"""

from __future__ import annotations

import numba as nb
import numpy as np

from .compiled_eval import JIT_OPTIONS


@nb.njit(**JIT_OPTIONS)
def crossings_kernel(x, y, ax, ay, bx, by, out):
    """``out[i] ^= `` parity of the crossings of the +x ray from (x[i], y[i]) with edges a -> b."""
    for i in range(x.size):
        xi, yi = x[i], y[i]
        odd = out[i]
        for k in range(ax.size):
            a_y, b_y = ay[k], by[k]
            if (a_y > yi) != (b_y > yi):
                dy = b_y - a_y
                if dy == 0.0:
                    dy = 1.0
                if xi < ax[k] + (yi - a_y) * (bx[k] - ax[k]) / dy:
                    odd = not odd
        out[i] = odd


def points_in_loops(uv: np.ndarray, loops) -> np.ndarray:
    """Even-odd point-in-region test against a set of closed polylines.

    Parameters
    ----------
    uv : ndarray of shape (..., 2)
    loops : sequence of ndarray of shape (n_i, 2)
        Closed polylines (first point not repeated).

    Returns
    -------
    inside : ndarray of bool, shape (...)
    """
    uv = np.asarray(uv, dtype=float)
    shape = uv.shape[:-1]
    pts = uv.reshape(-1, 2)
    odd = np.zeros(pts.shape[0], dtype=np.bool_)
    if loops:
        a = np.concatenate([np.asarray(lp, dtype=float) for lp in loops])
        b = np.concatenate([np.roll(np.asarray(lp, dtype=float), -1, axis=0) for lp in loops])
        x = np.ascontiguousarray(pts[:, 0])
        y = np.ascontiguousarray(pts[:, 1])
        crossings_kernel(x, y, *(np.ascontiguousarray(c) for c in (a[:, 0], a[:, 1], b[:, 0], b[:, 1])), odd)
    return odd.reshape(shape)
