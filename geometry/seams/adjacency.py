"""Where faces meet: seams from the file's shared edges and from matching boundaries.

Two sources, used together:

- the shared-edge topology of the file (:attr:`Model.edges`): an edge used by
  two different faces is a seam;
- geometric matching of every boundary that the topology leaves free (faces
  without edge uses contribute their trimming loops or the sides of their
  domain): boundary samples are matched to other faces' boundaries within a
  search distance with a k-d tree, so faces left slightly apart still meet as
  a (failing) seam instead of showing as free edges. One long edge against two
  short ones gives two seams.

A boundary sample matches another face's boundary when it lies within the
search distance of it, the two boundaries run parallel (within
:data:`PARALLEL_DEG`), and its closest point is a true perpendicular foot, not
the clamped end of the other boundary (so a boundary running on past the end
of its neighbour becomes a free edge there, rather than a seam with a growing
gap). Each sample takes its closest
matching face; contiguous samples with the same partner form a seam. A face
may meet itself (a closed surface along its parametric closure): that is a
seam too, measured like any other.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.spatial import cKDTree

from ..errors import BattenError
from ..model.topology import Model, _frozen
from .boundary import CORNER_DEG, BoundaryCurve, arc_length_table, face_boundary_curves, polyline_at, split_closed

# Default search distance: faces this far apart (mm), or this fraction of the
# model's diagonal if larger, still meet as a seam. Common practice for catching
# small gaps (no published source).
SEARCH_MM = 0.5
SEARCH_FRACTION = 0.005
# Boundaries that meet run parallel: the angle between them stays below this (degrees).
PARALLEL_DEG = 30.0
# A seam needs this many consecutive matched samples; fewer is a touching corner.
MIN_RUN_SAMPLES = 3
# Sample spacing along boundaries, as a fraction of the search distance.
SPACING_FRACTION = 0.5
MIN_CURVE_SAMPLES, MAX_CURVE_SAMPLES = 9, 4097
# A boundary sample this close (relative to the domain) to a side of the
# domain lies on that side (for a closed face meeting itself).
CLOSURE_RTOL = 1e-6
# How far (relative to the model size) a closest point may lie past a free end.
END_SLACK = 1e-9
# Arc-length table intervals per polyline segment (three Gauss points each), and
# per curve at least. Trim polylines have chords of a fraction of a micrometre,
# over which the curve's speed is all but constant: a few intervals give the
# length to rounding; a face's natural boundary is a few long segments, which
# the floor divides finely.
ARC_TABLE_PER_SEGMENT = 4
ARC_TABLE_MIN = 256
# Boundary sample pairs within reach, per sample, past which the boundaries crowd into one place (a broken
# file: thousands of curves on one spot). Sound models stay far below it: each sample meets a few curves.
PAIRS_PER_SAMPLE = 200


@dataclass(frozen=True, eq=False)
class SeamPair:
    """Two faces meeting along a boundary, before measuring.

    Attributes
    ----------
    face_a : int
        The face sampled along the seam.
    uv_a : ndarray of shape (n, 2)
        The seam as a p-curve polyline on face a.
    face_b : int
        The other face.
    targets_b : tuple of ndarray of shape (m_i, 2)
        p-curves of face b's boundary that points of side a are projected on.
    points : ndarray of shape (k, 3)
        The seam as a 3-D polyline (for display), mm.
    source : str
        ``"topology"`` (a shared edge of the file) or ``"geometry"`` (matched).
    edge : int
        Index of the shared edge in :attr:`Model.edges` (topology), else -1.
        For a topology seam ``uv_a``, ``targets_b[0]`` and ``points`` are the
        edge's samples, point for point.
    """

    face_a: int
    uv_a: np.ndarray
    face_b: int
    targets_b: tuple[np.ndarray, ...]
    points: np.ndarray
    source: str
    edge: int = -1

    def __post_init__(self):
        object.__setattr__(self, "uv_a", _frozen(self.uv_a, (2,)))
        object.__setattr__(self, "targets_b", tuple(_frozen(t, (2,)) for t in self.targets_b))
        object.__setattr__(self, "points", _frozen(self.points, (3,)))

    @property
    def faces(self) -> tuple[int, int]:
        return (self.face_a, self.face_b)

    def cut(self, model: Model, tau0: float, tau1: float) -> SeamPair:
        """The part of the seam between arc-length fractions ``tau0 < tau1`` of side a."""
        uv = sub_polyline(self.uv_a, *_fraction_to_t(model, self.face_a, self.uv_a, tau0, tau1))
        points = model.faces[self.face_a].surface.points_at(uv[:, 0], uv[:, 1])
        return SeamPair(self.face_a, uv, self.face_b, self.targets_b, points, self.source)


@dataclass(frozen=True, eq=False)
class FreeEdge:
    """A piece of boundary that meets no other face.

    Attributes
    ----------
    face : int
    uv : ndarray of shape (n, 2)
        p-curve polyline on the face.
    points : ndarray of shape (n, 3)
        3-D polyline, mm.
    length : float
        mm.
    """

    face: int
    uv: np.ndarray
    points: np.ndarray
    length: float

    def __post_init__(self):
        object.__setattr__(self, "uv", _frozen(self.uv, (2,)))
        object.__setattr__(self, "points", _frozen(self.points, (3,)))
        object.__setattr__(self, "length", float(self.length))

    def as_dict(self) -> dict:
        """Plain data for JSON (the ``free_edges`` entries of ``batten check``)."""
        return {
            "face": self.face,
            "length": self.length,
            "start": [float(x) for x in self.points[0]],
            "end": [float(x) for x in self.points[-1]],
        }


@dataclass(frozen=True, eq=False)
class Adjacency:
    """Every seam and free edge of a model.

    Attributes
    ----------
    seams : tuple of SeamPair
    free_edges : tuple of FreeEdge
    search_distance : float
        The search distance used, mm.
    """

    seams: tuple[SeamPair, ...]
    free_edges: tuple[FreeEdge, ...]
    search_distance: float


def default_search_distance(model: Model) -> float:
    """0.5 mm, or 0.5 % of the model's diagonal if that is larger (mm)."""
    return max(SEARCH_MM, SEARCH_FRACTION * model.size)


