"""Sample arrays of one curve: resampling, knot breaks, traversal direction, arc length.

A curve's samples travel as a dict of arrays (``points``, ``tangents``,
``sides``, ``curvature``, ``slope``, ... one row per sample, see
:func:`geometry.sections.curve_geometry.curve_geometry`). These helpers place the
samples, split them at knot lines and turn them to run one way.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .march import FIXED_U, FIXED_V, FREE

# Knot lines crossed at a smaller sine (in parameter units scaled by the ranges) get no pair.
STEEP_CROSSING = 0.2
# A trimming loop turning by more than this at a vertex (degrees) has a corner there.
CORNER_DEG = 25.0
# A sample closer to a knot pair than this fraction of its step gives way to the pair.
CROWDED = 0.25
# Knot doubles sit this fraction of the face's parameter range either side of the knot.
KNOT_OFFSET = 1e-11


def arc_lengths(points: np.ndarray, abs_curvature: np.ndarray) -> np.ndarray:
    """Arc length at each point of a sampled curve, shape (n,).

    Parameters
    ----------
    points : ndarray of shape (n, 3)
    abs_curvature : ndarray of shape (n,)
        Exact curvature magnitude at the points.

    Notes
    -----
    Each chord c is lengthened to the arc of a circle of the mean curvature of
    its ends: ``arc = c (1 + k^2 c^2 / 24)``, the series of ``2 asin(k c / 2) / k``.
    The error per step falls from O(k^2 c^3) (plain chords) to O(c^4 k'k).
    """
    chord = np.linalg.norm(np.diff(points, axis=0), axis=1)
    k = 0.5 * (abs_curvature[1:] + abs_curvature[:-1])
    return np.concatenate([[0.0], np.cumsum(chord * (1.0 + (k * chord) ** 2 / 24.0))])


def signed(geom: dict, factor: np.ndarray | float) -> dict:
    """Values for the traversal direction ``factor`` (+1 or -1 per sample) times the field's.

    Reversing a curve negates its tangent and dk/ds; k and the side vector
    keep their sign, which comes from the face normal (see
    :mod:`geometry.sections.curve_geometry`).
    """
    out = dict(geom)
    col = np.asarray(factor, float)[..., None] if np.ndim(factor) else factor
    out["tangents"] = geom["tangents"] * col
    out["orient"] = geom.get("orient", 1.0) * np.asarray(factor, float)
    out["slope"] = geom["slope"] * factor
    return out


def flip(geom: dict) -> dict:
    """The same samples traversed backwards."""
    return signed({k: v[::-1] for k, v in geom.items()}, -1.0)


def along_samples(geom: dict) -> dict:
    """Field-oriented values of one piece turned to run in the order of its samples (sets ``orient``).

    The field's direction is continuous along a regular piece, so one sign
    serves the piece: the one most steps agree with (single steps can be
    too short to tell, at a knot pair).
    """
    pts = geom["points"]
    if pts.shape[0] < 2:
        return {**geom, "orient": np.ones(pts.shape[0])}
    step = np.diff(pts, axis=0)
    along = float(np.sum(np.einsum("ij,ij->i", geom["tangents"][:-1] + geom["tangents"][1:], step)))
    return signed({**geom, "orient": np.ones(pts.shape[0])}, -1.0 if along < 0 else 1.0)


@dataclass
class PieceQueue:
    """Crossing polylines of several faces, resampled and gathered for one batched refinement.

    Attributes
    ----------
    spacing : float
        Distance between samples along a piece, mm.
    min_points : int
        Fewest samples of a piece.
    faces, uv, fixed : list of ndarray
        Per piece: the face of each sample (m,), its parameters (m, 2), and FREE or the
        domain edge an end sample is held to (m,).
    cycles : list of bool
        Whether each piece closes on itself.
    """

    spacing: float
    min_points: int
    faces: list[np.ndarray] = field(default_factory=list)
    uv: list[np.ndarray] = field(default_factory=list)
    fixed: list[np.ndarray] = field(default_factory=list)
    cycles: list[bool] = field(default_factory=list)

    def add(self, face: int, uv: np.ndarray, xyz: np.ndarray, node_fixed: np.ndarray, cycle: bool) -> None:
        """Resample one crossing polyline (nodes ``uv`` (n, 2), ``xyz`` (n, 3)) at the spacing."""
        uv = resample(uv, xyz, cycle, self.spacing, self.min_points)
        flags = np.full(uv.shape[0], FREE)
        if not cycle:  # end points on a domain edge stay on it
            flags[0], flags[-1] = node_fixed[0], node_fixed[-1]
        self.faces.append(np.full(uv.shape[0], face))
        self.uv.append(uv)
        self.fixed.append(flags)
        self.cycles.append(cycle)

    def samples(self) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """All samples: faces (k,), uv (k, 2), fixed (k,) and each piece's first sample (pieces + 1,)."""
        bounds = np.cumsum([0] + [f.size for f in self.faces])
        return np.concatenate(self.faces), np.concatenate(self.uv), np.concatenate(self.fixed), bounds


def resample(uv: np.ndarray, xyz: np.ndarray, closed: bool, spacing: float, min_points: int) -> np.ndarray:
    """Parameters at even arc length along a polyline (linear in uv between nodes), shape (m, 2).

    The polyline should not stand still in space (see :func:`moving_runs`).
    """
    if closed:
        uv, xyz = np.concatenate([uv, uv[:1]]), np.concatenate([xyz, xyz[:1]])
    s = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(xyz, axis=0), axis=1))])
    count = max(min_points, int(np.ceil(s[-1] / spacing)) + 1)
    target = np.linspace(0.0, s[-1], count)  # a closed polyline ends on a copy of its first point
    return np.stack([np.interp(target, s, uv[:, 0]), np.interp(target, s, uv[:, 1])], axis=1)


