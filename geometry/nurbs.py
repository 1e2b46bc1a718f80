"""The tensor-product NURBS surface and its exact partial derivatives.

Grids are evaluated as basis matrices contracted with the homogeneous control
net (two matrix products per derivative); scattered parameter pairs go through
the compiled kernels of :mod:`geometry.compiled_eval`, which contract the
(p + 1) x (q + 1) active poles of each pair. Rational derivatives follow from
the homogeneous ones by the quotient rule of The NURBS Book (Piegl & Tiller,
2nd ed.), eq. 4.20 and algorithm A4.4.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property
from math import comb

import numpy as np

from . import compiled_eval
from .basis import basis_matrices, validate_knots
from .errors import SurfaceError


def _readonly(a: np.ndarray) -> np.ndarray:
    a.setflags(write=False)
    return a


@dataclass(frozen=True, eq=False)
class NurbsSurface:
    """A (possibly rational) tensor-product B-spline surface.

    Parameters
    ----------
    degree_u, degree_v : int
        Polynomial degrees p and q.
    knots_u : ndarray of shape (nu + p + 1,)
    knots_v : ndarray of shape (nv + q + 1,)
        Non-decreasing knot vectors; clamped or unclamped (periodic nets
        written out with their wrapped poles).
    poles : ndarray of shape (nu, nv, 3)
        Control points in model units (mm).
    weights : ndarray of shape (nu, nv), optional
        Positive weights; ``None`` for a polynomial surface.

    Raises
    ------
    SurfaceError
        When the definition is inconsistent (see :func:`validate_knots`), poles
        are not finite, or a weight is not positive.
    """

    degree_u: int
    degree_v: int
    knots_u: np.ndarray
    knots_v: np.ndarray
    poles: np.ndarray
    weights: np.ndarray | None = None

    def __post_init__(self):
        poles = np.array(self.poles, dtype=float)
        if poles.ndim != 3 or poles.shape[2] != 3:
            raise SurfaceError(f"poles must have shape (nu, nv, 3), got {poles.shape}")
        if not np.all(np.isfinite(poles)):
            raise SurfaceError("control net holds NaN or infinite coordinates")
        nu, nv, _ = poles.shape
        ku = validate_knots(self.knots_u, self.degree_u, nu, "u")
        kv = validate_knots(self.knots_v, self.degree_v, nv, "v")
        weights = None
        if self.weights is not None:
            weights = np.array(self.weights, dtype=float)
            if weights.shape != (nu, nv):
                raise SurfaceError(f"weights must have shape {(nu, nv)}, got {weights.shape}")
            if not np.all(np.isfinite(weights)) or np.any(weights <= 0):
                raise SurfaceError("weights must be finite and positive")
            if np.all(weights == weights.flat[0]):
                weights = None  # equal weights: the surface is polynomial
        object.__setattr__(self, "degree_u", int(self.degree_u))
        object.__setattr__(self, "degree_v", int(self.degree_v))
        object.__setattr__(self, "knots_u", ku)
        object.__setattr__(self, "knots_v", kv)
        object.__setattr__(self, "poles", _readonly(poles))
        object.__setattr__(self, "weights", None if weights is None else _readonly(weights))

    # -- description -------------------------------------------------------
    @property
    def shape(self) -> tuple[int, int]:
        """Pole counts (nu, nv)."""
        return self.poles.shape[:2]

    @property
    def is_rational(self) -> bool:
        return self.weights is not None

    @property
    def domain(self) -> tuple[tuple[float, float], tuple[float, float]]:
        """Parameter domain ((u0, u1), (v0, v1))."""
        nu, nv = self.shape
        p, q = self.degree_u, self.degree_v
        return (
            (float(self.knots_u[p]), float(self.knots_u[nu])),
            (float(self.knots_v[q]), float(self.knots_v[nv])),
        )

    @cached_property
    def homogeneous(self) -> np.ndarray:
        """Homogeneous net (w x, w y, w z, w), shape (nu, nv, 4)."""
        w = np.ones(self.shape) if self.weights is None else self.weights
        return _readonly(np.concatenate([self.poles * w[..., None], w[..., None]], axis=2))

    def clip_to_domain(self, u: np.ndarray, v: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Parameters clipped into the domain (rounding outside it is harmless)."""
        (u0, u1), (v0, v1) = self.domain
        return np.clip(np.asarray(u, float), u0, u1), np.clip(np.asarray(v, float), v0, v1)

    # -- evaluation --------------------------------------------------------
    def derivatives_grid(self, u: np.ndarray, v: np.ndarray, order: int = 2) -> np.ndarray:
        """Partial derivatives S_kl, k + l <= order, on the tensor grid u x v.

        Parameters
        ----------
        u : ndarray of shape (a,)
        v : ndarray of shape (b,)
        order : int
            Highest total derivative order (0 to 3).

        Returns
        -------
        ders : ndarray of shape (order + 1, order + 1, a, b, 3)
            ``ders[k, l]`` is d^(k+l) S / du^k dv^l; entries with k + l > order are zero.
        """
        u, v = self.clip_to_domain(np.ravel(u), np.ravel(v))
        nu, nv = self.shape
        bu = basis_matrices(self.knots_u, self.degree_u, nu, u, order)
        bv = basis_matrices(self.knots_v, self.degree_v, nv, v, order)
        return np.moveaxis(self.derivatives_from_basis(bu, bv, order), 2, -1)

    def derivatives_from_basis(self, bu: np.ndarray, bv: np.ndarray, order: int) -> np.ndarray:
        """Grid derivatives from precomputed basis matrices, components first.

        Parameters
        ----------
        bu : ndarray of shape (>= order + 1, a, nu)
        bv : ndarray of shape (>= order + 1, b, nv)
            From :func:`geometry.basis.basis_matrices`.
        order : int

        Returns
        -------
        ders : ndarray of shape (order + 1, order + 1, 3, a, b)
            Components first, so each coordinate is a contiguous (a, b) block
            for the arithmetic that follows.
        """
        if not self.is_rational:
            return self.homogeneous_from_basis(bu, bv, order, dim=3)
        return rational_quotient(self.homogeneous_from_basis(bu, bv, order), order)

    def homogeneous_from_basis(self, bu: np.ndarray, bv: np.ndarray, order: int, dim: int = 4) -> np.ndarray:
        """Derivatives A_kl of the homogeneous surface (w x, w y, w z, w) on a grid.

        Parameters
        ----------
        bu : ndarray of shape (>= order + 1, a, nu)
        bv : ndarray of shape (>= order + 1, b, nv)
        order : int
        dim : int
            4 for all homogeneous components, 3 for the weighted coordinates only.

        Returns
        -------
        hom : ndarray of shape (order + 1, order + 1, dim, a, b)
            Entries with k + l > order are zero. Each is two matrix products:
            ``A_kl = Bu^(k) P^w Bv^(l)T`` (The NURBS Book eq. 3.17, differentiated).
        """
        net = self.net_components[:dim]  # (dim, nu, nv)
        nv = net.shape[2]
        a, b = bu.shape[1], bv.shape[1]
        hom = np.empty((order + 1, order + 1, dim, a, b))
        for k in range(order + 1):
            hom[k, order + 1 - k :] = 0.0
            rows = np.matmul(bu[k], net).reshape(dim * a, nv)
            for l in range(order + 1 - k):
                np.matmul(rows, bv[l].T, out=hom[k, l].reshape(dim * a, b))
        return hom

    @cached_property
    def net_components(self) -> np.ndarray:
        """Homogeneous net with components first, shape (4, nu, nv)."""
        return _readonly(np.ascontiguousarray(self.homogeneous.transpose(2, 0, 1)))

    def derivatives_at(self, u: np.ndarray, v: np.ndarray, order: int = 2) -> np.ndarray:
        """Partial derivatives S_kl at scattered parameter pairs (u[i], v[i]).

        Parameters
        ----------
        u, v : ndarray of shape (k,)
        order : int

        Returns
        -------
        ders : ndarray of shape (order + 1, order + 1, k, 3)
        """
        u = np.ravel(np.asarray(u, dtype=float))
        v = np.ravel(np.asarray(v, dtype=float))
        if u.shape != v.shape:
            raise SurfaceError(f"u and v must pair up, got {u.shape} and {v.shape}")
        # Compiled: one pass per pair over its (p + 1) x (q + 1) active poles
        # (A2.3 basis derivatives, A3.6 contraction, A4.4 quotient).
        return compiled_eval.derivatives(self.pack, 0, u, v, order)

    @cached_property
    def pack(self) -> compiled_eval.SurfacePack:
        """This surface alone as a :class:`~geometry.compiled_eval.SurfacePack`."""
        return compiled_eval.SurfacePack.of([self])

    def points_grid(self, u: np.ndarray, v: np.ndarray) -> np.ndarray:
        """Surface points on the grid u x v, shape (len(u), len(v), 3)."""
        return self.derivatives_grid(u, v, 0)[0, 0]

    def points_at(self, u: np.ndarray, v: np.ndarray) -> np.ndarray:
        """Surface points at pairs (u[i], v[i]), shape (k, 3)."""
        return self.derivatives_at(u, v, 0)[0, 0]

    # -- transforms --------------------------------------------------------
    def transformed(self, matrix: np.ndarray) -> NurbsSurface:
        """The surface under a 4x4 affine placement (NURBS are affinely invariant)."""
        m = np.asarray(matrix, float)
        poles = self.poles @ m[:3, :3].T + m[:3, 3]
        return NurbsSurface(self.degree_u, self.degree_v, self.knots_u, self.knots_v, poles, self.weights)


