"""Arithmetic on arrays of 3-vectors, with the axis of the three components named.

The core holds vectors in two layouts: components last (points of shape
``(n, 3)``, the usual numpy layout) and components first (shape ``(3, k)``,
used by kernels that keep each component contiguous for speed). Every helper
takes ``axis``, the axis of the three components, so one module serves both
and no caller guesses which convention a private ``_dot`` had.
"""

from __future__ import annotations

import numpy as np

# Lengths below this count as zero when normalising (no division by zero).
TINY_LENGTH = 1e-300


def _part(a: np.ndarray, i: int, axis: int) -> np.ndarray:
    """Component ``i`` of every vector (a view)."""
    if axis == -1:
        return a[..., i]
    return a[(slice(None),) * axis + (i,)]


def dot(a: np.ndarray, b: np.ndarray, axis: int = -1, out: np.ndarray | None = None) -> np.ndarray:
    """Dot products of corresponding vectors.

    Parameters
    ----------
    a, b : ndarray
        Broadcastable arrays with 3 components along ``axis``, e.g. (n, 3) or (3, k).
    axis : int
        -1 (components last) or a non-negative axis (0: components first).
    out : ndarray, optional
        Written in place; shape of the result.

    Returns
    -------
    ndarray
        The input shape without ``axis``.
    """
    out = np.multiply(_part(a, 0, axis), _part(b, 0, axis), out=out)
    out += _part(a, 1, axis) * _part(b, 1, axis)
    out += _part(a, 2, axis) * _part(b, 2, axis)
    return out


def cross(a: np.ndarray, b: np.ndarray, axis: int = -1, out: np.ndarray | None = None) -> np.ndarray:
    """Cross products ``a x b`` of corresponding vectors (right-handed).

    Parameters
    ----------
    a, b : ndarray
        Broadcastable arrays with 3 components along ``axis``.
    axis : int
        -1 (components last) or a non-negative axis (0: components first).
    out : ndarray, optional
        Written in place; the broadcast shape of ``a`` and ``b``.

    Returns
    -------
    ndarray
        The broadcast shape of ``a`` and ``b``.
    """
    if out is None:
        out = np.empty(np.broadcast_shapes(np.shape(a), np.shape(b)))
    for i, j, k in ((0, 1, 2), (1, 2, 0), (2, 0, 1)):
        target = _part(out, i, axis)
        np.multiply(_part(a, j, axis), _part(b, k, axis), out=target)
        target -= _part(a, k, axis) * _part(b, j, axis)
    return out


def norm(a: np.ndarray, axis: int = -1) -> np.ndarray:
    """Euclidean lengths of the vectors, the input shape without ``axis``."""
    return np.sqrt(dot(a, a, axis))


def unit(a: np.ndarray, axis: int = -1) -> np.ndarray:
    """The vectors scaled to length 1 (zero vectors stay zero), same shape as ``a``."""
    a = np.asarray(a, dtype=float)
    return a / np.expand_dims(np.maximum(norm(a, axis), TINY_LENGTH), axis)
