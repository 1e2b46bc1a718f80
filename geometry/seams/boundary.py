"""Face boundaries as curves on their surfaces: sampling and closest-point projection.

A boundary curve is a polyline in a face's parameter space (a p-curve) mapped
onto the surface: ``C(t) = S(uv(t))`` with ``uv`` piecewise linear in
``t in [0, n - 1]`` (vertex ``i`` at ``t = i``). The natural sides of an
untrimmed face are single segments, so there ``C`` is the exact iso-curve; a
trimmed face's loop is as exact as the reader's p-curve polyline.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.spatial import cKDTree

from ..model.topology import Face
from ..nurbs.surface import NurbsSurface

# Loops are split into separate boundary curves where their direction turns by
# more than this (degrees): a corner of the face, not a bend of a smooth edge.
CORNER_DEG = 30.0
# Newton iterations for the closest point on a boundary curve (converges in 3-5).
PROJECTION_ITERATIONS = 30
# Step size, in units of t, below which a projection has converged.
PROJECTION_STEP = 1e-13
# Seed samples per curve for the closest-point search (spread over its segments).
SEED_SAMPLES = 512
# Newton iterations for the closest point on the surface near a boundary foot.
SURFACE_ITERATIONS = 6
# ... and its step, relative to the domain, below which it has converged.
SURFACE_STEP = 1e-14


@dataclass(frozen=True, eq=False)
class BoundaryCurve:
    """An open piece of a face's boundary.

    Attributes
    ----------
    face : int
        Index of the face in the model.
    uv : ndarray of shape (n, 2)
        Vertices of the p-curve, ``n >= 2``, in the face's (u, v).
    """

    face: int
    uv: np.ndarray

    def __post_init__(self):
        uv = np.array(self.uv, dtype=float).reshape(-1, 2)
        uv.setflags(write=False)
        object.__setattr__(self, "uv", uv)

    @property
    def segments(self) -> int:
        return self.uv.shape[0] - 1

    @property
    def iso_direction(self) -> int | None:
        """0 when the curve is a line of constant u, 1 for constant v, else None."""
        for axis in (0, 1):
            if np.all(self.uv[:, axis] == self.uv[0, axis]):
                return axis
        return None


def polyline_at(uv: np.ndarray, t: np.ndarray, segment: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Point and derivative of a piecewise-linear p-curve.

    Parameters
    ----------
    uv : ndarray of shape (n, 2)
    t : ndarray of shape (k,)
        In ``[0, n - 1]``.
    segment : ndarray of int, shape (k,), optional
        Segment to use (matters only at vertices); default ``floor(t)``.

    Returns
    -------
    point, slope : ndarray of shape (k, 2)
        ``uv(t)`` and ``d uv / dt``.
    """
    t = np.asarray(t, float)
    if segment is None:
        segment = np.clip(np.floor(t).astype(int), 0, uv.shape[0] - 2)
    slope = uv[segment + 1] - uv[segment]
    return uv[segment] + (t - segment)[:, None] * slope, slope


