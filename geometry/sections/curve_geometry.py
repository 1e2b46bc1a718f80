"""Exact differential geometry of curves that lie on a surface.

A section curve is followed in the surface's parameter plane by a velocity
field ``x'(t) = A(x)``: for a plane section ``f(u, v) = (S(u, v) - o) . n = 0``
the field is the rotated gradient ``A = (-f_v, f_u)`` (the curve is the level
set f = 0); for an iso-parameter curve it is constant, (0, 1) along u = const
and (1, 0) along v = const. The uv velocity, acceleration and jerk follow from
A and its derivatives, and the space curve's derivatives from the chain rule:

    C'   = S_u a + S_v b
    C''  = S_uu a^2 + 2 S_uv a b + S_vv b^2 + S_u a'' + S_v b''
    C''' = S_uuu a^3 + 3 S_uuv a^2 b + 3 S_uvv a b^2 + S_vvv b^3
           + 3 (S_uu a a'' + S_uv (a b'' + a'' b) + S_vv b b'') + S_u a''' + S_v b'''

with (a, b) = x'. Everything is exact from the surface's first to third partial
derivatives; nothing is fitted to samples.

Signed curvature: one convention for every curve, the colour map's. The sign
is that of the normal curvature of the face along the curve: positive where
the face bends towards its unit normal N (face orientation applied), as k1,
k2 and H are (see DEVELOPERS.md). Reversing a curve keeps k and negates dk/ds.

- ``PLANE``: the magnitude is the curve's own curvature in its plane,
  ``|(C' x C'') . n| / |C'|^3`` (do Carmo 1976, sec. 1-5); the side vector is
  the in-plane normal ``n x T`` turned towards N, and k takes the sign of
  ``(n x T) . N`` times the in-plane signed curvature. So ``k * sides`` is the
  curve's curvature vector and ``k * (sides . N)`` is the normal curvature
  (Meusnier, do Carmo sec. 3-2), which the tests check. ``(n x T) . N``
  vanishes only where the plane touches the surface, where the section itself
  is singular.
- ``ISO_U``, ``ISO_V``, ``PCURVE`` (iso-parameter, boundary and trim curves): the normal curvature
  ``k_n = C'' . N / |C'|^2 = II(x', x') / I(x', x')``, side vector N. This is how the
  surface bends along the curve, the quantity whose sign change is an
  inflection of the surface in that direction; the curve's full curvature
  magnitude is also returned (``abs_curvature``).

Derivatives along arc length: ``dk/ds = (dk/dt) / |C'|`` with
``d/dt [(C' x C'') . n / |C'|^3] = (C' x C''') . n / |C'|^3 - 3 k (C' . C'') / |C'|^2``
and ``d/dt [C'' . N / |C'|^2] = (C''' . N + C'' . N') / |C'|^2 - 2 k (C' . C'') / |C'|^2``,
``N' = P_perp(d(S_u x S_v)/dt) / |S_u x S_v|`` (derivative of a unit vector).
"""

from __future__ import annotations

import numpy as np

from ..vectors import cross, dot

PLANE = "plane"
ISO_U = "iso_u"  # u = const, parametrised by v
ISO_V = "iso_v"  # v = const, parametrised by u
PCURVE = "pcurve"  # a given parameter-plane curve (a trim loop), its motion passed in

# Below this speed |C'| (mm per unit of the field's parameter, relative to the
# model size) the curve's tangent is undefined: the plane touches the surface.
SINGULAR_SPEED = 1e-14


def _safe(x: np.ndarray, floor: float) -> np.ndarray:
    return np.where(np.abs(x) > floor, x, floor)


def uv_motion(kind: str, ders: np.ndarray, normal: np.ndarray | None = None) -> tuple[np.ndarray, ...]:
    """uv velocity, acceleration and jerk of the curve's own parameter t.

    Parameters
    ----------
    kind : str
        PLANE, ISO_U or ISO_V.
    ders : ndarray of shape (4, 4, 3, k)
        Surface derivatives S_kl up to order 3, components first.
    normal : ndarray of shape (3,)
        Unit plane normal (PLANE only).

    Returns
    -------
    x1, x2, x3 : ndarray of shape (2, k)
        d x / dt, d^2 x / dt^2, d^3 x / dt^3 in (u, v).

    Notes
    -----
    PLANE: ``x' = A = (-f_v, f_u)``, ``x'' = J A``, ``x'''^i = A^T H_i A + (J x'')^i``
    with J the Jacobian and H_i the Hessians of A, all from ``f_kl = S_kl . n``.
    """
    k = ders.shape[-1]
    zero = np.zeros((2, k))
    if kind == ISO_U:
        return np.stack([np.zeros(k), np.ones(k)]), zero, zero
    if kind == ISO_V:
        return np.stack([np.ones(k), np.zeros(k)]), zero, zero
    f = np.einsum("abik,i->abk", ders, normal)
    a, b = -f[0, 1], f[1, 0]
    jac = np.array([[-f[1, 1], -f[0, 2]], [f[2, 0], f[1, 1]]])  # (2, 2, k)
    hess = np.array(
        [
            [[-f[2, 1], -f[1, 2]], [-f[1, 2], -f[0, 3]]],
            [[f[3, 0], f[2, 1]], [f[2, 1], f[1, 2]]],
        ]
    )  # (2, 2, 2, k): hess[i, j, l] = d^2 A^i / dx_j dx_l
    x1 = np.stack([a, b])
    x2 = np.einsum("ijk,jk->ik", jac, x1)
    x3 = np.einsum("ijlk,jk,lk->ik", hess, x1, x1) + np.einsum("ijk,jk->ik", jac, x2)
    return x1, x2, x3


