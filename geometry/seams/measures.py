"""G0, G1 and G2 measures at points along one seam.

The seam is parametrised by the fraction ``tau in [0, 1]`` of its arc length
on side a. At each ``tau`` the point of side a is projected onto the boundary
of side b (closest point), and the two faces are compared there:

- gap: distance from the point of a to the closest point of b's boundary, mm;
- angle: between the two unit normals, degrees, ``atan2(|n_a x n_b|, n_a . n_b)``
  (accurate near 0 where ``arccos`` is not);
- cross-seam normal curvature of each face in the direction ``w = n x T``
  (perpendicular to the seam tangent T in that face's tangent plane), by
  Euler's formula ``k(w) = k1 (w . d1)^2 + k2 (w . d2)^2`` (do Carmo, 1976,
  sec. 3-2) from the principal curvatures of :mod:`geometry.nurbs.differential`;
  its jump in 1/mm and relative to the larger of the two;
- where both sides are iso-parameter lines whose cross iso-curves line up,
  the jump of the curvature vector of those iso-curves, 1/mm, and (G3) of
  their third arc-length derivative, 1/mm^2, both oriented across the seam
  from a to b.

Orientation rule. Faces of a consistently oriented shell run along their
common edge in opposite directions when each boundary is traversed with the
face on its left (about the face normal); this holds for any angle between
the faces. Per seam the rule is checked at a few points from each side's
inward direction (a parameter-space offset tested with :meth:`Face.inside`).
If the two faces run the same way, the normals disagree because of
orientation alone: side b's normal is flipped for every measure and the seam
is reported with ``orientation_consistent = False``. Where the inward
direction cannot be decided, the sign of the mean ``n_a . n_b`` decides.
"""

from __future__ import annotations

import numpy as np

from ..model.topology import Face, Model
from ..nurbs.differential import shape_quantities
from ..vectors import dot, unit
from .adjacency import SeamPair
from .boundary import BoundaryCurve, CurveTarget, arc_length_table, polyline_at

# Samples of the arc-length table of a seam (parameter -> length fraction).
ARC_TABLE_SAMPLES = 2048
# Cross iso-curves of the two sides count as one curve when their tangents
# are within this angle (degrees).
ISO_ALIGNED_DEG = 1.0
# An iso-curve slower than this, relative to the fastest sample, has collapsed.
DEGENERATE_SPEED = 1e-9
# Parameter offset (fraction of the domain) for the inside test.
INWARD_OFFSET = 1e-6
# Points per seam that vote on the orientation rule.
ORIENTATION_VOTES = 9


def seam_samples(
    gap, n_a, n_b, k_a, k_b, flat_curvature, iso_jump, third_jump, points, uv_a, uv_b
) -> dict[str, np.ndarray]:
    """The measures of a seam at k points, from what each side gives there: the one place they are combined.

    Parameters
    ----------
    gap : ndarray of shape (k,)
        Distance between the two sides' points, mm.
    n_a, n_b : ndarray of shape (k, 3)
        Unit normals of the two sides (side b already flipped where the shell's
        orientation is inconsistent).
    k_a, k_b : ndarray of shape (k,)
        Normal curvature across the seam on each side, 1/mm (signs in DEVELOPERS.md).
    flat_curvature : float
        Curvature below which a side counts as flat for the relative jump, 1/mm.
    iso_jump, third_jump : ndarray of shape (k,)
        Jumps of the cross iso-curves' curvature vector and its derivative (NaN where not aligned).
    points : ndarray of shape (k, 3)
        Side a's points.
    uv_a, uv_b : ndarray of shape (k, 2)

    Returns
    -------
    dict
        ``gap``, ``angle`` (degrees between the normals, ``atan2(|n_a x n_b|, n_a . n_b)``, which keeps
        full precision near 0 and 180), ``curvature_a``, ``curvature_b``, ``curvature_jump``
        (``|k_a - k_b|``), ``curvature_jump_rel`` (the jump over the larger curvature, at least
        ``flat_curvature``), ``iso_curvature_jump``, ``curvature_derivative_jump``: shape (k,);
        ``points`` (k, 3); ``uv_a``, ``uv_b`` (k, 2).
    """
    angle = np.degrees(np.arctan2(np.linalg.norm(np.cross(n_a, n_b), axis=1), dot(n_a, n_b)))
    jump = np.abs(k_a - k_b)
    scale = np.maximum(np.maximum(np.abs(k_a), np.abs(k_b)), flat_curvature)
    return {
        "gap": gap,
        "angle": angle,
        "curvature_a": k_a,
        "curvature_b": k_b,
        "curvature_jump": jump,
        "curvature_jump_rel": jump / scale,
        "iso_curvature_jump": iso_jump,
        "curvature_derivative_jump": third_jump,
        "points": points,
        "uv_a": uv_a,
        "uv_b": uv_b,
    }


