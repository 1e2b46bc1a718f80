"""B-spline basis functions as dense matrices, and the checks of a knot vector.

The basis functions themselves are computed once, by the compiled
:func:`geometry.nurbs.compiled_eval.basis_rows` (The NURBS Book, Piegl & Tiller,
2nd ed., 1997, A2.1 and A2.3); :func:`basis_matrices` lays them out as design
matrices.
"""

from __future__ import annotations

import numpy as np

from ..errors import SurfaceError
from .compiled_eval import basis_rows


def basis_matrices(knots: np.ndarray, degree: int, n_poles: int, u: np.ndarray, order: int) -> np.ndarray:
    """Dense design matrices of the basis and its derivatives.

    Parameters
    ----------
    knots : ndarray of shape (n_poles + degree + 1,)
        Non-decreasing knot vector.
    degree, n_poles, order : int
        Degree p, number of control points, highest derivative (above the degree: zero).
    u : ndarray of shape (k,)
        Parameters (clipped into the domain ``[knots[p], knots[n_poles]]``).

    Returns
    -------
    matrices : ndarray of shape (order + 1, k, n_poles)
        ``matrices[d] @ poles`` gives the d-th derivative of the curve at ``u``.
    """
    ders, spans = basis_rows(knots, degree, n_poles, np.asarray(u, dtype=float).ravel(), order)
    k = ders.shape[0]
    out = np.zeros((order + 1, k, n_poles))
    cols = spans[:, None] - degree + np.arange(degree + 1)
    rows = np.arange(k)[:, None]
    out[:, rows, cols] = np.moveaxis(ders, 1, 0)
    return out


# Knot magnitudes and relative domain width a surface may have (see validate_knots).
MAX_KNOT = 1e12
MIN_DOMAIN_RELATIVE = 1e-12


def validate_knots(knots: np.ndarray, degree: int, n_poles: int, name: str) -> np.ndarray:
    """Check one knot vector and return it as a read-only float array.

    Raises
    ------
    SurfaceError
        With a message saying what is wrong.
    """
    if not isinstance(degree, (int, np.integer)) or degree < 1:
        raise SurfaceError(f"{name}: degree must be a whole number >= 1, got {degree!r}")
    if degree > 25:
        raise SurfaceError(f"{name}: degree {degree} is beyond what any design surface uses (max 25)")
    try:
        knots = np.array(knots, dtype=float).ravel()
    except (TypeError, ValueError) as exc:
        raise SurfaceError(f"{name}: knot vector must be numbers ({exc})") from None
    if not np.all(np.isfinite(knots)):
        raise SurfaceError(f"{name}: knot vector holds NaN or infinite values")
    if n_poles < degree + 1:
        raise SurfaceError(f"{name}: degree {degree} needs at least {degree + 1} poles, got {n_poles}")
    if knots.size != n_poles + degree + 1:
        raise SurfaceError(
            f"{name}: {n_poles} poles of degree {degree} need {n_poles + degree + 1} knots, got {knots.size}"
        )
    # Derivatives scale with 1 / width^k: widths or magnitudes far from any design data overflow or
    # underflow double precision (common practice: parameters are lengths or lie in [0, 1]).
    top = float(np.abs(knots).max()) if knots.size else 0.0
    if top > MAX_KNOT:
        raise SurfaceError(
            f"{name}: knot values up to {top:.3g}, beyond what can be evaluated (at most {MAX_KNOT:.0e})"
        )
    if np.any(np.diff(knots) < 0):
        raise SurfaceError(f"{name}: knot vector is not non-decreasing")
    if not knots[degree] < knots[n_poles]:
        raise SurfaceError(f"{name}: parameter domain [{knots[degree]}, {knots[n_poles]}] is empty")
    width = float(knots[n_poles] - knots[degree])
    if width < MIN_DOMAIN_RELATIVE * max(1.0, top):
        raise SurfaceError(f"{name}: parameter domain only {width:.3g} wide, too narrow to evaluate")
    inner = knots[degree + 1 : n_poles]
    if inner.size:
        _, counts = np.unique(inner, return_counts=True)
        if counts.max() > degree + 1:
            raise SurfaceError(f"{name}: an interior knot repeats more than degree + 1 = {degree + 1} times")
    knots.setflags(write=False)
    return knots
