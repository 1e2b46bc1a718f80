"""Where a plane crosses one face: marching squares on the face's sample grid.

The plane function ``f = (S - o) . n`` is evaluated on the cached grid of
surface points; every grid edge whose end values differ in sign holds one
crossing (linear interpolation of f along the edge). Cells join their crossings
into segments (Lorensen & Cline's marching cubes reduced to squares; a cell
with four crossings is split by the sign of the mean of its corners, the
usual asymptote-free choice). Segments outside the face's trim are dropped;
a segment leaving the trim is cut where the trim boundary crosses it, found by
bisection on :meth:`geometry.model.Face.inside`. Connected segments are
ordered into polylines by a depth-first walk (each node has at most two
neighbours).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components, depth_first_order

from ..model.sampling import model_grids
from ..model.topology import Face, Model

# Crossing nodes on the domain boundary keep that boundary's parameter when
# refined: 0 free, 1 u is fixed (a u = const edge), 2 v is fixed.
FREE, FIXED_U, FIXED_V = 0, 1, 2
# |f| below this fraction of the coordinates' size is zero (rounding).
ZERO_SNAP = 1e-12
# End samples closer than this fraction of the range to the domain's edge move onto it.
EDGE_SNAP = 1e-6
# Bisection steps for the trim boundary along a grid segment (2^-24 of a cell).
TRIM_BISECTIONS = 24


@dataclass(frozen=True, eq=False)
class MarchGrid:
    """Cached surface points of one face for marching.

    Attributes
    ----------
    u : ndarray of shape (a,)
    v : ndarray of shape (b,)
        Parameters of :func:`geometry.model.sampling.model_grids` (over the trim's
        box), pushed out onto the domain's edges where they lie a hair inside.
    points : ndarray of shape (a, b, 3)
        Exact surface points on the grid u x v.
    poles : ndarray of shape (m, 3)
        The control net, for the convex-hull test (The NURBS Book P4.9): a
        plane with every pole on one side cannot cut the face.
    """

    u: np.ndarray
    v: np.ndarray
    points: np.ndarray
    poles: np.ndarray


def march_grids(model: Model, budget: int) -> tuple[MarchGrid, ...]:
    """Marching grids of every face from the shared trim-aware sampling (computed once per model)."""
    out = []
    for face, grid in zip(model.faces, model_grids(model, budget), strict=True):
        s = face.surface
        (u0, u1), (v0, v1) = s.domain
        u, v = np.array(grid.u), np.array(grid.v)
        # sampling insets its end samples; a section's end on the domain edge belongs on the edge
        for t, lo, hi in ((u, u0, u1), (v, v0, v1)):
            if t[0] - lo <= EDGE_SNAP * (hi - lo):
                t[0] = lo
            if hi - t[-1] <= EDGE_SNAP * (hi - lo):
                t[-1] = hi
        out.append(MarchGrid(u, v, s.points_grid(u, v), s.poles.reshape(-1, 3)))
    return tuple(out)


@dataclass(frozen=True, eq=False)
class Crossings:
    """Crossing polylines of one face, before refinement.

    Attributes
    ----------
    uv, xyz : ndarray of shape (N, 2), (N, 3)
        Nodes: linear estimates on grid edges (or trim boundary points).
    fixed : ndarray of int, shape (N,)
        FREE, FIXED_U or FIXED_V.
    polylines : list of (ndarray of int, bool)
        Node indices in order, and whether the polyline closes on itself.
    """

    uv: np.ndarray
    xyz: np.ndarray
    fixed: np.ndarray
    polylines: list[tuple[np.ndarray, bool]]


def _edge_nodes(grid: MarchGrid, d: np.ndarray, ids: np.ndarray):
    """uv, xyz (linear in f along the edge) and fixed flag of the crossings on grid edges ``ids``.

    Edge ids: ``i * b + j`` for the u-edge (i, j)-(i+1, j), then
    ``(a - 1) * b + i * (b - 1) + j`` for the v-edge (i, j)-(i, j+1).
    """
    a, b = d.shape
    n_h = (a - 1) * b
    along_u = ids < n_h
    k = np.where(along_u, ids, ids - n_h)
    i0 = np.where(along_u, k // b, k // (b - 1))
    j0 = np.where(along_u, k % b, k % (b - 1))
    i1 = i0 + along_u
    j1 = j0 + ~along_u
    # t = d0 / (d0 - d1), written so that no step can overflow: on a crossed edge the signs
    # differ, so |d0 - d1| = |d0| + |d1|, and scaling by the larger (never 0: zero counts as
    # positive, so the other end is negative) keeps both terms in [0, 1] whatever |f| is
    a0, a1 = np.abs(d[i0, j0]), np.abs(d[i1, j1])
    scale = np.maximum(a0, a1)
    t = (a0 / scale) / (a0 / scale + a1 / scale)
    uv = np.stack([grid.u[i0] + t * (grid.u[i1] - grid.u[i0]), grid.v[j0] + t * (grid.v[j1] - grid.v[j0])], axis=1)
    p0, p1 = grid.points[i0, j0], grid.points[i1, j1]
    xyz = p0 + t[:, None] * (p1 - p0)
    fixed = np.where(along_u & ((j0 == 0) | (j0 == b - 1)), FIXED_V, FREE)
    fixed = np.where(~along_u & ((i0 == 0) | (i0 == a - 1)), FIXED_U, fixed)
    return uv, xyz, fixed


def _cell_segments(d: np.ndarray) -> np.ndarray:
    """Segments (M, 2) of grid-edge ids, marching squares with the centre rule for saddles."""
    a, b = d.shape
    pos = d >= 0
    hc = pos[:-1, :] != pos[1:, :]
    vc = pos[:, :-1] != pos[:, 1:]
    n_h = (a - 1) * b
    hid = np.arange(n_h).reshape(a - 1, b)
    vid = n_h + np.arange(a * (b - 1)).reshape(a, b - 1)
    # cell (i, j): bottom h(i, j), right v(i+1, j), top h(i, j+1), left v(i, j)
    ids = np.stack([hid[:, :-1], vid[1:, :], hid[:, 1:], vid[:-1, :]], axis=-1).reshape(-1, 4)
    crossed = np.stack([hc[:, :-1], vc[1:, :], hc[:, 1:], vc[:-1, :]], axis=-1).reshape(-1, 4)
    count = crossed.sum(axis=1)
    two = count == 2
    segs = [ids[two][crossed[two]].reshape(-1, 2)]
    four = np.flatnonzero(count == 4)
    if four.size:
        corners = np.stack([d[:-1, :-1], d[1:, :-1], d[1:, 1:], d[:-1, 1:]], axis=-1).reshape(-1, 4)[four]
        joined = (corners.mean(axis=1) >= 0) == (corners[:, 0] >= 0)
        e = ids[four]
        # centre like corner 00: cut off corners 10 (bottom, right) and 01 (top, left)
        first = np.where(joined[:, None], e[:, [0, 1]], e[:, [0, 3]])
        second = np.where(joined[:, None], e[:, [2, 3]], e[:, [2, 1]])
        segs += [first, second]
    return np.concatenate(segs)


def _trim(face: Face, uv: np.ndarray, xyz: np.ndarray, fixed: np.ndarray, segs: np.ndarray):
    """Drop segments outside the trim; cut those that leave it at the trim boundary."""
    inside = face.inside(uv[:, 0], uv[:, 1])
    keep = inside[segs[:, 0]] & inside[segs[:, 1]]
    mixed = np.flatnonzero(inside[segs[:, 0]] != inside[segs[:, 1]])
    if mixed.size == 0:
        return uv, xyz, fixed, segs[keep]
    seg = segs[mixed]
    a_in = inside[seg[:, 0]]
    start = np.where(a_in, seg[:, 0], seg[:, 1])  # the inside end
    end = np.where(a_in, seg[:, 1], seg[:, 0])
    lo, hi = np.zeros(mixed.size), np.ones(mixed.size)
    for _ in range(TRIM_BISECTIONS):
        mid = 0.5 * (lo + hi)
        p = uv[start] + mid[:, None] * (uv[end] - uv[start])
        ok = face.inside(p[:, 0], p[:, 1])
        lo = np.where(ok, mid, lo)
        hi = np.where(ok, hi, mid)
    new = uv.shape[0] + np.arange(mixed.size)
    uv = np.concatenate([uv, uv[start] + lo[:, None] * (uv[end] - uv[start])])
    xyz = np.concatenate([xyz, xyz[start] + lo[:, None] * (xyz[end] - xyz[start])])
    fixed = np.concatenate([fixed, np.zeros(mixed.size, int)])
    return uv, xyz, fixed, np.concatenate([segs[keep], np.stack([start, new], axis=1)])


def _polylines(n: int, segs: np.ndarray) -> list[tuple[np.ndarray, bool]]:
    """Order the segments' nodes into polylines (one per connected component)."""
    graph = coo_matrix((np.ones(segs.shape[0]), (segs[:, 0], segs[:, 1])), shape=(n, n)).tocsr()
    graph = (graph + graph.T).tocsr()
    degree = np.diff(graph.indptr)
    n_comp, labels = connected_components(graph, directed=False)
    by_label = np.argsort(labels, kind="stable")
    bounds = np.searchsorted(labels[by_label], np.arange(n_comp + 1))
    out = []
    for c in range(n_comp):
        nodes = by_label[bounds[c] : bounds[c + 1]]
        if nodes.size < 2:
            continue
        ends = nodes[degree[nodes] == 1]
        start = ends[0] if ends.size else nodes[0]
        order = depth_first_order(graph, start, directed=False, return_predecessors=False)
        out.append((order, ends.size == 0))
    return out


