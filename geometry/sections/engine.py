"""Plane sections, iso-parameter and boundary curves of a model, with their curvature.

A plane section is found in four steps:

1. marching squares on each face's cached sample grid (:mod:`geometry.sections.march`),
   trimmed by :meth:`Face.inside`;
2. each crossing polyline is cut where it stands still (a pole), resampled
   at even arc length, given a pair of samples either side of every knot line
   it crosses (:func:`geometry.sections.pieces.split_at_knots`), and every
   sample is refined onto the exact surface by Newton's method on the plane
   equation ``f(u, v) = (S(u, v) - o) . n = 0``, stepping along the gradient of
   f in (u, v) (the curve normal), or along the domain edge or knot line a
   sample is held to;
3. exact signed curvature and its arc-length derivative at every sample
   (:mod:`geometry.sections.curve_geometry`);
4. pieces are joined across faces into chains: end points closer than the
   join tolerance, on faces the model's edge topology says are neighbours
   (any faces when the model has no edges). Chains run one agreed way, so
   arc length starts at a predictable end: closed chains run anticlockwise
   seen from the side the normal points to, open ones run along the plane's
   first in-plane axis (:func:`in_plane_axes`). The sign of curvature does
   not depend on it: it is the face normal's, as on the colour map.

Inflections and extrema are then found by root finding on the exact curve
(:mod:`geometry.sections.features`). :class:`SectionEngine` keeps the grids
and the batched evaluator, so moving the plane repeats steps 1 to 4 only.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.spatial import cKDTree

from ..errors import BattenError
from ..model.topology import Model
from ..nurbs.differential import DEGENERATE_SINE, LIMIT_NUDGE
from .curve_geometry import PLANE, curve_geometry
from .evaluate import FaceEvaluator
from .features import analyse_features
from .iso import IsoCurves
from .march import FIXED_U, FREE, MarchGrid, march_face, march_grids
from .pieces import (
    PieceQueue,
    along_samples,
    approach_pole,
    arc_lengths,
    fill_singular,
    flip,
    interior_knots,
    moving_runs,
    signed,
    spans_of,
    split_at_knots,
)
from .results import PlaneSection, SectionCurve

# Default distance between curve points, as a fraction of the model size.
POINT_SPACING_FRACTION = 1.0 / 400.0
# Samples of all marching grids together: a plane's march costs about 1 ms per 20 000.
GRID_BUDGET = 40_000
# Fewest points on any face piece of a curve.
MIN_PIECE_POINTS = 9
# Newton on the plane equation stops when |f| is below this fraction of the model size.
PLANE_TOLERANCE = 1e-12
NEWTON_MAX_ITERATIONS = 8
# Below this |f| (fraction of the model size) one more Newton step is the last.
LAST_STEP_RESIDUAL = 1e-8
# A sample held to a parameter line moves freely where the section crosses
# that line at an angle whose sine squared is below this.
GRAZING = 0.01
# A Newton step moves at most this fraction of a face's parameter range.
MAX_STEP_FRACTION = 0.05
# Crossing nodes closer than this fraction of the model size are one point.
SAME_POINT = 1e-12
# Piece ends closer than this fraction of the model size join into one chain.
JOIN_FRACTION = 1e-4


def in_plane_axes(normal: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Right-handed in-plane axes (e1, e2) with e1 x e2 = normal, each of shape (3,).

    e1 is the world axis least aligned with the normal, projected into the
    plane; a family of parallel planes shares the same axes.
    """
    axis = np.eye(3)[int(np.argmin(np.abs(normal)))]
    e1 = axis - (axis @ normal) * normal
    e1 /= np.linalg.norm(e1)
    return e1, np.cross(normal, e1)


def parallel_planes(origin, normal, count: int, spacing: float) -> list[tuple[np.ndarray, np.ndarray]]:
    """``count`` planes (point, unit normal), the first through ``origin``, stepping ``spacing`` mm along the normal."""
    origin, normal = _plane(origin, normal)
    return [(origin + i * spacing * normal, normal) for i in range(int(count))]


