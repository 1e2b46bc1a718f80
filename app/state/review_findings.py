"""The window's findings, judged by the same review code as ``batten check``.

Seams and free edges are measured by :func:`app.review.seam_entries.seams_and_free_edges`
against the profile in force, and the verdicts come from
:func:`app.review.findings.collect`, exactly as the check computes them; this
module only turns them into list entries the window can show and focus.
Entries the check does not judge (the points of each inflection, section
curvature extrema, each face's tightest spot) are listed as notes.

Faces are named by their names in the file; an unnamed face is ``face N``
counted from 0, as ``batten probe --face N`` counts them.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from app.profiles import Profile
from app.review import findings as review
from app.review.faces import curvature_range, unevaluable_reason
from app.review.result import Kind, Verdict
from app.review.seam_entries import FreeEdgeEntry, SeamEntry, seams_and_free_edges
from app.review.section_entries import CutSections
from geometry.model import Model
from geometry.sections import SectionCurve

from .results import FaceSamples, FindingEntry, SeamView


def face_label(model: Model, index: int) -> str:
    """The face's name from the file, or ``face N`` (N from 0, as on the command line)."""
    name = model.faces[index].name if 0 <= index < len(model.faces) else ""
    return name or f"face {index}"


@dataclass(frozen=True, eq=False)
class SeamReview:
    """Seams and free edges of a model measured against one profile (the check's own entries).

    Attributes
    ----------
    profile : Profile
    seams : tuple of app.review.seam_entries.SeamEntry
    free_edges : tuple of app.review.seam_entries.FreeEdgeEntry
    lines : tuple of app.review.seam_entries.Line
        Seams first (in ``seams`` order), then free edges.
    views : tuple of SeamView
        The same lines, coloured by verdict in the view.
    """

    profile: Profile
    seams: tuple[SeamEntry, ...]
    free_edges: tuple[FreeEdgeEntry, ...]
    lines: tuple
    views: tuple[SeamView, ...]


def review_seams(model: Model, profile: Profile, progress=None) -> SeamReview:
    """Measure every seam and free edge of ``model`` under ``profile`` (as ``batten check`` does).

    ``progress(done, total)`` is called as seams are measured.
    """
    seams, free, lines, _ = seams_and_free_edges(model, profile, progress)
    views = []
    for seam, line in zip(seams, lines[: len(seams)], strict=True):
        label = f"seam {' / '.join(seam.face_names)}: {seam.result.continuity}, {seam.result.verdict}"
        views.append(SeamView(np.asarray(line.points, float), seam.result.verdict, label))
    for edge, line in zip(free, lines[len(seams) :], strict=True):
        views.append(SeamView(np.asarray(line.points, float), "free", f"free edge of {edge.face_name}"))
    return SeamReview(profile, tuple(seams), tuple(free), tuple(lines), tuple(views))


def cut_sections(curves: tuple[SectionCurve, ...], where: tuple[tuple[int, int], ...]) -> CutSections:
    """The window's section curves as the check's findings take them, planes labelled from 1.

    Parameters
    ----------
    curves : tuple of SectionCurve
    where : tuple of (plane, curve) index pairs, one per curve (both from 0)
    """
    planes = 1 + max((p for p, _ in where), default=-1)
    return CutSections(tuple(str(p + 1) for p in range(planes)), tuple(curves), tuple(where))


def curve_label(where: tuple[int, int]) -> str:
    """``section P, curve C`` (both from 1, as the report and the check number them)."""
    return f"section {where[0] + 1}, curve {where[1] + 1}"


def _measured(f, value: float | None = None) -> str:
    value = f.value if value is None else value
    if f.unit == "fraction":
        limit = "" if f.limit is None else f", limit {100 * f.limit:g} %"
        return f"{f.measure} {100 * value:.3g} %{limit}"
    limit = "" if f.limit is None else f", limit {f.limit:g} {f.unit}"
    return f"{f.measure} {value:.4g} {f.unit}{limit}"


