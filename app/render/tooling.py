"""The draft view as pyvista objects: draft map, undercut and cutter-reach overlays, zero-draft curves, pull arrow.

The window's draft mode and the report's draft picture both draw with these
functions, from one :class:`geometry.tooling.ToolingAnalysis`.

The draft map is diverging about the limit ``draft_min_deg`` on each side: samples
with enough draft are blue (released along +pull) or green (along -pull), deeper as
the draft grows; samples short of the limit run from pale at the limit to red at
zero draft, so the colour changes exactly where the verdict does.
"""

from __future__ import annotations

import numpy as np
import pyvista as pv

from geometry.tooling import ToolingAnalysis

from . import colours
from .combs import polylines
from .meshes import grid_triangles

# (position, colour) stops of the draft map over [-span, span]; the limit sits at +-LIMIT_AT
LIMIT_AT = 0.25
UNDERCUT, UNDERCUT_NAME = "#7b1fa2", "purple"
OUT_OF_REACH, OUT_OF_REACH_NAME = "#ff8f00", "amber"
ZERO_DRAFT = "#111111"
PULL_ARROW = "#1b5e20"
# The map reaches its deepest colour at this many times the limit (at least SPAN_MIN_DEG).
SPAN_LIMITS = 4.0
SPAN_MIN_DEG = 8.0
# Overlays stand off the surface by this share of the model size.
OVERLAY_LIFT = 1e-3
# Flat light on the map: the colour, not the shading, carries the value.
MAP_LIGHT = dict(ambient=0.35, diffuse=0.7, specular=0.0)
# Draft limit shown when the profile sets none: the map still needs a centre.
SHOWN_LIMIT_DEG = 1.0
LEGEND_TITLE = "Draft\n(degrees)"


def draft_span(analysis: ToolingAnalysis) -> tuple[float, float]:
    """(limit, span) in degrees: the limit the map is centred on, and the half-range it covers."""
    limit = analysis.draft_min_deg if analysis.draft_min_deg is not None else SHOWN_LIMIT_DEG
    return limit, max(SPAN_LIMITS * limit, SPAN_MIN_DEG)


def draft_table(analysis: ToolingAnalysis) -> pv.LookupTable:
    """Lookup table of the draft map over [-span, span] (see the module notes)."""
    limit, span = draft_span(analysis)
    at = 0.5 * limit / span  # the limit's distance from the middle, as a share of the table
    stops = (
        (0.0, "#0b5d1e"),
        (0.5 - at, "#c8e6c9"),
        (np.nextafter(0.5 - at, 1.0), "#ffe0b2"),
        (0.5, "#c62828"),
        (np.nextafter(0.5 + at, 0.0), "#ffe0b2"),
        (0.5 + at, "#bbdefb"),
        (1.0, "#0d47a1"),
    )
    table = pv.LookupTable(values=colours.ramp_table(stops, 512))
    table.scalar_range = (-span, span)
    table.nan_color = colours.MISSING
    return table


def tooling_mesh(analysis: ToolingAnalysis) -> pv.PolyData:
    """Every face's tooling grid as one triangle mesh.

    Point data: ``draft`` (degrees), ``undercut`` and ``out_of_reach`` (0 or 1),
    ``Normals`` (outward).
    """
    points, normals, draft, undercut, reach, triangles = [], [], [], [], [], []
    offset = 0
    for maps in analysis.maps:
        inside = maps.grid.inside
        points.append(np.asarray(maps.field.points).reshape(-1, 3))
        normals.append(np.asarray(maps.field.normals).reshape(-1, 3))
        draft.append(np.asarray(maps.field.draft, float).ravel())
        undercut.append(maps.undercut.ravel())
        reach.append(maps.out_of_reach.ravel())
        triangles.append(grid_triangles(inside, offset))
        offset += inside.size
    tris = np.concatenate(triangles) if triangles else np.zeros((0, 3), int)
    cells = np.concatenate([np.full((tris.shape[0], 1), 3), tris], axis=1).ravel()
    mesh = pv.PolyData(np.nan_to_num(np.concatenate(points)), faces=cells)
    mesh.point_data["Normals"] = np.nan_to_num(np.concatenate(normals))
    mesh.point_data.active_normals_name = "Normals"
    mesh.point_data["draft"] = np.concatenate(draft)
    mesh.point_data["undercut"] = np.concatenate(undercut).astype(np.uint8)
    mesh.point_data["out_of_reach"] = np.concatenate(reach).astype(np.uint8)
    return mesh