def space_derivatives(ders: np.ndarray, x1: np.ndarray, x2: np.ndarray, x3: np.ndarray) -> tuple[np.ndarray, ...]:
    """C', C'', C''' of the space curve by the chain rule (module notes), each (3, k)."""
    a, b = x1
    a2, b2 = x2
    a3, b3 = x3
    su, sv = ders[1, 0], ders[0, 1]
    suu, suv, svv = ders[2, 0], ders[1, 1], ders[0, 2]
    c1 = su * a + sv * b
    c2 = suu * a * a + 2.0 * suv * a * b + svv * b * b + su * a2 + sv * b2
    c3 = (
        ders[3, 0] * a**3
        + 3.0 * ders[2, 1] * a * a * b
        + 3.0 * ders[1, 2] * a * b * b
        + ders[0, 3] * b**3
        + 3.0 * (suu * a * a2 + suv * (a * b2 + a2 * b) + svv * b * b2)
        + su * a3
        + sv * b3
    )
    return c1, c2, c3


def curve_geometry(
    kind: str,
    ders: np.ndarray,
    face_sign: np.ndarray,
    normal: np.ndarray | None,
    length_scale: float,
    motion: tuple[np.ndarray, ...] | None = None,
) -> dict[str, np.ndarray]:
    """Points, unit tangents, side vectors, signed curvature and its arc-length derivative.

    Parameters
    ----------
    kind : str
        PLANE, ISO_U, ISO_V or PCURVE.
    ders : ndarray of shape (4, 4, 3, k)
        Surface derivatives up to order 3 at the samples, components first.
    face_sign : ndarray of shape (k,)
        +1 or -1: the face orientation at each sample.
    normal : ndarray of shape (3,) or None
        Unit plane normal for PLANE.
    length_scale : float
        Model size in mm, for the singular-speed floor.
    motion : tuple of ndarray of shape (2, k), optional
        (x', x'', x''') for PCURVE: the derivatives of the given uv curve.

    Returns
    -------
    dict
        ``points, tangents, sides`` of shape (k, 3); ``curvature, slope,
        abs_curvature`` of shape (k,) (slope = dk/ds); ``field_tangents`` (k, 2) the
        unit uv direction of the field.

    Notes
    -----
    The formulas and the sign convention are in the module notes.
    """
    x1, x2, x3 = motion if kind == PCURVE else uv_motion(kind, ders, normal)
    c1, c2, c3 = space_derivatives(ders, x1, x2, x3)
    speed = _safe(np.sqrt(dot(c1, c1, axis=0)), SINGULAR_SPEED * length_scale)
    tangent = c1 / speed
    along = dot(c1, c2, axis=0) / (speed * speed)
    c1xc2 = cross(c1, c2, axis=0)
    abs_curvature = np.sqrt(dot(c1xc2, c1xc2, axis=0)) / speed**3
    n_raw = cross(ders[1, 0], ders[0, 1], axis=0)
    area = _safe(np.sqrt(dot(n_raw, n_raw, axis=0)), 1e-300)
    unit = n_raw / area
    if kind == PLANE:
        in_plane = np.einsum("ik,i->k", c1xc2, normal) / speed**3
        in_plane_rate = np.einsum("ik,i->k", cross(c1, c3, axis=0), normal) / speed**3 - 3.0 * in_plane * along
        side = cross(np.broadcast_to(normal[:, None], c1.shape), tangent, axis=0)
        # turn the in-plane side towards the face normal: the colour map's sign
        towards = np.where(dot(side, unit, axis=0) * face_sign < 0, -1.0, 1.0)
        side = side * towards
        curvature = in_plane * towards
        rate = in_plane_rate * towards
    else:
        su_t = ders[2, 0] * x1[0] + ders[1, 1] * x1[1]
        sv_t = ders[1, 1] * x1[0] + ders[0, 2] * x1[1]
        n_t = cross(su_t, ders[0, 1], axis=0) + cross(ders[1, 0], sv_t, axis=0)
        unit_t = (n_t - unit * dot(n_t, unit, axis=0)) / area
        side = unit * face_sign
        curvature = dot(c2, side, axis=0) / (speed * speed)
        rate = (dot(c3, side, axis=0) + dot(c2, unit_t * face_sign, axis=0)) / (speed * speed) - 2.0 * curvature * along
    uv_speed = _safe(np.hypot(x1[0], x1[1]), 1e-300)
    return {
        "points": ders[0, 0].T.copy(),
        "tangents": tangent.T.copy(),
        "sides": side.T.copy(),
        "curvature": curvature,
        "slope": rate / speed,
        "abs_curvature": abs_curvature,
        "field_tangents": (x1 / uv_speed).T.copy(),
    }
