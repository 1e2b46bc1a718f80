"""What became of the findings of one revision in the next: new, fixed, unchanged, changed.

Only findings over tolerance (failing or accepted) take part. Each finding of
the old revision looks for the same finding in the new one (same kind and
faces, nearest anchor; :mod:`app.review.identity`):

- fixed: it is gone, or within tolerance now;
- unchanged: still over tolerance, in the same place (within the place
  tolerance) and with the same value (within :data:`identity.VALUE_RTOL`);
- changed: still over tolerance but moved or measuring differently (value
  before and after, distance moved);
- new: over tolerance in the new revision with no counterpart over tolerance
  in the old.
"""

from __future__ import annotations

from dataclasses import dataclass

from .findings import SEAM_MEASURES
from .identity import PLACE_TOLERANCE_MM, FindingKey, finding_keys, nearest_same, same_value
from .result import ACCEPTED, FAIL, FileReview, Finding

NEW, FIXED, UNCHANGED, CHANGED = "new", "fixed", "unchanged", "changed"
STATUS_ORDER = (NEW, CHANGED, FIXED, UNCHANGED)


@dataclass(frozen=True)
class FindingChange:
    """One finding followed from the old revision to the new one.

    Attributes
    ----------
    status : str
        :data:`NEW`, :data:`FIXED`, :data:`UNCHANGED` or :data:`CHANGED`.
    key : FindingKey
        The identity (the new revision's, when it has the finding).
    before, after : Finding or None
        The finding in each revision (None where it is absent).
    moved_mm : float or None
        Distance between the anchors, when both exist.
    after_value : float or None
        The new revision's value of the measure the old finding was decided by
        (a seam's deciding measure may change: a fixed G1 seam is then decided by
        its gap), so before and after compare like with like.
    """

    status: str
    key: FindingKey
    before: Finding | None
    after: Finding | None
    moved_mm: float | None = None
    after_value: float | None = None

    def to_dict(self) -> dict:
        def side(f: Finding | None):
            if f is None:
                return None
            return {"subject": f.subject, "measure": f.measure, "value": f.value, "verdict": f.verdict}

        either = self.after or self.before
        return {
            "status": self.status,
            "finding": self.key.label,
            "kind": self.key.kind,
            "faces": list(self.key.faces),
            "unit": either.unit,
            "limit": either.limit,
            "before": side(self.before),
            "after": side(self.after),
            "moved_mm": self.moved_mm,
            "after_value": self.after_value,
        }


def _over(f: Finding) -> bool:
    return f.verdict in (FAIL, ACCEPTED)


def measured_as(review: FileReview, finding: Finding, measure: str) -> float | None:
    """The value of ``measure`` for ``finding``'s subject in ``review`` (seams: any of their measures)."""
    if finding.measure == measure:
        return finding.value
    seam = finding.ref.get("seam") if finding.kind == "seam" else None
    if seam is None or not 0 <= seam < len(review.seams):
        return None
    keys = {m: key for m, key, *_ in SEAM_MEASURES}  # measure -> its refined maximum in the JSON's "worst"
    worst = (review.seams[seam].get("worst") or {}).get(keys.get(measure, "")) or {}
    value = worst.get("value")
    return None if value is None else float(value)


def _same_measure(a: Finding, b: Finding) -> bool:
    return a.measure == b.measure and same_value(a.value, b.value)


def diff_findings(old: FileReview, new: FileReview, place_tolerance: float = PLACE_TOLERANCE_MM):
    """Follow every over-tolerance finding from ``old`` to ``new``.

    Returns
    -------
    tuple of FindingChange
        New and changed first, then fixed, then unchanged.
    """
    old_keys, new_keys = finding_keys(old), finding_keys(new)
    changes = []
    claimed: set[int] = set()
    for i, finding in enumerate(old.findings):
        if not _over(finding):
            continue
        j, distance = nearest_same(old_keys[i], new_keys, claimed)
        if j < 0:
            changes.append(FindingChange(FIXED, old_keys[i], finding, None))
            continue
        after = new.findings[j]
        claimed.add(j)
        moved = None if distance == float("inf") else distance
        if not _over(after):
            status = FIXED
        elif (
            distance <= place_tolerance and after.measure == finding.measure and same_value(after.value, finding.value)
        ):
            status = UNCHANGED
        else:
            status = CHANGED
        changes.append(
            FindingChange(status, new_keys[j], finding, after, moved, measured_as(new, after, finding.measure))
        )
    for j, finding in enumerate(new.findings):
        if _over(finding) and j not in claimed:
            changes.append(FindingChange(NEW, new_keys[j], None, finding))
    return tuple(sorted(changes, key=lambda c: STATUS_ORDER.index(c.status)))


def count(changes) -> dict[str, int]:
    return {status: sum(c.status == status for c in changes) for status in STATUS_ORDER}
