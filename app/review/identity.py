"""Which finding of one revision is the same finding in the next.

A finding is known by its kind, the names of the faces it concerns and one
place on the model (its anchor): the midpoint of a seam's line, the first
inflection of a section curve (else the plane's point). Names survive a
revision; indices and section numbers need not. Two findings are the same when
kind and faces agree; they are in the same place when their anchors lie within
a tolerance (:data:`PLACE_TOLERANCE_MM` unless the review file says otherwise).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .result import FileReview, Finding

# Anchors this close (mm) are the same place: common practice for re-finding a
# marked spot on a revised class-A surface (no published source).
PLACE_TOLERANCE_MM = 1.0
# A value within this relative change counts as unchanged.
VALUE_RTOL = 1e-3


@dataclass(frozen=True)
class FindingKey:
    """The identity of a finding across revisions.

    Attributes
    ----------
    kind : str
        The finding's kind (``"seam"``, ``"inflection"``, ...).
    faces : tuple of str
        Names of the faces it concerns (``face N`` for an unnamed face), sorted.
    anchor : tuple of float or None
        xyz (mm) of the place that identifies it.
    """

    kind: str
    faces: tuple[str, ...]
    anchor: tuple[float, float, float] | None

    @property
    def label(self) -> str:
        """Readable form: ``seam visor_bend / visor_flat at (0, 60, 0)``."""
        return f"{self.kind} {' / '.join(self.faces)}{_at(self.anchor)}"

    def same_subject(self, other: FindingKey) -> bool:
        return self.kind == other.kind and self.faces == other.faces

    def distance(self, other: FindingKey) -> float:
        """Distance (mm) between the anchors; 0 when neither has one, inf when only one has."""
        if self.anchor is None and other.anchor is None:
            return 0.0
        if self.anchor is None or other.anchor is None:
            return float("inf")
        return float(np.linalg.norm(np.subtract(self.anchor, other.anchor)))


def _at(anchor) -> str:
    return "" if anchor is None else " at ({:.3f}, {:.3f}, {:.3f})".format(*anchor)


def _face_names(review: FileReview, indices) -> tuple[str, ...]:
    names = {f.id: f.name or f"face {f.id}" for f in review.faces}
    return tuple(sorted({names.get(int(i), f"face {int(i)}") for i in indices}))


def midpoint(points: np.ndarray) -> tuple[float, float, float] | None:
    """The point half-way along a polyline (by arc length)."""
    pts = np.asarray(points, float).reshape(-1, 3)
    if not len(pts):
        return None
    s = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(pts, axis=0), axis=1))])
    half = 0.5 * s[-1]
    return tuple(float(np.interp(half, s, pts[:, i])) for i in range(3))


def _seam_anchor(review: FileReview, seam_id: int) -> tuple[float, float, float] | None:
    lines = [line for line in review.lines if getattr(line, "kind", "") == "seam"]
    if 0 <= seam_id < len(lines):
        return midpoint(lines[seam_id].points)
    worst = review.seams[seam_id].get("worst_position") if 0 <= seam_id < len(review.seams) else None
    return None if worst is None else tuple(float(x) for x in worst)


def finding_key(review: FileReview, finding: Finding) -> FindingKey:
    """The identity of one finding of ``review``."""
    ref = finding.ref or {}
    if finding.kind == "seam" and "seam" in ref and 0 <= ref["seam"] < len(review.seams):
        seam = review.seams[ref["seam"]]
        faces = tuple(sorted(seam.get("face_names") or _face_names(review, seam.get("faces", ()))))
        return FindingKey(finding.kind, faces, _seam_anchor(review, ref["seam"]))
    if "section" in ref and 0 <= ref["section"] < len(review.sections):
        section = review.sections[ref["section"]]
        curves = section.get("curves", ())
        curve = curves[ref.get("curve", 0)] if ref.get("curve", 0) < len(curves) else {}
        faces = _face_names(review, curve.get("faces", ()))
        anchor = finding.where
        if anchor is None:
            anchor = (section.get("plane") or {}).get("point")
        return FindingKey(finding.kind, faces, None if anchor is None else tuple(float(x) for x in anchor))
    return FindingKey(finding.kind, (finding.subject,), finding.where)


def finding_keys(review: FileReview) -> list[FindingKey]:
    """One key per finding of ``review``, in its order."""
    return [finding_key(review, f) for f in review.findings]


def nearest_same(key: FindingKey, candidates: list[FindingKey], skip: set[int] = frozenset()) -> tuple[int, float]:
    """The candidate with the same kind and faces nearest to ``key``'s anchor (indices in ``skip`` left out).

    Returns
    -------
    index : int
        -1 when no candidate has the same kind and faces.
    distance : float
        Between the anchors, mm (inf when none).
    """
    best, best_d = -1, float("inf")
    for i, other in enumerate(candidates):
        if i in skip or not key.same_subject(other):
            continue
        d = key.distance(other)
        if best < 0 or d < best_d:
            best, best_d = i, d
    return best, best_d


def same_value(a: float, b: float) -> bool:
    return bool(np.isclose(a, b, rtol=VALUE_RTOL, atol=1e-12))