def moving_runs(xyz: np.ndarray, closed: bool, tol: float) -> list[tuple[np.ndarray, bool, tuple[bool, bool]]]:
    """Split a polyline where it stands still in space: index runs, whether each closes, which ends are cuts.

    Along a collapsed edge (a surface pole) the parameters move while the point
    does not; the curve passes through the pole from one parameter line to
    another, so the polyline is cut there (the pieces join again in space).
    A run that starts or ends on such a cut starts or ends at the pole; runs
    that do not move at all are dropped.

    Parameters
    ----------
    xyz : ndarray of shape (n, 3)
    closed : bool
    tol : float
        Steps up to this length (mm) stand still.
    """
    n = xyz.shape[0]
    ring = np.concatenate([xyz, xyz[:1]]) if closed else xyz
    chord = np.linalg.norm(np.diff(ring, axis=0), axis=1)
    still = chord <= tol
    if np.all(still):
        return []
    if not np.any(still):
        return [(np.arange(n), closed, (False, False))]
    if closed:  # start the ring just after a standstill, then treat it as open
        start = int(np.flatnonzero(still)[0]) + 1
        order = np.roll(np.arange(n), -start)
        still = np.roll(still, -start)[:-1]
    else:
        order = np.arange(n)
    cuts = np.flatnonzero(still) + 1
    runs = np.split(order, cuts)
    out = []
    for i, run in enumerate(runs):
        if run.size >= 2:
            out.append((run, False, (closed or i > 0, closed or i < len(runs) - 1)))
    return out


def approach_pole(
    uv: np.ndarray, fixed: np.ndarray, domain: np.ndarray, ends: tuple[bool, bool]
) -> tuple[np.ndarray, np.ndarray]:
    """Put run ends on a collapsed edge onto the parameter line they arrive along.

    Every parameter along a collapsed edge names the same point, but the
    curve reaches it along one parameter line, which the last two nodes point
    to (extended to the edge). Interpolating towards any other would cut
    across the pole.

    Parameters
    ----------
    uv : ndarray of shape (m, 2)
    fixed : ndarray of int, shape (m,)
    domain : ndarray of shape (2, 2)
        ((u0, u1), (v0, v1)) of the face.
    ends : (bool, bool)
        Which ends (first, last) sit on a collapsed edge (the cuts of :func:`moving_runs`).

    Returns
    -------
    uv, fixed : the ends moved, and flagged to stay on their edge when refined.
    """
    uv, fixed = uv.copy(), fixed.copy()
    if uv.shape[0] < 2:
        return uv, fixed
    for end, near, far in [(0, 1, 2)] * bool(ends[0]) + [(-1, -2, -3)] * bool(ends[1]):
        for edge_axis, flag in ((1, FIXED_V), (0, FIXED_U)):
            if not np.any(
                np.isclose(uv[end, edge_axis], domain[edge_axis], rtol=0, atol=1e-12 * np.ptp(domain[edge_axis]))
            ):
                continue
            free = 1 - edge_axis
            value = uv[near, free]
            if uv.shape[0] >= 3 and uv[near, edge_axis] != uv[far, edge_axis]:
                # extend the last leg to the edge: the line of approach to first order
                rate = (uv[near, free] - uv[far, free]) / (uv[near, edge_axis] - uv[far, edge_axis])
                value += rate * (uv[end, edge_axis] - uv[near, edge_axis])
            uv[end, free] = np.clip(value, *domain[free])
            fixed[end] = flag
            break
    return uv, fixed


