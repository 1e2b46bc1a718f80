"""The review document as HTML, shared by the PDF and the HTML report.

The document is a cover, a chapter per file and a sign-off page. A chapter is
the list :data:`CHAPTER` of small functions, each writing one section of it
from a :class:`Chapter`; a new analysis adds its section there. Pictures are
referred to through ``image_src(name)``: a data URI in the HTML file, a
document resource in the PDF.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass

from app.review.result import ACCEPTED, FileReview, face_account_line, overall_verdict
from geometry.conventions import CURVATURE_SIGN

from . import blocks, review_parts
from .figures import Figure
from .settings_text import profile_origin, profile_rows, sections_sentence
from .tables import (
    SEAMS_WITHIN_LISTED,
    WIDTHS,
    checked_rows,
    extrema_rows,
    face_rows,
    figure_rows,
    file_rows,
    finding_rows,
    free_edge_rows,
    inflection_rows,
    listed_tooling_faces,
    seam_rows,
    tooling_facts,
    tooling_rows,
    undercut_rows,
)
from .wording import Markup, count_words, plural, quantity

TITLE = "Surface fairness review"
REVIEW_AID = (
    "This report is an aid to a surface review, not a release decision. The measurements compare the surfaces "
    "with the tolerance profile named below; whether a surface is fit for tooling is decided by your "
    "organisation's own surface quality standard, its tolerances and the people who sign the review. Where "
    "that standard differs from the profile used here, the standard governs."
)
# The overview picture shares the chapter's findings page: a little smaller.
OVERVIEW_WIDTH = 380
SEAMS_NOTE = (
    "Largest values along each seam: the gap between the faces, the angle between their normals, and the jump "
    "of the normal curvature across the seam (Jump), in 1/mm and as a share of the larger of the two curvatures. "
    "Continuity reached: the highest class whose tolerances the seam meets (none: the faces do not meet in "
    "position)."
)
FIGURES_NOTE = (
    "Inflections and extrema: how many points along the curve where the curvature changes sign, and where it "
    "is largest or smallest. Monotone pieces: stretches along which the curvature only rises or only falls; a "
    "fair curve has few (Farin, Curves and Surfaces for CAGD, 5th ed., sec. 23.1). Variation: the integral "
    "\u222b(dk/ds)\u00b2 ds of the squared rate of change of curvature along the curve, smaller for a fairer curve "
    "(after Moreton and Sequin's minimum variation idea)."
)


SIGN_NOTE = (
    f"Sign of every curvature in this report (maps, sections, graphs, combs, tables): {CURVATURE_SIGN}, exactly "
    "as in the window's colour map."
)


def model_name(review: FileReview) -> str:
    """The name a file goes by on the page: its file name."""
    return os.path.basename(review.source) or review.source


@dataclass(frozen=True)
class Chapter:
    """What the sections of one file's chapter are written from."""

    review: FileReview
    figures: dict[str, Figure]
    image_src: Callable[[str], str]
    width: int


def _files_detail(reviews: Sequence[FileReview]) -> str:
    checked = sum(r.status == "checked" for r in reviews)
    over = sum(len(r.failures) for r in reviews)
    done = "checked" if checked == len(reviews) else f"{checked} checked"
    if len(reviews) == 1:
        done = "checked" if checked else "not checked"
    return f"{plural(len(reviews), 'file')} {done}; {count_words(over, 'finding')} over tolerance"


def _profile_part(review: FileReview) -> str:
    return "".join(
        [
            blocks.heading("Tolerance profile and sections"),
            blocks.paragraph(f"Profile in force: {profile_origin(review.profile)}."),
            blocks.table(
                ["Requirement", "Basis"], profile_rows(review.profile), "The profile sets no values.", WIDTHS["profile"]
            ),
            blocks.paragraph(sections_sentence(review.sections_spec)),
        ]
    )


