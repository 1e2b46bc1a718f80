"""Seam continuity: G0, G1 and G2 along every seam of a model, against a tolerance.

:func:`check_seams` finds the seams (:mod:`geometry.seams.adjacency`), samples each
densely and evenly in arc length, refines the worst sample of every measure to
the maximum between its neighbours (a bounded search, so the worst value and
its place are found, not just the worst sample), classifies the seam and gives
a verdict against the :class:`SeamTolerance` in force, which every result
echoes. The measures are defined in :mod:`geometry.seams.measures`: gap (G0),
angle between the normals (G1), cross-seam normal curvature jump (G2), and
where both sides are iso-parameter lines that line up, the jumps of the cross
iso-curves' curvature vector and third derivative (G3). The class is decided
by G0 to G2; the G3 jump is reported only.

Seams from the file's shared edges are measured between the two surfaces at
the 3-D edge (:mod:`geometry.seams.edges`), all of them batched together;
seams matched geometrically are measured from side a's boundary to side b's
(:mod:`geometry.seams.measures`), and cut back to where their gap stays within
the search distance they were matched with.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from ..model.topology import Model
from .adjacency import Adjacency, FreeEdge, SeamPair, find_seams, free_piece
from .batch import REFINED, SAMPLED, ZOOM_POINTS, ZOOM_ROUNDS, measure_batch
from .batch import refine_maxima_batch as _refine_batch
from .edges import EdgeSeams, measurable_at_edge
from .measures import SeamGeometry
from .results import SeamReport, SeamResult, Worst
from .spacing import MAX_SPACING_MM, MIN_SAMPLES, sample_counts, seam_demands
from .tolerance import SeamTolerance

# Edge seams measured in one batch: about this many samples (bounds memory; each
# batch reports progress).
BATCH_SAMPLES = 60_000
# A geometric seam whose gap exceeds the search distance is cut back this many times at most.
CUT_ROUNDS = 3

Progress = Callable[[int, int], None]

__all__ = [
    "MAX_SPACING_MM",
    "MIN_SAMPLES",
    "REFINED",
    "SAMPLED",
    "ZOOM_POINTS",
    "ZOOM_ROUNDS",
    "SeamReport",
    "SeamResult",
    "Worst",
    "analyse_seams",
    "check_seams",
    "measure_seam",
    "measure_seams",
    "refine_maxima",
]


def refine_maxima(
    evaluate, tau: np.ndarray, values: dict[str, np.ndarray], keys: tuple[str, ...]
) -> dict[str, tuple[float, float]]:
    """(tau, value) of the maximum of each measure of one seam near its worst sample.

    Parameters
    ----------
    evaluate : callable
        ``evaluate(tau) -> dict`` of measures at arc-length fractions, shape (k,).
    tau : ndarray of shape (n,)
        Sample positions, increasing.
    values : dict of ndarray of shape (n,)
    keys : tuple of str

    Returns
    -------
    dict
        key -> (tau, value); (0, NaN) for a measure with no finite sample.

    Notes
    -----
    :func:`geometry.seams.batch.refine_maxima_batch` for a single seam.
    """
    seam = np.zeros(tau.size, dtype=int)
    t_best, best = _refine_batch(lambda _, t: evaluate(t), seam, tau, np.array([0]), values, keys)
    out = {k: (0.0, float("nan")) for k in values if k not in keys}
    out.update({k: (float(t_best[0, i]), float(best[0, i])) for i, k in enumerate(keys)})
    return out


def measure_seam(
    model: Model,
    pair: SeamPair,
    tolerance: SeamTolerance,
    max_spacing: float = MAX_SPACING_MM,
    min_samples: int = MIN_SAMPLES,
    demand: tuple[float, int] | None = None,
) -> SeamResult:
    """Measure one seam from side a's boundary to side b's (see :class:`SeamGeometry`).

    Parameters
    ----------
    model : Model
    pair : SeamPair
    tolerance : SeamTolerance
    max_spacing : float
        Largest sample spacing, mm.
    min_samples : int
        Fewest samples along the seam (at least 3).
    demand : (float, int), optional
        The seam's turning (radians) and knot spans crossed, as
        :func:`geometry.seams.spacing.seam_demands` gives them (computed when not given).

    Returns
    -------
    SeamResult
    """
    geometry = SeamGeometry(model, pair, tolerance.flat_curvature_per_mm)
    if demand is None:
        _, turning, spans = seam_demands(model, [pair])
        demand = (float(turning[0]), int(spans[0]))
    (result,) = measure_batch(
        lambda _, tau: geometry.evaluate(tau),
        [pair],
        np.array([geometry.length]),
        np.array([geometry.orientation]),
        tolerance,
        max_spacing,
        min_samples,
        np.array([demand[0]]),
        np.array([demand[1]]),
    )
    return result


def _tolerance(tolerance) -> SeamTolerance:
    """The SeamTolerance itself, or the one a profile object carries (duck-typed: geometry never imports app)."""
    if tolerance is None:
        return SeamTolerance()
    tolerance = getattr(tolerance, "tolerance", tolerance)
    if not isinstance(tolerance, SeamTolerance):
        raise TypeError(f"expected a SeamTolerance (or a profile holding one), got {type(tolerance).__name__}")
    return tolerance


def _batches(counts: np.ndarray) -> list[list[int]]:
    """Indices of seams in groups of about :data:`BATCH_SAMPLES` samples, given each seam's sample count."""
    groups, current, size = [], [], 0
    for i, count in enumerate(counts.tolist()):
        current.append(i)
        size += count
        if size >= BATCH_SAMPLES:
            groups.append(current)
            current, size = [], 0
    if current:
        groups.append(current)
    return groups