def fill_singular(geom: dict, bounds: np.ndarray) -> dict:
    """Values at singular samples (a pole) extended linearly from the two next samples of their piece.

    At a pole the surface's parametrisation is singular and nearby evaluations
    lose their digits; the curve itself is smooth there, so its curvature,
    slope and directions are continued from the neighbours along the arc
    (error O(h^2) in the sample spacing h). Samples that cannot be filled keep
    their evaluated values (limits from a nudged parameter).

    Parameters
    ----------
    geom : dict
        Sample arrays with ``points`` and ``singular``.
    bounds : ndarray of int
        Piece boundaries into the arrays (piece k is ``bounds[k]:bounds[k + 1]``).
    """
    bad = np.flatnonzero(geom["singular"])
    if bad.size == 0:
        return geom
    piece = np.searchsorted(bounds, bad, side="right") - 1
    start, stop = bounds[piece], bounds[piece + 1]
    forward = bad + 2 < stop  # continue from the two samples after, else from the two before
    j1 = np.where(forward, bad + 1, bad - 1)
    j2 = np.where(forward, bad + 2, bad - 2)
    ok = j2 >= start
    ok[ok] = ~geom["singular"][j1[ok]] & ~geom["singular"][j2[ok]]
    bad, j1, j2 = bad[ok], j1[ok], j2[ok]
    pts = geom["points"]
    d1 = np.linalg.norm(pts[bad] - pts[j1], axis=1)
    d12 = np.linalg.norm(pts[j1] - pts[j2], axis=1)
    w = np.where(d12 > 0, d1 / np.where(d12 > 0, d12, 1.0), 0.0)
    out = dict(geom)
    for key in ("curvature", "slope", "abs_curvature"):
        out[key] = geom[key].copy()
        out[key][bad] = geom[key][j1] + w * (geom[key][j1] - geom[key][j2])
    for key in ("tangents", "sides", "field_tangents"):
        out[key] = geom[key].copy()
        value = geom[key][j1] + w[:, None] * (geom[key][j1] - geom[key][j2])
        out[key][bad] = value / np.linalg.norm(value, axis=1, keepdims=True)
    return out


def loop_stretches(uv: np.ndarray, xyz: np.ndarray, tol: float) -> list[tuple[np.ndarray, np.ndarray, bool]]:
    """A closed polyline split at its corners: (uv, xyz, closed) per stretch.

    Parameters
    ----------
    uv : ndarray of shape (n, 2)
    xyz : ndarray of shape (n, 3)
        The loop (first point not repeated) in parameters and in space.
    tol : float
        Steps up to this length (mm) are dropped (repeated points).

    Returns
    -------
    list
        One closed stretch when the loop has no corner (a turn above
        CORNER_DEG between neighbouring legs), else one open stretch from each
        corner to the next, both corners included.
    """
    step = np.linalg.norm(np.roll(xyz, -1, axis=0) - xyz, axis=1)
    keep = step > tol
    uv, xyz = uv[keep], xyz[keep]
    n = uv.shape[0]
    if n < 2:
        return []
    legs = np.roll(xyz, -1, axis=0) - xyz  # leg i runs from vertex i to i + 1
    legs /= np.linalg.norm(legs, axis=1, keepdims=True)
    turn = np.degrees(np.arccos(np.clip(np.einsum("ij,ij->i", np.roll(legs, 1, axis=0), legs), -1.0, 1.0)))
    corners = np.flatnonzero(turn > CORNER_DEG)
    if corners.size == 0:
        return [(uv, xyz, True)]
    out = []
    for a, b in zip(corners, np.roll(corners, -1), strict=True):
        idx = np.arange(a, b + 1) if b > a else np.concatenate([np.arange(a, n), np.arange(0, b + 1)])
        out.append((uv[idx], xyz[idx], False))
    return out


