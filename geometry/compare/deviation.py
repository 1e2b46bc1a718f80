"""Deviation of one revision of a model from another, on the exact surfaces.

:func:`signed_distances` measures how far points lie from a model: the nearest
samples of the model (a k-d tree) seed point inversion on the exact NURBS
(:func:`geometry.model.probe.closest_parameters`, The NURBS Book, 2nd ed., sec. 6.1),
one batched call per face and candidate, and the distance is signed along the
model's normal at the foot point (the face orientation applied, DEVELOPERS.md).
:func:`model_deviation` samples every face of the new revision and reports each
face's largest and mean deviation from the old one, with where they occur.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..model.probe import closest_parameters
from ..model.sampling import face_grid, model_grids
from ..model.topology import Face, Model

# Samples of the reference model seeding the inversion (spread by the trim-aware sampler).
SEED_BUDGET = 40_000
# Samples of the measured model over which deviation is reported.
DEVIATION_BUDGET = 40_000
# Nearest seeds looked at per point: feet on other faces are tried near face boundaries.
CANDIDATES = 8
# Seeds on a face at least (inside its trim): the shared sampler gives a small flat face few,
# and a face with too few seeds is crowded out of the nearest candidates by a denser neighbour.
MIN_FACE_SEEDS = 400
# Parts each trim-polyline segment is cut into when a foot falls outside its trim.
TRIM_SUBDIVISION = 16
# Zoom rounds along the trim around the nearest node: each narrows the step by TRIM_SUBDIVISION / 2.
TRIM_REFINE = 6


@dataclass(frozen=True, eq=False)
class Feet:
    """Nearest points of a model to query points.

    Attributes
    ----------
    signed : ndarray of shape (k,)
        Distance in mm, positive on the side the model's normal points to.
    face : ndarray of int, shape (k,)
        Face of the model holding each foot point.
    uv : ndarray of shape (k, 2)
        Parameters of the foot points on those faces.
    points : ndarray of shape (k, 3)
        The foot points.
    """

    signed: np.ndarray
    face: np.ndarray
    uv: np.ndarray
    points: np.ndarray


class ReferenceModel:
    """A model prepared for repeated closest-point queries (its seed tree is built once).

    Parameters
    ----------
    model : Model
    budget : int
        Seed samples over the whole model.
    """

    def __init__(self, model: Model, budget: int = SEED_BUDGET):
        from scipy.spatial import cKDTree

        self.model = model
        pts, owner, uv, patch = [], [], [], []
        first_patch = 0
        for index, (face, grid) in enumerate(zip(model.faces, model_grids(model, budget), strict=True)):
            if grid.count < MIN_FACE_SEEDS:
                grid = face_grid(face, 4 * MIN_FACE_SEEDS)
            uu, vv = np.meshgrid(grid.u, grid.v, indexing="ij")
            keep = grid.inside
            breaks_u, breaks_v = np.unique(face.surface.knots_u), np.unique(face.surface.knots_v)
            if keep.any():
                pts.append(face.surface.points_grid(grid.u, grid.v)[keep])
                uv.append(np.stack([uu[keep], vv[keep]], axis=-1))
                owner.append(np.full(int(keep.sum()), index))
                span_u = np.searchsorted(breaks_u, uu[keep], side="right")
                span_v = np.searchsorted(breaks_v, vv[keep], side="right")
                patch.append(first_patch + span_u * (breaks_v.size + 1) + span_v)
            first_patch += (breaks_u.size + 1) * (breaks_v.size + 1)
        self.seeds = np.concatenate(pts) if pts else np.zeros((0, 3))
        self.seed_uv = np.concatenate(uv) if uv else np.zeros((0, 2))
        self.seed_face = np.concatenate(owner) if owner else np.zeros(0, int)
        # Knot-span patch of each seed: a surface may kink at a knot of full multiplicity, where the
        # distance has a local minimum on each side, so each patch near a point gets its own start.
        self.seed_patch = np.concatenate(patch) if patch else np.zeros(0, int)
        self.tree = cKDTree(self.seeds) if len(self.seeds) else None
        self._trim_trees: dict[int, tuple] = {}

    def signed_distances(self, points: np.ndarray) -> Feet:
        """Signed distance of each point from the model; see :func:`signed_distances`."""
        pts = np.asarray(points, float).reshape(-1, 3)
        k = pts.shape[0]
        if self.tree is None or k == 0:
            nan = np.full(k, np.nan)
            return Feet(nan, np.full(k, -1), np.full((k, 2), np.nan), np.full((k, 3), np.nan))
        count = min(CANDIDATES, len(self.seeds))
        _, nearest = self.tree.query(pts, k=count)
        nearest = nearest.reshape(k, count)
        best = np.full(k, np.inf)
        face_of = np.full(k, -1)
        uv = np.zeros((k, 2))
        foot = np.zeros((k, 3))
        tried = np.zeros((k, 0), int)
        for rank in range(count):
            seed = nearest[:, rank]
            faces, patches = self.seed_face[seed], self.seed_patch[seed]
            # Only a patch not tried at a better rank adds a candidate (points inside a patch try one).
            fresh = ~(tried == patches[:, None]).any(axis=1)
            tried = np.concatenate([tried, patches[:, None]], axis=1)
            for index in np.unique(faces[fresh]):
                rows = np.flatnonzero(fresh & (faces == index))
                cu, cv, cp = self._feet_on_face(int(index), pts[rows], self.seed_uv[seed[rows]])
                dist = np.linalg.norm(cp - pts[rows], axis=1)
                better = dist < best[rows]
                take = rows[better]
                best[take] = dist[better]
                face_of[take] = index
                uv[take] = np.stack([cu, cv], axis=-1)[better]
                foot[take] = cp[better]
        return Feet(self._sign(pts, foot, face_of, uv) * best, face_of, uv, foot)

    def _feet_on_face(self, index: int, pts: np.ndarray, start: np.ndarray):
        """Nearest points of one face to ``pts``, from starting parameters ``start`` (k, 2).

        Returns (u (k,), v (k,), points (k, 3)); a foot that leaves the trim is
        replaced by the nearest point of the face's trim boundary.
        """
        face = self.model.faces[index]
        u, v = closest_parameters(face.surface, pts, start[:, 0], start[:, 1])
        feet = face.surface.points_at(u, v)
        if face.is_trimmed:
            outside = ~face.inside(u, v)
            if outside.any():
                tu, tv, feet[outside] = self._nearest_on_trim(index, face, pts[outside])
                u[outside], v[outside] = tu, tv
        return u, v, feet

    def _nearest_on_trim(self, index: int, face: Face, pts: np.ndarray):
        """Nearest points of a face's trim loops to ``pts`` (k, 3): u (k,), v (k,), points (k, 3).

        A k-d tree of points along the loops gives the nearest node; the search
        then zooms in on the loop around it (:data:`TRIM_REFINE` rounds of
        :data:`TRIM_SUBDIVISION` + 1 samples, all points at once).
        """
        tree, loops = self._trim_tree(index, face)
        _, j = tree.query(pts)
        # Position along the loops in segment units: node j of the tree is t = j / TRIM_SUBDIVISION.
        t = j / TRIM_SUBDIVISION
        width = 1.0 / TRIM_SUBDIVISION
        offsets = np.linspace(-1.0, 1.0, TRIM_SUBDIVISION + 1)
        for _ in range(TRIM_REFINE):
            cand = t[:, None] + width * offsets[None, :]  # (k, m)
            uv = loops.at(cand.ravel())
            xyz = face.surface.points_at(uv[:, 0], uv[:, 1]).reshape(*cand.shape, 3)
            best = np.argmin(np.einsum("kmi,kmi->km", xyz - pts[:, None], xyz - pts[:, None]), axis=1)
            t = cand[np.arange(len(t)), best]
            width *= 2.0 / TRIM_SUBDIVISION
        uv = loops.at(t)
        return uv[:, 0], uv[:, 1], face.surface.points_at(uv[:, 0], uv[:, 1])

    def _trim_tree(self, index: int, face: Face):
        """k-d tree of points along a face's trim loops (on the exact surface), and the loops."""
        if index not in self._trim_trees:
            from scipy.spatial import cKDTree

            loops = _Loops(face.loops)
            nodes = loops.at(np.arange(loops.segments * TRIM_SUBDIVISION) / TRIM_SUBDIVISION)
            self._trim_trees[index] = (cKDTree(face.surface.points_at(nodes[:, 0], nodes[:, 1])), loops)
        return self._trim_trees[index]

    def _sign(self, pts: np.ndarray, foot: np.ndarray, face_of: np.ndarray, uv: np.ndarray) -> np.ndarray:
        """+1 where a point lies on the side of the foot's normal, -1 on the other side."""
        sign = np.ones(len(pts))
        for index in np.unique(face_of[face_of >= 0]):
            rows = np.flatnonzero(face_of == index)
            face = self.model.faces[int(index)]
            d = face.surface.derivatives_at(uv[rows, 0], uv[rows, 1], 1)
            normal = face.sign * np.cross(d[1, 0], d[0, 1])
            side = np.einsum("ki,ki->k", pts[rows] - foot[rows], normal)
            sign[rows] = np.where(side < 0, -1.0, 1.0)
        return sign