def _within_search(
    model: Model, pair: SeamPair, result: SeamResult, search: float, tolerance: SeamTolerance, sampling: dict
) -> tuple[SeamResult | None, list[FreeEdge]]:
    """A matched seam cut back to its longest stretch whose gap stays within the search distance.

    What is cut off is free boundary of side a. A seam with no such stretch is
    no seam: all of it is free.
    """
    free: list[FreeEdge] = []
    for _ in range(CUT_ROUNDS):
        if not result.worst["gap"].value > search:
            return result, free
        ok = result.gap <= search
        runs = np.flatnonzero(np.diff(np.concatenate([[0], ok.astype(int), [0]])))
        starts, stops = runs[::2], runs[1::2] - 1  # inclusive sample ranges where ok
        fraction = result.arc / max(result.length, 1e-300)
        if starts.size == 0:
            return None, [free_piece(model, pair.face_a, pair.uv_a, 0.0, 1.0)]
        longest = int(np.argmax(stops - starts))
        i0, i1 = starts[longest], stops[longest]
        if i1 - i0 < 2:
            return None, [free_piece(model, pair.face_a, pair.uv_a, 0.0, 1.0)]
        tau0, tau1 = fraction[i0], fraction[i1]
        if tau0 > 0:
            free.append(free_piece(model, pair.face_a, pair.uv_a, 0.0, tau0))
        if tau1 < 1:
            free.append(free_piece(model, pair.face_a, pair.uv_a, tau1, 1.0))
        pair = pair.cut(model, tau0, tau1)
        result = measure_seam(model, pair, tolerance, **sampling)
    if result.worst["gap"].value > search:
        return None, [*free, free_piece(model, pair.face_a, pair.uv_a, 0.0, 1.0)]
    return result, free


def _pcurve_warnings(model: Model, adjacency: Adjacency, tolerance: SeamTolerance) -> list[str]:
    """One line for each p-curve lying off its 3-D edge by more than the position tolerance."""
    lines = []
    for pair in adjacency.seams:
        if pair.edge < 0:
            continue
        edge = model.edges[pair.edge]
        for use in edge.uses:
            if use.offset > tolerance.position_mm:
                face = model.faces[use.face]
                name = f" ('{face.name}')" if face.name else ""
                told = f"; the file's tolerance for the edge is {edge.tolerance:.3g} mm" if edge.tolerance > 0 else ""
                lines.append(
                    f"face {use.face}{name}, edge {pair.edge} (faces {pair.face_a} and {pair.face_b}): its trim "
                    f"curve lies up to {use.offset:.3g} mm off the 3-D edge, beyond the position tolerance "
                    f"{tolerance.position_mm:g} mm{told}; the seam is measured between the surfaces at the edge"
                )
    return lines


