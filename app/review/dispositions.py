"""Apply a review file's dispositions to a check of a (possibly newer) revision.

Each disposition looks for the finding with the same kind and faces nearest to
its recorded place (:mod:`app.review.identity`):

- ``applied``: found within the file's place tolerance with the value the
  reviewer saw (within :data:`VALUE_CHANGE_RTOL`). An accepted finding over
  tolerance then counts as accepted and no longer fails the gate.
- ``re-review``: found, but moved beyond the tolerance or measuring
  differently. The decision is not applied: the finding keeps its verdict and
  is flagged for a reviewer.
- ``stale``: no such finding any more, or it is now within tolerance.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from .identity import FindingKey, finding_keys, nearest_same
from .result import ACCEPTED, FAIL, FileReview
from .review_file import ACCEPTED as DECIDED_ACCEPTED
from .review_file import Disposition, ReviewFile

APPLIED, RE_REVIEW, STALE = "applied", "re-review", "stale"
# A value that changed by more than this fraction since the decision asks for a new look
# (common practice: a few per cent is measurement scatter between revisions).
VALUE_CHANGE_RTOL = 0.05


@dataclass(frozen=True)
class Outcome:
    """What became of one disposition on one revision.

    Attributes
    ----------
    disposition : Disposition
    status : str
        :data:`APPLIED`, :data:`RE_REVIEW` or :data:`STALE`.
    finding : int or None
        Index of the matched finding in the review's findings.
    note : str
        Why, for people (``"moved 3.2 mm"``, ``"value 1 -> 0.4"``).
    value_now : float or None
    """

    disposition: Disposition
    status: str
    finding: int | None
    note: str = ""
    value_now: float | None = None

    def to_dict(self) -> dict:
        return {**self.disposition.to_dict(), "status": self.status, "note": self.note, "value_now": self.value_now}


def _changed(d: Disposition, value: float, measure: str) -> str:
    if d.measure and measure and d.measure != measure:
        return f"now decided by {measure} (was {d.measure})"
    if d.value is not None and not np.isclose(value, d.value, rtol=VALUE_CHANGE_RTOL, atol=1e-12):
        return f"value {d.value:.4g} -> {value:.4g}"
    return ""


def match_dispositions(review: FileReview, file: ReviewFile, keys: list[FindingKey] | None = None) -> list[Outcome]:
    """Find each disposition's finding in ``review``; see the module notes for the statuses."""
    keys = finding_keys(review) if keys is None else keys
    over = {i for i, f in enumerate(review.findings) if f.verdict in (FAIL, ACCEPTED)}
    within = set(range(len(keys))) - over
    out = []
    for d in file.dispositions:
        # Only findings over tolerance can take a decision; the rest tell a fixed finding from a vanished one.
        index, distance = nearest_same(d.key, keys, within)
        if index < 0:
            gone = nearest_same(d.key, keys, over)[0] < 0
            out.append(Outcome(d, STALE, None, "finding no longer present" if gone else "now within tolerance"))
            continue
        finding = review.findings[index]
        if distance > file.place_tolerance_mm:
            where = "" if not np.isfinite(distance) else f" {distance:.3g} mm"
            note = f"moved{where} (tolerance {file.place_tolerance_mm:g} mm)"
            out.append(Outcome(d, RE_REVIEW, index, note, finding.value))
        elif note := _changed(d, finding.value, finding.measure):
            out.append(Outcome(d, RE_REVIEW, index, note, finding.value))
        else:
            out.append(Outcome(d, APPLIED, index, "", finding.value))
    return out


def apply_review(review: FileReview, file: ReviewFile) -> FileReview:
    """The review with accepted findings marked accepted and every disposition's outcome attached.

    Parameters
    ----------
    review : FileReview
    file : ReviewFile

    Returns
    -------
    FileReview
        ``findings``: an over-tolerance finding with an applied "accepted"
        disposition has verdict :data:`app.review.result.ACCEPTED`;
        ``dispositions``: one :class:`Outcome` per disposition;
        ``reviewers``: the names in the file.
    """
    if review.status != "checked":
        return replace(review, reviewers=file.reviewers, review_file=file.source)
    outcomes = match_dispositions(review, file)
    accepted = {
        o.finding
        for o in outcomes
        if o.status == APPLIED and o.disposition.decision == DECIDED_ACCEPTED and o.finding is not None
    }
    # "to fix" by anyone outranks an acceptance of the same finding.
    to_fix = {o.finding for o in outcomes if o.status == APPLIED and o.disposition.decision != DECIDED_ACCEPTED}
    findings = tuple(
        replace(f, verdict=ACCEPTED) if i in accepted - to_fix and f.verdict == FAIL else f
        for i, f in enumerate(review.findings)
    )
    return replace(
        review,
        findings=findings,
        dispositions=tuple(outcomes),
        reviewers=file.reviewers,
        review_file=file.source,
    )
