"""Exact evaluation of many faces at scattered (face, u, v) samples in one pass.

Section curves cross many faces, and each step of a Newton iteration needs the
derivatives of every face at a few dozen points. All faces go into one
:class:`geometry.nurbs.compiled_eval.SurfacePack` and every sample is evaluated in one
compiled call, whatever its face (The NURBS Book, 2nd ed., A2.3 basis
derivatives, A3.6 surface derivatives, A4.4 rational quotient).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ..nurbs.compiled_eval import SurfacePack, derivatives
from ..nurbs.surface import NurbsSurface
from .march import FIXED_U, FIXED_V


class FaceEvaluator:
    """Exact derivatives of a model's face surfaces at scattered samples.

    Parameters
    ----------
    surfaces : sequence of NurbsSurface
        One per face, indexed as the model's faces.
    """

    def __init__(self, surfaces: Sequence[NurbsSurface]):
        self.surfaces = tuple(surfaces)
        self.pack = SurfacePack.of(self.surfaces)
        domains = self.pack.domains
        self.u_lo, self.u_hi, self.v_lo, self.v_hi = (np.ascontiguousarray(domains[:, c]) for c in range(4))
        # each face's parameter ranges, shape (n_faces, 2)
        self.ranges = np.stack([self.u_hi - self.u_lo, self.v_hi - self.v_lo], axis=1)

    def clip(self, faces: np.ndarray, uv: np.ndarray) -> np.ndarray:
        """Parameters clipped into each sample's face domain, shape (k, 2)."""
        u = np.clip(uv[:, 0], self.u_lo[faces], self.u_hi[faces])
        v = np.clip(uv[:, 1], self.v_lo[faces], self.v_hi[faces])
        return np.stack([u, v], axis=1)

    def derivatives(self, faces: np.ndarray, uv: np.ndarray, order: int) -> np.ndarray:
        """Partial derivatives S_kl (k + l <= order) of each sample's face.

        Parameters
        ----------
        faces : ndarray of int, shape (k,)
            Face index of each sample.
        uv : ndarray of shape (k, 2)
            Parameters (clipped into the face's domain).
        order : int
            Highest total order, 0 to 3.

        Returns
        -------
        ders : ndarray of shape (order + 1, order + 1, 3, k)
            Components first: ``ders[k, l, :, i]`` is d^(k+l) S / du^k dv^l at sample i.
        """
        faces = np.asarray(faces, dtype=np.int64).ravel()
        uv = np.asarray(uv, dtype=float).reshape(-1, 2)
        return np.moveaxis(derivatives(self.pack, faces, uv[:, 0], uv[:, 1], order), 3, 2)

    def level_step(
        self,
        faces: np.ndarray,
        uv: np.ndarray,
        value: np.ndarray,
        grad: np.ndarray,
        fixed: np.ndarray,
        max_step_fraction: float,
        grazing: float,
    ) -> np.ndarray:
        """One Newton step towards the zero set of a function g(u, v) of each sample's face.

        Parameters
        ----------
        faces : ndarray of int, shape (k,)
        uv : ndarray of shape (k, 2)
        value : ndarray of shape (k,)
            g at the samples.
        grad : ndarray of shape (k, 2)
            (g_u, g_v) at the samples.
        fixed : ndarray of int, shape (k,)
            FREE, or FIXED_U / FIXED_V for a sample held to a domain edge: it steps along the edge.
        max_step_fraction : float
            Largest step, as a fraction of each parameter's range.
        grazing : float
            Where the zero set runs within this (relative ``|grad . direction| / |grad|^2``)
            along the edge a sample is held to, it steps along the gradient instead.

        Returns
        -------
        uv : ndarray of shape (k, 2)
            Clipped into each face's domain.

        Notes
        -----
        Newton's method along a direction ``e``: the step ``-g / (grad g . e) e`` solves the
        linearised equation ``g + grad g . step = 0`` along ``e``; with ``e = grad g`` (free
        samples) it is that equation's shortest solution.
        """
        direction = grad.copy()
        direction[fixed == FIXED_U, 0] = 0.0
        direction[fixed == FIXED_V, 1] = 0.0
        # stepping along a held line that the curve nearly follows is ill-conditioned
        along = np.abs(grad[:, 0] * direction[:, 0] + grad[:, 1] * direction[:, 1])
        slip = along < grazing * np.sum(grad * grad, axis=1)
        direction[slip] = grad[slip]
        denom = np.einsum("ij,ij->i", grad, direction)
        ok = np.abs(denom) > 1e-300
        step = np.where(ok, -value / np.where(ok, denom, 1.0), 0.0)[:, None] * direction
        limit = max_step_fraction * self.ranges[faces]
        return self.clip(faces, uv + np.clip(step, -limit, limit))
