"""Seams along the file's shared edges, measured at the edge, all seams at once.

A seam of the file's topology is measured where the kernel says the faces meet:
on the 3-D edge. The edge comes as a polyline (sampled by arc length with its
chords within a small fraction of the position tolerance, see
:mod:`geometry.kernel.occt_curves`) with each face's p-curve at the same
parameters. At an arc-length fraction ``tau`` of a seam:

1. ``X`` is the edge point there, and the p-curves give starting parameters on
   both faces;
2. ``X`` is projected onto both surfaces (point inversion, Newton's method);
3. where the edge lies off its surfaces (a file whose edge and trims disagree),
   the two feet are moved to the closest pair of points of the two surfaces:
   both are projected onto the point where their tangent planes meet (Newton's
   step for a surface intersection) or, for near-parallel surfaces, onto their
   midpoint (averaged alternating projections), until the gap stops shrinking;
   so the gap is between the surfaces, not between the edge and them;
4. the measures of :mod:`geometry.seams.measures` follow from the derivatives
   at the two feet: gap ``|S_a - S_b|``, angle between the normals, normal
   curvature across the seam on each side and its jump, and the iso-curve
   jumps where both sides are iso-parameter lines.

Everything is vectorised over every sample of every seam: each stage is one
compiled call over every face of the model at once
(:func:`geometry.nurbs.compiled_inversion.invert_with_derivatives` on a
:class:`SurfacePack`, which hands back each foot with its derivatives).
"""

from __future__ import annotations

import numpy as np

from ..model.topology import Model
from ..nurbs.compiled_eval import SurfacePack
from ..nurbs.compiled_inversion import invert_with_derivatives
from ..vectors import dot, unit
from .adjacency import SeamPair
from .batch import even_samples
from .boundary import BoundaryCurve
from .measures import DEGENERATE_SPEED, INWARD_OFFSET, ISO_ALIGNED_DEG, ORIENTATION_VOTES, _iso_curvature, seam_samples
from .spacing import TURN_PER_SAMPLE_DEG

# Alternating projections: at most this many rounds, each while the gap still
# shrinks by more than this fraction (converged, or a real gap between the faces).
ALTERNATIONS = 6
ALTERNATION_RTOL = 1e-2
# Normals closer than this sine are near parallel: no tangent-plane step.
CROSSING_SINE = 1e-3
# A tangent-plane step longer than this many gaps is not taken.
MAX_STEP_GAPS = 1e3
# A gap below this (mm) needs no alternation: far below any position tolerance.
ALTERNATE_ABOVE_MM = 1e-6
# |Su x Sv| relative to |Su| |Sv| below this: no tangent plane (a pole).
DEGENERATE_SINE = 1e-10


def measurable_at_edge(pair: SeamPair) -> bool:
    """A topology seam whose edge polyline and both p-curves share their samples."""
    n = pair.points.shape[0]
    return pair.edge >= 0 and n >= 2 and pair.uv_a.shape[0] == n and pair.targets_b[0].shape[0] == n


def _by_face(faces: np.ndarray):
    """(face, indices) for each face present, indices into ``faces``."""
    order = np.argsort(faces, kind="stable")
    values, starts = np.unique(faces[order], return_index=True)
    return zip(values.tolist(), np.split(order, starts[1:]), strict=True)


def _cross_normal_curvature(d: np.ndarray, normal: np.ndarray, across: np.ndarray) -> np.ndarray:
    """Normal curvature of a surface in the tangent direction ``across``, shape (k,).

    Notes
    -----
    ``across = a Su + b Sv`` with ``(a, b)`` from the first fundamental form
    ``[[E, F], [F, G]] (a, b) = (across . Su, across . Sv)``; then
    ``k_n = II(across) / I(across) = (a^2 Suu + 2 a b Suv + b^2 Svv) . n / |across|^2``
    (do Carmo, 1976, sec. 3-2, the normal curvature as the ratio of the
    fundamental forms).
    """
    su, sv = d[1, 0], d[0, 1]
    e, f, g = dot(su, su), dot(su, sv), dot(sv, sv)
    det = e * g - f * f
    pu, pv = dot(across, su), dot(across, sv)
    safe = np.where(det > 0, det, 1.0)
    a = (g * pu - f * pv) / safe
    b = (e * pv - f * pu) / safe
    second = dot(d[2, 0], normal) * a * a + 2.0 * dot(d[1, 1], normal) * a * b + dot(d[0, 2], normal) * b * b
    return np.where(det > 0, second / np.maximum(dot(across, across), 1e-300), np.nan)


