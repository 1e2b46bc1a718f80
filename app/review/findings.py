"""Turn the analyses' results into findings set against the profile's tolerances.

A seam gives one finding: the measure that comes closest to (or furthest over)
its tolerance, among those the required continuity class involves; the
verdict is the seam analysis's own. A section curve gives one finding only
when the profile limits inflections per section (``section_inflections_max``):
whether an inflection is a defect or the design's intent (a waist, a
transition) is the reviewer's call, so without a limit they are listed and
marked, not judged.
"""

from __future__ import annotations

import math

from app.profiles import Profile

from .result import FAIL, PASS, Finding, Kind
from .seam_entries import SeamEntry
from .section_entries import CutSections

# seam measure -> (refined maximum it reads, unit, profile key of the limit, class it decides)
SEAM_MEASURES = (
    ("gap", "gap", "mm", "position_mm", "G0"),
    ("angle", "angle", "deg", "tangent_deg", "G1"),
    ("curvature jump", "curvature_jump_rel", "fraction", "curvature_relative", "G2"),
)
_CLASS_RANK = {"G0": 0, "G1": 1, "G2": 2, "G3": 3}
INFLECTION_LIMIT_KEY = "section_inflections_max"


def _ratio(f: Finding) -> float:
    if f.kind == Kind.CUTTER_REACH:  # a radius: the smaller, the worse
        return f.limit / f.value if f.value > 0 else float("inf")
    if f.limit:
        return f.value / f.limit
    return float("inf") if f.value > 0 else 0.0


def worst_first(found: list[Finding]) -> tuple[Finding, ...]:
    """Findings over tolerance first, then by value / limit, largest first."""
    return tuple(sorted(found, key=lambda f: (f.verdict != FAIL, -_ratio(f))))


def seam_finding(seam: SeamEntry, profile: Profile) -> Finding:
    """The deciding measure of one seam."""
    result = seam.result
    required = "G0" if result.crease else str(profile.values.get("required", "G2"))
    candidates = []
    for measure, key, unit, limit_key, decides in SEAM_MEASURES:
        worst, limit = result.worst.get(key), profile.limit(limit_key)
        if worst is None or not math.isfinite(worst.value) or limit is None:
            continue
        if _CLASS_RANK[decides] > _CLASS_RANK.get(required, 2):
            continue
        where = tuple(float(x) for x in worst.xyz)
        candidates.append(Finding(Kind.SEAM, "", measure, float(worst.value), limit, unit, PASS, where))
    best = max(candidates, key=_ratio) if candidates else Finding(Kind.SEAM, "", "continuity", 0.0, None, "", PASS)
    subject = f"seam {seam.id}: {' / '.join(seam.face_names)} ({result.continuity}, needs {required})"
    return Finding(
        Kind.SEAM,
        subject,
        best.measure,
        best.value,
        best.limit,
        best.unit,
        FAIL if result.verdict == FAIL else PASS,
        best.where,
        {"seam": seam.id},
    )


def inflection_findings(sections: CutSections, profile: Profile) -> list[Finding]:
    """One finding per section curve where the profile limits inflections per section."""
    limit = profile.limit(INFLECTION_LIMIT_KEY)
    if limit is None:
        return []
    found = []
    for curve, (si, ci) in zip(sections.curves, sections.places, strict=True):
        points = curve.inflections.points
        where = tuple(float(x) for x in points[0]) if len(points) else None
        found.append(
            Finding(
                Kind.INFLECTION,
                f"section {sections.labels[si]}, curve {ci + 1}",
                "inflections",
                float(len(points)),
                limit,
                "count",
                FAIL if len(points) > limit else PASS,
                where,
                {"section": si, "curve": ci},
            )
        )
    return found


def face_findings(unevaluable=(), skipped=()) -> list[Finding]:
    """A failing finding for every face that was not checked.

    A face no sample of which could be evaluated, and a face the reader left
    out, were not checked at all; a gate must not pass them in silence.

    Parameters
    ----------
    unevaluable : sequence of (int, str)
        Index and problem of each face no sample of which could be evaluated
        (:func:`unevaluable_faces`).
    skipped : sequence of geometry.model.SkippedFace
        Faces of the file the reader left out, with the reason.
    """
    found = [_face_finding(i, f"face {i} cannot be evaluated: {problem}") for i, problem in unevaluable]
    for s in skipped:
        place = "a face" if s.place is None else f"face {s.place} of the file"
        named = f" ({s.name})" if s.name else ""
        found.append(_face_finding(s.place, f"{place}{named} was not read: {s.reason}"))
    return found


def unevaluable_faces(faces) -> list[tuple[int, str]]:
    """(index, problem) of each face summary without a curvature range (:class:`app.review.faces.FaceSummary`)."""
    return [(f.id, f.problem) for f in faces if f.curvature is None]


def _face_finding(face, subject: str) -> Finding:
    return Finding(Kind.FACE, subject, "valid samples", 0.0, None, "samples", FAIL, None, {"face": face})


def collect(seams, sections: CutSections, profile: Profile, faces=(), skipped=()) -> tuple[Finding, ...]:
    """All findings of a review, those over tolerance first, worst (value / limit) first.

    Parameters
    ----------
    seams : sequence of SeamEntry
    sections : CutSections
    profile : Profile
    faces : sequence of FaceSummary
    skipped : sequence of geometry.model.SkippedFace
        As :func:`face_findings` takes it.
    """
    found = face_findings(unevaluable_faces(faces), skipped)
    found += [seam_finding(s, profile) for s in seams]
    found += inflection_findings(sections, profile)
    return worst_first(found)