class _Loops:
    """A face's trim loops as one chain of (u, v) segments, walked by a position t (segments from 0)."""

    def __init__(self, loops):
        starts = np.concatenate([lp for lp in loops])
        ends = np.concatenate([np.roll(lp, -1, axis=0) for lp in loops])
        self.starts, self.steps = starts, ends - starts
        self.segments = len(starts)

    def at(self, t: np.ndarray) -> np.ndarray:
        """(u, v) at positions t (any shape (k,)); a position is clamped to its own segment's ends."""
        t = np.asarray(t, float)
        seg = np.clip(np.floor(t), 0, self.segments - 1).astype(int)
        frac = np.clip(t - seg, 0.0, 1.0)[:, None]
        return self.starts[seg] + frac * self.steps[seg]


def signed_distances(model: Model, points: np.ndarray) -> Feet:
    """Signed distance of points from a model's faces (exact closest points).

    Parameters
    ----------
    model : Model
    points : ndarray of shape (k, 3)

    Returns
    -------
    Feet

    Notes
    -----
    The foot of P on a face minimises ``|S(u, v) - P|`` (The NURBS Book, 2nd ed.,
    eq. 6.3-6.6, by :func:`geometry.model.probe.closest_parameters`), started from the
    nearest seed samples of up to :data:`CANDIDATES` faces; the nearest foot
    wins. The sign is that of ``(P - S) . n`` with ``n`` the face's normal
    (``Su x Sv`` times the face orientation), so a revision moved along the
    normal deviates positively.
    """
    return ReferenceModel(model).signed_distances(points)


