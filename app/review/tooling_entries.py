"""The tooling checks of a review: draft, undercut and cutter reach, as JSON entries and findings.

The limits come from the profile's ``[tooling]`` values (``pull``, ``draft_min_deg``,
``cutter_radius_mm``; None skips a check); ``--pull`` overrides the profile's direction.
Without a pull direction only cutter reach runs (it needs none).
"""

from __future__ import annotations

import math

from app.profiles import Profile
from geometry.model import Model
from geometry.tooling import ToolingAnalysis, analyse_tooling

from .result import FAIL, PASS, Finding, Kind

# pull used when only cutter reach runs: any direction does, nothing depends on it then
_ANY_PULL = (0.0, 0.0, 1.0)


def _xyz(p) -> list[float] | None:
    return None if p is None else [float(c) for c in p]


def _number(x: float) -> float | None:
    return float(x) if math.isfinite(x) else None


def pull_in_force(profile: Profile, override) -> tuple[tuple[float, float, float] | None, str]:
    """The pull direction a check uses and where it comes from ("--pull", "profile" or "none")."""
    if override is not None:
        return tuple(float(c) for c in override), "--pull"
    pull = profile.values.get("pull")
    return (tuple(float(c) for c in pull), "profile") if pull else (None, "none")


def run_tooling(model: Model, profile: Profile, override=None) -> ToolingAnalysis | None:
    """The tooling analysis of a model under a profile, or None when every check is skipped."""
    pull, _ = pull_in_force(profile, override)
    draft_min = profile.limit("draft_min_deg")
    cutter = profile.limit("cutter_radius_mm")
    if pull is None and cutter is None:
        return None
    return analyse_tooling(
        model,
        pull if pull is not None else _ANY_PULL,
        draft_min if pull is not None else None,
        cutter,
        undercuts=pull is not None,
        curves=pull is not None,
    )


def tooling_entry(model: Model, analysis: ToolingAnalysis | None, source: str) -> dict | None:
    """The ``tooling`` entry of a file in the check JSON (see ``app/report/check_schema.json``)."""
    if analysis is None:
        return None
    drafted = source != "none"
    names = [f.name for f in model.faces]
    faces = []
    for f in analysis.faces:
        faces.append(
            {
                "face": f.face,
                "name": names[f.face],
                "area_mm2": f.area,
                "draft_range_deg": [_number(f.draft_min_deg), _number(f.draft_max_deg)] if drafted else None,
                "least_draft_deg": _number(f.least_draft_deg) if drafted else None,
                "least_draft_at": _xyz(f.least_draft_at) if drafted else None,
                "insufficient_area_mm2": f.insufficient_area if drafted else None,
                "undercut_area_mm2": f.undercut_area if drafted else None,
                "concave_radius_mm": _number(f.concave_radius_mm),
                "concave_at": _xyz(f.concave_at),
                "out_of_reach_area_mm2": f.out_of_reach_area,
            }
        )
    return {
        "pull": _xyz(analysis.pull) if drafted else None,
        "pull_source": source,
        "draft_min_deg": analysis.draft_min_deg,
        "cutter_radius_mm": analysis.cutter_radius_mm,
        "insufficient_area_mm2": analysis.insufficient_area if drafted else None,
        "undercut_area_mm2": analysis.undercut_area if drafted else None,
        "concave_radius_mm": _number(analysis.concave_radius_mm),
        "faces": faces,
        "undercuts": [
            {"face": r.face, "name": names[r.face], "area_mm2": r.area, "centre": list(r.centre), "samples": r.samples}
            for r in analysis.regions
        ],
        "zero_draft_curves": [
            {"face": c.face, "name": names[c.face], "length_mm": c.length, "closed": c.closed, "points": len(c.points)}
            for c in analysis.zero_draft
        ],
    }


def _face_label(entry: dict) -> str:
    return f"face {entry['face']}" + (f" {entry['name']}" if entry["name"] else "")


def tooling_findings(entry: dict | None) -> list[Finding]:
    """Findings of the tooling entry: draft per face, each undercut region, cutter reach per concave face."""
    if entry is None:
        return []
    found = []
    draft_min, cutter = entry["draft_min_deg"], entry["cutter_radius_mm"]
    for index, face in enumerate(entry["faces"]):
        label, ref = _face_label(face), {"tooling_face": index}
        if draft_min is not None and face["least_draft_deg"] is not None:
            short = face["insufficient_area_mm2"] > 0
            found.append(
                Finding(
                    Kind.DRAFT,
                    f"{label}: {face['insufficient_area_mm2']:.4g} mm^2 below {draft_min:g} deg",
                    "least draft",
                    face["least_draft_deg"],
                    draft_min,
                    "deg",
                    FAIL if short else PASS,
                    tuple(face["least_draft_at"]),
                    ref,
                )
            )
        if cutter is not None and face["concave_radius_mm"] is not None:
            found.append(
                Finding(
                    Kind.CUTTER_REACH,
                    f"{label}: tightest concave radius against a {cutter:g} mm ball-end cutter",
                    "concave radius",
                    face["concave_radius_mm"],
                    cutter,
                    "mm",
                    FAIL if face["out_of_reach_area_mm2"] > 0 else PASS,
                    tuple(face["concave_at"]),
                    ref,
                )
            )
    for index, region in enumerate(entry["undercuts"]):
        found.append(
            Finding(
                Kind.UNDERCUT,
                f"{_face_label(region)}: undercut region {index + 1}",
                "undercut area",
                region["area_mm2"],
                0.0,
                "mm^2",
                FAIL,
                tuple(region["centre"]),
                {"undercut": index},
            )
        )
    return found
