"""Section curves, curvature combs, their envelopes and markers as line and point sets."""

from __future__ import annotations

import numpy as np
import pyvista as pv

from geometry.sections import CurvatureComb, SectionCurve


def polylines(chains: list[np.ndarray]) -> pv.PolyData:
    """One PolyData holding each (n_i, 3) chain as a polyline (chains under two points skipped)."""
    chains = [np.asarray(c, float) for c in chains if len(c) >= 2]
    if not chains:
        return pv.PolyData()
    sizes = np.array([c.shape[0] for c in chains])
    starts = np.concatenate([[0], np.cumsum(sizes)[:-1]])
    ids = np.arange(sizes.sum())
    # VTK line cells: n, i0 .. i(n-1) for each chain
    cells = np.concatenate([np.concatenate([[n], ids[s : s + n]]) for s, n in zip(starts, sizes, strict=True)])
    return pv.PolyData(np.concatenate(chains), lines=cells)


def segments(starts: np.ndarray, ends: np.ndarray) -> pv.PolyData:
    """Separate line segments start[i] -> end[i], shapes (m, 3)."""
    m = starts.shape[0]
    if m == 0:
        return pv.PolyData()
    points = np.concatenate([starts, ends])
    cells = np.stack([np.full(m, 2), np.arange(m), np.arange(m) + m], axis=-1).ravel()
    return pv.PolyData(points, lines=cells)


def comb_teeth(combs: tuple[CurvatureComb, ...]) -> pv.PolyData:
    """Every tooth of every comb as one line set."""
    if not combs:
        return pv.PolyData()
    return segments(np.concatenate([c.roots for c in combs]), np.concatenate([c.tips for c in combs]))


def comb_envelopes(combs: tuple[CurvatureComb, ...]) -> pv.PolyData:
    """The polyline through each comb's tips (closed for a closed curve)."""
    return polylines([c.envelope for c in combs])


def section_curves(sections: tuple[SectionCurve, ...]) -> pv.PolyData:
    return polylines([c.points for c in sections])


def marker_points(points: list[np.ndarray]) -> pv.PolyData:
    """Point set of markers (inflections, extrema), shape (m_i, 3) arrays joined."""
    points = [np.asarray(p, float).reshape(-1, 3) for p in points]
    joined = np.concatenate(points) if points else np.zeros((0, 3))
    return pv.PolyData(joined) if joined.shape[0] else pv.PolyData()
