"""The tooling checks of a whole model: draft, undercut and cutter reach, face by face.

Every face is sampled on the trim-aware grid of :func:`geometry.model.sampling.model_grids`;
draft comes from :mod:`.draft`, undercuts from rays cast against the same grids'
tessellation (:mod:`.undercut`), cutter reach from the exact k1
(:mod:`geometry.nurbs.differential`, :mod:`.cutter`), and the zero-draft curves from
:mod:`.zero_draft`. Areas are quadratures of ``|Su x Sv|`` over the samples
inside the trim.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from ..model.sampling import FaceGrid, model_grids, trimmed_mesh
from ..model.topology import Model
from ..nurbs.differential import curvature_on_grid
from .cutter import concave_radius
from .draft import INSUFFICIENT, DraftField, draft_classes, draft_on_grid, unit_pull
from .undercut import RayCaster, blocked_release
from .zero_draft import ZeroDraftCurve, ZeroDraftTracer

# Total samples of a check: enough for areas to a fraction of a percent on the samples,
# one ray each.
TOOLING_BUDGET = 150_000
# Samples of the tessellation the rays are cast against: coarser than the rays' grid.
MESH_BUDGET = 40_000
# Rays start this many mean tessellation edges away from their own surface.
CLEARANCE_EDGES = 0.5
# Grid neighbours (8-connected) form one undercut region.
_NEIGHBOURS = np.ones((3, 3), dtype=bool)


@dataclass(frozen=True)
class UndercutRegion:
    """A connected patch of undercut samples on one face.

    Attributes
    ----------
    face : int
    area : float
        mm^2.
    centre : tuple of float
        Area-weighted centre of its samples, mm.
    samples : int
    """

    face: int
    area: float
    centre: tuple[float, float, float]
    samples: int


@dataclass(frozen=True)
class FaceTooling:
    """Tooling figures of one face.

    Attributes
    ----------
    face : int
    area : float
        Sampled area, mm^2.
    draft_min_deg, draft_max_deg : float
        Signed extremes of the draft, degrees.
    least_draft_deg : float
        Smallest |draft| on the face, degrees, at ``least_draft_at``.
    insufficient_area : float
        mm^2 with |draft| below the limit (0 without a limit).
    undercut_area : float
        mm^2 whose release path is blocked (0 when not checked).
    concave_radius_mm : float
        Tightest concave radius (1 / max k1 over k1 > 0), mm; inf where nothing is concave.
    concave_at : tuple of float or None
    out_of_reach_area : float
        mm^2 with k1 > 1 / cutter radius (0 without a cutter).
    """

    face: int
    area: float
    draft_min_deg: float
    draft_max_deg: float
    least_draft_deg: float
    least_draft_at: tuple[float, float, float] | None
    insufficient_area: float
    undercut_area: float
    concave_radius_mm: float
    concave_at: tuple[float, float, float] | None
    out_of_reach_area: float


@dataclass(frozen=True, eq=False)
class FaceMaps:
    """Per-sample tooling values of one face on its grid, for display.

    Attributes
    ----------
    grid : FaceGrid
    field : DraftField
    undercut : ndarray of bool, shape (a, b)
    out_of_reach : ndarray of bool, shape (a, b)
    """

    grid: FaceGrid
    field: DraftField
    undercut: np.ndarray
    out_of_reach: np.ndarray


@dataclass(frozen=True, eq=False)
class ToolingAnalysis:
    """Draft, undercut and cutter reach of a model for one pull direction.

    Attributes
    ----------
    pull : ndarray of shape (3,)
        Unit pull direction.
    draft_min_deg, cutter_radius_mm : float or None
        The limits applied; None: that check was skipped.
    undercuts_checked : bool
    faces : tuple of FaceTooling
    regions : tuple of UndercutRegion
        Largest first.
    zero_draft : tuple of ZeroDraftCurve
    maps : tuple of FaceMaps
    """

    pull: np.ndarray
    draft_min_deg: float | None
    cutter_radius_mm: float | None
    undercuts_checked: bool
    faces: tuple[FaceTooling, ...]
    regions: tuple[UndercutRegion, ...]
    zero_draft: tuple[ZeroDraftCurve, ...]
    maps: tuple[FaceMaps, ...]

    @property
    def insufficient_area(self) -> float:
        return float(sum(f.insufficient_area for f in self.faces))

    @property
    def undercut_area(self) -> float:
        return float(sum(r.area for r in self.regions))

    @property
    def concave_radius_mm(self) -> float:
        return float(min((f.concave_radius_mm for f in self.faces), default=np.inf))


def _point(p: np.ndarray) -> tuple[float, float, float]:
    return tuple(float(x) for x in p)


def model_tessellation(model: Model, budget: int = MESH_BUDGET) -> tuple[np.ndarray, np.ndarray, float]:
    """Triangles of every face's trimmed sample grid, stacked (see :func:`geometry.model.sampling.trimmed_mesh`).

    Returns
    -------
    vertices : ndarray of shape (m, 3)
    triangles : ndarray of int, shape (t, 3)
    mean_edge : float
        Mean triangle edge length, mm (0 without triangles).
    """
    vertices, triangles, offset = [], [], 0
    for face, grid in zip(model.faces, model_grids(model, budget), strict=True):
        points, tris = trimmed_mesh(face, grid)
        vertices.append(points)
        triangles.append(tris + offset)
        offset += points.shape[0]
    vertices, triangles = np.concatenate(vertices), np.concatenate(triangles)
    if triangles.size == 0:
        return vertices, triangles, 0.0
    edges = vertices[triangles] - vertices[np.roll(triangles, 1, axis=1)]
    return vertices, triangles, float(np.linalg.norm(edges, axis=2).mean())


def _regions(face: int, mask: np.ndarray, field: DraftField) -> list[UndercutRegion]:
    labels, count = ndimage.label(mask, structure=_NEIGHBOURS)
    if count == 0:
        return []
    index = np.arange(1, count + 1)
    area = ndimage.sum_labels(field.area, labels, index)
    samples = ndimage.sum_labels(np.ones(mask.shape), labels, index)
    centres = (
        np.stack([ndimage.sum_labels(field.area * field.points[..., k], labels, index) for k in range(3)], axis=1)
        / np.where(area > 0, area, 1.0)[:, None]
    )
    return [UndercutRegion(face, float(a), _point(c), int(n)) for a, c, n in zip(area, centres, samples, strict=True)]


def analyse_tooling(
    model: Model,
    pull,
    draft_min_deg: float | None,
    cutter_radius_mm: float | None,
    undercuts: bool = True,
    budget: int = TOOLING_BUDGET,
    curves: bool = True,
) -> ToolingAnalysis:
    """Draft, undercut and cutter reach of every face of a model.

    Parameters
    ----------
    model : Model
    pull : array_like of shape (3,)
        Pull direction (normalised here).
    draft_min_deg : float or None
        Least draft, degrees; None skips the insufficient-draft figures.
    cutter_radius_mm : float or None
        Ball-end cutter radius; None skips cutter reach.
    undercuts : bool
        Cast the release rays.
    budget : int
        Total grid samples (see :func:`geometry.model.sampling.model_grids`).
    curves : bool
        Trace the zero-draft curves.

    Returns
    -------
    ToolingAnalysis
    """
    d = unit_pull(pull)
    grids = model_grids(model, budget)
    fields = [draft_on_grid(f.surface, g.u, g.v, d, f.reversed) for f, g in zip(model.faces, grids, strict=True)]
    blocked = [np.zeros(g.inside.shape, bool) for g in grids]
    if undercuts and model.faces:
        vertices, triangles, mean_edge = model_tessellation(model)
        if triangles.size:
            caster = RayCaster(vertices, triangles)
            use = [g.inside & np.all(np.isfinite(f.normals), axis=-1) for f, g in zip(fields, grids, strict=True)]
            hit = blocked_release(
                caster,
                np.concatenate([f.points[m] for f, m in zip(fields, use, strict=True)]),
                np.concatenate([f.normals[m] for f, m in zip(fields, use, strict=True)]),
                np.concatenate([f.draft[m] for f, m in zip(fields, use, strict=True)]),
                d,
                CLEARANCE_EDGES * mean_edge,
            )
            start = 0
            for b, m in zip(blocked, use, strict=True):
                b[m] = hit[start : start + int(m.sum())]
                start += int(m.sum())
    faces, regions, maps = [], [], []
    for index, (face, grid, field) in enumerate(zip(model.faces, grids, fields, strict=True)):
        inside = grid.inside & np.isfinite(field.draft)
        weight = np.where(inside, field.area, 0.0)
        radius = np.full(grid.inside.shape, np.inf)
        if cutter_radius_mm is not None:
            k1 = curvature_on_grid(face.surface, grid.u, grid.v, face.reversed).k1
            radius = np.where(inside, concave_radius(k1), np.inf)
        reach = radius < (cutter_radius_mm if cutter_radius_mm is not None else 0.0)
        undercut = blocked[index] & inside
        maps.append(FaceMaps(grid, field, undercut, reach))
        regions += _regions(index, undercut, field)
        faces.append(_face_figures(index, field, inside, weight, radius, reach, undercut, draft_min_deg))
    zero = ZeroDraftTracer(model).curves(d) if curves and model.faces else ()
    return ToolingAnalysis(
        d,
        draft_min_deg,
        cutter_radius_mm,
        bool(undercuts),
        tuple(faces),
        tuple(sorted(regions, key=lambda r: -r.area)),
        zero,
        tuple(maps),
    )


def _face_figures(index, field, inside, weight, radius, reach, undercut, draft_min_deg) -> FaceTooling:
    if not inside.any():
        return FaceTooling(index, 0.0, np.nan, np.nan, np.nan, None, 0.0, 0.0, np.inf, None, 0.0)
    draft = np.where(inside, field.draft, np.nan)
    least = int(np.nanargmin(np.abs(draft)))
    insufficient = 0.0
    if draft_min_deg is not None:
        insufficient = float(weight[draft_classes(draft, draft_min_deg) == INSUFFICIENT].sum())
    tight = int(np.argmin(radius))
    finite = bool(np.isfinite(radius.flat[tight]))
    return FaceTooling(
        face=index,
        area=float(weight.sum()),
        draft_min_deg=float(np.nanmin(draft)),
        draft_max_deg=float(np.nanmax(draft)),
        least_draft_deg=float(np.abs(draft.flat[least])),
        least_draft_at=_point(field.points.reshape(-1, 3)[least]),
        insufficient_area=insufficient,
        undercut_area=float(weight[undercut].sum()),
        concave_radius_mm=float(radius.flat[tight]),
        concave_at=_point(field.points.reshape(-1, 3)[tight]) if finite else None,
        out_of_reach_area=float(weight[reach].sum()),
    )