def cover(reviews: Sequence[FileReview], created: str, version: str) -> str:
    overall = overall_verdict({r.verdict for r in reviews})
    checked = [r for r in reviews if r.status == "checked"]
    parts = [
        blocks.heading(TITLE, level=1),
        blocks.paragraph(f"Written by Batten {version} on {created}."),
        blocks.verdict_box(overall, _files_detail(reviews)),
        blocks.notice("About this report.", REVIEW_AID),
        blocks.heading("Files reviewed"),
        blocks.table(*file_rows(reviews), "No files were given.", WIDTHS["files"]),
    ]
    if checked or reviews:
        parts.append(_profile_part((checked or reviews)[0]))
    return "".join(parts)


# -- the sections of a file's chapter -------------------------------------------------------------------
def _hash(review: FileReview) -> str:
    # a size smaller, so the 64 digits stay on one line for a reader who compares them
    return Markup(f'<span style="font-size: 8pt;">{review.sha256}</span>') if review.sha256 else "-"


def file_facts(ch: Chapter) -> str:
    r = ch.review
    if r.status != "checked":
        return blocks.facts([("File", r.source), ("SHA-256 of the file", _hash(r))])
    declared = f"{r.units} (the file declares {r.source_units})" if r.source_units else r.units
    pairs = [
        ("File", r.source),
        ("SHA-256 of the file", _hash(r)),
        ("Units", declared),
        ("Faces", face_account_line(r.face_account) if r.face_account else plural(len(r.faces), "face")),
        ("Model size", f"{quantity(r.model_size, 'mm')} (diagonal of the bounding box)"),
        ("Sections", sections_sentence(r.sections_spec)),
    ]
    if r.profile:
        pairs.append(("Tolerance profile", str(r.profile.get("title") or r.profile.get("name"))))
    return blocks.facts(pairs)


def verdict(ch: Chapter) -> str:
    r = ch.review
    detail = f"{count_words(len(r.failures), 'finding')} over tolerance, of {plural(len(r.findings), 'finding')} judged"
    if r.review_file is not None:
        accepted = sum(f.verdict == ACCEPTED for f in r.findings)
        if accepted:
            detail += f"; {plural(accepted, 'more finding')} over tolerance but accepted by reviewers"
        else:
            detail += "; reviewers accepted none over tolerance"
    return blocks.verdict_box(r.verdict, detail)


def not_checked(review: FileReview) -> list[str]:
    """What this check did not look at, and why: each a sentence."""
    out = []
    if not review.sections:
        out.append("No section planes were cut, so no inflections or curvature extrema along sections were sought.")
    if review.profile.get("section_inflections_max") is None and review.sections:
        out.append("Inflections are listed and marked, not judged: the profile sets no limit for them.")
    if review.free_edges:
        out.append("Free edges (open boundaries) are listed for the reviewer, not judged.")
    if not review.tooling:
        out.append("Draft and undercut for tooling were not part of this check.")
    elif review.tooling.get("pull") is None:
        out.append(
            "Draft and undercut were not checked: no pull direction was given (the profile sets none). "
            "Concave radii against the cutter were checked."
        )
    if review.warnings:
        out.append(
            f"Reading and checking left {plural(len(review.warnings), 'note')}, listed at the end of this chapter "
            "(faces that were skipped are named there with the reason)."
        )
    else:
        out.append("Every face of the file was read and checked; none was skipped.")
    return out


def checked(ch: Chapter) -> str:
    return "".join(
        [
            blocks.heading("What was checked"),
            blocks.table(*checked_rows(ch.review), "Nothing was checked.", WIDTHS["checked"]),
            blocks.paragraph("Not checked, or checked without a verdict:"),
            blocks.bullets(not_checked(ch.review)),
        ]
    )


def findings(ch: Chapter) -> str:
    header, rows = finding_rows(ch.review)
    parts = [blocks.heading("Findings over tolerance"), blocks.table(header, rows, "None.", WIDTHS["findings"])]
    within = len(ch.review.findings) - len(rows)
    if within:
        where = "see the tables below"
        if seam_rows(ch.review, SEAMS_WITHIN_LISTED)[2]:
            where += " (of the seams within tolerance, the seam table lists the nearest misses)"
        parts.append(blocks.paragraph(f"{plural(within, 'more finding')} within tolerance: {where}."))
    if "findings" in ch.figures:
        fig = ch.figures["findings"]
        parts.append(blocks.figure(ch.image_src(fig.name), fig.caption, OVERVIEW_WIDTH))
    return "".join(parts)


