"""A slow, obvious NURBS evaluator for tests only: one point at a time, plain recursion.

Nothing here is fast or vectorised on purpose: it is the independent reference the
batched evaluator in ``geometry`` is checked against.

- Basis functions by the Cox-de Boor recursion (The NURBS Book, Piegl & Tiller,
  2nd ed., eq. 2.5) and their derivatives by eq. 2.9 applied k times:
  ``N^(k)_{i,p} = p (N^(k-1)_{i,p-1} / (u_{i+p} - u_i) - N^(k-1)_{i+1,p-1} / (u_{i+p+1} - u_{i+1}))``
  with 0/0 = 0.
- Rational surface derivatives from the homogeneous ones by eq. 4.20.
- ``side="left"`` evaluates the limit from the left at a knot (spans closed on the
  right), the value de Boor's jump conditions compare with the right limit
  (A Practical Guide to Splines, rev. ed. 2001, ch. IX; quoted from memory).
"""

from __future__ import annotations

from math import comb

import numpy as np


def _span_indicator(knots, i: int, u: float, side: str, last: int) -> float:
    a, b = knots[i], knots[i + 1]
    if a == b:
        return 0.0
    if side == "left":
        return 1.0 if a < u <= b or (u == a == knots[0] and i == _first_nonempty(knots)) else 0.0
    return 1.0 if a <= u < b or (u == b == knots[-1] and i == last) else 0.0


def _first_nonempty(knots) -> int:
    return next(i for i in range(len(knots) - 1) if knots[i] < knots[i + 1])


def basis(knots, i: int, p: int, u: float, k: int = 0, side: str = "right") -> float:
    """The k-th derivative of N_{i,p} at u (eq. 2.5 and 2.9), recursively."""
    knots = [float(t) for t in knots]
    last = max(j for j in range(len(knots) - 1) if knots[j] < knots[j + 1])
    return _basis(knots, i, p, u, k, side, last)


def _basis(knots, i, p, u, k, side, last) -> float:
    if k > p:
        return 0.0
    if p == 0:
        return _span_indicator(knots, i, u, side, last)
    if k == 0:
        left = right = 0.0
        d1 = knots[i + p] - knots[i]
        d2 = knots[i + p + 1] - knots[i + 1]
        if d1 > 0:
            left = (u - knots[i]) / d1 * _basis(knots, i, p - 1, u, 0, side, last)
        if d2 > 0:
            right = (knots[i + p + 1] - u) / d2 * _basis(knots, i + 1, p - 1, u, 0, side, last)
        return left + right
    d1 = knots[i + p] - knots[i]
    d2 = knots[i + p + 1] - knots[i + 1]
    a = _basis(knots, i, p - 1, u, k - 1, side, last) / d1 if d1 > 0 else 0.0
    b = _basis(knots, i + 1, p - 1, u, k - 1, side, last) / d2 if d2 > 0 else 0.0
    return p * (a - b)


def surface_derivatives(surface, u: float, v: float, order: int, side: str = "right") -> np.ndarray:
    """S_kl (k + l <= order) of a ``geometry.nurbs.NurbsSurface`` at one (u, v), shape (order + 1, order + 1, 3)."""
    nu, nv = surface.shape
    p, q = surface.degree_u, surface.degree_v
    hom = surface.homogeneous  # (nu, nv, 4): w * P and w
    a = np.zeros((order + 1, order + 1, 4))
    for k in range(order + 1):
        bu = np.array([basis(surface.knots_u, i, p, u, k, side) for i in range(nu)])
        for l in range(order + 1 - k):
            bv = np.array([basis(surface.knots_v, j, q, v, l, side) for j in range(nv)])
            a[k, l] = np.einsum("i,j,ijd->d", bu, bv, hom)
    s = np.zeros((order + 1, order + 1, 3))
    w = a[..., 3]
    for k in range(order + 1):
        for l in range(order + 1 - k):
            value = a[k, l, :3].copy()
            for j in range(1, l + 1):
                value -= comb(l, j) * w[0, j] * s[k, l - j]
            for i in range(1, k + 1):
                value -= comb(k, i) * w[i, 0] * s[k - i, l]
                for j in range(1, l + 1):
                    value -= comb(k, i) * comb(l, j) * w[i, j] * s[k - i, l - j]
            s[k, l] = value / w[0, 0]
    return s
