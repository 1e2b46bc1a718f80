"""Seam continuity: G0, G1 and G2 along every seam of a model, against a tolerance.

:func:`check_seams` finds the seams (:mod:`geometry.adjacency`), samples each
densely and evenly in arc length, refines the worst sample of every measure to
the maximum between its neighbours (a bounded search, :func:`refine_maxima`,
so the worst value and its place are found, not just the worst sample), classifies the seam and
gives a verdict against the :class:`SeamTolerance` in force, which every
result echoes. The measures are defined in :mod:`geometry.seam_measures`:
gap (G0), angle between the normals (G1), cross-seam normal curvature jump
(G2), and where both sides are iso-parameter lines that line up, the jumps of
the cross iso-curves' curvature vector and third derivative (G3). The class
is decided by G0 to G2; the G3 jump is reported only.
"""

from __future__ import annotations

from dataclasses import dataclass, fields
from types import MappingProxyType

import numpy as np

from .adjacency import Adjacency, FreeEdge, SeamPair, find_seams
from .model import Model, _frozen
from .seam_measures import SeamGeometry
from .seam_tolerance import SeamTolerance, classify

# Sampling along a seam: at most this spacing (mm), within these counts.
MAX_SPACING_MM = 1.0
MIN_SAMPLES, MAX_SAMPLES = 129, 4097
# Refinement of each maximum: grid points per round and rounds; the bracket
# (two sample spacings) shrinks 16-fold per round, to about 1e-6 spacings.
ZOOM_POINTS, ZOOM_ROUNDS = 33, 5
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


def _readonly(a) -> np.ndarray:
    return _frozen(a, np.shape(a)[1:])


@dataclass(frozen=True, eq=False)
class Worst:
    """Where a measure is largest along a seam.

    Attributes
    ----------
    value : float
        The maximum (mm, degrees, 1/mm or fraction, by measure); NaN if the
        measure does not apply.
    arc : float
        Distance along the seam from its start, mm.
    xyz : ndarray of shape (3,)
        The place on side a, mm.
    uv_a, uv_b : ndarray of shape (2,)
        Its parameters on face a and the closest boundary point's on face b.
    """

    value: float
    arc: float
    xyz: np.ndarray
    uv_a: np.ndarray
    uv_b: np.ndarray

    def __post_init__(self):
        for key in ("xyz", "uv_a", "uv_b"):
            object.__setattr__(self, key, _readonly(getattr(self, key)))

    def as_dict(self) -> dict:
        return {
            "value": _num(self.value),
            "arc_mm": _num(self.arc),
            "xyz": [float(x) for x in self.xyz],
            "uv_a": [float(x) for x in self.uv_a],
            "uv_b": [float(x) for x in self.uv_b],
        }


def _num(x: float) -> float | None:
    return None if not np.isfinite(x) else float(x)


@dataclass(frozen=True, eq=False)
class SeamResult:
    """The measured continuity of one seam.

    Attributes
    ----------
    faces : tuple of int
        (a, b): a is the side sampled, b the side projected on.
    source : str
        ``"topology"`` or ``"geometry"`` (how the seam was found).
    length : float
        mm.
    arc : ndarray of shape (n,)
        Sample positions along the seam, mm.
    points : ndarray of shape (n, 3)
        Samples on side a.
    gap, angle, curvature_a, curvature_b, curvature_jump, curvature_jump_rel : ndarray of shape (n,)
        The measures at the samples: mm, degrees, 1/mm (cross-seam normal
        curvature of each side and their jump), fraction.
    iso_curvature_jump, curvature_derivative_jump : ndarray of shape (n,)
        Jump of the cross iso-curves' curvature vector (1/mm) and of their
        third arc-length derivative (G3, 1/mm^2); NaN where the two sides'
        iso-curves do not line up across the seam.
    worst : mapping of str to Worst
        Refined maximum of each measure in :data:`REFINED`.
    mean : mapping of str to float
        Arc-length mean of each measure.
    angle_min : float
        Smallest angle along the seam, degrees (decides a crease).
    orientation_consistent : bool
        False when the faces' normals disagree by orientation alone (side b's
        normal was flipped for the measures).
    continuity, verdict : str
        Achieved class (G2, G1, G0, broken) and pass/fail against ``tolerance``.
    crease : bool
    reasons : tuple of str
    tolerance : SeamTolerance
        The profile in force.
    """

    faces: tuple[int, int]
    source: str
    length: float
    arc: np.ndarray
    points: np.ndarray
    gap: np.ndarray
    angle: np.ndarray
    curvature_a: np.ndarray
    curvature_b: np.ndarray
    curvature_jump: np.ndarray
    curvature_jump_rel: np.ndarray
    iso_curvature_jump: np.ndarray
    curvature_derivative_jump: np.ndarray
    worst: MappingProxyType
    mean: MappingProxyType
    angle_min: float
    orientation_consistent: bool
    continuity: str
    verdict: str
    crease: bool
    reasons: tuple[str, ...]
    tolerance: SeamTolerance

    def __post_init__(self):
        for f in fields(self):
            value = getattr(self, f.name)
            if isinstance(value, np.ndarray):
                object.__setattr__(self, f.name, _readonly(value))

    @property
    def worst_position(self) -> np.ndarray:
        """xyz (3,) of the worst place: the first measure over tolerance, else the largest angle."""
        tol = self.tolerance
        for key, limit in (("gap", tol.position_mm), ("angle", tol.tangent_deg)):
            if self.worst[key].value > limit:
                return self.worst[key].xyz
        if self.worst["curvature_jump_rel"].value > tol.curvature_relative:
            return self.worst["curvature_jump_rel"].xyz
        return self.worst["angle"].xyz

    def as_dict(self) -> dict:
        """Plain data for JSON (the ``seams`` entries of ``batten check``)."""
        return {
            "faces": list(self.faces),
            "source": self.source,
            "length": self.length,
            "gap_max": _num(self.worst["gap"].value),
            "gap_mean": _num(self.mean["gap"]),
            "angle_max_deg": _num(self.worst["angle"].value),
            "angle_mean_deg": _num(self.mean["angle"]),
            "angle_min_deg": _num(self.angle_min),
            "curvature_jump_max": _num(self.worst["curvature_jump"].value),
            "curvature_jump_mean": _num(self.mean["curvature_jump"]),
            "curvature_jump_rel_max": _num(self.worst["curvature_jump_rel"].value),
            "curvature_jump_rel_mean": _num(self.mean["curvature_jump_rel"]),
            "iso_curvature_jump_max": _num(self.worst["iso_curvature_jump"].value),
            "curvature_derivative_jump_max": _num(self.worst["curvature_derivative_jump"].value),
            "worst": {key: w.as_dict() for key, w in self.worst.items()},
            "worst_position": [float(x) for x in self.worst_position],
            "orientation_consistent": self.orientation_consistent,
            "continuity": self.continuity,
            "verdict": self.verdict,
            "crease": self.crease,
            "reasons": list(self.reasons),
            "profile": self.tolerance.name,
        }