def find_seams(
    model: Model, search_distance: float | None = None, topology: bool = True, geometry: bool = True
) -> Adjacency:
    """Find the seams and free edges of a model.

    Parameters
    ----------
    model : Model
    search_distance : float, optional
        Faces this far apart (mm) still meet; default :func:`default_search_distance`.
    topology : bool
        Use the file's shared edges (:attr:`Model.edges`).
    geometry : bool
        Match the boundaries the topology leaves free.

    Returns
    -------
    Adjacency
    """
    search = default_search_distance(model) if search_distance is None else float(search_distance)
    if not search > 0:
        raise BattenError(f"the seam search distance must be a positive length in mm, got {search_distance}")
    seams: list[SeamPair] = []
    free_curves: list[BoundaryCurve] = []
    used_faces: set[int] = set()
    if topology:
        for index, edge in enumerate(model.edges):
            if edge.length <= _tiny(model):
                continue  # a collapsed edge (a pole): neither seam nor free
            uses = [u for u in edge.uses if u.uv.shape[0] >= 2]
            used_faces.update(u.face for u in uses)
            first = uses[0] if uses else None
            partners = [u for u in uses[1:] if first is not None and u.face != first.face]
            for use in partners:
                seams.append(SeamPair(first.face, first.uv, use.face, (use.uv,), edge.points, "topology", index))
            if len(uses) == 1:
                free_curves.extend(_open_curves(model, first.face, first.uv))
    for index, face in enumerate(model.faces):
        if index not in used_faces:
            free_curves.extend(face_boundary_curves(face, index))
    if not geometry:
        free = [_free_edge(model, c, 0.0, float(c.segments)) for c in free_curves]
        return Adjacency(tuple(seams), tuple(free), search)
    matched, free = _match_curves(model, free_curves, search)
    tiny = _tiny(model)
    free = [e for e in _join_free_edges(free, model.size) if e.length > tiny]
    return Adjacency(tuple(seams + matched), tuple(free), search)