def _relabel(pieces: np.ndarray, spans: np.ndarray) -> np.ndarray:
    """Span labels made unique along a chain (each piece numbers its own from 0), shape (n,)."""
    new = np.ones(spans.size, int)
    new[0] = 0
    new[1:] = (pieces[1:] != pieces[:-1]) | (spans[1:] != spans[:-1])
    return np.cumsum(new)


def _plane(origin, normal) -> tuple[np.ndarray, np.ndarray]:
    origin = np.asarray(origin, float).reshape(3)
    normal = np.asarray(normal, float).reshape(3)
    length = float(np.linalg.norm(normal))
    if not np.all(np.isfinite(origin)) or not np.isfinite(length) or length == 0.0:
        raise BattenError(f"a section plane needs a finite point and a non-zero normal, got {origin} {normal}")
    return origin, normal / length


@dataclass(frozen=True)
class _Piece:
    """One face's stretch of a curve, exact and oriented along its field."""

    face: int
    geom: dict
    uv: np.ndarray
    cycle: bool


def _on_polyline(piece: _Piece, other: _Piece, tol: float) -> bool:
    """Whether every sample of ``piece`` lies on the polyline of ``other`` (see ``_without_twins``)."""
    pts, line = piece.geom["points"], other.geom["points"]
    if other.cycle:
        line = np.concatenate([line, line[:1]])
    start, step = line[:-1], np.diff(line, axis=0)  # (s, 3)
    h2 = np.einsum("ij,ij->i", step, step)
    slack = tol + float(h2.max()) * float(np.max(other.geom["abs_curvature"])) / 8.0
    # distance from each sample (n) to each segment (s): clamp the foot of the perpendicular
    rel = pts[:, None, :] - start[None, :, :]
    t = np.clip(np.einsum("nsk,sk->ns", rel, step) / np.where(h2 > 0, h2, 1.0), 0.0, 1.0)
    dist = np.linalg.norm(rel - t[..., None] * step[None], axis=-1).min(axis=1)
    return bool(np.all(dist <= slack))