@dataclass(frozen=True)
class FaceDeviation:
    """How far one face of the new revision lies from the old revision.

    Attributes
    ----------
    face : int
        Index of the face in the new model.
    samples : int
        Samples measured (inside the trim).
    max_mm : float
        Largest |deviation|.
    max_signed_mm : float
        The deviation (with its sign) where |deviation| is largest.
    max_at : tuple of float
        xyz (mm) of that sample on the new face.
    mean_mm : float
        Area-weighted mean of |deviation|.
    min_signed_mm, max_signed_mm_pos : float
        Smallest and largest signed deviation.
    """

    face: int
    samples: int
    max_mm: float
    max_signed_mm: float
    max_at: tuple[float, float, float]
    mean_mm: float
    min_signed_mm: float
    max_signed_mm_pos: float

    def to_dict(self) -> dict:
        return {
            "face": self.face,
            "samples": self.samples,
            "max_mm": self.max_mm,
            "max_signed_mm": self.max_signed_mm,
            "max_at": list(self.max_at),
            "mean_mm": self.mean_mm,
            "signed_range_mm": [self.min_signed_mm, self.max_signed_mm_pos],
        }


@dataclass(frozen=True)
class ModelDeviation:
    """Deviation of a new revision from an old one, face by face and over the model.

    Attributes
    ----------
    faces : tuple of FaceDeviation
        One per face of the new model with samples, in its order.
    max_mm, mean_mm : float
        Largest and area-weighted mean |deviation| over every face.
    max_at : tuple of float or None
        Where the largest deviation is.
    max_face : int
        New face holding it (-1 for an empty model).
    """

    faces: tuple[FaceDeviation, ...]
    max_mm: float
    mean_mm: float
    max_at: tuple[float, float, float] | None
    max_face: int

    def to_dict(self) -> dict:
        return {
            "max_mm": self.max_mm,
            "mean_mm": self.mean_mm,
            "max_at": None if self.max_at is None else list(self.max_at),
            "max_face": self.max_face,
            "faces": [f.to_dict() for f in self.faces],
        }