def dispositions(ch: Chapter) -> str:
    """Accepted findings, open items and every decision of the review file (who, when, why)."""
    review = ch.review
    if review.review_file is None:
        return ""
    return "".join(
        [
            blocks.heading("Accepted by reviewers"),
            blocks.paragraph(f"Review file: {review.review_file}"),
            blocks.table(*review_parts.accepted_rows(review), "No finding over tolerance was accepted."),
            blocks.heading("Open items"),
            blocks.table(*review_parts.open_rows(review), "None: every finding over tolerance was accepted."),
            blocks.heading("Reviewers' decisions"),
            blocks.paragraph(review_parts.DISPOSITIONS_NOTE, small=True),
            blocks.table(*review_parts.disposition_rows(review), "The review file records no decision."),
        ]
    )


def seams(ch: Chapter) -> str:
    header, rows, left_out = seam_rows(ch.review, SEAMS_WITHIN_LISTED)
    parts = [
        blocks.heading("Seams, worst first"),
        blocks.table(header, rows, "The model has no seams between faces.", WIDTHS["seams"]),
    ]
    if left_out:
        parts.append(
            blocks.paragraph(
                f"{plural(left_out, 'more seam')} within tolerance, better than those above, not listed; the "
                "check's JSON record (batten check --json) lists every seam."
            )
        )
    if rows:
        parts.append(blocks.paragraph(SEAMS_NOTE, small=True))
    return "".join(parts)


def free_edges(ch: Chapter) -> str:
    empty = "None: every edge of every face is shared with another face."
    return blocks.heading("Free edges (open boundary)") + blocks.table(
        *free_edge_rows(ch.review), empty, WIDTHS["free_edges"]
    )


def section_figures(ch: Chapter) -> str:
    header, rows = figure_rows(ch.review)
    parts = [
        blocks.heading("Section curves: fairness figures"),
        blocks.table(header, rows, "No sections were cut.", WIDTHS["figures"]),
    ]
    if rows:
        parts.append(blocks.paragraph(FIGURES_NOTE, small=True))
    return "".join(parts)


def inflections(ch: Chapter) -> str:
    empty = "None of the section curves has an inflection." if ch.review.sections else "No sections were cut."
    return blocks.heading("Inflections of the section curves") + blocks.table(
        *inflection_rows(ch.review), empty, WIDTHS["inflections"]
    )


def extrema(ch: Chapter) -> str:
    empty = "No curvature extrema along the sections." if ch.review.sections else "No sections were cut."
    header, rows = extrema_rows(ch.review)
    parts = [
        blocks.heading("Curvature extrema along the sections"),
        blocks.table(header, rows, empty, WIDTHS["extrema"]),
    ]
    if rows:
        parts.append(blocks.paragraph(SIGN_NOTE, small=True))
    return "".join(parts)


def faces(ch: Chapter) -> str:
    header, rows = face_rows(ch.review)
    table = blocks.table(header, rows, "The model has no faces.", WIDTHS["faces"])
    note = blocks.paragraph(SIGN_NOTE, small=True) if rows else ""
    return blocks.heading("Faces and their curvature") + table + note


TOOLING_NOTE = (
    "Draft: the angle between the surface and the pull direction, asin(n \u00b7 pull) with the outward normal, "
    "signed (positive: the face leaves with the mould half moving along the pull); short of draft: area whose "
    "|draft| is below the limit. Undercut: area whose straight path out along its release direction meets the "
    "part again. Tightest concave radius: 1 / the largest positive principal curvature; out of cutter reach: area "
    "a ball-end cutter of the profile's radius cannot finish. Sharp inside creases are not curvature and are not "
    "judged here. The limits are common practice; your organisation's tooling standard decides."
)


NO_TOOLING_REMARK = "No face is short of draft, undercut or out of the cutter's reach."


def _quiet_faces(review: FileReview) -> str:
    listed, left_out = listed_tooling_faces(review)
    if not left_out or not listed:
        return ""  # nothing left out, or nothing listed at all (the table's own sentence says so)
    return blocks.paragraph(
        f"{plural(left_out, 'more face')}: nothing short of draft, no undercut and nothing out of the cutter's "
        "reach; not listed."
    )