def _table_size(segments: int) -> int:
    """Intervals of a boundary curve's arc-length table."""
    return max(ARC_TABLE_PER_SEGMENT * segments, ARC_TABLE_MIN)


def _tiny(model: Model) -> float:
    """Lengths below this (mm) are collapsed edges."""
    return END_SLACK * max(model.size, 1.0)


def _open_curves(model: Model, face: int, uv: np.ndarray) -> list[BoundaryCurve]:
    """A free edge of the file as open boundary curves (a closed one cut in two, so it has ends).

    An edge closed in 3-D but not in (u, v), the end circle of a periodic face,
    runs once round the face: it is cut in the middle, never closed by a chord
    back across the parameter domain (that chord would run round the face again).
    """
    surface = model.faces[face].surface
    pts = surface.points_at(uv[:, 0], uv[:, 1])
    if not np.ptp(pts, axis=0).max() > _tiny(model):
        return []  # collapsed on the face (a pole, or a broken edge): neither seam nor free
    closed_3d = uv.shape[0] > 2 and np.linalg.norm(pts[0] - pts[-1]) <= 1e-9 * max(model.size, 1.0)
    if not closed_3d:
        return [BoundaryCurve(face, uv)]
    (u0, u1), (v0, v1) = surface.domain
    closed_uv = np.all(np.abs(uv[0] - uv[-1]) <= 1e-9 * np.array([u1 - u0, v1 - v0]))
    if closed_uv:
        return [BoundaryCurve(face, piece) for piece in split_closed(uv[:-1], pts[:-1])]
    middle = uv.shape[0] // 2
    return [BoundaryCurve(face, uv[: middle + 1]), BoundaryCurve(face, uv[middle:])]


@dataclass
class _Samples:
    points: np.ndarray  # (N, 3)
    tangent: np.ndarray  # (N, 3) unit, along the curve
    curve: np.ndarray  # (N,) index into the curve list
    t: np.ndarray  # (N,) curve parameter
    first: np.ndarray  # (N,) bool: first sample of its curve
    last: np.ndarray  # (N,) bool
    uv: np.ndarray  # (N, 2) on its face


def _sample(model: Model, curves: list[BoundaryCurve], spacing: float) -> _Samples:
    parts = []
    for i, c in enumerate(curves):
        surface = model.faces[c.face].surface
        t_table, arc = arc_length_table(surface, c.uv, _table_size(c.segments))
        m = int(np.clip(np.ceil(arc[-1] / spacing) + 1, MIN_CURVE_SAMPLES, MAX_CURVE_SAMPLES))
        t = np.interp(np.linspace(0.0, arc[-1], m), arc, t_table)
        uv, _ = polyline_at(c.uv, t)
        pts = surface.points_at(uv[:, 0], uv[:, 1])
        tangent = np.gradient(pts, axis=0)
        tangent /= np.maximum(np.linalg.norm(tangent, axis=1, keepdims=True), 1e-300)
        ends = np.zeros(m, dtype=bool)
        first, last = ends.copy(), ends.copy()
        first[0], last[-1] = True, True
        parts.append((pts, tangent, np.full(m, i), t, first, last, uv))
    return _Samples(*(np.concatenate(col) for col in zip(*parts, strict=True)))