class SectionEngine(IsoCurves):
    """Sections of one model, with per-face sample grids cached for interactive use.

    Parameters
    ----------
    model : Model
    point_spacing : float, optional
        mm between curve points (and comb teeth); default model size / 400.
    grid_budget : int
        Total samples of the faces' marching grids (shared out by
        :func:`geometry.model.sampling.model_grids` by size and bending).

    Notes
    -----
    Building the engine samples every face once; :meth:`plane` then costs one
    marching pass over the cached grids, a few batched Newton steps and one
    third-order evaluation per curve point.
    """

    def __init__(self, model: Model, point_spacing: float | None = None, grid_budget: int = GRID_BUDGET):
        if not model.faces:
            raise BattenError(f"{model.source or 'model'}: no faces to section")
        self.model = model
        self.size = model.size or 1.0
        self.spacing = float(point_spacing or self.size * POINT_SPACING_FRACTION)
        self.evaluator = FaceEvaluator([f.surface for f in model.faces])
        self.grids: tuple[MarchGrid, ...] = march_grids(model, grid_budget)
        self.signs = np.array([f.sign for f in model.faces])
        self.knots = tuple(
            (
                interior_knots(f.surface.knots_u, f.surface.degree_u, f.surface.shape[0]),
                interior_knots(f.surface.knots_v, f.surface.degree_v, f.surface.shape[1]),
            )
            for f in model.faces
        )
        self.ranges = self.evaluator.ranges
        self.neighbours: set[tuple[int, int]] | None = None
        if model.edges:
            pairs = set()
            for edge in model.edges:
                faces = edge.faces
                pairs.update((a, b) for a in faces for b in faces)
            self.neighbours = pairs

    # -- exact evaluation ------------------------------------------------------
    def _project(self, faces: np.ndarray, uv: np.ndarray, fixed: np.ndarray, origin, normal) -> np.ndarray:
        """Newton on the plane equation, along grad f (or along a domain edge), shape (k, 2)."""
        uv = self.evaluator.clip(faces, uv)
        tol = PLANE_TOLERANCE * self.size
        for _ in range(NEWTON_MAX_ITERATIONS):
            ders = self.evaluator.derivatives(faces, uv, 1)
            f = np.einsum("ik,i->k", ders[0, 0], normal) - origin @ normal
            residual = np.max(np.abs(f))
            if residual <= tol:
                break
            grad = np.stack([ders[1, 0].T @ normal, ders[0, 1].T @ normal], axis=1)
            uv = self.evaluator.level_step(faces, uv, f, grad, fixed, MAX_STEP_FRACTION, GRAZING)
            if residual <= LAST_STEP_RESIDUAL * self.size:
                break  # quadratic convergence: this step brought |f| to about C f^2, far below tol
        return uv

    def _geometry(self, kind: str, faces: np.ndarray, uv: np.ndarray, plane=None, motion=None) -> dict:
        """Exact curve geometry at the samples (see :func:`curve_geometry`), plus ``uv`` and ``faces``.

        ``plane`` is (origin, unit normal) for plane sections, None for iso-parameter
        curves; ``motion`` the uv derivatives of a trim curve (PCURVE).
        """
        normal = None if plane is None else plane[1]
        ders = self.evaluator.derivatives(faces, uv, 3)
        geom = curve_geometry(kind, ders, self.signs[faces], normal, self.size, motion)
        bad = self._degenerate(faces, ders)
        geom["singular"] = np.zeros(faces.size, bool)
        geom["singular"][bad] = True
        if bad.size:
            # a pole or collapsed edge: limits from two nudges towards the domain's
            # middle (as geometry.nurbs.differential does), back onto the curve, and
            # extrapolated to the point: g(0) = 2 g(e) - g(2 e) + O(e^2)
            lo = np.stack([self.evaluator.u_lo, self.evaluator.v_lo], axis=1)[faces[bad]]
            step = np.sign(lo + 0.5 * self.ranges[faces[bad]] - uv[bad]) * LIMIT_NUDGE * self.ranges[faces[bad]]
            near = []
            for m in (1.0, 2.0):
                at = uv[bad] + m * step
                if plane is not None:
                    at = self._project(faces[bad], at, np.full(bad.size, FREE), *plane)
                ders_near = self.evaluator.derivatives(faces[bad], at, 3)
                sub = None if motion is None else tuple(m[:, bad] for m in motion)
                near.append(curve_geometry(kind, ders_near, self.signs[faces[bad]], normal, self.size, sub))
            for key, value in geom.items():
                if key not in ("points", "singular"):
                    value[bad] = 2.0 * near[0][key] - near[1][key]
            for key in ("tangents", "sides", "field_tangents"):
                geom[key][bad] /= np.linalg.norm(geom[key][bad], axis=1, keepdims=True)
        geom["uv"] = uv
        geom["faces"] = faces
        return geom

    def _degenerate(self, faces: np.ndarray, ders: np.ndarray) -> np.ndarray:
        """Indices of samples where the parametrisation is singular (Su x Sv vanishes)."""
        su, sv = np.linalg.norm(ders[1, 0], axis=0), np.linalg.norm(ders[0, 1], axis=0)
        area = np.linalg.norm(np.cross(ders[1, 0], ders[0, 1], axis=0), axis=0)
        typical = self.size / self.ranges[faces]  # |S_u|, |S_v| of a face as big as the model
        return np.flatnonzero(
            (area <= DEGENERATE_SINE * su * sv)
            | (su <= DEGENERATE_SINE * typical[:, 0])
            | (sv <= DEGENERATE_SINE * typical[:, 1])
        )

    # -- plane sections --------------------------------------------------------
    def plane(self, origin, normal, exact: bool = True) -> PlaneSection:
        """All curves where the plane (origin, normal) cuts the model.

        Parameters
        ----------
        origin : array_like of shape (3,)
            A point on the plane, mm.
        normal : array_like of shape (3,)
            The plane's normal (any length but zero).
        exact : bool
            Locate inflections and extrema by root finding on the exact curve;
            False interpolates them linearly between samples (for dragging).

        Returns
        -------
        PlaneSection
        """
        origin, normal = _plane(origin, normal)
        pieces = self._plane_pieces(origin, normal)
        chains = self._join(pieces)
        curves = [self._plane_curve(chain, origin, normal, exact) for chain in chains]
        curves.sort(key=lambda c: -c.length)
        return PlaneSection(origin, normal, tuple(curves))

    def family(self, origin, normal, count: int, spacing: float, exact: bool = True) -> tuple[PlaneSection, ...]:
        """Sections by ``count`` parallel planes ``spacing`` mm apart (see :func:`parallel_planes`)."""
        return tuple(self.plane(o, n, exact) for o, n in parallel_planes(origin, normal, count, spacing))

    def _plane_pieces(self, origin, normal) -> list[_Piece]:
        """March every face, resample and split each crossing polyline, refine all samples at once."""
        queue = PieceQueue(self.spacing, MIN_PIECE_POINTS)
        for index, (face, grid) in enumerate(zip(self.model.faces, self.grids, strict=True)):
            crossings = march_face(face, grid, origin, normal)
            if crossings is None:
                continue
            for line, ring in crossings.polylines:
                for run, cycle, cut in moving_runs(crossings.xyz[line], ring, SAME_POINT * self.size):
                    nodes = line[run]
                    uv, fixed = crossings.uv[nodes], crossings.fixed[nodes]
                    if any(cut):  # the line passes a pole
                        uv, fixed = approach_pole(uv, fixed, np.array(face.surface.domain), cut)
                    queue.add(index, uv, crossings.xyz[nodes], fixed, cycle)
        if not queue.cycles:
            return []
        faces, uv, fixed, pairs, owner = self._split_knots(*queue.samples())
        before = uv.copy()
        uv = self._project(faces, uv, fixed, origin, normal)
        geom = self._geometry(PLANE, faces, uv, (origin, normal))
        # a knot pair must stay on its knot line and reach the plane; where the
        # section only grazes the line it cannot, and the pair is dropped
        held = np.where(fixed == FIXED_U, 0, 1)
        rows = np.arange(faces.size)
        slipped = np.abs(uv[rows, held] - before[rows, held]) > 1e-9 * self.ranges[faces, held]
        slipped |= np.abs(geom["points"] @ normal - origin @ normal) > 10.0 * PLANE_TOLERANCE * self.size
        keep = ~np.isin(pairs, pairs[(pairs >= 0) & slipped])
        geom = {k: v[keep] for k, v in geom.items()}
        uv, faces, pairs, owner = uv[keep], faces[keep], pairs[keep], owner[keep]
        bounds = np.searchsorted(owner, np.arange(len(queue.cycles) + 1))
        geom = fill_singular(geom, bounds)
        geom["spans"] = np.concatenate([spans_of(pairs[a:b]) for a, b in zip(bounds[:-1], bounds[1:], strict=True)])
        return [
            _Piece(int(faces[a]), along_samples({k: v[a:b] for k, v in geom.items()}), uv[a:b], cycle)
            for a, b, cycle in zip(bounds[:-1], bounds[1:], queue.cycles, strict=True)
        ]

    def _split_knots(self, faces, uv, fixed, bounds):
        """Pieces with knot pairs added (:func:`split_at_knots`): faces, uv, fixed, pair ids, piece of each sample."""
        parts, count = [], 0
        for piece, (a, b) in enumerate(zip(bounds[:-1], bounds[1:], strict=True)):
            face = int(faces[a])
            puv, pfix, pairs = split_at_knots(uv[a:b], fixed[a:b], *self.knots[face], self.ranges[face])
            pairs[pairs >= 0] += count
            count = int(pairs.max()) + 1 if np.any(pairs >= 0) else count
            parts.append((np.full(puv.shape[0], face), puv, pfix, pairs, np.full(puv.shape[0], piece)))
        return tuple(np.concatenate(c) for c in zip(*parts, strict=True))

    def _join(self, pieces: list[_Piece]) -> list[tuple[list[tuple[_Piece, bool]], bool]]:
        """Chains of (piece, reversed) and whether each closes, from end-point proximity."""
        pieces = self._without_twins(pieces)
        open_ids = [i for i, p in enumerate(pieces) if not p.cycle]
        chains = [([(p, False)], True) for p in pieces if p.cycle]
        if not open_ids:
            return chains
        ends = np.array([[pieces[i].geom["points"][0], pieces[i].geom["points"][-1]] for i in open_ids]).reshape(-1, 3)
        match = np.full(ends.shape[0], -1)
        tol = JOIN_FRACTION * self.size
        lengths = [float(np.ptp(pieces[i].geom["points"], axis=0).max()) for i in open_ids]
        pairs = cKDTree(ends).query_pairs(tol, output_type="ndarray")
        if pairs.size:
            dist = np.linalg.norm(ends[pairs[:, 0]] - ends[pairs[:, 1]], axis=1)
            for a, b in pairs[np.argsort(dist)]:  # nearest first; one partner per end
                fa, fb = pieces[open_ids[a // 2]].face, pieces[open_ids[b // 2]].face
                if a // 2 == b // 2 and lengths[a // 2] < 2.0 * tol:
                    continue  # a speck, not a closed curve
                if self.neighbours is not None and fa != fb and (fa, fb) not in self.neighbours:
                    continue
                if match[a] < 0 and match[b] < 0:
                    match[a], match[b] = b, a
        seen = np.zeros(len(open_ids), bool)

        def walk(start_piece: int, enter_end: int) -> tuple[list[tuple[_Piece, bool]], bool]:
            chain, piece, end = [], start_piece, enter_end
            while not seen[piece]:
                seen[piece] = True
                chain.append((pieces[open_ids[piece]], end == 1))
                nxt = match[2 * piece + (1 - end)]
                if nxt < 0:
                    return chain, False
                piece, end = nxt // 2, nxt % 2
            return chain, True

        for piece in range(len(open_ids)):  # open chains start at a free end
            for end in (0, 1):
                if not seen[piece] and match[2 * piece + end] < 0:
                    chains.append(walk(piece, end))
        for piece in range(len(open_ids)):  # what is left closes on itself
            if not seen[piece]:
                chains.append(walk(piece, 0))
        return chains

    def _without_twins(self, pieces: list[_Piece]) -> list[_Piece]:
        """Drop pieces that repeat another face's piece: a plane through a shared edge cuts both faces there.

        Twins are pieces of different faces with the same ends (either way round)
        whose every sample lies on the other's polyline, within the join tolerance
        plus the chord's sagitta ``h^2 |k| / 8`` (h the longest step, k the largest
        curvature: the circle through a step's ends). Sample counts and positions
        may differ between the faces, so samples are not compared one to one.
        """
        if len(pieces) < 2:
            return pieces
        tol = JOIN_FRACTION * self.size
        ends = np.array([[p.geom["points"][0], p.geom["points"][-1]] for p in pieces])  # (m, 2, 3)
        gap = np.linalg.norm(ends[:, None] - ends[None, :], axis=-1).max(-1)
        gap_turned = np.linalg.norm(ends[:, None] - ends[None, :, ::-1], axis=-1).max(-1)
        faces = np.array([p.face for p in pieces])
        # pieces closing on themselves (cycles, or ends on a periodic face's parameter seam) start
        # anywhere: their ends say nothing, the polyline test decides
        loops = np.array([p.cycle for p in pieces]) | (np.linalg.norm(ends[:, 0] - ends[:, 1], axis=1) <= tol)
        candidate = (np.minimum(gap, gap_turned) <= tol) | (loops[:, None] & loops[None, :])
        candidate &= faces[:, None] != faces[None, :]
        drop = np.zeros(len(pieces), bool)
        for a, b in zip(*np.nonzero(np.triu(candidate, k=1)), strict=True):
            if (
                not drop[a]
                and not drop[b]
                and _on_polyline(pieces[b], pieces[a], tol)
                and _on_polyline(pieces[a], pieces[b], tol)
            ):
                drop[b] = True
        return [p for p, d in zip(pieces, drop, strict=True) if not d]

    def _plane_curve(self, chain, origin, normal, exact: bool) -> SectionCurve:
        parts = [(flip(p.geom) if rev else p.geom, rev) for p, rev in chain[0]]
        closed = chain[1]
        curve = {k: np.concatenate([g[k] for g, _ in parts]) for k in parts[0][0]}
        curve["pieces"] = np.concatenate([np.full(g["points"].shape[0], i) for i, (g, _) in enumerate(parts)])
        curve["spans"] = _relabel(curve["pieces"], curve["spans"])
        e1, e2 = in_plane_axes(normal)
        pts = curve["points"]
        if closed:
            x, y = (pts - origin) @ e1, (pts - origin) @ e2
            backwards = float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y)) < 0  # shoelace area
        else:
            chord = pts[-1] - pts[0]
            backwards = chord @ e1 < 0 if abs(chord @ e1) > 1e-9 * self.size else chord @ e2 < 0
        if backwards:
            curve = flip(curve)
            curve["pieces"] = curve["pieces"].max() - curve["pieces"]
            curve["spans"] = curve["spans"].max() - curve["spans"]
        return self._finish(PLANE, PLANE, curve, closed, exact, plane=(origin, normal))

    def _finish(self, kind, field_kind, curve, closed, exact, plane=None, parameter=None, probe=None):
        """Arc length, special points and figures; the SectionCurve.

        ``probe`` evaluates the exact curve between samples (see
        ``geometry.sections.features.Probe``); the default interpolates the
        parameters linearly and, for a plane section, refines onto the plane.
        """
        pts = curve["points"]
        s = arc_lengths(pts, curve["abs_curvature"])
        curve["arc_length"] = s
        normal = None if plane is None else plane[1]

        def between(ia, ib, t):
            faces = curve["faces"][ia]
            uv = curve["uv"][ia] + t[:, None] * (curve["uv"][ib] - curve["uv"][ia])
            if field_kind == PLANE:
                uv = self._project(faces, uv, np.full(faces.size, FREE), plane[0], normal)
            return signed(self._geometry(field_kind, faces, uv, plane), curve["orient"][ia])

        probe = probe or between
        inflections, extrema, figures = analyse_features(curve, probe if exact else None, closed, self.size)
        return SectionCurve(
            kind=kind,
            points=pts,
            arc_length=s,
            curvature=curve["curvature"],
            slope=curve["slope"],
            abs_curvature=curve["abs_curvature"],
            tangents=curve["tangents"],
            sides=curve["sides"],
            faces=curve["faces"],
            uv=curve["uv"],
            pieces=curve["pieces"],
            spans=curve["spans"],
            closed=closed,
            inflections=inflections,
            extrema=extrema,
            figures=figures,
            plane=None if plane is None else np.stack(plane),
            parameter=parameter,
        )


def plane_section(model: Model, origin, normal, point_spacing: float | None = None, exact: bool = True) -> PlaneSection:
    """Curves where one plane cuts a model (a one-off :class:`SectionEngine`)."""
    return SectionEngine(model, point_spacing).plane(origin, normal, exact)


def section_family(
    model: Model, origin, normal, count: int, spacing: float, point_spacing: float | None = None
) -> tuple[PlaneSection, ...]:
    """Sections by ``count`` parallel planes ``spacing`` mm apart, the first through ``origin``."""
    return SectionEngine(model, point_spacing).family(origin, normal, count, spacing)