def tooling(ch: Chapter) -> str:
    r = ch.review
    if not r.tooling:
        return ""
    return "".join(
        [
            blocks.heading("Release to tooling"),
            blocks.facts(tooling_facts(r)),
            blocks.table(*tooling_rows(r), NO_TOOLING_REMARK),
            _quiet_faces(r),
            blocks.paragraph(TOOLING_NOTE, small=True),
        ]
        # without a pull no undercut was sought: "What was checked" says so, no heading stands over nothing
        + (
            [blocks.heading("Undercut regions"), blocks.table(*undercut_rows(r), "None found.")]
            if r.tooling.get("pull") is not None
            else []
        )
    )


def notes(ch: Chapter) -> str:
    if not ch.review.warnings:
        return ""
    return blocks.heading("Notes from reading and checking") + blocks.bullets(ch.review.warnings)


def pictures(ch: Chapter) -> str:
    shown = [f for f in ch.figures.values() if f.name != "findings"]
    if not shown:
        return ""
    parts = [blocks.heading("Pictures", new_page=True)]
    parts += [blocks.figure(ch.image_src(f.name), f.caption, ch.width) for f in shown]
    return "".join(parts)


# The sections of a file's chapter, in reading order.
CHAPTER: tuple[Callable[[Chapter], str], ...] = (
    file_facts,
    verdict,
    checked,
    findings,
    dispositions,
    seams,
    free_edges,
    section_figures,
    inflections,
    extrema,
    faces,
    tooling,
    notes,
    pictures,
)


def file_part(review: FileReview, figures: Sequence[Figure], image_src: Callable[[str], str], width: int) -> str:
    """The chapter of one file."""
    head = blocks.heading(model_name(review), level=2, new_page=True)
    if review.status != "checked":
        return (
            head
            + file_facts(Chapter(review, {}, image_src, width))
            + blocks.verdict_box(review.verdict, review.error or "unknown cause")
        )
    chapter = Chapter(review, {f.name: f for f in figures}, image_src, width)
    return head + "".join(section(chapter) for section in CHAPTER)


def image_key(file_index: int, name: str) -> str:
    """The name a picture goes by in the document: unique over all files."""
    return f"f{file_index}-{name}"


def comparison_part(comparison) -> str:
    """The chapter comparing two revisions: faces, deviation, findings, fairness trend."""
    seam_trend, families = review_parts.trend_rows(comparison)
    return "".join(
        [
            blocks.heading("Comparison with the previous revision", level=2, new_page=True),
            blocks.facts(review_parts.comparison_summary(comparison)),
            blocks.heading("Findings since the previous revision"),
            blocks.table(
                *review_parts.finding_change_rows(comparison), "No finding over tolerance in either revision."
            ),
            blocks.heading("Deviation by face"),
            blocks.paragraph(review_parts.DEVIATION_NOTE, small=True),
            blocks.table(*review_parts.deviation_rows(comparison), "No face was measured."),
            blocks.heading("Faces"),
            blocks.table(*review_parts.face_change_rows(comparison), "The models have no faces."),
            blocks.heading("Seams, before and after"),
            blocks.table(*seam_trend, "Neither revision has seams between faces."),
            blocks.heading("Section families, before and after"),
            blocks.table(*families, "No sections were cut."),
            blocks.paragraph(FIGURES_NOTE, small=True),
        ]
    )


SIGN_OFF = "Review sign-off"


def sign_off(reviewers: Sequence[str] = ()) -> str:
    """The sign-off block: one set of lines per reviewer named in the review file (or one blank set)."""
    parts = [blocks.heading(SIGN_OFF, level=2, new_page=True)]
    for name in list(reviewers) or [""]:
        rows = [("Reviewed by", name), ("Role", ""), ("Date", ""), ("Decision and remarks", ""), ("Signature", "")]
        parts.append(blocks.facts(rows))
    return "".join(parts)


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
        f'<html><head><meta charset="utf-8"/><title>{TITLE}</title></head>'
        '<body style="font-family: sans-serif; font-size: 10pt;">' + "".join(body) + "</body></html>"
    )