def _segment_distance(s: _Samples, p: np.ndarray, start: np.ndarray, slack: float) -> tuple[np.ndarray, np.ndarray]:
    """Distance from samples p to segments (start, start + 1) and the foot's fraction along each.

    The distance is inf where the foot lies off the segment (by more than
    ``slack`` mm) or the boundaries are not parallel.
    """
    a, b = s.points[start], s.points[start + 1]
    d = b - a
    length = np.maximum(np.linalg.norm(d, axis=1), 1e-300)
    lam = np.einsum("ij,ij->i", s.points[p] - a, d) / np.maximum(length * length, 1e-300)
    foot = a + np.clip(lam, 0.0, 1.0)[:, None] * d
    dist = np.linalg.norm(s.points[p] - foot, axis=1)
    on = (lam >= -slack / length) & (lam <= 1.0 + slack / length)
    parallel = np.abs(np.einsum("ij,ij->i", s.tangent[p], d)) / length >= np.cos(np.radians(PARALLEL_DEG))
    return np.where(on & parallel, dist, np.inf), lam


def _pair_distance(s: _Samples, p: np.ndarray, q: np.ndarray, slack: float) -> np.ndarray:
    """Distance from samples p to the boundary polyline around its sample q (inf: no match).

    The foot must lie on one of the two segments at q, or at q itself when p
    sits in the wedge outside a bend (past the end of one segment and before
    the start of the other).
    """
    dist = np.full(p.size, np.inf)
    lam_before = np.full(p.size, np.nan)
    lam_after = np.full(p.size, np.nan)
    before, after = ~s.first[q], ~s.last[q]
    dist[before], lam_before[before] = _segment_distance(s, p[before], q[before] - 1, slack)
    d_after, lam_after[after] = _segment_distance(s, p[after], q[after], slack)
    dist[after] = np.minimum(dist[after], d_after)
    wedge = before & after & (lam_before > 1.0) & (lam_after < 0.0)
    parallel = np.abs(np.einsum("ij,ij->i", s.tangent[p[wedge]], s.tangent[q[wedge]])) >= np.cos(
        np.radians(PARALLEL_DEG)
    )
    at_vertex = np.linalg.norm(s.points[p[wedge]] - s.points[q[wedge]], axis=1)
    dist[wedge] = np.where(parallel, np.minimum(dist[wedge], at_vertex), dist[wedge])
    return dist


