"""The tensor-product NURBS surface and its exact partial derivatives.

Grids and scattered parameter pairs are evaluated by the compiled kernels of
:mod:`geometry.nurbs.compiled_eval`, which contract the (p + 1) x (q + 1) active
poles of each sample (a grid row's u-contraction is shared along the row).
Rational derivatives follow from
the homogeneous ones by the quotient rule of The NURBS Book (Piegl & Tiller,
2nd ed.), eq. 4.20 and algorithm A4.4.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from ..errors import SurfaceError
from . import compiled_eval
from .basis import validate_knots


def _numbers(values, name: str) -> np.ndarray:
    """``values`` as a new float array, or a SurfaceError saying they are not numbers."""
    try:
        return np.array(values, dtype=float)
    except (TypeError, ValueError) as exc:
        raise SurfaceError(f"{name} must be an array of numbers ({exc})") from None


# Largest ratio of two weights of one surface: beyond it the homogeneous products lose all precision.
MAX_WEIGHT_RATIO = 1e12


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
        poles = _numbers(self.poles, "poles")
        if poles.ndim != 3 or poles.shape[2] != 3:
            raise SurfaceError(f"poles must have shape (nu, nv, 3), got {poles.shape}")
        if not np.all(np.isfinite(poles)):
            raise SurfaceError("control net holds NaN or infinite coordinates")
        nu, nv, _ = poles.shape
        ku = validate_knots(self.knots_u, self.degree_u, nu, "u")
        kv = validate_knots(self.knots_v, self.degree_v, nv, "v")
        weights = None
        if self.weights is not None:
            weights = _numbers(self.weights, "weights")
            if weights.shape != (nu, nv):
                raise SurfaceError(f"weights must have shape {(nu, nv)}, got {weights.shape}")
            if not np.all(np.isfinite(weights)) or np.any(weights <= 0):
                raise SurfaceError("weights must be finite and positive")
            if weights.max() > MAX_WEIGHT_RATIO * weights.min():
                raise SurfaceError(f"weights differ by more than a factor {MAX_WEIGHT_RATIO:.0e}, beyond evaluation")
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
        u, v = _numbers(u, "u"), _numbers(v, "v")
        return np.clip(u, u0, u1), np.clip(v, v0, v1)

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
        # Compiled: each grid row contracted with the net once (A3.6), quotient rule per sample (A4.4).
        return compiled_eval.grid_derivatives(self, u, v, order)

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
        """This surface alone as a :class:`~geometry.nurbs.compiled_eval.SurfacePack`."""
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