class EdgeSeams:
    """The measures of many topology seams at arc-length fractions.

    Parameters
    ----------
    model : Model
    pairs : sequence of SeamPair
        Each with :func:`measurable_at_edge` true.
    flat_curvature : float
        Floor (1/mm) of the denominator of the relative curvature jump.
    """

    def __init__(self, model: Model, pairs, flat_curvature: float):
        self.model = model
        self.pairs = list(pairs)
        self.flat_curvature = float(flat_curvature)
        self.pack = SurfacePack.of([f.surface for f in model.faces])
        self.domains = self.pack.domains
        counts = np.array([p.points.shape[0] for p in self.pairs])
        self.start = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(int)
        self.count = counts
        self.points = np.concatenate([p.points for p in self.pairs])
        self.uv_a = np.concatenate([p.uv_a for p in self.pairs])
        self.uv_b = np.concatenate([p.targets_b[0] for p in self.pairs])
        owner = np.repeat(np.arange(len(self.pairs)), counts)
        chord = np.linalg.norm(np.diff(self.points, axis=0), axis=1)
        chord[self.start[1:] - 1] = 0.0  # no chord between one seam's end and the next one's start
        arc = np.concatenate([[0.0], np.cumsum(chord)])
        self.arc = arc - arc[self.start][owner]
        self.length = self.arc[self.start + counts - 1]
        self.tangents = _vertex_tangents(self.points, self.arc, owner, self.start, counts)
        # A monotone key to find each sample's segment with one searchsorted.
        self.stride = float(self.length.max(initial=0.0)) * 2.0 + 1.0
        self.key = owner * self.stride + self.arc
        self.face_a = np.array([p.face_a for p in self.pairs], dtype=int)
        self.face_b = np.array([p.face_b for p in self.pairs], dtype=int)
        self.sign_a = np.array([model.faces[f].sign for f in self.face_a])
        self.sign_b = np.array([model.faces[f].sign for f in self.face_b])
        self.iso_a = np.array([_iso(p.uv_a) for p in self.pairs], dtype=int)
        self.iso_b = np.array([_iso(p.targets_b[0]) for p in self.pairs], dtype=int)
        self.has_iso = (self.iso_a >= 0) & (self.iso_b >= 0)
        self.cross_a = np.ones(len(self.pairs))
        self.cross_b = np.ones(len(self.pairs))
        if self.has_iso.any():
            self._orient_iso()
        self.orientation = np.ones(len(self.pairs))
        self.orientation = self._orientation()

    # -- where the samples are --------------------------------------------
    def sample_positions(self, counts: np.ndarray, max_spacing: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Arc-length fractions of ``counts`` samples per seam, closer together where the edge turns.

        Parameters
        ----------
        counts : ndarray of int, shape (s,)
            Samples of each seam (:func:`geometry.seams.spacing.sample_counts`).
        max_spacing : float
            mm.

        Returns
        -------
        seam, tau : ndarray of shape (sum(counts),)
            Seam by seam, ``tau`` increasing from 0 to 1.
        start : ndarray of int, shape (s,)

        Notes
        -----
        The samples are spread evenly in ``D(s) = s / max_spacing + theta(s) /
        TURN_PER_SAMPLE_DEG``, ``theta(s)`` the edge polyline's turning up to arc
        length ``s``: equidistribution of a monitor function (de Boor, 1973,
        Good approximation by splines with variable knots; cited from memory).
        A seam of even bending gets even samples; a short fold (an edge turning
        by 160 degrees within micrometres) gets its share of them.
        """
        seam, fraction, start = even_samples(counts)
        n = self.count.size
        owner = np.repeat(np.arange(n), self.count)
        legs = np.diff(self.points, axis=0)
        size = np.linalg.norm(legs, axis=1)
        legs = legs / np.where(size > 0, size, 1.0)[:, None]
        # the turn at each inner vertex: the angle between the legs before and after it
        turn = np.zeros(owner.size)
        inner = np.flatnonzero((owner[1:-1] == owner[:-2]) & (owner[1:-1] == owner[2:])) + 1
        before, after = legs[inner - 1], legs[inner]
        turn[inner] = np.arctan2(np.linalg.norm(np.cross(before, after), axis=1), dot(before, after))
        total = np.cumsum(turn)
        turned = total - total[self.start][owner]
        demand = self.arc / max_spacing + turned / np.radians(TURN_PER_SAMPLE_DEG)
        end = demand[self.start + self.count - 1]
        level = np.where(end[owner] > 0, demand / np.where(end[owner] > 0, end[owner], 1.0), 0.0)
        key = owner * 2.0 + level
        i = np.searchsorted(key, seam * 2.0 + fraction, side="right") - 1
        i = np.clip(i, self.start[seam], self.start[seam] + self.count[seam] - 2)
        rise = level[i + 1] - level[i]
        w = np.clip(np.where(rise > 0, (fraction - level[i]) / np.where(rise > 0, rise, 1.0), 0.0), 0.0, 1.0)
        arc = self.arc[i] + w * (self.arc[i + 1] - self.arc[i])
        length = self.length[seam]
        tau = np.where(length > 0, arc / np.where(length > 0, length, 1.0), fraction)
        tau[start] = 0.0
        tau[np.append(start[1:], seam.size) - 1] = 1.0
        return seam, np.clip(tau, 0.0, 1.0), start

    def _locate(self, seam: np.ndarray, tau: np.ndarray):
        arc = np.clip(tau, 0.0, 1.0) * self.length[seam]
        i = np.searchsorted(self.key, seam * self.stride + arc, side="right") - 1
        i = np.clip(i, self.start[seam], self.start[seam] + self.count[seam] - 2)
        span = self.arc[i + 1] - self.arc[i]
        frac = np.clip(np.where(span > 0, (arc - self.arc[i]) / np.where(span > 0, span, 1.0), 0.0), 0.0, 1.0)
        return i, frac[:, None], arc

    def _along(self, seam: np.ndarray, tau: np.ndarray) -> dict[str, np.ndarray]:
        i, f, arc = self._locate(seam, tau)

        def lerp(a):
            return a[i] + f * (a[i + 1] - a[i])

        # Cubic Hermite between the vertices (tangents of unit speed in arc
        # length): the chords' sag, h^2 k / 8, drops to the order of h^4.
        h = (self.arc[i + 1] - self.arc[i])[:, None]
        f2, f3 = f * f, f * f * f
        edge = (
            (2 * f3 - 3 * f2 + 1) * self.points[i]
            + (f3 - 2 * f2 + f) * h * self.tangents[i]
            + (-2 * f3 + 3 * f2) * self.points[i + 1]
            + (f3 - f2) * h * self.tangents[i + 1]
        )
        return {
            "edge": edge,
            "tangent": unit(lerp(self.tangents)),
            "uv_a": lerp(self.uv_a),
            "uv_b": lerp(self.uv_b),
            "slope_a": self.uv_a[i + 1] - self.uv_a[i],
            "slope_b": self.uv_b[i + 1] - self.uv_b[i],
            "arc": arc,
        }

    # -- batched surface work ---------------------------------------------
    def _project(self, faces: np.ndarray, points: np.ndarray, uv: np.ndarray, orders) -> tuple[np.ndarray, np.ndarray]:
        """Closest surface parameters of ``points`` on their ``faces``, from nearby ``uv``, and the derivatives there.

        Returns
        -------
        uv : ndarray of shape (k, 2)
        ders : ndarray of shape (4, 4, k, 3)
            Derivatives at the feet up to ``orders`` (int or shape (k,)); zero above.

        Notes
        -----
        Point inversion, The NURBS Book (2nd ed.), sec. 6.1, eq. 6.6, compiled,
        every point of every face in one call; the foot's derivatives are those
        of the last Newton iteration
        (:func:`geometry.nurbs.compiled_inversion.invert_with_derivatives`).
        """
        u, v, ders = invert_with_derivatives(self.pack, faces, points, uv[:, 0], uv[:, 1], orders)
        out = np.zeros((4, 4, faces.size, 3))
        out[: ders.shape[0], : ders.shape[1]] = ders
        return np.stack([u, v], axis=1), out

    def _inside(self, faces: np.ndarray, uv: np.ndarray) -> np.ndarray:
        out = np.zeros(faces.size, dtype=bool)
        for face, idx in _by_face(faces):
            out[idx] = self.model.faces[face].inside(uv[idx, 0], uv[idx, 1])
        return out

    def _feet(self, seam: np.ndarray, at: dict, orders) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """Parameters of the two feet (see the module notes, steps 2 and 3) and the derivatives there.

        Returns
        -------
        uv_a, uv_b : ndarray of shape (k, 2)
        da, db : ndarray of shape (4, 4, k, 3)
            Derivatives of each side at its foot, up to ``orders`` (int or shape (k,)).
        """
        fa, fb = self.face_a[seam], self.face_b[seam]
        orders = np.broadcast_to(np.maximum(orders, 1), seam.shape)  # normals for the common point
        # The edge point onto face a, that foot onto face b, and that one back
        # onto face a: where either face ends exactly on the edge (its foot
        # clamped to its boundary), both feet come to that same edge point,
        # whatever the polyline's own small error.
        uv_a, da = self._project(fa, at["edge"], at["uv_a"], 0)
        uv_b, db = self._project(fb, da[0, 0], at["uv_b"], orders)
        uv_a, da = self._project(fa, db[0, 0], uv_a, orders)
        gap = np.linalg.norm(da[0, 0] - db[0, 0], axis=1)
        active = np.flatnonzero(gap > ALTERNATE_ABOVE_MM)
        for _ in range(ALTERNATIONS):
            if active.size == 0:
                break
            m = active.size
            target = self._common_point(da[:, :, active], db[:, :, active])
            uv, d = self._project(
                np.concatenate([fa[active], fb[active]]),
                np.concatenate([target, target]),
                np.concatenate([uv_a[active], uv_b[active]]),
                np.concatenate([orders[active], orders[active]]),
            )
            new_gap = np.linalg.norm(d[0, 0, :m] - d[0, 0, m:], axis=1)
            better = new_gap < gap[active]
            shrink = gap[active] - new_gap
            enough = shrink > ALTERNATION_RTOL * gap[active]
            take = active[better]
            uv_a[take], uv_b[take] = uv[:m][better], uv[m:][better]
            da[:, :, take], db[:, :, take] = d[:, :, :m][:, :, better], d[:, :, m:][:, :, better]
            gap[take] = new_gap[better]
            active = active[better & enough & (new_gap > ALTERNATE_ABOVE_MM)]
        return uv_a, uv_b, da, db

    def _common_point(self, da: np.ndarray, db: np.ndarray) -> np.ndarray:
        """Where the two tangent planes at the feet meet, nearest the feet's midpoint, shape (k, 3).

        Parameters
        ----------
        da, db : ndarray of shape (>= 2, >= 2, k, 3)
            Derivatives at the two feet, to first order at least.

        Notes
        -----
        The point ``X = M + alpha n_a + beta n_b`` (M the midpoint of the feet)
        on both tangent planes, ``n_a . (X - P_a) = 0`` and ``n_b . (X - P_b) = 0``:
        the Newton step for a point of the intersection of two surfaces
        (Barnhill and Kersey, CAGD 7, 1990, sec. 3; cited from memory), which
        converges quadratically where the surfaces cross. Where they are near
        parallel (or apart, not crossing) the step is the midpoint itself, and
        projecting it onto both surfaces is an averaged alternating projection.
        """
        pa, pb = da[0, 0], db[0, 0]
        na = np.nan_to_num(self._normal(da, np.ones(pa.shape[0])))
        nb = np.nan_to_num(self._normal(db, np.ones(pb.shape[0])))
        middle = 0.5 * (pa + pb)
        c = dot(na, nb)
        det = 1.0 - c * c
        ra, rb = -dot(na, middle - pa), -dot(nb, middle - pb)
        crossing = det > CROSSING_SINE**2
        safe = np.where(crossing, det, 1.0)
        alpha = np.where(crossing, (ra - c * rb) / safe, 0.0)
        beta = np.where(crossing, (rb - c * ra) / safe, 0.0)
        step = alpha[:, None] * na + beta[:, None] * nb
        # A step far beyond the gap is a crossing far off (or none): stay at the midpoint.
        far = np.linalg.norm(step, axis=1) > MAX_STEP_GAPS * np.linalg.norm(pa - pb, axis=1)
        step[far] = 0.0
        return middle + step

    # -- orientation ------------------------------------------------------
    def _inward_turn(self, faces, uv, slope, d, normal, tangent) -> np.ndarray:
        """Sign of (n x T) . inward across the boundary: +1, -1, or 0 when undecided."""
        box = self.domains[faces]
        spans = np.stack([box[:, 1] - box[:, 0], box[:, 3] - box[:, 2]], axis=1)
        perp = np.stack([-slope[:, 1], slope[:, 0]], axis=1)
        perp = perp / np.maximum(np.linalg.norm(perp / spans, axis=1, keepdims=True), 1e-300) * INWARD_OFFSET
        plus, minus = self._inside(faces, uv + perp), self._inside(faces, uv - perp)
        side = np.where(plus & ~minus, 1.0, np.where(minus & ~plus, -1.0, 0.0))
        inward = side[:, None] * (d[1, 0] * perp[:, :1] + d[0, 1] * perp[:, 1:])
        return np.sign(dot(np.cross(normal, tangent), inward))

    def _orientation(self) -> np.ndarray:
        """+1 where the faces run along their edge in opposite directions (consistent), else -1."""
        n = len(self.pairs)
        seam = np.repeat(np.arange(n), ORIENTATION_VOTES)
        tau = np.tile(np.linspace(0.05, 0.95, ORIENTATION_VOTES), n)
        at = self._along(seam, tau)
        uv_a, uv_b, da, db = self._feet(seam, at, 1)
        n_a = self._normal(da, self.sign_a[seam])
        n_b = self._normal(db, self.sign_b[seam])
        turn_a = self._inward_turn(self.face_a[seam], uv_a, at["slope_a"], da, n_a, at["tangent"])
        turn_b = self._inward_turn(self.face_b[seam], uv_b, at["slope_b"], db, n_b, at["tangent"])
        votes = np.nan_to_num(turn_a * turn_b)  # -1: opposite traversal (consistent), +1: same (flipped)
        total = np.bincount(seam, votes, minlength=n)
        decided = np.bincount(seam, votes != 0, minlength=n) > 0
        agree = np.bincount(seam, np.nan_to_num(dot(n_a, n_b)), minlength=n)
        return np.where(decided, np.where(total <= 0, 1.0, -1.0), np.where(agree >= 0, 1.0, -1.0))

    def _orient_iso(self) -> None:
        """Signs orienting the cross iso-curves from a to b (see :func:`geometry.seams.measures._cross_sign`)."""
        seams = np.flatnonzero(self.has_iso)
        for side, faces, uvs, axes, into in (
            ("a", self.face_a, self.uv_a, self.iso_a, False),
            ("b", self.face_b, self.uv_b, self.iso_b, True),
        ):
            middle = uvs[self.start[seams] + self.count[seams] // 2]
            steps = np.zeros((seams.size, 2))
            for j, s in enumerate(seams):
                (u0, u1), (v0, v1) = self.model.faces[faces[s]].surface.domain
                steps[j, axes[s]] = INWARD_OFFSET * (u1 - u0, v1 - v0)[axes[s]]
            goes_in = self._inside(faces[seams], middle + steps)
            signs = np.where(goes_in == into, 1.0, -1.0)
            (self.cross_a if side == "a" else self.cross_b)[seams] = signs

    @staticmethod
    def _normal(d: np.ndarray, sign: np.ndarray) -> np.ndarray:
        cross = np.cross(d[1, 0], d[0, 1])
        size = np.linalg.norm(cross, axis=1)
        flat = size <= DEGENERATE_SINE * np.linalg.norm(d[1, 0], axis=1) * np.linalg.norm(d[0, 1], axis=1)
        normal = cross / np.where(flat, 1.0, size)[:, None] * sign[:, None]
        normal[flat] = np.nan
        return normal

    # -- the measures -----------------------------------------------------
    def evaluate(self, seam: np.ndarray, tau: np.ndarray) -> dict[str, np.ndarray]:
        """Every measure at arc-length fractions ``tau`` of seams ``seam``.

        Parameters
        ----------
        seam : ndarray of int, shape (k,)
            Index into the pairs.
        tau : ndarray of shape (k,)

        Returns
        -------
        dict
            As :meth:`geometry.seams.measures.SeamGeometry.evaluate`: ``gap``,
            ``angle``, ``curvature_a``, ``curvature_b``, ``curvature_jump``,
            ``curvature_jump_rel``, ``iso_curvature_jump``,
            ``curvature_derivative_jump`` of shape (k,); ``points`` (k, 3) on
            side a; ``uv_a``, ``uv_b`` (k, 2).
        """
        seam = np.asarray(seam, int)
        tau = np.clip(np.asarray(tau, float), 0.0, 1.0)
        at = self._along(seam, tau)
        uv_a, uv_b, da, db = self._feet(seam, at, np.where(self.has_iso[seam], 3, 2))
        n_a = self._normal(da, self.sign_a[seam])
        n_b = self._normal(db, self.sign_b[seam] * self.orientation[seam])
        tangent = at["tangent"]
        k_a = _cross_normal_curvature(da, n_a, unit(np.cross(n_a, tangent)))
        k_b = _cross_normal_curvature(db, n_b, unit(np.cross(n_b, tangent)))
        iso_jump, third_jump = self._iso_jumps(seam, da, db)
        gap = np.linalg.norm(da[0, 0] - db[0, 0], axis=1)
        return seam_samples(gap, n_a, n_b, k_a, k_b, self.flat_curvature, iso_jump, third_jump, da[0, 0], uv_a, uv_b)

    def _iso_jumps(self, seam: np.ndarray, da: np.ndarray, db: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        iso_jump = np.full(seam.size, np.nan)
        third_jump = np.full(seam.size, np.nan)
        idx = np.flatnonzero(self.has_iso[seam])
        if idx.size == 0:
            return iso_jump, third_jump
        s = seam[idx]
        t_a, kappa_a, third_a = _iso_curvature(da[:, :, idx], self.iso_a[s])
        t_b, kappa_b, third_b = _iso_curvature(db[:, :, idx], self.iso_b[s])
        aligned = np.linalg.norm(np.cross(t_a, t_b), axis=1) <= np.sin(np.radians(ISO_ALIGNED_DEG))
        # C_sss changes sign with the direction of travel; C_ss does not
        third_a = third_a * self.cross_a[s][:, None]
        third_b = third_b * self.cross_b[s][:, None]
        iso_jump[idx] = np.where(aligned, np.linalg.norm(kappa_a - kappa_b, axis=1), np.nan)
        third_jump[idx] = np.where(aligned, np.linalg.norm(third_a - third_b, axis=1), np.nan)
        return iso_jump, third_jump


def _vertex_tangents(points, arc, owner, start, counts) -> np.ndarray:
    """Unit tangents at the vertices of polylines, shape (n, 3).

    Notes
    -----
    Derivative of the parabola through each vertex and its two neighbours
    (second order in the spacing, on uneven spacing too): the three-point
    difference formulas of numerical differentiation (Burden and Faires,
    Numerical Analysis, 9th ed., sec. 4.1), central inside, one-sided at the
    ends. A polyline of two points gets its chord.
    """
    n = points.shape[0]
    first, last = start[owner], (start + counts - 1)[owner]
    i = np.arange(n)
    # the three points used: centred inside, the first three or last three at the ends
    mid = np.clip(i, first + 1, last - 1)
    two = counts[owner] < 3
    lo, hi = np.where(two, first, mid - 1), np.where(two, last, mid + 1)
    mid = np.where(two, first, mid)
    s0, s1, s2 = arc[lo], arc[mid], arc[hi]
    x = arc[i]
    h01, h02, h12 = s1 - s0, s2 - s0, s2 - s1
    two |= ~(h01 * h02 * h12 > 0)  # repeated points: fall back to the chord of the neighbours
    lo, hi = np.where(two, np.maximum(i - 1, first), lo), np.where(two, np.minimum(i + 1, last), hi)
    h02 = np.where(two, arc[hi] - arc[lo], h02)
    safe = np.where(two, 1.0, h01 * h02 * h12)
    # d/dx of the Lagrange basis through s0, s1, s2, at x
    w0 = np.where(two, -1.0 / np.maximum(h02, 1e-300), ((x - s1) + (x - s2)) * h12 / safe)
    w1 = np.where(two, 0.0, -((x - s0) + (x - s2)) * h02 / safe)
    w2 = np.where(two, 1.0 / np.maximum(h02, 1e-300), ((x - s0) + (x - s1)) * h01 / safe)
    derivative = w0[:, None] * points[lo] + w1[:, None] * points[mid] + w2[:, None] * points[hi]
    chord = points[np.minimum(i + 1, last)] - points[np.maximum(i - 1, first)]
    return unit(np.where(np.isfinite(derivative).all(axis=1, keepdims=True), derivative, chord))


def _iso(uv: np.ndarray) -> int:
    direction = BoundaryCurve(0, uv).iso_direction
    return -1 if direction is None else direction


__all__ = ["DEGENERATE_SPEED", "EdgeSeams", "measurable_at_edge"]