def _inward(face: Face, uv: np.ndarray, slope: np.ndarray, ders: np.ndarray) -> np.ndarray:
    """3-D direction into the face across its boundary, shape (k, 3); zero if undecided."""
    (u0, u1), (v0, v1) = face.surface.domain
    span = np.array([u1 - u0, v1 - v0])
    perp = np.stack([-slope[:, 1], slope[:, 0]], axis=1)
    perp = perp / np.maximum(np.linalg.norm(perp / span, axis=1, keepdims=True), 1e-300) * INWARD_OFFSET
    plus = face.inside(*(uv + perp).T)
    minus = face.inside(*(uv - perp).T)
    side = np.where(plus & ~minus, 1.0, np.where(minus & ~plus, -1.0, 0.0))
    return side[:, None] * (ders[1, 0] * perp[:, :1] + ders[0, 1] * perp[:, 1:])


def _shape(ders: np.ndarray, sign: float) -> dict[str, np.ndarray]:
    def comp(k, l):
        return np.ascontiguousarray(ders[k, l].T)

    q = shape_quantities(comp(1, 0), comp(0, 1), comp(2, 0), comp(1, 1), comp(0, 2), sign)
    return {key: (val.T if val.ndim == 2 else val) for key, val in q.items()}


def _cross_curvature(q: dict[str, np.ndarray], tangent: np.ndarray) -> np.ndarray:
    """Normal curvature across the seam by Euler's formula, shape (k,)."""
    w = unit(np.cross(q["normals"], tangent))
    return q["k1"] * dot(w, q["dir1"]) ** 2 + q["k2"] * dot(w, q["dir2"]) ** 2


