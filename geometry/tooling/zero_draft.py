"""Zero-draft curves: where the surface runs parallel to the pull direction.

Seen along the pull direction ``d`` these curves are the model's silhouette;
a parting line can run along them. They are the zero set of
``g(u, v) = n(u, v) . d`` on each face, found like a plane section
(:mod:`geometry.sections.march` marches the sampled field, trimmed by the face's
loops) and refined on the exact surface by Newton's method on ``g``, stepping
along its gradient in (u, v). With ``W = Su x Sv`` and ``n = W / |W|``,

    n_u = (W_u - n (n . W_u)) / |W|,   W_u = Suu x Sv + Su x Suv,

and likewise for v (differentiating the unit normal; do Carmo, *Differential
Geometry of Curves and Surfaces*, 1976, sec. 3-2), so ``grad g = (n_u . d, n_v . d)``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..model.topology import Model
from ..sections.engine import GRAZING
from ..sections.evaluate import FaceEvaluator
from ..sections.march import march_field, march_grids
from ..sections.pieces import PieceQueue
from .draft import draft_on_grid, unit_pull

# Samples of all marching grids together.
GRID_BUDGET = 60_000
# Distance between curve points, as a fraction of the model size.
POINT_SPACING_FRACTION = 1.0 / 300.0
MIN_PIECE_POINTS = 5
# |n . d| below this is zero (rounding on walls exactly parallel to d).
ZERO_SNAP = 1e-12
NEWTON_ITERATIONS = 12
# Newton stops when |n . d| (the sine of the draft) is below this.
SINE_TOLERANCE = 1e-12
# Curve points whose |n . d| stays above this after Newton are dropped (not on the curve).
KEEP_SINE = 1e-9
# A Newton step moves at most this fraction of a face's parameter range.
MAX_STEP_FRACTION = 0.05


@dataclass(frozen=True, eq=False)
class ZeroDraftCurve:
    """One face's stretch of a zero-draft curve.

    Attributes
    ----------
    face : int
    points : ndarray of shape (n, 3)
    uv : ndarray of shape (n, 2)
    closed : bool
        The stretch closes on itself inside the face.
    residual : float
        Largest ``|n . d|`` left at its points (the sine of the draft there).
    """

    face: int
    points: np.ndarray
    uv: np.ndarray
    closed: bool
    residual: float

    def __post_init__(self):
        self.points.setflags(write=False)
        self.uv.setflags(write=False)

    @property
    def length(self) -> float:
        return float(np.linalg.norm(np.diff(self.points, axis=0), axis=1).sum())


def _normal_field(ders: np.ndarray):
    """Unit normal (3, k), its u and v derivatives (3, k) each, and |Su x Sv| (k,) from ders (3, 3, 3, k)."""
    su, sv, suu, suv, svv = ders[1, 0], ders[0, 1], ders[2, 0], ders[1, 1], ders[0, 2]
    w = np.cross(su, sv, axis=0)
    size = np.linalg.norm(w, axis=0)
    safe = np.where(size > 0, size, 1.0)
    n = w / safe
    wu = np.cross(suu, sv, axis=0) + np.cross(su, suv, axis=0)
    wv = np.cross(suv, sv, axis=0) + np.cross(su, svv, axis=0)
    nu = (wu - n * np.einsum("ik,ik->k", n, wu)) / safe
    nv = (wv - n * np.einsum("ik,ik->k", n, wv)) / safe
    return n, nu, nv, size


class ZeroDraftTracer:
    """Zero-draft curves of one model, with the face grids and normals cached.

    Parameters
    ----------
    model : Model
    grid_budget : int
        Total samples of the faces' marching grids.
    """

    def __init__(self, model: Model, grid_budget: int = GRID_BUDGET):
        self.model = model
        self.size = model.size or 1.0
        self.spacing = self.size * POINT_SPACING_FRACTION
        self.grids = march_grids(model, grid_budget)
        # normals do not depend on the pull: compute them once
        self.normals = tuple(
            np.array(draft_on_grid(f.surface, g.u, g.v, (0, 0, 1), f.reversed).normals)
            for f, g in zip(model.faces, self.grids, strict=True)
        )
        self.evaluator = FaceEvaluator([f.surface for f in model.faces])

    def curves(self, pull) -> tuple[ZeroDraftCurve, ...]:
        """Zero-draft curves for a pull direction, longest first.

        Parameters
        ----------
        pull : array_like of shape (3,)

        Returns
        -------
        tuple of ZeroDraftCurve
        """
        d = unit_pull(pull)
        queue = PieceQueue(self.spacing, MIN_PIECE_POINTS)
        for index, (face, grid, normals) in enumerate(zip(self.model.faces, self.grids, self.normals, strict=True)):
            field = np.nan_to_num(normals @ d)
            field[np.abs(field) <= ZERO_SNAP] = 0.0
            if field.min() >= 0.0 or field.max() < 0.0:
                continue
            crossings = march_field(face, grid, field)
            if crossings is None:
                continue
            for line, ring in crossings.polylines:
                xyz = crossings.xyz[line]
                if np.ptp(xyz, axis=0).max() <= 1e-9 * self.size:
                    continue
                queue.add(index, crossings.uv[line], xyz, crossings.fixed[line], ring)
        if not queue.cycles:
            return ()
        faces, uv, fixed, bounds = queue.samples()
        uv, residual = self._refine(faces, uv, fixed, d)
        points = self.evaluator.derivatives(faces, uv, 0)[0, 0].T
        out = []
        for a, b, ring in zip(bounds[:-1], bounds[1:], queue.cycles, strict=True):
            # where Newton could not reach the curve (a pole, a fold of the normal field) the point is
            # dropped rather than shown off the curve; a piece that loses points no longer closes
            keep = np.flatnonzero(residual[a:b] <= KEEP_SINE) + a
            whole = keep.size == b - a
            for run in np.split(keep, np.flatnonzero(np.diff(keep) > 1) + 1):
                if run.size >= 2:
                    piece = ZeroDraftCurve(
                        int(faces[a]), points[run], uv[run], ring and whole, float(residual[run].max())
                    )
                    out.append(piece)
        return tuple(sorted(out, key=lambda c: -c.length))

    def _refine(self, faces: np.ndarray, uv: np.ndarray, fixed: np.ndarray, d: np.ndarray):
        """Newton on g = n . d along grad g (or along the domain edge a sample is held to).

        Returns the refined parameters (k, 2) and |g| left at each (k,).
        """
        uv = self.evaluator.clip(faces, uv)
        for _ in range(NEWTON_ITERATIONS):
            n, nu, nv, size = _normal_field(self.evaluator.derivatives(faces, uv, 2))
            g = d @ n
            if np.all(np.abs(g) <= SINE_TOLERANCE):
                break
            # no step where the normal is undefined (|Su x Sv| = 0)
            grad = np.where((size > 0)[:, None], np.stack([d @ nu, d @ nv], axis=1), 0.0)
            uv = self.evaluator.level_step(faces, uv, g, grad, fixed, MAX_STEP_FRACTION, GRAZING)
        n, _, _, _ = _normal_field(self.evaluator.derivatives(faces, uv, 2))
        return uv, np.abs(d @ n)


def zero_draft_curves(model: Model, pull) -> tuple[ZeroDraftCurve, ...]:
    """Zero-draft curves of a model for one pull direction (a one-off :class:`ZeroDraftTracer`)."""
    return ZeroDraftTracer(model).curves(pull)
