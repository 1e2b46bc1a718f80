"""The review document as HTML, shared by the PDF and the HTML report.

Only the HTML subset Qt's rich-text engine lays out is used (tables with
border attributes, inline styles, ``page-break-before``), so the PDF written
through QTextDocument and the HTML file opened in a browser read the same.
Pictures are referred to through ``image_src(name)``: a data URI in the HTML
file, a document resource in the PDF.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from html import escape

from app.render.colours import VERDICT
from app.review.result import ACCEPTED, ERROR, FAIL, PASS, UNREADABLE, FileReview, face_account_line, overall_verdict
from geometry.conventions import CURVATURE_SIGN

from . import review_parts
from .figures import Figure
from .tables import (
    extrema_rows,
    face_rows,
    figure_rows,
    finding_rows,
    free_edge_rows,
    inflection_rows,
    seam_rows,
    tooling_facts,
    tooling_rows,
    undercut_rows,
)

REVIEW_AID = (
    "This report is an aid to a surface review, not a release decision. The measurements compare the surfaces "
    "with the tolerance profile named below; whether a surface is fit for tooling is decided by your "
    "organisation's own surface quality standard, its tolerances and the people who sign the review. Where "
    "that standard differs from the profile used here, the standard governs."
)

FIGURES_PER_PAGE = 2
# The overview picture shares the chapter's first page with the verdict: a little smaller.
OVERVIEW_WIDTH = 360

# the window's verdict colours (one palette); the two "not checked" states have their own
_VERDICT_COLOURS = {PASS: VERDICT["pass"], FAIL: VERDICT["fail"], UNREADABLE: "#7a4b00", ERROR: "#5a5a5a"}
_VERDICT_WORDS = {
    PASS: "PASS: no finding over tolerance",
    FAIL: "FAIL: findings over tolerance",
    UNREADABLE: "NOT CHECKED: the file cannot be read",
    ERROR: "NOT CHECKED: the analysis stopped on an internal error",
}


NOWRAP_CHARS = 12
NOWRAP = ' style="white-space: nowrap;"'
SEAMS_NOTE = (
    '<p style="font-size: 8pt;">Largest values along each seam: gap between the faces, angle between their '
    "normals, and jump of the cross-seam normal curvature, absolute and relative to the larger of the two. "
    "class: the continuity reached under the profile's tolerances (G2, G1, G0, or broken).</p>"
)
SIGN_NOTE = (
    f'<p style="font-size: 8pt;">Sign of every curvature in this report (maps, sections, graphs, combs, '
    f"tables): {CURVATURE_SIGN}, exactly as in the window's colour map.</p>"
)
FIGURES_NOTE = (
    '<p style="font-size: 8pt;">pieces: monotone pieces of the curvature plot (a fair curve has few; Farin, '
    "<i>Curves and Surfaces for CAGD</i>, 5th ed., sec. 23.1). int (dk/ds)^2 ds: curvature variation along the "
    "curve, 1/mm^3 (after Moreton and Sequin's minimum variation idea).</p>"
)
TOOLING_NOTE = (
    '<p style="font-size: 8pt;">draft: asin(n . pull) with the outward normal, signed (positive: the face '
    "leaves with the mould half moving along +pull); short: area with |draft| below the limit. undercut: "
    "area whose straight path out along its release direction meets the part again. radius: tightest concave "
    "bend (1 / largest positive principal curvature); no reach: area a ball-end cutter of the profile's radius "
    "cannot finish. Sharp inside creases are not curvature and are not judged here. The limits are common "
    "practice; your organisation's tooling standard decides.</p>"
)
# Column widths (percent) of the tables whose text columns would otherwise wrap mid-word.
WIDTHS = {
    "seam": (7, 27, 8, 9, 9, 9, 9, 8, 14),
    "#": (4, 30, 12, 9, 11, 8, 9, 17),
}


def _nowrap(text: str) -> str:
    # Short cells (numbers, classes, verdicts, labels like "y = -10.67") must not break mid-word.
    return NOWRAP if len(text) <= NOWRAP_CHARS else ""


def _width(percent: int | None) -> str:
    return f' width="{percent}%"' if percent else ""


def _table(header: Sequence[str], rows: Sequence[Sequence[str]], empty: str) -> str:
    if not rows:
        return f"<p><i>{escape(empty)}</i></p>"
    widths = WIDTHS.get(header[0])
    widths = widths if widths and len(widths) == len(header) else [None] * len(header)
    head = "".join(
        # One word per line, none broken: a header is never wider than its longest word.
        f'<th bgcolor="#e4e8ec" align="left"{_width(w)}{NOWRAP}>{"<br/>".join(map(escape, h.split()))}</th>'
        for h, w in zip(header, widths, strict=True)
    )
    body = []
    for row in rows:
        cells = []
        for cell in row:
            text = escape(str(cell))
            if cell in (FAIL, "FAIL"):
                text = f'<b><font color="{_VERDICT_COLOURS[FAIL]}">FAIL</font></b>'
            elif cell in (PASS, "PASS"):
                text = f'<font color="{_VERDICT_COLOURS[PASS]}">pass</font>'
            cells.append(f"<td{_nowrap(str(cell))}>{text}</td>")
        body.append("<tr>" + "".join(cells) + "</tr>")
    return (
        '<table border="1" cellspacing="0" cellpadding="3" width="100%" style="border-collapse: collapse; '
        f'font-size: 8pt;"><thead><tr>{head}</tr></thead><tbody>{"".join(body)}</tbody></table>'
    )


def _kv(pairs: Sequence[tuple[str, str]]) -> str:
    rows = "".join(
        f'<tr><td bgcolor="#f0f2f4" width="28%"><b>{escape(k)}</b></td><td>{escape(str(v))}</td></tr>' for k, v in pairs
    )
    return f'<table border="1" cellspacing="0" cellpadding="3" width="100%" style="font-size: 9pt;">{rows}</table>'


def _verdict_box(verdict: str, detail: str) -> str:
    colour = _VERDICT_COLOURS[verdict]
    return (
        f'<table border="0" cellspacing="0" cellpadding="8" width="100%"><tr><td bgcolor="{colour}">'
        f'<font color="white" size="5"><b>{escape(_VERDICT_WORDS[verdict])}</b></font><br/>'
        f'<font color="white">{escape(detail)}</font></td></tr></table>'
    )


def _figure(fig: Figure, image_src: Callable[[str], str], width: int) -> str:
    # Each picture in its own paragraph: Qt lays an inline image over the text above otherwise.
    return (
        f'<p align="center"><img src="{image_src(fig.name)}" width="{width}"/></p>'
        f'<p style="font-size: 8pt;"><i>{escape(fig.caption)}</i></p>'
    )


def _profile_block(review: FileReview) -> str:
    """Every value of the profile, with where it comes from."""
    basis = review.profile.get("basis") or {}
    rows = [
        (str(k), "no limit" if v is None else str(v), str(basis.get(k, "")))
        for k, v in review.profile.items()
        if k != "basis"
    ]
    return _table(["setting", "value", "basis"], rows, "no profile values")


def cover(reviews: Sequence[FileReview], created: str, version: str) -> str:
    files = [
        (
            r.source,  # _table escapes every cell
            r.sha256 or "-",
            f"{r.units} (file: {r.source_units})" if r.source_units else r.units,
            r.verdict.upper() if r.verdict != PASS else PASS,
        )
        for r in reviews
    ]
    overall = overall_verdict({r.verdict for r in reviews})
    checked = [r for r in reviews if r.status == "checked"]
    over = sum(len(r.failures) for r in reviews)
    detail = f"{len(reviews)} file(s), {len(checked)} checked, {over} finding(s) over tolerance"
    profile = checked[0] if checked else (reviews[0] if reviews else None)
    parts = [
        '<h1 style="font-size: 20pt;">Surface fairness review</h1>',
        f"<p>Written by Batten {escape(version)} on {escape(created)}.</p>",
        _verdict_box(overall, detail),
        '<table border="1" cellspacing="0" cellpadding="6" width="100%"><tr><td bgcolor="#fdf6e3">'
        f"<b>About this report.</b> {escape(REVIEW_AID)}</td></tr></table>",
        "<h3>Files reviewed</h3>",
        _table(["file", "sha256", "units", "verdict"], [tuple(f) for f in files], "no files"),
    ]
    if profile is not None:
        spec = profile.sections_spec or "none"
        parts += [
            f"<h3>Tolerance profile and sections</h3><p>Sections cut: <b>{escape(spec)}</b></p>",
            _profile_block(profile),
        ]
    return "".join(parts)


def _glance(review: FileReview) -> str:
    summary = review.summary()
    rows = [
        (kind.replace("_", " "), str(c.get(PASS, 0)), str(c.get(FAIL, 0)))
        + ((str(c.get(ACCEPTED, 0)),) if review.review_file is not None else ())
        for kind, c in sorted(summary["counts"].items())
    ]
    detail = f"{len(review.failures)} finding(s) over tolerance of {len(review.findings)} measured"
    accepted = sum(f.verdict == ACCEPTED for f in review.findings)
    if review.review_file is not None:
        detail += f"; {accepted} more over tolerance but accepted by reviewers (see Accepted by reviewers)"
    curves = [c for s in review.sections for c in s.get("curves", ())]
    inflections = sum(len(c.get("inflections", ())) for c in curves)
    judged = "inflection" in summary["counts"]
    facts = [
        ("faces", str(len(review.faces))),
        ("seams", f"{len(review.seams)} ({sum(s.get('verdict') == FAIL for s in review.seams)} over tolerance)"),
        ("free edges", f"{len(review.free_edges)} (open boundary: listed, not judged)"),
        ("sections", f"{len(review.sections)} planes, {len(curves)} curves"),
        ("inflections", f"{inflections}" + ("" if judged else " (listed and marked; this profile sets no limit)")),
    ]
    parts = [
        _verdict_box(review.verdict, detail),
        "<h3>At a glance</h3>",
        _kv(facts),
        "<p></p>",
        _table(
            ["kind of finding", "within tolerance", "over tolerance"]
            + (["accepted by reviewers"] if review.review_file is not None else []),
            rows,
            "nothing was judged",
        ),
    ]
    return "".join(parts)


def file_part(review: FileReview, figures: Sequence[Figure], image_src: Callable[[str], str], width: int) -> str:
    """The chapter of one file."""
    head = f'<h2 style="page-break-before: always; font-size: 15pt;">{escape(review.source)}</h2>'
    meta = _kv(
        [
            ("file", review.source),
            ("sha256", review.sha256 or "-"),
            ("units", f"{review.units} (declared in file: {review.source_units or '-'})"),
            ("faces", face_account_line(review.face_account) if review.face_account else str(len(review.faces))),
            ("model size (box diagonal)", f"{review.model_size:.4g} mm"),
            ("sections", review.sections_spec or "none"),
        ]
    )
    if review.status != "checked":
        return head + meta + _verdict_box(review.verdict, review.error or "unknown cause")
    by_name = {f.name: f for f in figures}
    parts = [head, meta, _glance(review)]
    header, rows = finding_rows(review)
    parts += ["<h3>Findings over tolerance</h3>", _table(header, rows, "none")]
    within = sum(f.verdict == PASS for f in review.findings)
    if within:
        parts.append(f"<p>{within} more finding(s) within tolerance: see the tables below.</p>")
    if "findings" in by_name:
        parts.append(_figure(by_name["findings"], image_src, OVERVIEW_WIDTH))
    if review.review_file is not None:
        parts.append(dispositions_part(review))
    parts += ["<h3>Seams (worst first)</h3>", _table(*seam_rows(review), "no seams"), SEAMS_NOTE]
    parts += ["<h3>Free edges</h3>", _table(*free_edge_rows(review), "no free edges")]
    parts += ["<h3>Sections: fairness figures</h3>", _table(*figure_rows(review), "no sections"), FIGURES_NOTE]
    parts += ["<h3>Inflections</h3>", _table(*inflection_rows(review), "no inflections found")]
    parts += ["<h3>Curvature extrema</h3>", _table(*extrema_rows(review), "no curvature extrema found"), SIGN_NOTE]
    parts += ["<h3>Faces and curvature ranges</h3>", _table(*face_rows(review), "no faces"), SIGN_NOTE]
    if review.tooling:
        parts += ["<h3>Release to tooling</h3>", _kv(tooling_facts(review)), "<p></p>"]
        parts += [_table(*tooling_rows(review), "no faces"), TOOLING_NOTE]
        parts += ["<h3>Undercut regions</h3>", _table(*undercut_rows(review), "none found")]
    if review.warnings:
        parts.append(
            "<h3>Notes from reading and checking</h3><ul>"
            + "".join(f"<li>{escape(w)}</li>" for w in review.warnings)
            + "</ul>"
        )
    shown = [f for f in figures if f.name != "findings"]
    for pair in range(0, len(shown), FIGURES_PER_PAGE):
        # A fixed number of pictures per page keeps each caption with its picture.
        title = "Pictures" if pair == 0 else "Pictures (continued)"
        parts.append(f'<h3 style="page-break-before: always;">{title}</h3>')
        parts += [_figure(f, image_src, width) for f in shown[pair : pair + FIGURES_PER_PAGE]]
    return "".join(parts)


def image_key(file_index: int, name: str) -> str:
    """The name a picture goes by in the document: unique over all files."""
    return f"f{file_index}-{name}"


def dispositions_part(review: FileReview) -> str:
    """Accepted findings, open items and every disposition of the review file (who, when, why)."""
    return "".join(
        [
            f"<h3>Accepted by reviewers</h3><p>Review file: {escape(review.review_file or '-')}</p>",
            _table(*review_parts.accepted_rows(review), "no finding over tolerance was accepted"),
            "<h3>Open items</h3>",
            _table(*review_parts.open_rows(review), "none: every finding over tolerance was accepted"),
            "<h3>Dispositions</h3>",
            f'<p style="font-size: 8pt;">{escape(review_parts.DISPOSITIONS_NOTE)}</p>',
            _table(*review_parts.disposition_rows(review), "the review file records no disposition"),
        ]
    )


def comparison_part(comparison) -> str:
    """The chapter comparing two revisions: faces, deviation, findings, fairness trend."""
    seams, families = review_parts.trend_rows(comparison)
    return "".join(
        [
            '<h2 style="page-break-before: always; font-size: 15pt;">Comparison with the previous revision</h2>',
            _kv(review_parts.comparison_summary(comparison)),
            "<h3>Findings since the previous revision</h3>",
            _table(*review_parts.finding_change_rows(comparison), "no finding over tolerance in either revision"),
            "<h3>Deviation by face</h3>",
            f'<p style="font-size: 8pt;">{escape(review_parts.DEVIATION_NOTE)}</p>',
            _table(*review_parts.deviation_rows(comparison), "no face measured"),
            "<h3>Faces</h3>",
            _table(*review_parts.face_change_rows(comparison), "no faces"),
            "<h3>Seams, before and after</h3>",
            _table(*seams, "no seams"),
            "<h3>Section families, before and after</h3>",
            _table(*families, "no sections"),
            FIGURES_NOTE,
        ]
    )


def sign_off(reviewers: Sequence[str] = ()) -> str:
    """The sign-off block: one set of lines per reviewer named in the review file (or one blank set)."""
    names = list(reviewers) or [""]
    blocks = []
    for name in names:
        rows = [("reviewed by", name), ("role", ""), ("date", ""), ("decision and remarks", ""), ("signature", "")]
        blocks.append(_kv(rows) + "<p></p>")
    return '<h3 style="page-break-before: always;">Review sign-off</h3>' + "".join(blocks)


def document(
    reviews: Sequence[FileReview],
    figures: Sequence[Sequence[Figure]],
    image_src: Callable[[str], str],
    created: str,
    version: str,
    image_width: int = 470,
    comparison=None,
) -> str:
    """The whole review as one HTML document: cover, a comparison when one was made, a chapter per file, sign-off."""
    body = [cover(reviews, created, version)]
    if comparison is not None:
        body.append(comparison_part(comparison))
    for index, (review, figs) in enumerate(zip(reviews, figures, strict=True)):
        body.append(file_part(review, figs, lambda name, i=index: image_src(image_key(i, name)), image_width))
    body.append(sign_off(tuple(dict.fromkeys(name for r in reviews for name in r.reviewers))))
    return (
        '<html><head><meta charset="utf-8"/><title>Surface fairness review</title></head>'
        '<body style="font-family: sans-serif; font-size: 10pt;">' + "".join(body) + "</body></html>"
    )