def rational_quotient(hom: np.ndarray, order: int) -> np.ndarray:
    """Derivatives of the rational surface from those of its homogeneous form.

    Parameters
    ----------
    hom : ndarray of shape (order + 1, order + 1, 4, ...)
        Derivatives of (w x, w y, w z, w), components on axis 2.
    order : int

    Returns
    -------
    ders : ndarray of shape (order + 1, order + 1, 3, ...)

    Notes
    -----
    The NURBS Book eq. 4.20 (algorithm A4.4):
    ``S_kl = (A_kl - sum_{(i,j) != (0,0)} C(k,i) C(l,j) w_ij S_{k-i,l-j}) / w``.
    """
    w = hom[:, :, 3]
    out = np.zeros((order + 1, order + 1, 3, *hom.shape[3:]))
    inv_w = 1.0 / w[0, 0]
    scratch = np.empty(out.shape[2:])
    for k in range(order + 1):
        for l in range(order + 1 - k):
            acc = out[k, l]
            acc[...] = hom[k, l, :3]
            for i in range(k + 1):
                for j in range(l + 1):
                    if i or j:
                        np.multiply(out[k - i, l - j], w[i, j], out=scratch)
                        if comb(k, i) * comb(l, j) != 1:
                            scratch *= comb(k, i) * comb(l, j)
                        acc -= scratch
            acc *= inv_w
    return out