def judged_findings(
    model: Model,
    seams: SeamReview | None,
    curves: tuple[SectionCurve, ...],
    where: tuple[tuple[int, int], ...],
    profile: Profile,
) -> list[FindingEntry]:
    """The check's own findings for what the window shows, as list entries.

    Parameters
    ----------
    model : Model
    seams : SeamReview or None
        None until the seams are measured.
    curves : tuple of SectionCurve
        The window's section curves.
    where : tuple of (plane, curve) pairs, one per curve
    profile : Profile
    """
    seam_entries = seams.seams if seams is not None else ()
    free = seams.free_edges if seams is not None else ()
    flat = {pair: n for n, pair in enumerate(where)}
    found = []
    for f in review.collect(seam_entries, cut_sections(curves, where), profile):
        position = None if f.where is None else np.asarray(f.where, float)
        detail = f"{_measured(f)}; profile {profile.name}"
        if f.kind == Kind.SEAM and "seam" in f.ref:
            seam = seam_entries[f.ref["seam"]].result
            names = " / ".join(seam_entries[f.ref["seam"]].face_names)
            crease = ", designed crease" if seam.crease else ""
            title = f"seam {names}: {seam.continuity}{crease}"
            reasons = "; ".join(seam.reasons)
            detail += f" ({reasons})" if reasons else ""
            path = np.asarray(seams.lines[f.ref["seam"]].points, float)
            position = np.asarray(seam.worst_position, float) if position is None else position
            extent = max(seam.length / 4, 1.0)
            place = names
        elif f.kind == Kind.INFLECTION and (f.ref.get("section"), f.ref.get("curve")) in flat:
            curve = curves[flat[f.ref["section"], f.ref["curve"]]]
            count = int(f.value)
            title = f"{f.subject}: {count} inflection{'s' * (count != 1)}, limit {f.limit:g}"
            path = curve.points
            position = curve.points[len(curve.points) // 2] if position is None else position
            extent = max(curve.length / 4, 1.0)
            place = f.subject
        else:  # a kind this window does not know yet: show it as the check words it
            title, path, extent = f"{f.subject}: {_measured(f)}", np.zeros((0, 3)), 10.0
            position = np.zeros(3) if position is None else position
            place = ""
        found.append(FindingEntry(f.kind, title, f.verdict, position, extent, detail, path, place))
    for edge, line in zip(free, seams.lines[len(seam_entries) :] if seams else (), strict=True):
        points = np.asarray(line.points, float)
        title = f"free edge of {edge.face_name}, {edge.length:.1f} mm"
        extent = max(edge.length / 4, 1.0)
        detail = f"free edge of {edge.face_name}: {edge.length:.2f} mm long, no neighbouring face"
        middle = points[len(points) // 2]
        found.append(FindingEntry(Kind.FREE_EDGE, title, Verdict.NOTE, middle, extent, detail, points, edge.face_name))
    return found


def section_notes(curves: tuple[SectionCurve, ...], where: tuple[tuple[int, int], ...]) -> list[FindingEntry]:
    """Each inflection and each curvature extremum of the section curves, as notes to click."""
    found = []
    for curve, pair in zip(curves, where, strict=True):
        label = curve_label(pair)
        extent = max(curve.length / 10, 1.0)
        marks = curve.inflections
        for p, s, seam in zip(marks.points, marks.arc_length, marks.at_seam, strict=True):
            across = " (across a seam)" if seam else ""
            title = f"{label}: inflection at s = {s:.1f} mm{across}"
            found.append(FindingEntry(Kind.INFLECTION, title, Verdict.NOTE, p, extent, place=label))
        ext = curve.extrema
        for p, s, k, top in zip(ext.points, ext.arc_length, ext.curvature, ext.is_maximum, strict=True):
            radius = f", radius {1 / abs(k):.4g} mm" if k else ""
            title = f"{label}: curvature {'max' if top else 'min'} {k:.3g} at s = {s:.1f} mm"
            detail = f"curvature {'maximum' if top else 'minimum'} along {label}: {k:.5g} 1/mm{radius}, s = {s:.2f} mm"
            found.append(FindingEntry(Kind.SECTION_EXTREMUM, title, Verdict.NOTE, p, extent, detail, place=label))
    return found


def face_ranges(samples: tuple[FaceSamples, ...]) -> tuple:
    """Each face's curvature range (:func:`app.review.faces.curvature_range`, None where nothing evaluates).

    The one pass over the samples that :func:`curvature_extremes` and :func:`unchecked_faces` read.
    """
    return tuple(curvature_range(s.field, s.inside) for s in samples)


def curvature_extremes(model: Model, samples: tuple[FaceSamples, ...], face_range: tuple) -> list[FindingEntry]:
    """The tightest spot (largest max |k|) of each face, tightest face first.

    The radius is the face range's (``face_range``, from :func:`face_ranges`),
    the one ``batten summary`` and ``batten check`` print.
    """
    found = []
    for s, ranges in zip(samples, face_range, strict=True):
        if ranges is None or ranges.min_radius is None:
            continue
        i, j = ranges.tightest
        k = ranges.max_abs
        title = f"{face_label(model, s.face)}: tightest radius {ranges.min_radius:.3g} mm"
        detail = f"max |k| {k:.4g} 1/mm (k1 {s.field.k1[i, j]:.4g}, k2 {s.field.k2[i, j]:.4g})"
        extent = min(10.0 / k, float(np.ptp(s.field.points[s.inside], axis=0).max()) or 10.0)
        where = s.field.points[i, j]
        entry = FindingEntry(
            Kind.CURVATURE, title, Verdict.NOTE, where, extent, detail, place=face_label(model, s.face)
        )
        found.append((k, entry))
    return [f for _, f in sorted(found, key=lambda pair: -pair[0])]


def unchecked_faces(model: Model, samples: tuple[FaceSamples, ...], face_range: tuple) -> list[FindingEntry]:
    """A failing entry for each face not checked: none of its samples evaluates, or the reader left it out.

    The same findings as ``batten check`` gives (:func:`app.review.findings.face_findings`);
    ``face_range`` is :func:`face_ranges` of the samples.
    """
    unevaluable = [
        (s.face, unevaluable_reason(model.faces[s.face]))
        for s, ranges in zip(samples, face_range, strict=True)
        if ranges is None
    ]
    centre = model.bounds.mean(axis=0)
    found = []
    for n, f in enumerate(review.face_findings(unevaluable, model.skipped)):
        # an unevaluable face is in the model (focus on its control net); a skipped one is not
        inside = n < len(unevaluable)
        where = model.faces[unevaluable[n][0]].surface.poles.reshape(-1, 3).mean(axis=0) if inside else centre
        place = face_label(model, unevaluable[n][0]) if inside else "left out by the reader"
        extent = max(model.size / 4, 1.0)
        found.append(FindingEntry(f.kind, f.subject, f.verdict, where, extent, f.subject, place=place))
    return found
