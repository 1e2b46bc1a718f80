"""The report's review-loop parts: dispositions, open items, a comparison of revisions, reviewers.

Rows are built here and laid out by the document's own table helper
(:mod:`app.report.document`), so they look like every other table.
"""

from __future__ import annotations

from app.review.finding_diff import STATUS_ORDER, count
from app.review.result import ACCEPTED, FAIL, FileReview

from .tables import num, xyz

DISPOSITIONS_NOTE = (
    "Decisions recorded in the review file. applied: the finding is where and as the reviewer saw it; "
    "re-review: it moved beyond the place tolerance or measures differently, so the decision is NOT applied "
    "and the finding keeps its verdict; stale: the finding is gone or within tolerance now."
)
DEVIATION_NOTE = (
    "Deviation: distance from the new revision's surface samples to the old revision's exact surfaces (point "
    "inversion on the NURBS), positive where the new surface lies on the side the old one's normal points to."
)


def disposition_rows(review: FileReview):
    """Every disposition of the review file with what became of it."""
    header = ["finding", "decision", "reason", "reviewer", "date", "status", "note"]
    rows = []
    for o in review.dispositions:
        d = o.disposition
        rows.append((d.key.label, d.decision, d.reason or "-", d.reviewer, d.date, o.status, o.note or "-"))
    return header, rows


def open_rows(review: FileReview):
    """Findings over tolerance that no reviewer accepted (with any "to fix" decision beside them)."""
    to_fix = {o.finding: o.disposition for o in review.dispositions if o.status == "applied"}
    header = ["#", "subject", "measure", "value", "tolerance", "decision", "where (mm)"]
    rows = []
    for n, f in enumerate(review.findings, start=1):
        if f.verdict != FAIL:
            continue
        d = to_fix.get(n - 1)
        decision = f"to fix ({d.reviewer}, {d.date})" if d is not None and d.decision == "to fix" else "open"
        rows.append((str(n), f.subject, f.measure, num(f.value), num(f.limit), decision, xyz(f.where)))
    return header, rows


def accepted_rows(review: FileReview):
    header = ["#", "subject", "measure", "value", "tolerance", "accepted by", "why"]
    by_finding = {o.finding: o.disposition for o in review.dispositions if o.status == "applied"}
    rows = []
    for n, f in enumerate(review.findings, start=1):
        if f.verdict == ACCEPTED:
            d = by_finding.get(n - 1)
            who = f"{d.reviewer}, {d.date}" if d else "-"
            rows.append((str(n), f.subject, f.measure, num(f.value), num(f.limit), who, d.reason if d else "-"))
    return header, rows


def deviation_rows(comparison):
    header = ["face", "max mm", "signed at max", "mean mm", "where (mm)"]
    rows = [
        (comparison.face_name(f.face), num(f.max_mm), num(f.max_signed_mm), num(f.mean_mm), xyz(f.max_at))
        for f in sorted(comparison.deviation.faces, key=lambda f: -f.max_mm)
    ]
    return header, rows


def finding_change_rows(comparison):
    header = ["change", "finding", "measure", "before", "after", "moved mm"]
    rows = []
    for c in comparison.findings:
        either = c.before or c.after  # the measure the old revision was judged by
        before = "-" if c.before is None else f"{num(c.before.value)} {c.before.unit}"
        after = "-"
        if c.after is not None and c.before is not None and c.after_value is not None:
            after = f"{num(c.after_value)} {c.before.unit} ({c.after.verdict})"  # in the measure of "before"
        elif c.after is not None:
            after = f"{num(c.after.value)} {c.after.unit} ({c.after.verdict})"
        rows.append((c.status, c.key.label, either.measure, before, after, num(c.moved_mm, 3)))
    return header, rows


def face_change_rows(comparison):
    p = comparison.pairing
    header = ["face", "change", "paired by"]
    changed = set(comparison.changed_faces)
    rows = [(comparison.face_name(n), "changed" if n in changed else "same", how) for _, n, how in p.pairs]
    rows += [(comparison.face_name(n), "added", "-") for n in p.added]
    rows += [(comparison.face_name(o, "old"), "removed", "-") for o in p.removed]
    return header, rows


def _pair(before, after, key: str) -> tuple[str, str]:
    return (num((before or {}).get(key)), num((after or {}).get(key)))


def trend_rows(comparison):
    """Seams and section families, old beside new."""
    from app.review import trend

    seams_header = ["seam", "gap before", "gap after", "angle before", "angle after", "jump before", "jump after"]
    seams = []
    for row in trend.seam_trend(comparison.old, comparison.new):
        b, a = row["before"], row["after"]
        cells = [" / ".join(row["faces"])]
        for key in ("gap_mm", "angle_deg", "curvature_jump"):
            cells += _pair(b, a, key)
        seams.append(tuple(cells))
    families_header = ["family", "inflections before", "after", "variation before", "after"]
    families = []
    for row in trend.section_trend(comparison.old, comparison.new):
        b, a = row["before"], row["after"]
        families.append((row["family"], *_pair(b, a, "inflections"), *_pair(b, a, "variation")))
    return (seams_header, seams), (families_header, families)


def comparison_summary(comparison) -> list[tuple[str, str]]:
    d = comparison.deviation
    counts = count(comparison.findings)
    p = comparison.pairing
    return [
        ("old revision", comparison.old.source),
        ("new revision", comparison.new.source),
        (
            "faces",
            f"{len(p.pairs)} paired, {len(comparison.changed_faces)} changed, {len(p.added)} added, "
            f"{len(p.removed)} removed",
        ),
        ("deviation", f"max {num(d.max_mm)} mm at {xyz(d.max_at)}, mean {num(d.mean_mm)} mm"),
        ("findings over tolerance", ", ".join(f"{counts[s]} {s}" for s in STATUS_ORDER)),
    ]
