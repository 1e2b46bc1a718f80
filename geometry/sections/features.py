"""Inflections, curvature extrema and fairness figures of one analysed curve.

Sign changes of the exact signed curvature k (inflections) and of its exact
arc-length derivative dk/ds (extrema) are bracketed between consecutive curve
points, then each root is found on the exact curve by the Illinois variant of
false position (Dowell & Jarratt, BIT 11, 1971), run on all brackets at once.
Values within a noise band of zero count as zero, so a circle has no extrema
and a straight line no inflections.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from .results import CurvePoints, FairnessFigures

# |k| below INFLECTION_BAND * max|k| (or radius beyond STRAIGHT_RADIUS model
# sizes) is zero: its sign is rounding noise.
INFLECTION_BAND = 1e-9
STRAIGHT_RADIUS = 1e10
# |dk/ds| below EXTREMUM_BAND * max|k| / length is zero (constant curvature).
EXTREMUM_BAND = 1e-7
# Stop when the bracket (a fraction of the sample interval) is this narrow, or
# |f| this small against its values at the ends: the root is then within
# about that fraction of the interval.
ROOT_TOLERANCE = 1e-12
VALUE_TOLERANCE = 1e-13
ROOT_MAX_ITERATIONS = 60
# A bracket narrower than JUMP_WIDTH whose end values both stay above
# JUMP_FRACTION of the starting ones holds a jump, not a root: dk/ds jumps at a
# knot of a C2 spline, k at a knot of a C1 one. The jump is the answer there.
JUMP_WIDTH = 1e-7
# Every this many steps, a bracket that has not halved since the last check is bisected.
SAFEGUARD_EVERY = 4
JUMP_FRACTION = 1e-3
# Two faces whose curvatures at a seam's point differ by less than this share meet
# curvature-continuously there: a turn of dk/ds across that seam is an extremum (the
# corner peaks of a rounded box split into faces at its corners), not a jump.
SEAM_CONTINUITY = 1e-3

# probe(ia, ib, t) -> dict with "points", "uv", "faces", "curvature", "slope" at
# the curve point a fraction t of the way from sample ia to sample ib.
Probe = Callable[[np.ndarray, np.ndarray, np.ndarray], dict]


def illinois_roots(fun: Callable[[np.ndarray, np.ndarray], np.ndarray], f0: np.ndarray, f1: np.ndarray) -> np.ndarray:
    """Roots in [0, 1] of many bracketed scalar functions at once.

    Parameters
    ----------
    fun : callable
        ``fun(sel, t)`` gives the values of the functions ``sel`` (int array) at ``t``.
    f0, f1 : ndarray of shape (m,)
        Values at 0 and 1, of opposite signs.

    Returns
    -------
    t : ndarray of shape (m,)

    Notes
    -----
    False position with Illinois halving of the retained end's value, which
    keeps superlinear convergence (order about 1.44) where plain false position
    stalls at one end (Dowell & Jarratt 1971); a bisection step wherever four
    steps failed to halve the bracket bounds the work at jumps.
    """
    m = f0.size
    a, b = np.zeros(m), np.ones(m)
    fa, fb = np.array(f0, float), np.array(f1, float)
    va, vb = np.abs(fa), np.abs(fb)  # true |f| at the ends (fa, fb get halved)
    jump_level = JUMP_FRACTION * np.minimum(va, vb)
    small = VALUE_TOLERANCE * np.maximum(va, vb)
    checked = np.ones(m)  # bracket width at the last safeguard check
    side = np.zeros(m, dtype=int)
    t = np.full(m, 0.5)
    active = np.arange(m)
    for iteration in range(ROOT_MAX_ITERATIONS):
        if active.size == 0:
            break
        aa, bb, ga, gb = a[active], b[active], fa[active], fb[active]
        denom = gb - ga
        tt = np.where(denom != 0, (aa * gb - bb * ga) / np.where(denom != 0, denom, 1.0), 0.5 * (aa + bb))
        # safeguard: bisect where the last two steps did not halve the bracket
        if iteration % SAFEGUARD_EVERY == SAFEGUARD_EVERY - 1:
            slow = (bb - aa) > 0.5 * checked[active]
            tt = np.where(slow, 0.5 * (aa + bb), tt)
            checked[active] = bb - aa
        tt = np.clip(tt, aa, bb)
        ft = fun(active, tt)
        t[active] = tt
        hit = np.abs(ft) <= small[active]
        to_b = (np.sign(ft) == np.sign(gb)) & ~hit
        to_a = ~to_b & ~hit
        # Illinois: halve the value at the end kept twice in a row
        fa[active[to_b & (side[active] == 1)]] *= 0.5
        fb[active[to_a & (side[active] == -1)]] *= 0.5
        b[active[to_b]], fb[active[to_b]], vb[active[to_b]] = tt[to_b], ft[to_b], np.abs(ft[to_b])
        a[active[to_a]], fa[active[to_a]], va[active[to_a]] = tt[to_a], ft[to_a], np.abs(ft[to_a])
        side[active[to_b]] = 1
        side[active[to_a]] = -1
        width = b[active] - a[active]
        jump = (width <= JUMP_WIDTH) & (np.minimum(va[active], vb[active]) > jump_level[active])
        done = hit | (width <= ROOT_TOLERANCE) | jump
        active = active[~done]
    return t


def _band_signs(values: np.ndarray, band: float) -> np.ndarray:
    return np.where(np.abs(values) > band, np.sign(values), 0).astype(int)


def _sign_changes(signs: np.ndarray, closed: bool) -> tuple[np.ndarray, np.ndarray]:
    """Pairs (i, j) of consecutive non-zero samples of opposite sign, in curve order."""
    nz = np.flatnonzero(signs)
    if nz.size < 2:
        return np.zeros(0, int), np.zeros(0, int)
    i, j = nz[:-1], nz[1:]
    if closed:
        i, j = np.append(i, nz[-1]), np.append(j, nz[0])
    change = signs[i] != signs[j]
    return i[change], j[change]


def _features(
    key: str,
    signs: np.ndarray,
    curve: dict,
    probe: Probe,
    closed: bool,
    continuous_seams_only: bool,
) -> CurvePoints:
    i, j = _sign_changes(signs, closed)
    n = signs.size
    pieces, spans = curve["pieces"], curve["spans"]
    adjacent = (j == i + 1) | (closed & (i == n - 1) & (j == 0))
    wrap = (i == n - 1) & (j == 0)
    same_piece = (pieces[i] == pieces[j]) & ~wrap  # the closing step joins two copies of one point
    bracket = adjacent & same_piece & (spans[i] == spans[j])
    knot = adjacent & same_piece & (spans[i] != spans[j])
    seam = adjacent & ~same_piece
    if continuous_seams_only:
        k = curve["curvature"]
        seam &= np.abs(k[i] - k[j]) <= SEAM_CONTINUITY * np.maximum(np.abs(k[i]), np.abs(k[j]))
    flat = ~adjacent
    parts = []
    if np.any(bracket):
        ia, ib = i[bracket], j[bracket]
        f0, f1 = curve[key][ia], curve[key][ib]

        def value(sel, t):
            return probe(ia[sel], ib[sel], t)[key]

        if probe is None:  # quick estimate: linear between the samples
            t = f0 / (f0 - f1)
            at = {
                k: curve[k][ia] + (t[:, None] if curve[k].ndim > 1 else t) * (curve[k][ib] - curve[k][ia])
                for k in ("points", "uv", "curvature")
            }
            at["faces"] = curve["faces"][ia]
        else:
            t = illinois_roots(value, f0, f1)
            at = probe(ia, ib, t)
        s = curve["arc_length"][ia] + np.linalg.norm(at["points"] - curve["points"][ia], axis=1)
        no = np.zeros(ia.size, bool)
        parts.append((at["points"], s, at["faces"], at["uv"], at["curvature"], signs[ia] < 0, no, no))
    for mask, where in ((seam, "seam"), (knot, "knot"), (flat, "flat")):
        if not np.any(mask):
            continue
        # at a seam or a knot: the point after the jump; a flat run: its middle sample
        ia, ib = i[mask], j[mask]
        mid = (ia + ((ib - ia) % n) // 2) % n if where == "flat" else ib
        parts.append(
            (
                curve["points"][mid],
                curve["arc_length"][mid],
                curve["faces"][mid],
                curve["uv"][mid],
                curve["curvature"][mid],
                signs[ia] < 0,
                np.full(mid.size, where == "seam"),
                np.full(mid.size, where == "knot"),
            )
        )
    if not parts:
        return CurvePoints.empty()
    cols = [np.concatenate(c) for c in zip(*parts, strict=True)]
    order = np.argsort(cols[1], kind="stable")
    if key == "slope":
        cols[5] = ~cols[5]  # a maximum where the slope goes from + to -
    return CurvePoints(*(c[order] for c in cols))


def analyse_features(
    curve: dict, probe: Probe | None, closed: bool, model_size: float
) -> tuple[CurvePoints, CurvePoints, FairnessFigures]:
    """Inflections, extrema and figures of one curve.

    Parameters
    ----------
    curve : dict
        ``points`` (n, 3), ``arc_length``, ``curvature``, ``slope`` (n,),
        ``faces`` (n,), ``uv`` (n, 2), ``singular`` (n,) (limit values at a pole),
        ``pieces`` (n,) (face piece labels), ``spans``
        (n,) (smooth-stretch labels, see :func:`geometry.sections.pieces.split_at_knots`),
        oriented along the curve.
    probe : callable or None
        Exact curve evaluation between two samples (see ``Probe``); None
        estimates roots linearly between samples (fast, for dragging).
    closed : bool
        The curve's last point is a copy of its first (a sign change between
        them is a seam's).
    model_size : float
        mm, for the straight-line band.

    Returns
    -------
    inflections, extrema : CurvePoints
    figures : FairnessFigures
    """
    k, slope, s = curve["curvature"], curve["slope"], curve["arc_length"]
    length = float(s[-1]) if s.size else 0.0
    kmax = float(np.max(np.abs(k))) if k.size else 0.0
    k_band = max(INFLECTION_BAND * kmax, 1.0 / (STRAIGHT_RADIUS * model_size))
    slope_band = max(EXTREMUM_BAND * kmax / max(length, 1e-300), 1.0 / (STRAIGHT_RADIUS * model_size**2))
    # limits at singular samples (poles) are too rough to carry a sign of their own
    known = ~curve["singular"]
    inflections = _features("curvature", _band_signs(k, k_band) * known, curve, probe, closed, False)
    # a curvature jump at a seam is the seam check's; a turn of dk/ds where k is continuous is an extremum
    extrema = _features("slope", _band_signs(slope, slope_band) * known, curve, probe, closed, True)
    same = curve["spans"][1:] == curve["spans"][:-1]
    ds = np.diff(s)[same]
    sq = slope**2
    variation = float(np.sum(0.5 * (sq[1:][same] + sq[:-1][same]) * ds))
    n_ext = len(extrema)
    figures = FairnessFigures(
        length=length,
        inflections=len(inflections),
        extrema=n_ext,
        monotone_pieces=max(n_ext, 1) if closed else n_ext + 1,
        max_abs_curvature=max([kmax, *np.abs(extrema.curvature).tolist()]),
        curvature_variation=variation,
    )
    return inflections, extrema, figures
