"""What the seam check found: the measured seams, their worst places, the whole report.

Frozen dataclasses of read-only arrays (safe to hand between threads), with
their plain-dict forms for JSON. Computed by :mod:`geometry.seams.check`.
"""

from __future__ import annotations

from dataclasses import dataclass, fields
from types import MappingProxyType

import numpy as np

from ..model.topology import _frozen
from .adjacency import FreeEdge
from .tolerance import SeamTolerance


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
    edge : int
        Index of the file's shared edge in :attr:`Model.edges` the seam was
        measured along, or -1 for a seam matched geometrically.
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
    edge: int = -1

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
            "edge": self.edge if self.edge >= 0 else None,
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
    warnings : tuple of str
        What a reviewer should know about the data: a file's p-curve lying off
        its 3-D edge by more than the position tolerance, a matched seam cut
        back to where its gap stays within the search distance.
    """

    seams: tuple[SeamResult, ...]
    free_edges: tuple[FreeEdge, ...]
    tolerance: SeamTolerance
    search_distance: float
    warnings: tuple[str, ...] = ()

    @property
    def failing(self) -> tuple[SeamResult, ...]:
        return tuple(s for s in self.seams if s.verdict == "fail")

    def as_dict(self) -> dict:
        return {
            "profile": self.tolerance.as_dict(),
            "search_distance_mm": self.search_distance,
            "seams": [s.as_dict() for s in self.seams],
            "free_edges": [e.as_dict() for e in self.free_edges],
            "warnings": list(self.warnings),
            "summary": {
                "seams": len(self.seams),
                "failing": len(self.failing),
                "free_edges": len(self.free_edges),
                "free_length": float(sum(e.length for e in self.free_edges)),
            },
        }
