"""The closing table of a check run: every file, grouped by verdict, worst first."""

from __future__ import annotations

from .result import ACCEPTED, ERROR, FAIL, PASS, UNREADABLE, FileReview, face_account_line

ORDER = (UNREADABLE, ERROR, FAIL, PASS)


def _detail(review: FileReview, cached: bool) -> str:
    if review.verdict in (PASS, FAIL):
        text = f"{len(review.failures)} over tolerance, {len(review.findings)} measured"
        if review.face_account:
            text += f"; {face_account_line(review.face_account)}"
        if review.review_file is not None:
            text += f", {sum(f.verdict == ACCEPTED for f in review.findings)} accepted by reviewers"
    else:
        text = review.error or ""
    return f"{text}; from cache" if cached else text


def _decision_lines(review: FileReview) -> list[str]:
    """Reviewers' decisions that were not applied as recorded (stale, re-review), one indented line each."""
    lines = []
    for outcome in review.dispositions:
        if outcome.status != "applied":
            d = outcome.disposition
            lines.append(f"  {outcome.status}: {d.key.label} ({d.decision} by {d.reviewer}, {d.date}): {outcome.note}")
    return lines


def verdict_table(reviews: list[FileReview], cached: list[bool]) -> str:
    """One line per file (verdict, path, detail), unreadable first and passing last, then the totals.

    Each file line starts with its verdict in capitals, so a script can read the
    table with ``split()``; the last line counts files per verdict.
    """
    rows = sorted(zip(reviews, cached, strict=True), key=lambda rc: ORDER.index(rc[0].verdict))
    width = max((len(r.source) for r in reviews), default=0)
    lines = []
    for r, c in rows:
        lines.append(f"{r.verdict.upper():10s} {r.source:{width}s}  ({_detail(r, c)})")
        lines.extend(_decision_lines(r))
    counts = [f"{sum(r.verdict == v for r in reviews)} {v}" for v in ORDER if any(r.verdict == v for r in reviews)]
    total = f"{len(reviews)} file{'s' if len(reviews) != 1 else ''}: {', '.join(counts) or 'none'}"
    if any(cached):
        total += f" ({sum(cached)} from cache)"
    return "\n".join([*lines, total]) + "\n"