def model_deviation(
    old: Model | ReferenceModel, new: Model, budget: int = DEVIATION_BUDGET
) -> tuple[ModelDeviation, list[tuple[np.ndarray, np.ndarray]]]:
    """Deviation of every face of ``new`` from the faces of ``old``.

    Parameters
    ----------
    old : Model or ReferenceModel
    new : Model
    budget : int
        Samples spread over ``new`` by the trim-aware sampler.

    Returns
    -------
    deviation : ModelDeviation
    samples : list of (points, signed)
        Per face of ``new``: sample points of shape (k, 3) and their signed
        deviations of shape (k,), for maps and pictures.

    Notes
    -----
    Each sample carries the area of its grid cell, ``|Su x Sv| du dv`` (the
    first fundamental form's area element, do Carmo, *Differential Geometry of
    Curves and Surfaces*, sec. 2-8), so the mean does not depend on how the
    face is parametrised.
    """
    reference = old if isinstance(old, ReferenceModel) else ReferenceModel(old)
    grids = model_grids(new, budget)
    pts, weights = [], []
    for face, grid in zip(new.faces, grids, strict=True):
        d = face.surface.derivatives_grid(grid.u, grid.v, 1)
        area = np.linalg.norm(np.cross(d[1, 0], d[0, 1]), axis=-1)
        keep = grid.inside
        pts.append(d[0, 0][keep])
        weights.append(area[keep])
    all_pts = np.concatenate(pts) if pts else np.zeros((0, 3))
    signed = reference.signed_distances(all_pts).signed
    split = np.cumsum([len(p) for p in pts])[:-1]
    per_face = np.split(signed, split) if pts else []
    faces = []
    for index, (p, w, s) in enumerate(zip(pts, weights, per_face, strict=True)):
        if len(s) == 0 or not np.isfinite(s).any():
            continue
        faces.append(_face_deviation(index, p, w, s))
    samples = list(zip(pts, per_face, strict=True))
    if not faces:
        return ModelDeviation((), 0.0, 0.0, None, -1), samples
    worst = max(faces, key=lambda f: f.max_mm)
    w_all = np.concatenate(weights)
    ok = np.isfinite(signed)
    mean = float(np.average(np.abs(signed[ok]), weights=_safe_weights(w_all[ok])))
    return ModelDeviation(tuple(faces), worst.max_mm, mean, worst.max_at, worst.face), samples


def _safe_weights(w: np.ndarray) -> np.ndarray:
    # A face degenerate everywhere (all areas 0) still counts its samples equally.
    return w if w.sum() > 0 else np.ones_like(w)


def _face_deviation(index: int, pts: np.ndarray, w: np.ndarray, s: np.ndarray) -> FaceDeviation:
    ok = np.isfinite(s)
    p, w, s = pts[ok], w[ok], s[ok]
    i = int(np.argmax(np.abs(s)))
    return FaceDeviation(
        face=index,
        samples=int(ok.sum()),
        max_mm=float(abs(s[i])),
        max_signed_mm=float(s[i]),
        max_at=tuple(float(x) for x in p[i]),
        mean_mm=float(np.average(np.abs(s), weights=_safe_weights(w))),
        min_signed_mm=float(s.min()),
        max_signed_mm_pos=float(s.max()),
    )