def march_face(face: Face, grid: MarchGrid, origin: np.ndarray, normal: np.ndarray) -> Crossings | None:
    """Crossing polylines of the plane (origin, normal) with one face, or None.

    Parameters
    ----------
    face : Face
    grid : MarchGrid
    origin, normal : ndarray of shape (3,)
        A point on the plane and its unit normal.
    """
    offset = float(origin @ normal)
    hull = grid.poles @ normal - offset
    if hull.min() > 0 or hull.max() < 0:
        return None
    d = grid.points @ normal - offset
    # rounding must not scatter signs where the plane runs along grid nodes (a face
    # edge or a knot line in the plane): there f is zero, and zero counts as positive
    d[np.abs(d) <= ZERO_SNAP * (np.abs(grid.points).max() + abs(offset))] = 0.0
    if d.min() == 0.0 < d.max():
        # the face touches the plane from the positive side only (a boundary or knot line
        # in the plane): with zero counted as positive it would show no crossing, so the
        # curve would depend on which way the normal points. Count zero as negative here;
        # a neighbour on the other side finds the same curve (engine.py drops the twin).
        d = -d
    return march_field(face, grid, d)


def march_field(face: Face, grid: MarchGrid, d: np.ndarray) -> Crossings | None:
    """Crossing polylines of the zero level of a field sampled on a face's grid, or None.

    Parameters
    ----------
    face : Face
    grid : MarchGrid
    d : ndarray of shape (a, b)
        Field values at the grid nodes; zero counts as positive.
    """
    segs = _cell_segments(d)
    if segs.size == 0:
        return None
    used, inverse = np.unique(segs, return_inverse=True)
    segs = inverse.reshape(-1, 2)
    uv, xyz, fixed = _edge_nodes(grid, d, used)
    if face.is_trimmed:
        uv, xyz, fixed, segs = _trim(face, uv, xyz, fixed, segs)
        if segs.size == 0:
            return None
    return Crossings(uv, xyz, fixed, _polylines(uv.shape[0], segs))
