"""The window's tooling view: draft, undercut and cutter reach for the pull on screen.

The numbers are the check's own: :func:`app.review.tooling_entries.run_tooling` computes
them with the window's pull as the override (same grids, limits from the profile in force) and
:func:`app.review.tooling_entries.tooling_findings` judges them; this module turns the
findings into list entries the window can show and focus.
"""

from __future__ import annotations

import numpy as np

from app.profiles import Profile
from app.review.tooling_entries import tooling_entry, tooling_findings
from geometry.model import Model, model_grids
from geometry.tooling import ToolingAnalysis, draft_on_grid, least_out_of_draft, principal_axes, unit_pull

from .results import FindingEntry

# Pull the window starts with when the profile names none: the model's z axis (common practice:
# parts are modelled with the mould opening along z).
DEFAULT_PULL = (0.0, 0.0, 1.0)
# Samples over the model for choosing a pull (areas to about a percent).
SUGGEST_BUDGET = 40_000
SUGGESTIONS = ("thinnest axis", "least out of draft")


def starting_pull(profile: Profile) -> tuple[float, float, float]:
    """The profile's pull, or +z."""
    pull = profile.values.get("pull")
    return tuple(float(c) for c in unit_pull(pull if pull else DEFAULT_PULL))


def tooling_list(model: Model, analysis: ToolingAnalysis | None, profile: Profile) -> list[FindingEntry]:
    """The check's tooling findings as list entries (failing ones and the undercut regions)."""
    if analysis is None:
        return []
    entry = tooling_entry(model, analysis, "--pull")
    extent = max(model.size / 8, 1.0)
    found = []
    for f in tooling_findings(entry):
        if f.verdict != "fail":
            continue  # a face with enough draft is not worth a line of the list
        position = np.zeros(3) if f.where is None else np.asarray(f.where, float)
        value = f"{f.value:.4g} {f.unit}" + ("" if f.limit is None else f", limit {f.limit:g} {f.unit}")
        detail = f"{f.measure} {value}; profile {profile.name}"
        place = f.subject.split(":")[0]  # the face's label
        found.append(FindingEntry(f.kind, f.subject, f.verdict, position, extent, detail, position, place))
    return found


def suggested_pull(model: Model, how: str, draft_min_deg: float | None) -> tuple[float, float, float]:
    """A pull picked from the model: its thinnest principal axis, or the axis with the least area out of draft.

    Parameters
    ----------
    how : str
        One of :data:`SUGGESTIONS`.
    draft_min_deg : float or None
        The limit the area out of draft is counted against (1 degree when None).
    """
    if how not in SUGGESTIONS:
        raise ValueError(f"pull suggestion must be one of {', '.join(SUGGESTIONS)}")
    fields = [
        (draft_on_grid(f.surface, g.u, g.v, DEFAULT_PULL, f.reversed), g.inside)
        for f, g in zip(model.faces, model_grids(model, SUGGEST_BUDGET), strict=True)
    ]
    normals = np.concatenate([d.normals[inside] for d, inside in fields])
    points = np.concatenate([d.points[inside] for d, inside in fields])
    areas = np.concatenate([d.area[inside] for d, inside in fields])
    if how == SUGGESTIONS[0]:
        pull = principal_axes(points, areas)[0]
    else:
        pull = least_out_of_draft(normals, areas, points, 1.0 if draft_min_deg is None else draft_min_deg)
    return tuple(float(c) for c in pull)