@dataclass(frozen=True, eq=False)
class SeamReport:
    """Every seam and free edge of a model, measured against one tolerance.

    Attributes
    ----------
    seams : tuple of SeamResult
    free_edges : tuple of FreeEdge
    tolerance : SeamTolerance
    search_distance : float
        mm.
    """

    seams: tuple[SeamResult, ...]
    free_edges: tuple[FreeEdge, ...]
    tolerance: SeamTolerance
    search_distance: float

    @property
    def failing(self) -> tuple[SeamResult, ...]:
        return tuple(s for s in self.seams if s.verdict == "fail")

    def as_dict(self) -> dict:
        return {
            "profile": self.tolerance.as_dict(),
            "search_distance_mm": self.search_distance,
            "seams": [s.as_dict() for s in self.seams],
            "free_edges": [
                {
                    "face": e.face,
                    "length": e.length,
                    "start": [float(x) for x in e.points[0]],
                    "end": [float(x) for x in e.points[-1]],
                }
                for e in self.free_edges
            ],
            "summary": {
                "seams": len(self.seams),
                "failing": len(self.failing),
                "free_edges": len(self.free_edges),
                "free_length": float(sum(e.length for e in self.free_edges)),
            },
        }


def refine_maxima(
    evaluate, tau: np.ndarray, values: dict[str, np.ndarray], keys: tuple[str, ...]
) -> dict[str, tuple[float, float]]:
    """(tau, value) of the maximum of each measure near its worst sample.

    Parameters
    ----------
    evaluate : callable
        ``evaluate(tau) -> dict`` of measures at arc-length fractions, shape (k,).
    tau : ndarray of shape (n,)
        Sample positions, increasing.
    values : dict of ndarray of shape (n,)
        The measures at the samples.
    keys : tuple of str
        Measures to refine.

    Returns
    -------
    dict
        key -> (tau, value); (0, NaN) for a measure with no finite sample.

    Notes
    -----
    Nested grid search, all measures at once: the bracket starts at the worst
    sample's two neighbours, is sampled at :data:`ZOOM_POINTS` points, and
    shrinks to the best point's neighbours; each round divides it by
    ``(ZOOM_POINTS - 1) / 2``. For a measure that is unimodal in the bracket
    this converges to the maximum (a vectorised form of the bracketing
    searches of Press et al., Numerical Recipes, 3rd ed., sec. 10.2). The
    value never drops below the worst sample's.
    """
    keys = tuple(k for k in keys if np.any(np.isfinite(values[k])))
    out = {k: (0.0, float("nan")) for k in values if k not in keys}
    if not keys:
        return out
    n = tau.size
    worst = np.array([np.nanargmax(values[k]) for k in keys])
    best_tau = tau[worst].astype(float)
    best = np.array([values[k][i] for k, i in zip(keys, worst, strict=True)], dtype=float)
    lo, hi = tau[np.maximum(worst - 1, 0)], tau[np.minimum(worst + 1, n - 1)]
    fraction = np.linspace(0.0, 1.0, ZOOM_POINTS)
    for _ in range(ZOOM_ROUNDS):
        grid = lo[:, None] + (hi - lo)[:, None] * fraction[None, :]
        ev = evaluate(grid.ravel())
        rows = np.stack([ev[k].reshape(grid.shape)[i] for i, k in enumerate(keys)])
        rows = np.where(np.isfinite(rows), rows, -np.inf)
        j = np.argmax(rows, axis=1)
        top = rows[np.arange(len(keys)), j]
        better = top > best
        best = np.where(better, top, best)
        best_tau = np.where(better, grid[np.arange(len(keys)), j], best_tau)
        step = (hi - lo) / (ZOOM_POINTS - 1)
        lo, hi = np.maximum(best_tau - step, lo), np.minimum(best_tau + step, hi)
    out.update({k: (float(t), float(v)) for k, t, v in zip(keys, best_tau, best, strict=True)})
    return out


