"""Exact NURBS constructions used by the sample builder (numpy only).

Everything here makes or cuts :class:`geometry.nurbs.surface.NurbsSurface` objects
without approximation: knot insertion (Boehm), splitting a surface at knots
into pieces that meet with the continuity of the original, rational arcs and
tensor-product nets whose (x, y) follow the parameters exactly.

References
----------
Piegl & Tiller, *The NURBS Book*, 2nd ed. (1997): A5.1 (knot insertion),
sec. 5.3 (splitting by inserting a knot p times), eq. 7.8 (rational quadratic
circular arc). Farin, *Curves and Surfaces for CAGD*, 5th ed. (2002): Bezier
end-point curvature, ch. 5. Cited from memory.
"""

from __future__ import annotations

import numpy as np

from geometry.nurbs import NurbsSurface

# Knot values closer than this are the same knot (all samples use mm-scale knots).
KNOT_SNAP = 1e-12


def clamped_knots(breaks: np.ndarray, degree: int) -> np.ndarray:
    """Clamped knot vector with simple interior knots.

    Parameters
    ----------
    breaks : ndarray of shape (m,)
        Increasing breakpoints, ends included.
    degree : int

    Returns
    -------
    knots : ndarray of shape (m + 2 * degree,)
    """
    breaks = np.asarray(breaks, float)
    return np.concatenate([np.full(degree, breaks[0]), breaks, np.full(degree, breaks[-1])])


def greville(knots: np.ndarray, degree: int) -> np.ndarray:
    """Greville abscissae, shape (len(knots) - degree - 1,).

    Poles placed at them reproduce the identity: a B-spline whose coefficients
    are its Greville abscissae is the linear function x(u) = u (linear precision;
    de Boor, *A Practical Guide to Splines*, 1978, ch. IX, from memory).
    """
    knots = np.asarray(knots, float)
    n = knots.size - degree - 1
    idx = np.arange(n)[:, None] + np.arange(1, degree + 1)
    return knots[idx].mean(axis=1)


def _homogeneous(surface: NurbsSurface) -> np.ndarray:
    return np.array(surface.homogeneous)


def _from_homogeneous(surface: NurbsSurface, hom: np.ndarray, knots_u, knots_v) -> NurbsSurface:
    w = hom[..., 3]
    poles = hom[..., :3] / w[..., None]
    return NurbsSurface(surface.degree_u, surface.degree_v, knots_u, knots_v, poles, w if surface.is_rational else None)


def insert_knot(knots: np.ndarray, degree: int, hom: np.ndarray, t: float) -> tuple[np.ndarray, np.ndarray]:
    """Insert the knot ``t`` once into a B-spline whose poles run along axis 0.

    Parameters
    ----------
    knots : ndarray of shape (n + degree + 1,)
    degree : int
    hom : ndarray of shape (n, ...)
        Homogeneous poles (w x, w y, w z, w) along axis 0; any trailing axes.
    t : float
        Below the last knot; may equal an existing interior knot.

    Returns
    -------
    knots : ndarray of shape (n + degree + 2,)
    hom : ndarray of shape (n + 1, ...)

    Notes
    -----
    The NURBS Book, A5.1 (Boehm): with span k (``U_k <= t < U_k+1``) and current
    multiplicity s, ``Q_i = a_i P_i + (1 - a_i) P_i-1`` for
    ``k - p + 1 <= i <= k - s`` with ``a_i = (t - U_i) / (U_i+p - U_i)``.
    """
    p = degree
    k = int(np.searchsorted(knots, t, side="right") - 1)
    s = int(np.sum(np.abs(knots - t) <= KNOT_SNAP))
    n = hom.shape[0]
    out = np.empty((n + 1, *hom.shape[1:]))
    out[: k - p + 1] = hom[: k - p + 1]
    out[k - s + 1 :] = hom[k - s :]
    i = np.arange(k - p + 1, k - s + 1)
    a = (t - knots[i]) / (knots[i + p] - knots[i])
    a = a.reshape(-1, *([1] * (hom.ndim - 1)))
    out[i] = a * hom[i] + (1.0 - a) * hom[i - 1]
    return np.insert(knots, k + 1, t), out


def _saturate(knots: np.ndarray, degree: int, hom: np.ndarray, t: float) -> tuple[np.ndarray, np.ndarray]:
    """Insert ``t`` until it has multiplicity ``degree`` (the curve passes a pole there)."""
    while np.sum(np.abs(knots - t) <= KNOT_SNAP) < degree:
        knots, hom = insert_knot(knots, degree, hom, t)
    snapped = np.where(np.abs(knots - t) <= KNOT_SNAP, t, knots)
    return snapped, hom


