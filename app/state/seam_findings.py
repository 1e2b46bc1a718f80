"""Seams and free edges for the window, from the core's seam analysis (:mod:`geometry.seams`)."""

from __future__ import annotations

import numpy as np

from geometry.model import Model
from geometry.seam_tolerance import SeamTolerance
from geometry.seams import SeamReport, SeamResult, check_seams

from .profiles import get_profile
from .results import Finding, SeamView

# measure key of SeamResult.worst -> tolerance field it is judged against
JUDGED = (("gap", "position_mm"), ("angle", "tangent_deg"), ("curvature_jump_rel", "curvature_relative"))
MEASURE_WORDS = {"gap": "gap", "angle": "angle", "curvature_jump_rel": "curvature jump"}


def seam_tolerance(profile: str | None = None) -> SeamTolerance:
    """Tolerances of a named or file profile (default: the shipped default profile)."""
    return get_profile(profile).tolerance


def worst_place(seam: SeamResult) -> tuple[str, np.ndarray]:
    """The measure furthest over (or nearest to) its tolerance, and where it is largest."""
    tol = seam.tolerance

    def ratio(pair):
        value = seam.worst[pair[0]].value
        return value / getattr(tol, pair[1]) if np.isfinite(value) and getattr(tol, pair[1]) > 0 else -1.0

    key = max(JUDGED, key=ratio)[0]
    return key, np.asarray(seam.worst[key].xyz, float)


def describe(seam: SeamResult) -> str:
    parts = [
        f"gap {seam.worst['gap'].value:.4g} mm",
        f"angle {seam.worst['angle'].value:.3g} deg",
        f"curvature jump {100 * seam.worst['curvature_jump_rel'].value:.3g} %",
    ]
    reasons = "; ".join(seam.reasons)
    return ", ".join(parts) + (f" ({reasons})" if reasons else "") + f"; profile {seam.tolerance.name}"


def seams_from_report(report: SeamReport) -> tuple[tuple[SeamView, ...], tuple[Finding, ...]]:
    """Lines coloured by verdict, and one finding per seam and free edge."""
    seams, findings = [], []
    for seam in report.seams:
        faces = " / ".join(str(f + 1) for f in seam.faces)
        label = f"seam {faces}: {seam.continuity}, {seam.verdict}"
        seams.append(SeamView(np.asarray(seam.points, float), seam.verdict, label))
        measure, where = worst_place(seam)
        title = f"seam {faces}: {seam.continuity}, worst {MEASURE_WORDS[measure]}"
        findings.append(
            Finding("seam", title, seam.verdict, where, max(seam.length / 4, 1.0), describe(seam), seam.points)
        )
    for edge in report.free_edges:
        label = f"free edge of face {edge.face + 1}, {edge.length:.1f} mm"
        seams.append(SeamView(np.asarray(edge.points, float), "free", label))
        middle = edge.points[len(edge.points) // 2]
        findings.append(Finding("free edge", label, "note", middle, max(edge.length / 4, 1.0), "", edge.points))
    return tuple(seams), tuple(findings)


def analyse_seams(model: Model, profile: str | None = None) -> tuple[tuple[SeamView, ...], tuple[Finding, ...]]:
    """Seams (coloured by verdict) and the seam and free-edge findings of a model."""
    return seams_from_report(check_seams(model, seam_tolerance(profile)))
