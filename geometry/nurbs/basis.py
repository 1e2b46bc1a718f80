"""B-spline basis functions and their derivatives, vectorised over parameters.

The recurrences are those of The NURBS Book (Piegl & Tiller, 2nd ed., 1997):
the Cox-de Boor triangle (eq. 2.5, algorithm A2.2) and the derivative of a
basis function in terms of two of one degree lower (eq. 2.7 and 2.9, the idea
behind A2.3). Here every step works on whole arrays of parameters at once and
on all the non-zero functions of a span together; no loop runs per parameter.
"""

from __future__ import annotations

import numpy as np

from ..errors import SurfaceError


def find_spans(knots: np.ndarray, degree: int, n_poles: int, u: np.ndarray) -> np.ndarray:
    """Knot span index of each parameter (The NURBS Book A2.1, vectorised).

    Parameters
    ----------
    knots : ndarray of shape (m,)
        Non-decreasing knot vector, ``m = n_poles + degree + 1``.
    degree : int
        Polynomial degree p.
    n_poles : int
        Number of control points n.
    u : ndarray of shape (k,)
        Parameters inside the domain ``[knots[p], knots[n]]``.

    Returns
    -------
    spans : ndarray of int, shape (k,)
        ``s`` with ``knots[s] <= u < knots[s + 1]`` and ``knots[s] < knots[s + 1]``;
        the domain's end belongs to the last non-empty span.
    """
    span = np.searchsorted(knots, u, side="right") - 1
    span = np.clip(span, degree, n_poles - 1)
    # At the domain's end (or on a knot of full multiplicity) the span found
    # can be empty; step back to the last non-empty one, which holds u.
    empty = knots[span] >= knots[span + 1]
    if np.any(empty):
        back = np.searchsorted(knots, u[empty], side="left") - 1
        span[empty] = np.clip(back, degree, n_poles - 1)
    return span


def _safe_ratio(num: np.ndarray, den: np.ndarray) -> np.ndarray:
    # 0/0 terms of the recurrences are zero by definition (NURBS Book, eq. 2.5 note).
    out = np.zeros(np.broadcast_shapes(num.shape, den.shape))
    np.divide(num, den, out=out, where=den > 0)
    return out


def _padded(a: np.ndarray) -> np.ndarray:
    """``a`` with a zero column on each side (np.pad costs more than the work here)."""
    out = np.zeros((a.shape[0], a.shape[1] + 2))
    out[:, 1:-1] = a
    return out


def nonzero_basis_derivatives(
    knots: np.ndarray, degree: int, n_poles: int, u: np.ndarray, order: int
) -> tuple[np.ndarray, np.ndarray]:
    """Non-zero basis functions and derivatives up to ``order`` at parameters ``u``.

    Parameters
    ----------
    knots : ndarray of shape (m,)
        Knot vector.
    degree : int
        Degree p.
    n_poles : int
        Number of control points.
    u : ndarray of shape (k,)
        Parameters.
    order : int
        Highest derivative wanted (0 to 3 are used in Batten; any works).

    Returns
    -------
    ders : ndarray of shape (order + 1, k, p + 1)
        ``ders[d, i, r]`` is the d-th derivative of N_{s_i - p + r, p} at ``u[i]``.
    spans : ndarray of int, shape (k,)

    Notes
    -----
    Degree-j functions come from degree j-1 by Cox-de Boor (NURBS Book eq. 2.5);
    the d-th derivative of a degree-j function is
    ``j * (D^{d-1} N_{i,j-1} / (u_{i+j} - u_i) - D^{d-1} N_{i+1,j-1} / (u_{i+j+1} - u_{i+1}))``
    (eq. 2.9). Derivatives above the degree are zero.
    """
    u = np.asarray(u, dtype=float).ravel()
    p = degree
    spans = find_spans(knots, p, n_poles, u)
    # triangle[j] : (k, j + 1) values of the degree-j functions non-zero on the span
    triangle = [np.ones((u.size, 1))]
    for j in range(1, p + 1):
        first = spans[:, None] - j + np.arange(j + 1)  # index i of N_{i,j}
        prev = _padded(triangle[-1])  # N_{i,j-1}, N_{i+1,j-1} with zeros
        left = _safe_ratio(u[:, None] - knots[first], knots[first + j] - knots[first])
        right = _safe_ratio(knots[first + j + 1] - u[:, None], knots[first + j + 1] - knots[first + 1])
        triangle.append(left * prev[:, :-1] + right * prev[:, 1:])

    ders = np.zeros((order + 1, u.size, p + 1))
    ders[0] = triangle[p]
    for d in range(1, min(order, p) + 1):
        # Derivative d of degree p from derivative d-1 of degree p-1, which in turn
        # comes from degree p-2 ... : walk down d degrees, then back up.
        current = triangle[p - d]
        for j in range(p - d + 1, p + 1):
            first = spans[:, None] - j + np.arange(j + 1)
            prev = _padded(current)
            a = _safe_ratio(np.float64(j), knots[first + j] - knots[first])
            b = _safe_ratio(np.float64(j), knots[first + j + 1] - knots[first + 1])
            current = a * prev[:, :-1] - b * prev[:, 1:]
        ders[d] = current
    return ders, spans


def basis_matrices(knots: np.ndarray, degree: int, n_poles: int, u: np.ndarray, order: int) -> np.ndarray:
    """Dense design matrices of the basis and its derivatives.

    Parameters
    ----------
    knots, degree, n_poles, u, order
        As for :func:`nonzero_basis_derivatives`.

    Returns
    -------
    matrices : ndarray of shape (order + 1, k, n_poles)
        ``matrices[d] @ poles`` gives the d-th derivative of the curve at ``u``.
    """
    ders, spans = nonzero_basis_derivatives(knots, degree, n_poles, u, order)
    k = ders.shape[1]
    out = np.zeros((order + 1, k, n_poles))
    cols = spans[:, None] - degree + np.arange(degree + 1)
    rows = np.arange(k)[:, None]
    out[:, rows, cols] = ders
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