def _match_curves(model: Model, curves: list[BoundaryCurve], search: float) -> tuple[list[SeamPair], list[FreeEdge]]:
    if not curves:
        return [], []
    s = _sample(model, curves, SPACING_FRACTION * search)
    faces = np.array([c.face for c in curves])
    sample_face = faces[s.curve]
    step = np.linalg.norm(np.diff(s.points, axis=0), axis=1)
    reach = search + (step[~s.last[:-1]].max() if np.any(~s.last[:-1]) else 0.0)
    tree = cKDTree(s.points)
    crowded = tree.count_neighbors(tree, reach) - len(s.points)  # counted both ways, without memory
    if crowded > 2 * PAIRS_PER_SAMPLE * len(s.points):
        raise BattenError(
            f"the face boundaries crowd into one place ({crowded // 2} sample pairs within {reach:.3g} mm "
            f"among {len(s.points)} samples): the file's edges are broken, seams cannot be matched"
        )
    pairs = tree.query_pairs(reach, output_type="ndarray")
    # Pairs on different faces, or on two curves of one face at opposite ends
    # of its parameter domain (a closed surface meeting itself along its closure).
    pairs = pairs[s.curve[pairs[:, 0]] != s.curve[pairs[:, 1]]]
    pairs = pairs[_not_self(model, s, sample_face, pairs)]
    p = np.concatenate([pairs[:, 0], pairs[:, 1]])
    q = np.concatenate([pairs[:, 1], pairs[:, 0]])
    slack = END_SLACK * max(model.size, 1.0)
    dist = _pair_distance(s, p, q, slack)
    ok = dist <= search
    p, q, dist = p[ok], q[ok], dist[ok]
    partner_face = sample_face[q]
    n_faces = len(model.faces)
    acceptable = np.unique(p * n_faces + partner_face)
    order = np.lexsort((dist, p))
    best_p, first_idx = np.unique(p[order], return_index=True)
    label = np.full(s.points.shape[0], -1)
    label[best_p] = partner_face[order][first_idx]
    label_curve = np.full(s.points.shape[0], -1)
    label_curve[best_p] = s.curve[q[order][first_idx]]
    seams, free = [], []
    starts = np.flatnonzero(s.first)
    counts = np.bincount(s.curve, minlength=len(curves))
    for i, c in enumerate(curves):
        idx = np.arange(starts[i], starts[i] + counts[i])
        labels = label[idx]
        for j0, j1, partner in _runs(labels):
            if partner >= 0 and j1 - j0 + 1 < MIN_RUN_SAMPLES:
                # a tie at a corner: join a neighbouring seam it also matches, else free
                keys = idx[j0 : j1 + 1] * n_faces
                around = [labels[j] for j in (j0 - 1, j1 + 1) if 0 <= j < idx.size and labels[j] >= 0]
                fits = [f for f in around if np.all(np.isin(keys + f, acceptable))]
                labels[j0 : j1 + 1] = fits[0] if fits else -1
        for j0, j1, partner in _runs(labels):
            if partner < 0:
                if j0 == j1 and 0 < j0 < idx.size - 1:
                    continue  # one stray sample where two seams meet
                # run on to the neighbouring seam samples: the boundary stays unbroken
                t0, t1 = s.t[idx[max(j0 - 1, 0)]], s.t[idx[min(j1 + 1, idx.size - 1)]]
                if t1 > t0:
                    free.append(_free_edge(model, c, t0, t1))
                continue
            run = label_curve[idx[j0 : j1 + 1]]
            if partner < c.face or (partner == c.face and np.median(run) < i):
                continue  # each seam is taken once: from the lower face (or curve) index
            keys = idx * n_faces + partner
            if j0 > 0 and np.isin(keys[j0 - 1], acceptable):
                j0 -= 1
            if j1 < idx.size - 1 and np.isin(keys[j1 + 1], acceptable):
                j1 += 1
            uv_a = sub_polyline(c.uv, s.t[idx[j0]], s.t[idx[j1]])
            pts = s.points[idx[j0 : j1 + 1]]
            run = label_curve[idx[j0 : j1 + 1]]
            run = run[run != i]
            targets = tuple(curves[k].uv for k in np.unique(run[run >= 0]) if curves[k].face == partner)
            if not targets:  # labels taken over from a neighbour at a corner
                targets = tuple(k.uv for k in curves if k.face == partner and k is not c)
            seams.append(SeamPair(c.face, uv_a, int(partner), targets, pts, "geometry"))
    return seams, free


def _not_self(model: Model, s: _Samples, sample_face: np.ndarray, pairs: np.ndarray) -> np.ndarray:
    """Which sample pairs may meet: on different faces, or across a face's periodic closure.

    Two boundary samples of one face meet only where they sit at opposite ends
    of one parameter direction (``u = u0`` and ``u = u1``, or the same in v).
    Anything else (two halves of a free end circle, a boundary folding back
    near itself) is one face's own boundary, not a seam.
    """
    same = sample_face[pairs[:, 0]] == sample_face[pairs[:, 1]]
    keep = ~same
    idx = np.flatnonzero(same)
    if idx.size == 0:
        return keep
    p, q = pairs[idx, 0], pairs[idx, 1]
    domains = np.array([np.ravel(f.surface.domain) for f in model.faces])[sample_face[p]]  # (k, 4): u0 u1 v0 v1
    closure = np.zeros(idx.size, dtype=bool)
    for axis in (0, 1):
        lo, hi = domains[:, 2 * axis], domains[:, 2 * axis + 1]
        near = CLOSURE_RTOL * (hi - lo)
        a, b = s.uv[p, axis], s.uv[q, axis]
        closure |= ((np.abs(a - lo) <= near) & (np.abs(b - hi) <= near)) | (
            (np.abs(a - hi) <= near) & (np.abs(b - lo) <= near)
        )
    keep[idx] = closure
    return keep


