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