def _pieces_1d(knots: np.ndarray, degree: int, hom: np.ndarray, cuts: np.ndarray):
    """(knots, hom) of each piece between consecutive cut values, poles along axis 0."""
    for t in cuts:
        knots, hom = _saturate(knots, degree, hom, float(t))
    out = []
    for a, b in zip(cuts[:-1], cuts[1:], strict=True):
        last_a = int(np.flatnonzero(knots == a)[-1])
        first_b = int(np.flatnonzero(knots == b)[0])
        # At a knot of multiplicity >= p the curve passes a pole: P_(last - p) seen
        # from the right, P_(first - 1) seen from the left (The NURBS Book sec. 5.3).
        piece_knots = np.concatenate([[a] * (degree + 1), knots[last_a + 1 : first_b], [b] * (degree + 1)])
        out.append((piece_knots, hom[last_a - degree : first_b]))
    return out


def split_surface(surface: NurbsSurface, cuts_u: np.ndarray, cuts_v: np.ndarray) -> list[list[NurbsSurface]]:
    """Cut a surface along parameter lines into clamped pieces, exactly.

    Parameters
    ----------
    surface : NurbsSurface
    cuts_u : ndarray of shape (a + 1,)
    cuts_v : ndarray of shape (b + 1,)
        Increasing parameter values, ends of the wanted range included (for a
        periodic net written out unclamped, the ends of its domain).

    Returns
    -------
    pieces : list of a lists of b NurbsSurface
        ``pieces[i][j]`` covers ``[cuts_u[i], cuts_u[i+1]] x [cuts_v[j], cuts_v[j+1]]``.

    Notes
    -----
    Each cut is inserted to multiplicity p (The NURBS Book, sec. 5.3), which does
    not change the surface; neighbouring pieces then share their boundary pole
    row and meet with the continuity the original had at that parameter:
    C^(p - m) at a knot of multiplicity m (The NURBS Book, P2.5, from memory).
    """
    hom = _homogeneous(surface)
    rows = _pieces_1d(np.array(surface.knots_u), surface.degree_u, hom, np.asarray(cuts_u, float))
    grid = []
    for ku, hom_u in rows:
        moved = np.moveaxis(hom_u, 1, 0)
        cols = _pieces_1d(np.array(surface.knots_v), surface.degree_v, moved, np.asarray(cuts_v, float))
        grid.append([_from_homogeneous(surface, np.moveaxis(h, 0, 1), ku, kv) for kv, h in cols])
    return grid


def arc_profile(start: np.ndarray, tangent: np.ndarray, centre: np.ndarray, sweep: float):
    """Rational quadratic circular arc of sweep < 180 degrees in a plane.

    Parameters
    ----------
    start : ndarray of shape (3,)
    tangent : ndarray of shape (3,)
        Unit tangent at ``start`` (direction of travel).
    centre : ndarray of shape (3,)
    sweep : float
        Angle in radians (0, pi).

    Returns
    -------
    poles : ndarray of shape (3, 3)
    weights : ndarray of shape (3,)

    Notes
    -----
    The NURBS Book eq. 7.8 (from memory): the middle pole is the intersection of
    the end tangents, at distance R tan(sweep / 2) from either end, with weight
    cos(sweep / 2).
    """
    start, tangent, centre = (np.asarray(a, float) for a in (start, tangent, centre))
    radius = np.linalg.norm(start - centre)
    half = 0.5 * sweep
    mid = start + tangent * radius * np.tan(half)
    radial = (start - centre) / radius
    end = centre + radius * (np.cos(sweep) * radial + np.sin(sweep) * tangent)
    return np.stack([start, mid, end]), np.array([1.0, np.cos(half), 1.0])


def extrude_profile(profile: np.ndarray, weights: np.ndarray | None, direction: np.ndarray) -> tuple:
    """Poles and weights of a profile swept straight along ``direction`` (degree 1 in v).

    Parameters
    ----------
    profile : ndarray of shape (n, 3)
    weights : ndarray of shape (n,) or None
    direction : ndarray of shape (3,)

    Returns
    -------
    poles : ndarray of shape (n, 2, 3)
    weights : ndarray of shape (n, 2) or None
    """
    profile = np.asarray(profile, float)
    poles = np.stack([profile, profile + np.asarray(direction, float)], axis=1)
    return poles, None if weights is None else np.stack([weights, weights], axis=1)