def _runs(labels: np.ndarray) -> list[tuple[int, int, int]]:
    """(first, last, label) of each run of equal labels."""
    cuts = np.flatnonzero(np.diff(labels)) + 1
    bounds = np.concatenate([[0], cuts, [labels.size]])
    return [(int(a), int(b) - 1, int(labels[a])) for a, b in zip(bounds[:-1], bounds[1:], strict=True)]


def sub_polyline(uv: np.ndarray, t0: float, t1: float) -> np.ndarray:
    """The part of a polyline between parameters t0 < t1, shape (m, 2)."""
    inner = np.arange(np.floor(t0) + 1, np.ceil(t1))
    inner = inner[(inner > t0) & (inner < t1)]
    ts = np.concatenate([[t0], inner, [t1]])
    return polyline_at(uv, ts)[0]


def _fraction_to_t(model: Model, face: int, uv: np.ndarray, tau0: float, tau1: float) -> tuple[float, float]:
    """Polyline parameters at arc-length fractions of a boundary curve."""
    t_table, arc = arc_length_table(model.faces[face].surface, uv, _table_size(uv.shape[0] - 1))
    fraction = arc / arc[-1] if arc[-1] > 0 else np.linspace(0.0, 1.0, arc.size)
    t0, t1 = np.interp([tau0, tau1], fraction, t_table)
    return float(t0), float(t1)


def free_piece(model: Model, face: int, uv: np.ndarray, tau0: float, tau1: float) -> FreeEdge:
    """The part of a boundary polyline between arc-length fractions ``tau0 < tau1``, as a free edge."""
    t0, t1 = _fraction_to_t(model, face, uv, tau0, tau1)
    return _free_edge(model, BoundaryCurve(face, uv), t0, t1)


def _free_edge(model: Model, curve: BoundaryCurve, t0: float, t1: float) -> FreeEdge:
    surface = model.faces[curve.face].surface
    uv = sub_polyline(curve.uv, t0, t1)
    t_table, arc = arc_length_table(surface, uv, _table_size(uv.shape[0] - 1))
    pv, _ = polyline_at(uv, t_table)
    return FreeEdge(curve.face, uv, surface.points_at(pv[:, 0], pv[:, 1]), arc[-1])


def _join_free_edges(edges: list[FreeEdge], size: float) -> list[FreeEdge]:
    """Join free edges of one face that continue each other smoothly.

    A closed loop without corners is cut in two for matching (see
    :func:`geometry.seams.boundary.split_closed`); where both halves stay free
    they are one free edge again. Ends are paired with a k-d tree of starts.
    """
    if len(edges) < 2:
        return list(edges)
    touch = 1e-9 * max(size, 1.0)
    starts = cKDTree(np.array([e.points[0] for e in edges]))
    follower: dict[int, int] = {}
    led: set[int] = set()
    for i, a in enumerate(edges):
        ta = a.points[-1] - a.points[-2]
        for j in starts.query_ball_point(a.points[-1], touch):
            b = edges[j]
            tb = b.points[1] - b.points[0]
            smooth = ta @ tb >= np.cos(np.radians(CORNER_DEG)) * np.linalg.norm(ta) * np.linalg.norm(tb)
            if j != i and b.face == a.face and smooth and j not in led:
                follower[i] = j
                led.add(j)
                break
    order = [i for i in range(len(edges)) if i not in led] + sorted(led)  # chain heads first, then cycles
    seen, out = set(), []
    for head in order:
        if head in seen:
            continue
        chain = [head]
        seen.add(head)
        while chain[-1] in follower and follower[chain[-1]] not in seen:
            chain.append(follower[chain[-1]])
            seen.add(chain[-1])
        parts = [edges[k] for k in chain]
        uv = np.concatenate([parts[0].uv] + [e.uv[1:] for e in parts[1:]])
        pts = np.concatenate([parts[0].points] + [e.points[1:] for e in parts[1:]])
        out.append(FreeEdge(parts[0].face, uv, pts, sum(e.length for e in parts)))
    return out
