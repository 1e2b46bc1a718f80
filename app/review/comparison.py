"""Compare two revisions of a model: faces, deviation, findings, fairness trend.

:func:`compare_models` runs the check's analyses on both revisions with the
same settings (:func:`app.review.runner.review_model`) and adds what only a
pair can tell: which face became which (:mod:`geometry.compare.correspondence`), how
far the new surfaces lie from the old ones (:mod:`geometry.compare.deviation`, exact
point inversion), which findings are new, fixed, unchanged or changed
(:mod:`app.review.finding_diff`) and the fairness figures side by side
(:mod:`app.review.trend`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from geometry.compare import FacePairing, pair_faces
from geometry.compare.deviation import DEVIATION_BUDGET, ModelDeviation, model_deviation
from geometry.model import Model

from . import trend
from .finding_diff import FindingChange, count, diff_findings
from .result import FileReview
from .runner import ReviewSettings, review_model

# A paired face whose largest deviation exceeds this (mm) is listed as changed: common practice
# for "the same surface" in class-A data exchange (no published source).
CHANGED_FACE_MM = 0.001
SCHEMA_ID = "batten-compare"
SCHEMA_VERSION = "1.0"


@dataclass(frozen=True, eq=False)
class Comparison:
    """Everything a comparison of two revisions found.

    Attributes
    ----------
    old, new : FileReview
        The check of each revision, same settings.
    pairing : FacePairing
    deviation : ModelDeviation
        Of ``new`` from ``old``, signed along old's normal.
    changed_faces : tuple of int
        New faces paired with an old face and deviating more than :data:`CHANGED_FACE_MM`.
    findings : tuple of FindingChange
    samples : list of (points (k, 3), signed (k,))
        Per new face, the deviation samples (for maps; not in the JSON).
    """

    old: FileReview
    new: FileReview
    pairing: FacePairing
    deviation: ModelDeviation
    changed_faces: tuple[int, ...]
    findings: tuple[FindingChange, ...]
    samples: list

    def face_name(self, index: int, side: str = "new") -> str:
        review = self.new if side == "new" else self.old
        return review.faces[index].name or f"face {index}"

    def to_dict(self) -> dict:
        per_face = []
        for f in self.deviation.faces:
            per_face.append({"name": self.face_name(f.face), **f.to_dict()})
        return {
            "old": {"source": self.old.source, "sha256": self.old.sha256, "verdict": self.old.verdict},
            "new": {"source": self.new.source, "sha256": self.new.sha256, "verdict": self.new.verdict},
            "profile": self.new.profile,
            "faces": {
                "paired": [
                    {"old": o, "new": n, "name": self.face_name(n), "by": how} for o, n, how in self.pairing.pairs
                ],
                "added": [{"new": n, "name": self.face_name(n)} for n in self.pairing.added],
                "removed": [{"old": o, "name": self.face_name(o, "old")} for o in self.pairing.removed],
                "changed": [{"new": n, "name": self.face_name(n)} for n in self.changed_faces],
                "changed_above_mm": CHANGED_FACE_MM,
            },
            "deviation": {
                "max_mm": self.deviation.max_mm,
                "mean_mm": self.deviation.mean_mm,
                "max_at": None if self.deviation.max_at is None else list(self.deviation.max_at),
                "max_face": None if self.deviation.max_face < 0 else self.face_name(self.deviation.max_face),
                "sign": "positive where NEW lies on the side OLD's normal points to",
                "faces": per_face,
            },
            "findings": {"counts": count(self.findings), "changes": [c.to_dict() for c in self.findings]},
            "trend": {
                "faces": trend.face_trend(self.old, self.new, self.pairing),
                "seams": trend.seam_trend(self.old, self.new),
                "section_families": trend.section_trend(self.old, self.new),
            },
        }


def compare_models(
    old_model: Model,
    new_model: Model,
    settings: ReviewSettings | None = None,
    progress=None,
    budget: int = DEVIATION_BUDGET,
    reviews: tuple[FileReview, FileReview] | None = None,
) -> Comparison:
    """Compare two loaded revisions.

    Parameters
    ----------
    old_model, new_model : Model
    settings : ReviewSettings, optional
        Profile and sections for both checks (a review file applies to both).
    progress : callable, optional
        Called with a short line before each stage.
    budget : int
        Deviation samples over ``new_model``.
    reviews : (FileReview, FileReview), optional
        Checks already made of the two models with ``settings`` (not redone).

    Returns
    -------
    Comparison
    """
    say = progress or (lambda _: None)
    settings = settings or ReviewSettings()
    if reviews is None:
        reviews = (review_model(old_model, settings, say), review_model(new_model, settings, say))
    old, new = reviews
    say("pairing faces")
    pairing = pair_faces(old_model, new_model)
    say("deviation by point inversion")
    deviation, samples = model_deviation(old_model, new_model, budget)
    by_face = {f.face: f for f in deviation.faces}
    changed = tuple(n for _, n, _ in pairing.pairs if n in by_face and by_face[n].max_mm > CHANGED_FACE_MM)
    file = settings.review()
    tolerance = file.place_tolerance_mm if file is not None else None
    changes = diff_findings(old, new) if tolerance is None else diff_findings(old, new, tolerance)
    return Comparison(old, new, pairing, deviation, changed, changes, samples)


def deviation_range(comparison: Comparison) -> float:
    """A symmetric colour range for the deviation map: the largest |deviation|, at least 1e-6 mm."""
    values = [np.abs(s[np.isfinite(s)]).max() for _, s in comparison.samples if np.isfinite(s).any()]
    return max([1e-6, *values])
