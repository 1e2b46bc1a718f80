"""Sampling, refining and judging many seams at once.

Every seam is sampled evenly in arc length; the worst sample of each measure is
refined to the maximum between its neighbours; the seam is classified against
the tolerance. Here all of that runs on the samples of many seams together, so
each stage is one batched evaluation (:class:`geometry.seams.edges.EdgeSeams`)
rather than one per seam.
"""

from __future__ import annotations

from types import MappingProxyType

import numpy as np

from .results import SeamResult, Worst
from .spacing import MAX_SPACING_MM, MIN_SAMPLES, sample_counts
from .tolerance import CREASE_BAND_DEG, SeamTolerance, classify

# Refinement of each maximum: grid points per round and rounds; the bracket
# (two sample spacings) shrinks 4-fold per round, to about 2e-6 spacings.
ZOOM_POINTS, ZOOM_ROUNDS = 9, 10
# A measure's refinement stops once its best point's grid neighbours are within
# this relative (or absolute: mm, degrees, 1/mm) difference of it. That is
# rounding: what stops is a measure flat along the seam (no jump at all, most of
# a model's seams), while a real peak keeps every round and its place's precision.
ZOOM_RTOL, ZOOM_ATOL = 1e-15, 1e-15
# Gaps are differences of coordinates: on parts up to 10 m their rounding is
# about 1e-12 mm, so gaps that differ by less are equal (mm).
GAP_ROUNDING_MM = 1e-12
# A grid point within this fraction of the grid spacing of a known point is that point.
KNOWN_FRACTION = 1e-9
# Measures refined to their maximum; their keys in the plain-dict "worst".
REFINED = ("gap", "angle", "curvature_jump", "curvature_jump_rel", "iso_curvature_jump", "curvature_derivative_jump")
SAMPLED = (
    "gap",
    "angle",
    "curvature_a",
    "curvature_b",
    "curvature_jump",
    "curvature_jump_rel",
    "iso_curvature_jump",
    "curvature_derivative_jump",
)


