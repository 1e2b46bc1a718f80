"""Compiled point-in-region test against trimming loops (numba).

Crossing-number test (Shimrat 1962, Algorithm 112): a point is inside when a
ray from it crosses the boundary an odd number of times; holes need no special
case under this even-odd rule. Only edges whose y-range holds a point can
cross its ray, so the edges are first sorted into horizontal bands (a uniform
grid in y, the bucketing of computational geometry) and each point walks the
edges of its band alone: long trims of thousands of edges cost as little
per point as a square. Points run on threads (the kernels release the GIL).
"""

from __future__ import annotations

import numba as nb
import numpy as np

from .compiled_eval import JIT_OPTIONS, run_row_blocks

# Bands per edge of the loops (a band holds a few edges), at most this many bands, and at most this
# many band entries per edge in all (edges spanning many bands fall back to fewer bands).
EDGES_PER_BAND = 4
MAX_BANDS = 4096
MAX_ENTRIES_PER_EDGE = 64
# Fewer points than this run on one thread.
THREADED_POINTS = 20000


@nb.njit(**JIT_OPTIONS)
def bands_kernel(ay, by, bands, lo, height):
    """Edges a -> b by horizontal band: CSR ``starts`` of shape (bands + 1,) and ``edges`` indices."""
    counts = np.zeros(bands + 1, dtype=np.int64)
    first = np.empty(ay.size, dtype=np.int64)
    last = np.empty(ay.size, dtype=np.int64)
    for k in range(ay.size):
        first[k] = min(max(int((min(ay[k], by[k]) - lo) / height), 0), bands - 1)
        last[k] = min(max(int((max(ay[k], by[k]) - lo) / height), 0), bands - 1)
        for band in range(first[k], last[k] + 1):
            counts[band + 1] += 1
    starts = np.cumsum(counts)
    edges = np.empty(starts[-1], dtype=np.int64)
    fill = starts[:-1].copy()
    for k in range(ay.size):
        for band in range(first[k], last[k] + 1):
            edges[fill[band]] = k
            fill[band] += 1
    return starts, edges


@nb.njit(**JIT_OPTIONS)
def crossings_kernel(x, y, ax, ay, bx, by, starts, edges, lo, height, out):
    """``out[i] ^= `` parity of the crossings of the +x ray from (x[i], y[i]) with edges a -> b.

    Only the edges of the point's band (``starts``, ``edges`` from :func:`bands_kernel`) are tried.
    """
    bands = starts.size - 1
    for i in range(x.size):
        xi, yi = x[i], y[i]
        if not (yi >= lo):  # below every edge (or NaN): no crossing
            continue
        band = min(int((yi - lo) / height), bands - 1)
        odd = out[i]
        for j in range(starts[band], starts[band + 1]):
            k = edges[j]
            a_y, b_y = ay[k], by[k]
            if (a_y > yi) != (b_y > yi):
                dy = b_y - a_y
                if dy == 0.0:
                    dy = 1.0
                if xi < ax[k] + (yi - a_y) * (bx[k] - ax[k]) / dy:
                    odd = not odd
        out[i] = odd


def _bands(ay: np.ndarray, by: np.ndarray) -> tuple[np.ndarray, np.ndarray, float, float]:
    """The edges sorted into horizontal bands: ``starts``, ``edges``, the lowest y and the band height."""
    lo = float(min(ay.min(), by.min()))
    hi = float(max(ay.max(), by.max()))
    bands = int(min(MAX_BANDS, max(1, ay.size // EDGES_PER_BAND)))
    while True:
        height = (hi - lo) / bands if hi > lo else 1.0
        reach = np.floor((np.maximum(ay, by) - lo) / height) - np.floor((np.minimum(ay, by) - lo) / height) + 1
        if bands == 1 or reach.sum() <= MAX_ENTRIES_PER_EDGE * ay.size:
            break
        bands = max(1, bands // 8)  # long edges over many bands: fewer, taller bands
    starts, edges = bands_kernel(ay, by, bands, lo, height)
    return starts, edges, lo, height


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
        ax, ay, bx, by = (np.ascontiguousarray(c) for c in (a[:, 0], a[:, 1], b[:, 0], b[:, 1]))
        starts, edges, lo, height = _bands(ay, by)

        def work(r0: int, r1: int) -> None:
            crossings_kernel(x[r0:r1], y[r0:r1], ax, ay, bx, by, starts, edges, lo, height, odd[r0:r1])

        run_row_blocks(work, x.size, None if x.size >= THREADED_POINTS else 1)
    return odd.reshape(shape)