def _iso_curvature(ders: np.ndarray, axis: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Unit tangent, curvature vector and third arc-length derivative of the cross iso-curve.

    Parameters
    ----------
    ders : ndarray of shape (4, 4, k, 3)
        Surface derivatives up to order 3.
    axis : ndarray of int, shape (k,)
        0 where the seam is a line of constant u (the cross iso-curve runs
        in u), 1 for constant v.

    Returns
    -------
    tangent, curvature, third : ndarray of shape (k, 3)
        ``C_s``, ``C_ss`` (the curvature vector) and ``C_sss`` of the iso-curve
        by arc length s.

    Notes
    -----
    With ``a, b, c`` the first three derivatives of the iso-curve in its
    surface parameter, ``sigma = |a|``, ``r2 = a . b / sigma`` (the second
    derivative of arc length) and ``r3 = (|b|^2 + a . c) / sigma - (a . b)^2 / sigma^3``
    (the third), the chain rule gives ``C_ss = b / sigma^2 - a r2 / sigma^3``
    (do Carmo, 1976, sec. 1-5) and
    ``C_sss = (c / sigma^2 - 3 b r2 / sigma^3 - a r3 / sigma^3 + 3 a r2^2 / sigma^4) / sigma``.
    """
    in_u = (axis == 0)[:, None]
    a = np.where(in_u, ders[1, 0], ders[0, 1])
    b = np.where(in_u, ders[2, 0], ders[0, 2])
    c = np.where(in_u, ders[3, 0], ders[0, 3])
    speed = np.linalg.norm(a, axis=1)
    # A collapsed iso-curve (a pole) has no arc length: NaN there, ignored by the maxima.
    sigma = np.where(speed > DEGENERATE_SPEED * np.max(speed, initial=0.0), speed, np.nan)[:, None]
    ab = dot(a, b)[:, None]
    r2 = ab / sigma
    r3 = (dot(b, b)[:, None] + dot(a, c)[:, None]) / sigma - ab**2 / sigma**3
    second = b / sigma**2 - a * r2 / sigma**3
    third = (c / sigma**2 - 3 * b * r2 / sigma**3 - a * r3 / sigma**3 + 3 * a * r2**2 / sigma**4) / sigma
    return a / sigma, second, third


def _cross_sign(face: Face, uv: np.ndarray, axis: int, into: bool) -> float:
    """+1 when increasing the cross parameter at an iso side goes into (``into``) or out of the face."""
    (u0, u1), (v0, v1) = face.surface.domain
    step = np.zeros(2)
    step[axis] = INWARD_OFFSET * (u1 - u0, v1 - v0)[axis]
    middle = uv[uv.shape[0] // 2] if uv.shape[0] > 2 else uv.mean(axis=0)
    goes_in = bool(face.inside(*(middle + step)))
    return 1.0 if goes_in == into else -1.0


class SeamGeometry:
    """Evaluates the measures of one seam at arc-length fractions.

    Parameters
    ----------
    model : Model
    pair : SeamPair
    flat_curvature : float
        Floor (1/mm) of the denominator of the relative curvature jump.
    """

    def __init__(self, model: Model, pair: SeamPair, flat_curvature: float):
        self.pair = pair
        self.face_a = model.faces[pair.face_a]
        self.face_b = model.faces[pair.face_b]
        self.flat_curvature = float(flat_curvature)
        self.t_table, arc = arc_length_table(self.face_a.surface, pair.uv_a, ARC_TABLE_SAMPLES)
        self.length = float(arc[-1])
        self.fraction = arc / self.length if self.length > 0 else np.linspace(0.0, 1.0, arc.size)
        self.target = CurveTarget(self.face_b.surface, pair.targets_b)
        iso_a = BoundaryCurve(pair.face_a, pair.uv_a).iso_direction
        self.iso_a = -1 if iso_a is None else iso_a
        iso_b = [BoundaryCurve(pair.face_b, c).iso_direction for c in pair.targets_b]
        self.iso_b = np.array([-1 if d is None else d for d in iso_b], dtype=int)
        self.order = 3 if self.has_iso else 2
        if self.has_iso:  # orient the cross iso-curves from a to b
            self.cross_a = _cross_sign(self.face_a, pair.uv_a, self.iso_a, into=False)
            self.cross_b = np.array(
                [
                    _cross_sign(self.face_b, c, max(d, 0), into=True)
                    for c, d in zip(pair.targets_b, self.iso_b, strict=True)
                ]
            )
        self.orientation = self._orientation()

    @property
    def has_iso(self) -> bool:
        return self.iso_a >= 0 and bool(np.any(self.iso_b >= 0))

    def _sides(self, tau: np.ndarray):
        t = np.interp(tau, self.fraction, self.t_table)
        uv_a, slope_a = polyline_at(self.pair.uv_a, t)
        da = self.face_a.surface.derivatives_at(uv_a[:, 0], uv_a[:, 1], self.order)
        tangent = unit(da[1, 0] * slope_a[:, :1] + da[0, 1] * slope_a[:, 1:])
        foot = self.target.project(da[0, 0])
        db = self.face_b.surface.derivatives_at(foot["uv"][:, 0], foot["uv"][:, 1], self.order)
        return uv_a, slope_a, da, tangent, foot, db

    def _orientation(self) -> float:
        tau = np.linspace(0.05, 0.95, ORIENTATION_VOTES)
        uv_a, slope_a, da, tangent, foot, db = self._sides(tau)
        n_a = _shape(da, self.face_a.sign)["normals"]
        n_b = _shape(db, self.face_b.sign)["normals"]
        turn_a = np.sign(dot(np.cross(n_a, tangent), _inward(self.face_a, uv_a, slope_a, da)))
        turn_b = np.sign(dot(np.cross(n_b, tangent), _inward(self.face_b, foot["uv"], foot["slope"], db)))
        votes = turn_a * turn_b  # -1: opposite traversal (consistent), +1: same (flipped)
        if np.any(votes != 0):
            return 1.0 if votes.sum() <= 0 else -1.0
        return 1.0 if np.mean(dot(n_a, n_b)) >= 0 else -1.0

    def evaluate(self, tau: np.ndarray) -> dict[str, np.ndarray]:
        """Every measure at arc-length fractions ``tau``.

        Parameters
        ----------
        tau : ndarray of shape (k,)

        Returns
        -------
        dict
            ``gap``, ``angle``, ``curvature_a``, ``curvature_b``,
            ``curvature_jump``, ``curvature_jump_rel``, ``iso_curvature_jump``,
            ``curvature_derivative_jump`` (the last two NaN where not meaningful):
            shape (k,). ``points`` (k, 3) on side a,
            ``uv_a``, ``uv_b`` (k, 2).
        """
        tau = np.clip(np.atleast_1d(np.asarray(tau, float)), 0.0, 1.0)
        uv_a, _, da, tangent, foot, db = self._sides(tau)
        qa = _shape(da, self.face_a.sign)
        qb = _shape(db, self.face_b.sign * self.orientation)
        k_a = _cross_curvature(qa, tangent)
        k_b = _cross_curvature(qb, tangent)
        iso_jump, third_jump = self._iso_jumps(da, db, foot["curve"])
        return seam_samples(
            foot["distance"], qa["normals"], qb["normals"], k_a, k_b, self.flat_curvature,
            iso_jump, third_jump, da[0, 0], uv_a, foot["uv"],
        )  # fmt: skip

    def _iso_jumps(self, da: np.ndarray, db: np.ndarray, curve: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        k = da.shape[2]
        if not self.has_iso:
            return np.full(k, np.nan), np.full(k, np.nan)
        t_a, kappa_a, third_a = _iso_curvature(da, np.full(k, self.iso_a))
        axis_b = self.iso_b[curve]
        t_b, kappa_b, third_b = _iso_curvature(db, np.maximum(axis_b, 0))
        aligned = (np.linalg.norm(np.cross(t_a, t_b), axis=1) <= np.sin(np.radians(ISO_ALIGNED_DEG))) & (axis_b >= 0)
        # C_sss changes sign with the direction of travel; C_ss does not
        third_a = third_a * self.cross_a
        third_b = third_b * self.cross_b[curve][:, None]
        jump = np.linalg.norm(kappa_a - kappa_b, axis=1)
        third_jump = np.linalg.norm(third_a - third_b, axis=1)
        return np.where(aligned, jump, np.nan), np.where(aligned, third_jump, np.nan)
