"""What a check found in one file: a plain record, and its JSON form.

The JSON layout is documented by ``app/report/check_schema.json``; bump
:data:`SCHEMA_VERSION` whenever a field changes meaning or disappears
(adding optional fields is a minor bump).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import UTC, datetime
from enum import StrEnum

from .faces import FaceSummary


def now_stamp() -> str:
    """The time a result or report is created, as written in the JSON and the report (UTC, minutes)."""
    return datetime.now(UTC).strftime("%Y-%m-%d %H:%M UTC")


SCHEMA_ID = "batten-check"
SCHEMA_VERSION = "1.1"  # 1.1: tooling (draft, undercut, cutter reach), faces accounted for


class Verdict(StrEnum):
    """What a finding says against its tolerance; NOTE: listed for the reviewer, not judged."""

    PASS = "pass"
    FAIL = "fail"
    NOTE = "note"
    # Over tolerance, but a reviewer accepted it in the review file: listed, does not fail the gate.
    ACCEPTED = "accepted"


class Kind(StrEnum):
    """What a finding is about (the JSON's ``kind``; the window lists the same kinds)."""

    SEAM = "seam"
    FREE_EDGE = "free_edge"
    INFLECTION = "inflection"
    SECTION_EXTREMUM = "section_extremum"  # a curvature extremum of a section curve
    CURVATURE = "curvature"  # the tightest spot of a face
    DRAFT = "draft"  # a face's least draft against the profile's minimum
    UNDERCUT = "undercut"  # a region whose release path meets the part
    CUTTER_REACH = "cutter_reach"  # a face's tightest concave radius against the cutter
    FACE = "face"  # a face no sample of which could be evaluated


PASS, FAIL, ACCEPTED = Verdict.PASS, Verdict.FAIL, Verdict.ACCEPTED
# A file's status when it could not be judged at all (never a finding's verdict).
UNREADABLE, ERROR = "unreadable", "error"


@dataclass(frozen=True)
class Finding:
    """One measured quantity set against its tolerance.

    Attributes
    ----------
    kind : Kind
    subject : str
        What it is about, for people (``"faces 2-3"``, ``"x = 40, curve 1"``).
    measure : str
        The quantity (``"gap"``, ``"angle"``, ``"curvature jump"``, ``"inflections"``).
    value, limit : float
        Measured value and the profile's tolerance, in ``unit``.
    unit : str
    verdict : Verdict
        PASS, FAIL, or ACCEPTED (over tolerance, accepted in the review file).
    where : tuple of float or None
        xyz (mm) of the worst place, when there is one.
    ref : dict
        Keys that locate the finding in the JSON (``{"seam": 3}``,
        ``{"section": 0, "curve": 1}``).
    """

    kind: Kind
    subject: str
    measure: str
    value: float
    limit: float | None
    unit: str
    verdict: Verdict
    where: tuple[float, float, float] | None = None
    ref: dict = field(default_factory=dict)

    def to_dict(self) -> dict:
        return {
            "kind": str(self.kind),
            "subject": self.subject,
            "measure": self.measure,
            "value": self.value,
            "limit": self.limit,
            "unit": self.unit,
            "verdict": str(self.verdict),
            "where": None if self.where is None else list(self.where),
            "ref": dict(self.ref),
        }


@dataclass(frozen=True)
class FileReview:
    """Everything a check measured in one file.

    ``seams``, ``free_edges`` and ``sections`` hold the plain-dict forms that
    the seam and section analyses give; ``section_curves`` keeps the exact
    section curves (:class:`geometry.sections.results.SectionCurve`) and
    ``section_places`` their (plane, curve) indices, for the figures; both are
    left out of the JSON.
    """

    source: str
    status: str
    error: str | None = None
    sha256: str | None = None
    units: str = "mm"
    source_units: str | None = None
    profile: dict = field(default_factory=dict)
    sections_spec: str = ""
    faces: tuple[FaceSummary, ...] = ()
    seams: tuple[dict, ...] = ()
    free_edges: tuple[dict, ...] = ()
    sections: tuple[dict, ...] = ()
    findings: tuple[Finding, ...] = ()
    warnings: tuple[str, ...] = ()
    model_size: float = 0.0
    face_account: dict = field(default_factory=dict)
    section_curves: tuple = ()
    section_places: tuple[tuple[int, int], ...] = ()
    lines: tuple = ()
    tooling: dict | None = None
    dispositions: tuple = ()
    reviewers: tuple[str, ...] = ()
    review_file: str | None = None

    @property
    def verdict(self) -> str:
        if self.status == UNREADABLE:
            return UNREADABLE
        if self.status != "checked":
            return ERROR
        return FAIL if any(f.verdict == FAIL for f in self.findings) else PASS

    @property
    def failures(self) -> tuple[Finding, ...]:
        return tuple(f for f in self.findings if f.verdict == FAIL)

    def summary(self) -> dict:
        counts: dict[str, dict[str, int]] = {}
        for f in self.findings:
            per_kind = counts.setdefault(f.kind, {PASS: 0, FAIL: 0})
            per_kind[f.verdict] = per_kind.get(f.verdict, 0) + 1
        return {
            "verdict": self.verdict,
            "over_tolerance": len(self.failures),
            "counts": counts,
            "findings": [f.to_dict() for f in self.findings],
        }

    def to_dict(self) -> dict:
        """The file's entry in the check JSON (see ``app/report/check_schema.json``)."""
        return {
            "source": self.source,
            "status": self.status,
            "error": self.error,
            "sha256": self.sha256,
            "units": self.units,
            "source_units": self.source_units,
            "profile": self.profile,
            "sections_spec": self.sections_spec,
            "model_size": self.model_size,
            "face_account": dict(self.face_account),
            "faces": [f.to_dict() for f in self.faces],
            "seams": list(self.seams),
            "free_edges": list(self.free_edges),
            "sections": list(self.sections),
            "warnings": list(self.warnings),
            "tooling": self.tooling,
            "summary": self.summary(),
            **self._review_dict(),
        }

    def _review_dict(self) -> dict:
        if self.review_file is None:
            return {}
        return {
            "review": {
                "file": self.review_file,
                "reviewers": list(self.reviewers),
                "accepted": sum(f.verdict == ACCEPTED for f in self.findings),
                "dispositions": [d.to_dict() for d in self.dispositions],
            }
        }


def face_account_line(account: dict) -> str:
    """``52 faces in the file: 50 analysed, 2 skipped (reason; ...)`` from ``Model.face_account()``."""
    if not account:
        return "faces not counted"
    skipped = account.get("skipped", [])
    faces = "face" if account["in_file"] == 1 else "faces"
    line = f"{account['in_file']} {faces} in the file: {account['analysed']} analysed, {len(skipped)} skipped"
    reasons: dict[str, int] = {}
    for s in skipped:
        reasons[s["reason"]] = reasons.get(s["reason"], 0) + 1
    if reasons:
        line += " (" + "; ".join(f"{n} x {r}" if n > 1 else r for r, n in reasons.items()) + ")"
    return line


def check_document(reviews: list[FileReview], created: str, batten_version: str) -> dict:
    """The whole JSON document of one check run: every file, in the order given."""
    verdicts = [r.verdict for r in reviews]
    return {
        "schema": SCHEMA_ID,
        "schema_version": SCHEMA_VERSION,
        "batten_version": batten_version,
        "created": created,
        "verdict": overall_verdict(verdicts),
        "files": [r.to_dict() for r in reviews],
    }


def overall_verdict(verdicts) -> str:
    """One verdict for several files: the worst of unreadable, error, fail, pass (in that order)."""
    for worst in (UNREADABLE, ERROR, FAIL):
        if worst in verdicts:
            return worst
    return PASS