def interior_knots(knots: np.ndarray, degree: int, n_poles: int) -> np.ndarray:
    """Distinct knots strictly inside the domain, shape (k,)."""
    inner = np.unique(knots[degree + 1 : n_poles])
    return inner[(inner > knots[degree]) & (inner < knots[n_poles])]


def split_at_knots(
    uv: np.ndarray, fixed: np.ndarray, knots_u: np.ndarray, knots_v: np.ndarray, ranges: tuple[float, float]
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Insert a pair of samples either side of every knot line the polyline crosses.

    Parameters
    ----------
    uv : ndarray of shape (n, 2)
    fixed : ndarray of int, shape (n,)
        Refinement flags (see :mod:`geometry.sections.march`).
    knots_u, knots_v : ndarray
        Interior knots of the face (:func:`interior_knots`).
    ranges : (float, float)
        The face's parameter ranges, for the offset of the pair.

    Returns
    -------
    uv : ndarray of shape (m, 2)
    fixed : ndarray of int, shape (m,)
        The inserted samples keep their knot-side parameter when refined.
    pairs : ndarray of int, shape (m,)
        -1 for the given samples, k for both samples of the k-th pair (see
        :func:`spans_of`).

    Notes
    -----
    A spline surface is only C^(p - r) across a knot of multiplicity r (The NURBS
    Book, sec. 2.2), so a section's curvature or its derivative may jump where
    the section crosses a knot line. A pair of samples a hair either side of
    the crossing makes the jump visible between two neighbours, where a sign
    change is a special point at the knot with no root to search for.
    """
    hits = []
    for axis, knots in ((0, knots_u), (1, knots_v)):
        if knots.size == 0 or uv.shape[0] < 2:
            continue
        a = uv[:-1, axis, None] - knots[None, :]
        b = uv[1:, axis, None] - knots[None, :]
        seg, k = np.nonzero(a * b < 0)
        # a crossing at a grazing angle is left alone: the pair could not be held
        # to the knot line when refined (and the curve may only touch the line)
        step = (uv[seg + 1] - uv[seg]) / np.asarray(ranges, float)
        steep = np.abs(step[:, axis]) >= STEEP_CROSSING * np.hypot(step[:, 0], step[:, 1])
        seg, k = seg[steep], k[steep]
        tau = a[seg, k] / (a[seg, k] - b[seg, k])
        hits.append((seg, tau, np.full(seg.size, axis), knots[k]))
    if not hits or sum(h[0].size for h in hits) == 0:
        return uv, fixed, np.full(uv.shape[0], -1)
    seg, tau, axis, knot = (np.concatenate(c) for c in zip(*hits, strict=True))
    order = np.lexsort((tau, seg))
    seg, tau, axis, knot = seg[order], tau[order], axis[order], knot[order]
    base = uv[seg] + tau[:, None] * (uv[seg + 1] - uv[seg])
    rows = np.arange(seg.size)
    direction = np.sign(uv[seg + 1, axis] - uv[seg, axis])
    offset = KNOT_OFFSET * np.asarray(ranges, float)[axis]
    before, after = base.copy(), base.copy()
    before[rows, axis] = knot - direction * offset
    after[rows, axis] = knot + direction * offset
    pairs = np.stack([before, after], axis=1).reshape(-1, 2)
    flags = np.repeat(np.where(axis == 0, FIXED_U, FIXED_V), 2)
    # a sample very near the crossing could be refined onto the other side of
    # the knot, out of order: the pair stands in for it
    n = uv.shape[0]
    keep = np.ones(n, bool)
    keep[seg[(tau < CROWDED) & (seg > 0)]] = False
    keep[seg[(tau > 1.0 - CROWDED) & (seg + 1 < n - 1)] + 1] = False
    where = np.repeat(np.cumsum(keep)[seg], 2)  # insertion points among the kept samples
    new_uv = np.insert(uv[keep], where, pairs, axis=0)
    new_fixed = np.insert(fixed[keep], where, flags)
    new_pairs = np.insert(np.full(int(keep.sum()), -1), where, np.repeat(np.arange(seg.size), 2))
    return new_uv, new_fixed, new_pairs


def spans_of(pairs: np.ndarray) -> np.ndarray:
    """Smooth-stretch labels, shape (m,): the second sample of each knot pair opens a new stretch."""
    opens = np.zeros(pairs.size, int)
    opens[1:] = (pairs[1:] >= 0) & (pairs[1:] == pairs[:-1])
    return np.cumsum(opens)