def flagged_cells(mesh: pv.PolyData, flag: str) -> pv.PolyData:
    """The triangles of ``mesh`` whose three corners carry ``flag`` (an overlay)."""
    if mesh.n_cells == 0 or not np.any(mesh.point_data[flag]):
        return pv.PolyData()
    corners = mesh.faces.reshape(-1, 4)[:, 1:]
    keep = np.all(mesh.point_data[flag][corners] > 0, axis=1)
    overlay = mesh.extract_cells(np.flatnonzero(keep)).extract_surface(algorithm="dataset_surface")
    # lifted a hair off the surface along the outward normal, so the two never fight for the same pixels
    size = float(np.linalg.norm(np.ptp(mesh.points, axis=0))) or 1.0
    overlay.points = overlay.points + OVERLAY_LIFT * size * overlay.point_data["Normals"]
    return overlay


def zero_draft_lines(analysis: ToolingAnalysis) -> pv.PolyData:
    """The zero-draft curves as one line set."""
    return polylines([c.points for c in analysis.zero_draft])


def pull_arrow(analysis: ToolingAnalysis, bounds: np.ndarray) -> pv.PolyData:
    """An arrow along the pull, standing on the top of the model's box (seen along +pull).

    Parameters
    ----------
    bounds : ndarray of shape (2, 3)
        The model's box.
    """
    lo, hi = np.asarray(bounds, float)
    centre, size = 0.5 * (lo + hi), float(np.linalg.norm(hi - lo)) or 1.0
    d = np.asarray(analysis.pull, float)
    reach = 0.5 * float(np.abs(hi - lo) @ np.abs(d))  # half the box's extent along d
    start = centre + (reach + 0.05 * size) * d
    return pv.Arrow(start=start, direction=d, scale=0.25 * size, tip_length=0.3, tip_radius=0.1, shaft_radius=0.035)


def add_tooling(plotter, analysis: ToolingAnalysis, bounds: np.ndarray, legend: dict | None = None) -> dict:
    """Add the draft map, overlays, zero-draft curves and pull arrow to a plotter; return the actors by name.

    Parameters
    ----------
    plotter : pyvista.Plotter
    analysis : ToolingAnalysis
    bounds : ndarray of shape (2, 3)
    legend : dict, optional
        ``scalar_bar_args`` for the draft legend; None for no legend.
    """
    mesh = tooling_mesh(analysis)
    _, span = draft_span(analysis)
    actors = {
        "faces": plotter.add_mesh(
            mesh,
            scalars="draft",
            cmap=draft_table(analysis),
            clim=(-span, span),
            nan_color=colours.MISSING,
            smooth_shading=True,
            **MAP_LIGHT,
            show_scalar_bar=legend is not None,
            scalar_bar_args=(legend or {}) | {"title": LEGEND_TITLE},
            name="faces",
            render=False,
            pickable=True,
        )
    }
    for name, colour in (("undercut", UNDERCUT), ("out_of_reach", OUT_OF_REACH)):
        overlay = flagged_cells(mesh, name)
        if overlay.n_cells:
            actors[name] = plotter.add_mesh(
                overlay, color=colour, opacity=0.75, name=name, render=False, pickable=False, show_scalar_bar=False
            )
    lines = zero_draft_lines(analysis)
    if lines.n_points:
        actors["zero_draft"] = plotter.add_mesh(
            lines, color=ZERO_DRAFT, line_width=3, name="zero_draft", render=False, pickable=False
        )
    actors["pull"] = plotter.add_mesh(
        pull_arrow(analysis, bounds), color=PULL_ARROW, name="pull", render=False, pickable=False
    )
    return actors