def split_closed(uv: np.ndarray, points: np.ndarray, corner_deg: float = CORNER_DEG) -> list[np.ndarray]:
    """Split a closed loop at its corners into open pieces.

    Parameters
    ----------
    uv : ndarray of shape (n, 2)
        Loop vertices, first not repeated.
    points : ndarray of shape (n, 3)
        The same vertices on the surface.
    corner_deg : float

    Returns
    -------
    list of ndarray of shape (m, 2)
        Open polylines whose ends meet. A loop without corners is cut in two,
        so that every boundary curve has two ends.
    """
    n = uv.shape[0]
    chords = np.roll(points, -1, axis=0) - points  # chord i: vertex i -> i + 1
    unit = chords / np.maximum(np.linalg.norm(chords, axis=1, keepdims=True), 1e-300)
    turn = np.einsum("ij,ij->i", np.roll(unit, 1, axis=0), unit)  # at vertex i
    corners = np.flatnonzero(turn < np.cos(np.radians(corner_deg)))
    if corners.size == 0:
        corners = np.array([0, n // 2])
    elif corners.size == 1:
        corners = np.sort([corners[0], (corners[0] + n // 2) % n])
    pieces = []
    closed = np.concatenate([uv, uv[:1]])
    for start, stop in zip(corners, np.roll(corners, -1), strict=True):
        idx = np.arange(start, stop + (n if stop <= start else 0) + 1) % n
        idx[-1] = n if idx[-1] == 0 else idx[-1]
        pieces.append(closed[idx])
    return pieces


def face_boundary_curves(face: Face, index: int, corner_deg: float = CORNER_DEG) -> list[BoundaryCurve]:
    """The boundary of a face as open curves.

    Parameters
    ----------
    face : Face
    index : int
        The face's index in its model.
    corner_deg : float
        Turning angle that splits a trimming loop.

    Returns
    -------
    list of BoundaryCurve
        The four sides of the natural domain (counter-clockwise in (u, v)) for
        an untrimmed face; each trimming loop split at its corners otherwise.
    """
    if not face.is_trimmed:
        (u0, u1), (v0, v1) = face.surface.domain
        sides = ([(u0, v0), (u1, v0)], [(u1, v0), (u1, v1)], [(u1, v1), (u0, v1)], [(u0, v1), (u0, v0)])
        return [BoundaryCurve(index, np.array(s)) for s in sides]
    curves = []
    for loop in face.loops:
        if loop.shape[0] < 3:
            continue
        pts = face.surface.points_at(loop[:, 0], loop[:, 1])
        curves.extend(BoundaryCurve(index, piece) for piece in split_closed(loop, pts, corner_deg))
    return curves


def curve_parameters(uv: np.ndarray, per_curve: int) -> np.ndarray:
    """Parameters spread over a polyline's segments, ends included.

    Parameters
    ----------
    uv : ndarray of shape (n, 2)
    per_curve : int
        Rough total; every segment gets at least two.

    Returns
    -------
    t : ndarray of shape (m,)
        Increasing, from 0 to ``n - 1``.
    """
    segments = uv.shape[0] - 1
    each = max(2, int(np.ceil(per_curve / segments)))
    local = np.linspace(0.0, 1.0, each + 1)[:-1]
    t = (np.arange(segments)[:, None] + local[None, :]).ravel()
    return np.append(t, float(segments))


# Three-point Gauss-Legendre rule on [0, 1] (Abramowitz & Stegun, 1964, 25.4.29).
_GAUSS_NODES = 0.5 + 0.5 * np.sqrt(0.6) * np.array([-1.0, 0.0, 1.0])
_GAUSS_WEIGHTS = np.array([5.0, 8.0, 5.0]) / 18.0


def arc_length_table(surface: NurbsSurface, uv: np.ndarray, per_curve: int) -> tuple[np.ndarray, np.ndarray]:
    """Arc length of a boundary curve against its parameter.

    Parameters
    ----------
    surface : NurbsSurface
    uv : ndarray of shape (n, 2)
    per_curve : int
        Table size (rough).

    Returns
    -------
    t, arc : ndarray of shape (m,)
        Parameters and the arc length from ``t = 0`` to each, in mm.

    Notes
    -----
    ``|C'(t)| = |S_u u' + S_v v'|`` integrated over each table interval by
    three-point Gauss-Legendre quadrature (exact for polynomials of degree 5;
    error of order h^6 for a smooth integrand).
    """
    t = curve_parameters(uv, per_curve)
    width = np.diff(t)
    nodes = (t[:-1, None] + width[:, None] * _GAUSS_NODES[None, :]).ravel()
    segment = np.repeat(np.clip(np.floor(t[:-1]).astype(int), 0, uv.shape[0] - 2), 3)
    p, slope = polyline_at(uv, nodes, segment)
    d = surface.derivatives_at(p[:, 0], p[:, 1], 1)
    speed = np.linalg.norm(d[1, 0] * slope[:, :1] + d[0, 1] * slope[:, 1:], axis=1).reshape(-1, 3)
    return t, np.concatenate([[0.0], np.cumsum(width * (speed @ _GAUSS_WEIGHTS))])


class CurveTarget:
    """Boundary curves of one face, to project points onto.

    Parameters
    ----------
    surface : NurbsSurface
    curves : sequence of ndarray of shape (n_i, 2)
        p-curve polylines of that face.
    """

    def __init__(self, surface: NurbsSurface, curves):
        self.surface = surface
        self.curves = [np.asarray(c, float) for c in curves]
        sizes = np.array([c.shape[0] for c in self.curves])
        self.offset = np.concatenate([[0], np.cumsum(sizes)])[:-1]
        self.vertices = np.concatenate(self.curves)
        self.last_segment = sizes - 2
        self.seeds = []  # per curve: (parameters, k-d tree of their points)
        for i, c in enumerate(self.curves):
            t = curve_parameters(c, SEED_SAMPLES)
            uv, _ = self._at(np.full(t.size, i), t, self._segment(np.full(t.size, i), t))
            self.seeds.append((t, cKDTree(surface.points_at(uv[:, 0], uv[:, 1]))))
        self.slack = np.concatenate([_chord_slack(surface.points_at(c[:, 0], c[:, 1])) for c in self.curves])

    def _segment(self, curve: np.ndarray, t: np.ndarray) -> np.ndarray:
        return np.clip(np.floor(t).astype(int), 0, self.last_segment[curve])

    def _at(self, curve, t, segment):
        start = self.offset[curve] + segment
        slope = self.vertices[start + 1] - self.vertices[start]
        return self.vertices[start] + (t - segment)[:, None] * slope, slope

    def _newton(self, points: np.ndarray, curve: np.ndarray, t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Closest parameters on the given curves from seeds t (see :meth:`project`)."""
        seg = self._segment(curve, t)
        active = np.ones(points.shape[0], dtype=bool)
        for _ in range(PROJECTION_ITERATIONS):
            idx = np.flatnonzero(active)
            if idx.size == 0:
                break
            c, s = curve[idx], seg[idx]
            uv, slope = self._at(c, t[idx], s)
            d = self.surface.derivatives_at(uv[:, 0], uv[:, 1], 2)
            du, dv = slope[:, 0:1], slope[:, 1:2]
            c1 = d[1, 0] * du + d[0, 1] * dv
            c2 = d[2, 0] * du * du + 2.0 * d[1, 1] * du * dv + d[0, 2] * dv * dv
            r = d[0, 0] - points[idx]
            g = np.einsum("ij,ij->i", c1, r)
            gn = np.einsum("ij,ij->i", c1, c1)
            h = gn + np.einsum("ij,ij->i", c2, r)
            h = np.where(h > 0.0, h, gn)
            step = -g / np.where(h > 0.0, h, 1.0)
            new_t = np.clip(t[idx] + step, s, s + 1)
            at_end = (new_t >= s + 1) & (step > 0) & (s < self.last_segment[c])
            at_start = (new_t <= s) & (step < 0) & (s > 0)
            seg[idx] = s + at_end - at_start
            moved = np.abs(new_t - t[idx])
            t[idx] = new_t
            active[idx] = (moved > PROJECTION_STEP) | at_end | at_start
        return t, seg

    def project(self, points: np.ndarray) -> dict[str, np.ndarray]:
        """Closest points of the boundary curves to ``points``.

        Parameters
        ----------
        points : ndarray of shape (k, 3)

        Returns
        -------
        dict
            ``uv`` (k, 2) and ``slope`` (k, 2): the foot's parameters and
            ``d uv / dt`` there; ``foot`` (k, 3); ``distance`` (k,);
            ``curve`` (k,) int and ``t`` (k,).

        Notes
        -----
        Newton's method on ``f(t) = |C(t) - P|^2 / 2`` (The NURBS Book, 2nd ed.,
        sec. 6.1, eq. 6.3 for point inversion on a curve), with
        ``C' = S_u u' + S_v v'`` and ``C'' = S_uu u'^2 + 2 S_uv u' v' + S_vv v'^2``
        on the current segment. Each step stays inside its segment; a point
        pushed against a segment end moves on to the neighbouring segment.
        Each curve is tried from its sample nearest to the point (k-d tree);
        the closest result wins.
        """
        points = np.asarray(points, float).reshape(-1, 3)
        best = None
        for i, (seed_t, tree) in enumerate(self.seeds):
            curve = np.full(points.shape[0], i)
            t, seg = self._newton(points, curve, seed_t[tree.query(points)[1]].copy())
            uv, _ = self._at(curve, t, seg)
            dist = np.linalg.norm(self.surface.points_at(uv[:, 0], uv[:, 1]) - points, axis=1)
            if best is None:
                best = (curve, t, seg, dist)
            else:
                closer = dist < best[3]
                best = tuple(np.where(closer, new, old) for new, old in zip((curve, t, seg, dist), best, strict=True))
        curve, t, seg, _ = best
        uv, slope = self._at(curve, t, seg)
        foot = self.surface.points_at(uv[:, 0], uv[:, 1])
        # A polyline p-curve is a chord of the true trim: a point on the true
        # edge may sit off it by the chord's sagitta. Take the closest point of
        # the surface instead where it lies within that sagitta of the foot.
        slack = self.slack[self.offset[curve] - curve + seg]
        loose = np.flatnonzero(slack > 0)
        if loose.size:
            uv_s = invert_on_surface(self.surface, points[loose], uv[loose])
            on_surface = self.surface.points_at(uv_s[:, 0], uv_s[:, 1])
            near = np.linalg.norm(on_surface - foot[loose], axis=1) <= slack[loose]
            closer = np.linalg.norm(on_surface - points[loose], axis=1) < np.linalg.norm(
                foot[loose] - points[loose], axis=1
            )
            take = loose[near & closer]
            uv[take] = uv_s[near & closer]
            foot[take] = on_surface[near & closer]
        return {
            "uv": uv,
            "slope": slope,
            "foot": foot,
            "distance": np.linalg.norm(foot - points, axis=1),
            "curve": curve,
            "t": t,
        }


def _chord_slack(points: np.ndarray) -> np.ndarray:
    """How far the true curve may stray from each chord of a polyline, shape (n - 1,).

    An arc of turning angle theta over a chord c bulges by about c theta / 8;
    twice that, from the turn at the chord's two ends, is allowed. A single
    segment (the exact side of a domain) gets none.
    """
    chords = np.diff(points, axis=0)
    length = np.linalg.norm(chords, axis=1)
    if chords.shape[0] < 2:
        return np.zeros(chords.shape[0])
    unit = chords / np.maximum(length[:, None], 1e-300)
    turn = np.arccos(np.clip(np.einsum("ij,ij->i", unit[:-1], unit[1:]), -1.0, 1.0))
    at_ends = np.maximum(np.concatenate([[0.0], turn]), np.concatenate([turn, [0.0]]))
    return length * at_ends / 4.0


def invert_on_surface(surface: NurbsSurface, points: np.ndarray, uv: np.ndarray) -> np.ndarray:
    """Parameters of the closest surface points, by Newton's method from ``uv``.

    Parameters
    ----------
    surface : NurbsSurface
    points : ndarray of shape (k, 3)
    uv : ndarray of shape (k, 2)
        Starting parameters (close to the answer).

    Returns
    -------
    uv : ndarray of shape (k, 2)
        Clipped to the domain.

    Notes
    -----
    Point inversion on a surface, The NURBS Book (2nd ed.), sec. 6.1,
    eq. 6.6 and 6.7: solve ``S_u . r = 0``, ``S_v . r = 0`` with
    ``r = S(u, v) - P``.
    """
    uv = np.array(uv, dtype=float)
    (u0, u1), (v0, v1) = surface.domain
    converged = SURFACE_STEP * max(u1 - u0, v1 - v0)
    for _ in range(SURFACE_ITERATIONS):
        d = surface.derivatives_at(uv[:, 0], uv[:, 1], 2)
        r = d[0, 0] - points
        su, sv = d[1, 0], d[0, 1]
        f = np.einsum("ij,ij->i", su, r)
        g = np.einsum("ij,ij->i", sv, r)
        a = np.einsum("ij,ij->i", su, su) + np.einsum("ij,ij->i", r, d[2, 0])
        b = np.einsum("ij,ij->i", su, sv) + np.einsum("ij,ij->i", r, d[1, 1])
        c = np.einsum("ij,ij->i", sv, sv) + np.einsum("ij,ij->i", r, d[0, 2])
        det = a * c - b * b
        ok = np.abs(det) > 1e-300
        safe = np.where(ok, det, 1.0)
        du = np.where(ok, -(c * f - b * g) / safe, 0.0)
        dv = np.where(ok, -(a * g - b * f) / safe, 0.0)
        u, v = surface.clip_to_domain(uv[:, 0] + du, uv[:, 1] + dv)
        uv = np.stack([u, v], axis=1)
        if np.all(np.abs(du) + np.abs(dv) <= converged):
            break
    return uv
