"""Trim-aware sampling of faces: parameter grids, inside masks, display meshes.

A face is sampled on a tensor grid ``u x v`` over the bounding box of its trim
(the whole domain when untrimmed); samples outside the trim are masked off
with :meth:`geometry.model.Face.inside`. The number of samples along each
direction follows the face's size and bending, both read from the control net
(the convex-hull and variation-diminishing properties, The NURBS Book, 2nd ed.,
P4.9 and P3.11, make the net a fair proxy of the surface): a direction needs
``length / spacing + turning / angle_step`` samples, where ``length`` is the
longest control-polygon row in that direction and ``turning`` the largest sum
of angles between its legs. One spacing for the whole model is found by
bisection so that the model's grids fit a total budget.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .topology import Face, Model

# Total samples a model opens with: a few hundred thousand (issue 3).
DEFAULT_BUDGET = 300_000
# Angle of control-polygon turning one sample covers (radians, 4 degrees).
ANGLE_STEP = np.radians(4.0)
# Samples along a direction: at least this many, and this many per knot span.
MIN_SAMPLES = 5
PER_SPAN = 2
MAX_SAMPLES = 2000
# The end samples sit this fraction of the range inside the trim box, so that a
# trim edge lying on the box (often the domain's edge) counts them as inside:
# the crossing-number test is half-open on a boundary.
END_INSET = 1e-9


@dataclass(frozen=True, eq=False)
class FaceGrid:
    """Sampling grid of one face.

    Attributes
    ----------
    u : ndarray of shape (a,)
    v : ndarray of shape (b,)
        Increasing parameters inside the domain.
    inside : ndarray of bool, shape (a, b)
        True where ``(u[i], v[j])`` lies on the face (inside its trim).
    """

    u: np.ndarray
    v: np.ndarray
    inside: np.ndarray

    def __post_init__(self):
        for name in ("u", "v", "inside"):
            getattr(self, name).setflags(write=False)

    @property
    def count(self) -> int:
        """Samples on the face (inside the trim)."""
        return int(self.inside.sum())


def _polygon_measures(net: np.ndarray) -> tuple[float, float]:
    """Longest row length and largest total turning of a control polygon.

    Parameters
    ----------
    net : ndarray of shape (n, m, 3)
        Rows along axis 0 are the polygons measured.

    Returns
    -------
    length : float
    turning : float
        Radians.
    """
    legs = np.diff(net, axis=0)  # (n-1, m, 3)
    norms = np.linalg.norm(legs, axis=2)
    length = float(norms.sum(axis=0).max())
    if legs.shape[0] < 2:
        return length, 0.0
    a, b = legs[:-1], legs[1:]
    na, nb = norms[:-1], norms[1:]
    ok = (na > 0) & (nb > 0)
    cosines = np.einsum("ijk,ijk->ij", a, b) / np.where(ok, na * nb, 1.0)
    angles = np.where(ok, np.arccos(np.clip(cosines, -1.0, 1.0)), 0.0)
    return length, float(angles.sum(axis=0).max())


@dataclass(frozen=True)
class _Demand:
    length_u: float
    length_v: float
    turn_u: float
    turn_v: float
    spans_u: int
    spans_v: int
    box: tuple[tuple[float, float], tuple[float, float]]


def _demand(face: Face) -> _Demand:
    s = face.surface
    (u0, u1), (v0, v1) = s.domain
    if face.loops:
        outer = face.loops[0]
        lo, hi = outer.min(axis=0), outer.max(axis=0)
        u0, u1 = max(u0, lo[0]), min(u1, hi[0])
        v0, v1 = max(v0, lo[1]), min(v1, hi[1])
        if not (u1 > u0 and v1 > v0):
            (u0, u1), (v0, v1) = s.domain
    lu, tu = _polygon_measures(s.poles)
    lv, tv = _polygon_measures(s.poles.transpose(1, 0, 2))
    # The trim box covers part of the domain: scale the demand down with it.
    (d0, d1), (e0, e1) = s.domain
    fu, fv = (u1 - u0) / (d1 - d0), (v1 - v0) / (e1 - e0)
    spans_u = max(1, np.unique(s.knots_u[s.degree_u : s.shape[0] + 1]).size - 1)
    spans_v = max(1, np.unique(s.knots_v[s.degree_v : s.shape[1] + 1]).size - 1)
    return _Demand(lu * fu, lv * fv, tu * fu, tv * fv, spans_u, spans_v, ((u0, u1), (v0, v1)))


def _counts(d: _Demand, spacing: float) -> tuple[int, int]:
    def one(length, turn, spans):
        n = length / spacing + turn / ANGLE_STEP
        return min(max(math.ceil(n), MIN_SAMPLES, PER_SPAN * spans + 1), MAX_SAMPLES)

    return one(d.length_u, d.turn_u, d.spans_u), one(d.length_v, d.turn_v, d.spans_v)


def _spacing_for_budget(demands: list[_Demand], budget: int) -> float:
    """Largest spacing (mm) with total grid size <= budget, by bisection on log-spacing.

    The counts of every face are computed at once per step (arrays over faces).
    """
    table = np.array([(d.length_u, d.turn_u, d.spans_u, d.length_v, d.turn_v, d.spans_v) for d in demands], float)
    total_length = float(table[:, 0].sum() + table[:, 3].sum()) or 1.0
    lo, hi = total_length * 1e-7, total_length * 10.0

    def counts(length, turn, spans, h):
        n = np.ceil(length / h + turn / ANGLE_STEP)
        return np.minimum(np.maximum(n, np.maximum(MIN_SAMPLES, PER_SPAN * spans + 1)), MAX_SAMPLES)

    def total(h):
        return float(np.sum(counts(*table[:, :3].T, h) * counts(*table[:, 3:].T, h)))

    if total(lo) <= budget:
        return lo
    for _ in range(60):
        mid = np.sqrt(lo * hi)
        if total(mid) > budget:
            lo = mid
        else:
            hi = mid
    return hi


def _grid(face: Face, d: _Demand, spacing: float) -> FaceGrid:
    a, b = _counts(d, spacing)
    (u0, u1), (v0, v1) = d.box
    inset_u, inset_v = END_INSET * (u1 - u0), END_INSET * (v1 - v0)
    u = np.linspace(u0 + inset_u, u1 - inset_u, a)
    v = np.linspace(v0 + inset_v, v1 - inset_v, b)
    uu, vv = np.meshgrid(u, v, indexing="ij")
    return FaceGrid(u, v, face.inside(uu, vv))


def face_grid(face: Face, budget: int) -> FaceGrid:
    """Sampling grid of one face with about ``budget`` grid points.

    Parameters
    ----------
    face : Face
    budget : int
        Target size of the full grid ``a * b`` (samples outside the trim
        included).

    Returns
    -------
    FaceGrid
    """
    d = _demand(face)
    return _grid(face, d, _spacing_for_budget([d], budget))


def model_grids(model: Model, budget: int = DEFAULT_BUDGET) -> tuple[FaceGrid, ...]:
    """Sampling grids of every face of a model under one total budget.

    Parameters
    ----------
    model : Model
    budget : int
        Upper bound on the sum of the grid sizes (minimum counts per face
        may exceed a tiny budget).

    Returns
    -------
    tuple of FaceGrid
        One per face, in the model's order; all faces share one spacing in mm, so
        a big face gets more samples than a small one and a bent one more than a
        flat one of the same size.
    """
    demands = [_demand(f) for f in model.faces]
    if not demands:
        return ()
    spacing = _spacing_for_budget(demands, budget)
    return tuple(_grid(f, d, spacing) for f, d in zip(model.faces, demands, strict=True))


def grid_cells(inside: np.ndarray) -> np.ndarray:
    """Grid cells whose four corners are all inside, as node indices.

    Parameters
    ----------
    inside : ndarray of bool, shape (a, b)
        Which grid nodes lie on the face; node (i, j) is index ``i * b + j``.

    Returns
    -------
    cells : ndarray of int, shape (m, 4)
        Corners (i, j), (i+1, j), (i+1, j+1), (i, j+1) of each kept cell.
    """
    b = inside.shape[1]
    keep = inside[:-1, :-1] & inside[1:, :-1] & inside[:-1, 1:] & inside[1:, 1:]
    ci, cj = np.nonzero(keep)
    p00 = ci * b + cj
    return np.stack([p00, p00 + b, p00 + b + 1, p00 + 1], axis=1)


def cell_triangles(cells: np.ndarray, reversed: bool = False) -> np.ndarray:
    """Two triangles per grid cell, wound so their normal follows Su x Sv (or its reverse).

    Parameters
    ----------
    cells : ndarray of int, shape (m, 4)
        From :func:`grid_cells`.
    reversed : bool
        The face's orientation is reversed.

    Returns
    -------
    triangles : ndarray of int, shape (2 m, 3)
    """
    p00, p10, p11, p01 = cells.T
    if reversed:
        return np.concatenate([np.stack([p00, p01, p10], 1), np.stack([p10, p01, p11], 1)])
    return np.concatenate([np.stack([p00, p10, p01], 1), np.stack([p10, p11, p01], 1)])


def trimmed_mesh(face: Face, grid: FaceGrid) -> tuple[np.ndarray, np.ndarray]:
    """Display triangulation of a face: grid cells with all four corners inside.

    Parameters
    ----------
    face : Face
    grid : FaceGrid

    Returns
    -------
    points : ndarray of shape (k, 3)
        Surface points of the used grid nodes.
    triangles : ndarray of int, shape (t, 3)
        Indices into ``points``, two per kept cell, wound so that their normal
        follows the face's orientation.
    """
    a, b = grid.inside.shape
    tris = cell_triangles(grid_cells(grid.inside), face.reversed)
    used = np.unique(tris)
    remap = np.full(a * b, -1)
    remap[used] = np.arange(used.size)
    points = face.surface.points_grid(grid.u, grid.v).reshape(-1, 3)[used]
    return points, remap[tris].reshape(-1, 3)