def measure_seam(
    model: Model,
    pair: SeamPair,
    tolerance: SeamTolerance,
    max_spacing: float = MAX_SPACING_MM,
    min_samples: int = MIN_SAMPLES,
) -> SeamResult:
    """Measure one seam.

    Parameters
    ----------
    model : Model
    pair : SeamPair
    tolerance : SeamTolerance
    max_spacing : float
        Largest sample spacing, mm.
    min_samples : int
        Fewest samples along the seam (at least 3).

    Returns
    -------
    SeamResult
    """
    geometry = SeamGeometry(model, pair, tolerance.flat_curvature_per_mm)
    n = int(np.clip(np.ceil(geometry.length / max_spacing) + 1, max(min_samples, 3), max(MAX_SAMPLES, min_samples)))
    tau = np.linspace(0.0, 1.0, n)
    values = geometry.evaluate(tau)
    maxima = refine_maxima(geometry.evaluate, tau, values, REFINED)
    at = geometry.evaluate(np.array([maxima[key][0] for key in REFINED]))
    worst, mean = {}, {}
    for i, key in enumerate(REFINED):
        t_best, value = maxima[key]
        worst[key] = Worst(value, t_best * geometry.length, at["points"][i], at["uv_a"][i], at["uv_b"][i])
    arc = tau * geometry.length
    for key in SAMPLED:
        finite = np.isfinite(values[key])
        mean[key] = float(np.mean(values[key][finite])) if np.any(finite) else float("nan")
    angle_min = float(np.min(values["angle"]))
    verdict = classify(
        worst["gap"].value, worst["angle"].value, angle_min, worst["curvature_jump_rel"].value, tolerance
    )
    return SeamResult(
        faces=pair.faces,
        source=pair.source,
        length=geometry.length,
        arc=arc,
        points=values["points"],
        **{key: values[key] for key in SAMPLED},
        worst=MappingProxyType(worst),
        mean=MappingProxyType(mean),
        angle_min=angle_min,
        orientation_consistent=geometry.orientation > 0,
        continuity=verdict.continuity,
        verdict=verdict.verdict,
        crease=verdict.crease,
        reasons=verdict.reasons,
        tolerance=tolerance,
    )


def _tolerance(tolerance) -> SeamTolerance:
    """The SeamTolerance itself, or the one a profile object carries (duck-typed: geometry never imports app)."""
    if tolerance is None:
        return SeamTolerance()
    tolerance = getattr(tolerance, "tolerance", tolerance)
    if not isinstance(tolerance, SeamTolerance):
        raise TypeError(f"expected a SeamTolerance (or a profile holding one), got {type(tolerance).__name__}")
    return tolerance


def measure_seams(model: Model, adjacency: Adjacency, tolerance: SeamTolerance, **sampling) -> SeamReport:
    """Measure every seam an adjacency found (see :func:`measure_seam` for ``sampling``)."""
    tolerance = _tolerance(tolerance)
    seams = tuple(measure_seam(model, pair, tolerance, **sampling) for pair in adjacency.seams)
    return SeamReport(seams, adjacency.free_edges, tolerance, adjacency.search_distance)


def check_seams(
    model: Model,
    tolerance: SeamTolerance | None = None,
    search_distance: float | None = None,
    topology: bool = True,
    geometry: bool = True,
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
        mm; default :func:`geometry.adjacency.default_search_distance`.
    topology, geometry : bool
        Which seam sources to use (see :func:`geometry.adjacency.find_seams`).
    **sampling
        ``max_spacing``, ``min_samples`` for :func:`measure_seam`.

    Returns
    -------
    SeamReport
    """
    tolerance = _tolerance(tolerance)
    adjacency = find_seams(model, search_distance, topology=topology, geometry=geometry)
    return measure_seams(model, adjacency, tolerance, **sampling)


def analyse_seams(model: Model, tolerance: SeamTolerance | None = None, **options) -> SeamReport:
    """Same as :func:`check_seams` (the name the window's state layer calls)."""
    return check_seams(model, tolerance, **options)