def even_samples(counts: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Seam index, arc-length fraction and first sample of each seam, for ``counts`` samples each.

    Returns
    -------
    seam, tau : ndarray of shape (sum(counts),)
    start : ndarray of shape (s,)
    """
    seam = np.repeat(np.arange(counts.size), counts)
    start = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(int)
    local = np.arange(seam.size) - start[seam]
    return seam, local / (counts[seam] - 1.0), start


def evaluate_unique(evaluate, seam: np.ndarray, tau: np.ndarray) -> dict[str, np.ndarray]:
    """``evaluate(seam, tau)`` with each distinct (seam, tau) pair evaluated once.

    Parameters
    ----------
    evaluate : callable
        ``evaluate(seam, tau) -> dict`` of arrays whose first axis runs over the pairs.
    seam, tau : ndarray of shape (k,)

    Returns
    -------
    dict
        As ``evaluate`` would return for all ``k`` pairs. Each pair is measured
        on its own, so a repeated pair's figures are the same either way.
    """
    pairs = np.stack([np.asarray(seam, float), np.asarray(tau, float)], axis=1)
    unique, back = np.unique(pairs, axis=0, return_inverse=True)
    if unique.shape[0] == pairs.shape[0]:
        return evaluate(np.asarray(seam, int), np.asarray(tau, float))
    ev = evaluate(unique[:, 0].astype(int), unique[:, 1])
    return {key: value[back.ravel()] for key, value in ev.items()}


def refine_maxima_batch(
    evaluate, seam: np.ndarray, tau: np.ndarray, start: np.ndarray, values: dict, keys: tuple[str, ...]
) -> tuple[np.ndarray, np.ndarray]:
    """Arc-length fraction and value of the maximum of each measure of each seam.

    Parameters
    ----------
    evaluate : callable
        ``evaluate(seam, tau) -> dict`` of measures, each of shape (k,).
    seam, tau : ndarray of shape (n,)
        The samples, seam by seam in increasing ``tau``.
    start : ndarray of shape (s,)
        First sample of each seam.
    values : dict of ndarray of shape (n,)
        The measures at the samples.
    keys : tuple of str

    Returns
    -------
    tau_best, best : ndarray of shape (s, len(keys))
        (0, NaN) for a measure with no finite sample on a seam.

    Notes
    -----
    Nested grid search, every seam and measure at once: the bracket starts at
    the worst sample's two neighbours, is sampled at :data:`ZOOM_POINTS`
    points, and shrinks to the best point's neighbours; each round divides it
    by ``(ZOOM_POINTS - 1) / 2``. For a measure unimodal in the bracket this
    converges to the maximum (a vectorised form of the bracketing searches of
    Press et al., Numerical Recipes, 3rd ed., sec. 10.2). The value never drops
    below the worst sample's.

    Only new points are measured: the bracket's ends and the best point so far
    are known (none of them can beat the best), and a point several measures
    share is measured once (:func:`evaluate_unique`). A measure stops early
    when its best point's grid neighbours lie within :data:`ZOOM_RTOL` (or
    :data:`ZOOM_ATOL`, :data:`GAP_ROUNDING_MM` for the gap) of its value,
    i.e. equal to rounding: a measure flat
    around its best point (a seam with no curvature jump, say) has nothing
    left to refine.
    """
    n_seams, n_keys = start.size, len(keys)
    end = np.append(start[1:], seam.size) - 1
    best_tau = np.zeros((n_seams, n_keys))
    best = np.full((n_seams, n_keys), np.nan)
    lo, hi = np.zeros((n_seams, n_keys)), np.zeros((n_seams, n_keys))
    for k, key in enumerate(keys):
        vals = np.where(np.isfinite(values[key]), values[key], -np.inf)
        order = np.lexsort((vals, seam))  # by seam, then value: each seam's last is its maximum
        top = order[end]
        best_tau[:, k], best[:, k] = tau[top], np.where(np.isfinite(vals[top]), vals[top], np.nan)
        lo[:, k], hi[:, k] = tau[np.maximum(top - 1, start)], tau[np.minimum(top + 1, end)]
    live = np.argwhere(np.isfinite(best))  # (m, 2): seam, key
    if live.size == 0:
        return best_tau, best
    s, k = live[:, 0], live[:, 1]
    lo, hi, b_tau, b_val = lo[s, k], hi[s, k], best_tau[s, k], best[s, k]
    fraction = np.linspace(0.0, 1.0, ZOOM_POINTS)
    floor = np.array([GAP_ROUNDING_MM if key == "gap" else ZOOM_ATOL for key in keys])
    for _ in range(ZOOM_ROUNDS):
        if s.size == 0:
            break
        grid = lo[:, None] + (hi - lo)[:, None] * fraction[None, :]
        step = (hi - lo) / (ZOOM_POINTS - 1)
        known = np.zeros(grid.shape, dtype=bool)
        known[:, 0] = known[:, -1] = True
        known |= np.abs(grid - b_tau[:, None]) <= KNOWN_FRACTION * step[:, None]
        row, col = np.nonzero(~known)
        ev = evaluate_unique(evaluate, s[row], grid[row, col])
        stacked = np.stack([ev[key] for key in keys])  # (n_keys, number of new points)
        rows = np.full(grid.shape, -np.inf)
        rows[row, col] = stacked[k[row], np.arange(row.size)]
        rows = np.where(np.isfinite(rows), rows, -np.inf)
        j = np.argmax(rows, axis=1)
        rows_of = np.arange(s.size)
        top = rows[rows_of, j]
        better = top > b_val
        b_val = np.where(better, top, b_val)
        b_tau = np.where(better, grid[rows_of, j], b_tau)
        # Converged: the new points next to the best one lie within the tolerance of it.
        beside = ~known & (np.abs(grid - b_tau[:, None]) <= (1.0 + KNOWN_FRACTION) * step[:, None])
        drop = np.where(beside, b_val[:, None] - rows, -np.inf).max(axis=1)
        done = beside.any(axis=1) & (drop <= ZOOM_RTOL * np.abs(b_val) + floor[k])
        lo, hi = np.maximum(b_tau - step, lo), np.minimum(b_tau + step, hi)
        best_tau[s[done], k[done]], best[s[done], k[done]] = b_tau[done], b_val[done]
        keep = ~done
        s, k, lo, hi, b_tau, b_val = s[keep], k[keep], lo[keep], hi[keep], b_tau[keep], b_val[keep]
    best_tau[s, k], best[s, k] = b_tau, b_val
    return best_tau, best


def _crease_minimum(evaluate, seam, tau, start, angle, tolerance: SeamTolerance) -> np.ndarray:
    """Smallest angle between the normals along each seam, degrees, shape (s,).

    The sampled minimum, refined between the samples (the maxima's search on
    the negated angle, :func:`refine_maxima_batch`) on the seams it makes
    creases: there a lower minimum between two samples could undo the crease,
    so the decision does not hang on where the samples fall. On the other
    seams a lower minimum changes nothing.
    """
    sampled = np.fmin.reduceat(angle, start)
    if tolerance.crease_deg is None:
        return sampled
    candidate = sampled >= tolerance.crease_deg - CREASE_BAND_DEG
    if not candidate.any():
        return sampled
    low = np.where(candidate[seam], -angle, np.nan)  # NaN: not refined

    def negated(s, t):
        return {"angle_low": -evaluate(s, t)["angle"]}

    _, best = refine_maxima_batch(negated, seam, tau, start, {"angle_low": low}, ("angle_low",))
    return np.where(candidate, np.fmin(sampled, -best[:, 0]), sampled)


def _segment_mean(values: np.ndarray, seam: np.ndarray, n_seams: int) -> np.ndarray:
    finite = np.isfinite(values)
    total = np.bincount(seam[finite], values[finite], minlength=n_seams)
    count = np.bincount(seam[finite], minlength=n_seams)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(count > 0, total / np.maximum(count, 1), np.nan)


def measure_batch(
    evaluator,
    pairs,
    lengths: np.ndarray,
    orientation: np.ndarray,
    tolerance: SeamTolerance,
    max_spacing: float = MAX_SPACING_MM,
    min_samples: int = MIN_SAMPLES,
    turning: np.ndarray | None = None,
    spans: np.ndarray | None = None,
    positions=None,
) -> list[SeamResult]:
    """Sample, refine and classify a batch of seams.

    Parameters
    ----------
    evaluator : callable
        ``evaluator(seam, tau) -> dict`` of measures, as
        :meth:`geometry.seams.edges.EdgeSeams.evaluate`.
    pairs : sequence of SeamPair
    lengths : ndarray of shape (s,)
        mm.
    orientation : ndarray of shape (s,)
        +1 where the faces are consistently oriented, -1 where side b's normal was flipped.
    tolerance : SeamTolerance
    max_spacing : float
        Largest sample spacing, mm.
    min_samples : int
        Fewest samples along a seam (at least 3).
    turning, spans : ndarray of shape (s,), optional
        Each seam's total turning (radians) and the knot spans it crosses
        (:func:`geometry.seams.spacing.seam_demands`): more samples where the
        seam bends or crosses knots (:func:`geometry.seams.spacing.sample_counts`).
    positions : callable, optional
        ``positions(counts) -> (seam, tau, start)``: where the samples go
        (:meth:`geometry.seams.edges.EdgeSeams.sample_positions`); default
        evenly in arc length (:func:`even_samples`).

    Returns
    -------
    list of SeamResult
        In the order of ``pairs``.
    """
    counts = sample_counts(lengths, max_spacing, min_samples, turning, spans)
    seam, tau, start = (positions or even_samples)(counts)
    values = evaluator(seam, tau)
    tau_best, best = refine_maxima_batch(evaluator, seam, tau, start, values, REFINED)
    n_seams, n_keys = start.size, len(REFINED)
    at = evaluate_unique(evaluator, np.repeat(np.arange(n_seams), n_keys), tau_best.ravel())
    means = {key: _segment_mean(values[key], seam, n_seams) for key in SAMPLED}
    angle_min = _crease_minimum(evaluator, seam, tau, start, values["angle"], tolerance)
    out = []
    for j, pair in enumerate(pairs):
        rows = slice(start[j], start[j] + counts[j])
        worst = {}
        for k, key in enumerate(REFINED):
            i = j * n_keys + k
            worst[key] = Worst(best[j, k], tau_best[j, k] * lengths[j], at["points"][i], at["uv_a"][i], at["uv_b"][i])
        verdict = classify(
            worst["gap"].value, worst["angle"].value, angle_min[j], worst["curvature_jump_rel"].value, tolerance
        )
        out.append(
            SeamResult(
                faces=pair.faces,
                source=pair.source,
                length=float(lengths[j]),
                arc=tau[rows] * lengths[j],
                points=values["points"][rows],
                **{key: values[key][rows] for key in SAMPLED},
                worst=MappingProxyType(worst),
                mean=MappingProxyType({key: float(means[key][j]) for key in SAMPLED}),
                angle_min=float(angle_min[j]),
                orientation_consistent=bool(orientation[j] > 0),
                continuity=verdict.continuity,
                verdict=verdict.verdict,
                crease=verdict.crease,
                reasons=verdict.reasons,
                tolerance=tolerance,
                edge=pair.edge,
            )
        )
    return out