def measure_seams(
    model: Model, adjacency: Adjacency, tolerance: SeamTolerance, progress: Progress | None = None, **sampling
) -> SeamReport:
    """Measure every seam an adjacency found (see :func:`measure_seam` for ``sampling``).

    Parameters
    ----------
    model : Model
    adjacency : Adjacency
    tolerance : SeamTolerance
    progress : callable, optional
        ``progress(done, total)``: seams measured so far, after each batch.
    **sampling
        ``max_spacing``, ``min_samples``.

    Returns
    -------
    SeamReport
        Seams in the order of ``adjacency.seams``, less matched seams with no
        stretch within the search distance (those become free edges).
    """
    tolerance = _tolerance(tolerance)
    max_spacing = sampling.get("max_spacing", MAX_SPACING_MM)
    pairs = list(adjacency.seams)
    total = len(pairs)
    results: list[SeamResult | None] = [None] * total
    at_edge = [i for i, p in enumerate(pairs) if measurable_at_edge(p)]
    lengths, turning, spans = seam_demands(model, pairs)
    counts = sample_counts(lengths, max_spacing, sampling.get("min_samples", MIN_SAMPLES), turning, spans)
    done = 0
    for group in _batches(counts[at_edge]):
        chosen = [pairs[at_edge[g]] for g in group]
        rows = [at_edge[g] for g in group]
        batch = EdgeSeams(model, chosen, tolerance.flat_curvature_per_mm)
        measured = measure_batch(
            batch.evaluate,
            chosen,
            batch.length,
            batch.orientation,
            tolerance,
            **sampling,
            turning=turning[rows],
            spans=spans[rows],
            positions=lambda n, batch=batch: batch.sample_positions(n, max_spacing),
        )
        for g, result in zip(group, measured, strict=True):
            results[at_edge[g]] = result
        done += len(group)
        if progress is not None:
            progress(done, total)
    free = list(adjacency.free_edges)
    warnings = _pcurve_warnings(model, adjacency, tolerance)
    for i, pair in enumerate(pairs):
        if results[i] is not None:
            continue
        result = measure_seam(model, pair, tolerance, **sampling, demand=(turning[i], spans[i]))
        if pair.source == "geometry":
            kept, cut = _within_search(model, pair, result, adjacency.search_distance, tolerance, sampling)
            if cut:
                what = "is cut back to" if kept is not None else "is left as free edges: no stretch of it lies"
                warnings.append(
                    f"faces {pair.face_a} and {pair.face_b}: a matched seam {what} where the faces lie within the "
                    f"search distance {adjacency.search_distance:.3g} mm"
                )
            result = kept
            free.extend(cut)
        results[i] = result
        done += 1
        if progress is not None and (done == total or done % 16 == 0):
            progress(done, total)
    seams = tuple(r for r in results if r is not None)
    return SeamReport(seams, tuple(free), tolerance, adjacency.search_distance, tuple(warnings))


def check_seams(
    model: Model,
    tolerance: SeamTolerance | None = None,
    search_distance: float | None = None,
    topology: bool = True,
    geometry: bool = True,
    progress: Progress | None = None,
    **sampling,
) -> SeamReport:
    """Find and measure every seam of a model.

    Parameters
    ----------
    model : Model
    tolerance : SeamTolerance, optional
        Default: :class:`SeamTolerance` defaults (the class-A values). A
        profile object with a ``tolerance`` attribute is accepted too.
    search_distance : float, optional
        mm; default :func:`geometry.seams.adjacency.default_search_distance`.
    topology, geometry : bool
        Which seam sources to use (see :func:`geometry.seams.adjacency.find_seams`).
    progress : callable, optional
        ``progress(done, total)`` as seams are measured.
    **sampling
        ``max_spacing``, ``min_samples`` for :func:`measure_seam`.

    Returns
    -------
    SeamReport
    """
    tolerance = _tolerance(tolerance)
    adjacency = find_seams(model, search_distance, topology=topology, geometry=geometry)
    return measure_seams(model, adjacency, tolerance, progress, **sampling)


def analyse_seams(model: Model, tolerance: SeamTolerance | None = None, **options) -> SeamReport:
    """Same as :func:`check_seams` (the name the window's state layer calls)."""
    return check_seams(model, tolerance, **options)
