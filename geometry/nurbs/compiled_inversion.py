"""Compiled point inversion on packed NURBS surfaces (numba).

Newton's method of The NURBS Book (Piegl & Tiller, 2nd ed., 1997), sec. 6.1,
eq. 6.3-6.6, on ``f = Su . r = 0, g = Sv . r = 0`` with ``r = S(u, v) - P``:
Gauss-Newton where the Hessian is not positive definite, a small
Levenberg-Marquardt damping (a collapsed pole makes the Jacobian singular),
projected steps on the domain's bounds, a trust region, and step halving when
a step would move away from the point. Each point iterates on its own, so a
point that has converged costs nothing more, and large batches run in
blocks on threads. The derivatives of the last
iteration are handed back with the foot (:func:`invert_with_derivatives`), so a
caller measuring at the foot evaluates nothing more.
"""

from __future__ import annotations

import numba as nb
import numpy as np

from .compiled_eval import (
    JIT_OPTIONS,
    MAX_ORDER,
    SurfacePack,
    binomials,
    homogeneous_at,
    make_scratch,
    rational_at,
    run_row_blocks,
)

# Newton stops when the parameter step is below this fraction of the domain.
STEP_RTOL = 1e-14
NEWTON_ITERATIONS = 30
# Damping on the Newton normal equations, relative to their trace.
DAMPING = 1e-12
# Step halvings tried when a step would move away from the point.
BACKTRACKS = 8
# Relative increase of the squared distance still accepted (rounding near the foot).
ACCEPT_RTOL = 1e-9
# Largest step per iteration, as a fraction of the domain (a trust region).
MAX_STEP = 0.25
# Fewer points than this are inverted on one thread (a thread hand-off costs more).
THREADED_POINTS = 2000


@nb.njit(**JIT_OPTIONS)
def _distance2(arrays, sid, u, v, target, hom, scratch):
    homogeneous_at(arrays, sid, u, v, 0, hom, scratch)
    d = 0.0
    for c in range(3):
        x = hom[0, 0, c] / hom[0, 0, 3] - target[c]
        d += x * x
    return d


@nb.njit(**JIT_OPTIONS)
def invert_kernel(arrays, domains, sids, targets, u, v, iterations, max_degree, orders, out):
    """Refine ``u``, ``v`` in place towards the feet of ``targets`` (k, 3).

    ``out[i, k, l]`` receives S_kl at the foot for ``k + l <= orders[i]``
    (``out`` of shape (n, o+1, o+1, 3), o the largest order asked; points first, so a
    block of points is a contiguous slice): the
    derivatives of the last Newton iteration, so the foot costs no further
    evaluation unless a third order is asked.
    """
    scratch = make_scratch(max_degree, MAX_ORDER)
    binom = binomials(MAX_ORDER)
    hom = np.zeros((MAX_ORDER + 1, MAX_ORDER + 1, 4))
    ders = np.zeros((MAX_ORDER + 1, MAX_ORDER + 1, 3))
    r = np.zeros(3)
    for i in range(u.size):
        sid = sids[i]
        u0, u1, v0, v1 = domains[sid, 0], domains[sid, 1], domains[sid, 2], domains[sid, 3]
        x = min(max(u[i], u0), u1)
        y = min(max(v[i], v0), v1)
        target = targets[i]
        fresh = False  # ders hold S_kl (k + l <= 2) at (x, y)
        for _ in range(iterations):
            homogeneous_at(arrays, sid, x, y, 2, hom, scratch)
            rational_at(hom, 2, binom, ders)
            fresh = True
            dist = 0.0
            for c in range(3):
                r[c] = ders[0, 0, c] - target[c]
                dist += r[c] * r[c]
            f = g = e_ = f_ = g_ = ruu = ruv = rvv = 0.0
            for c in range(3):
                su, sv = ders[1, 0, c], ders[0, 1, c]
                f += su * r[c]
                g += sv * r[c]
                e_ += su * su
                f_ += su * sv
                g_ += sv * sv
                ruu += r[c] * ders[2, 0, c]
                ruv += r[c] * ders[1, 1, c]
                rvv += r[c] * ders[0, 2, c]
            a, b, cc = e_ + ruu, f_ + ruv, g_ + rvv
            if not (a * cc - b * b > 0.0 and a > 0.0):
                # Gauss-Newton drops the r . S_ij terms: always positive semi-definite.
                a, b, cc = e_, f_, g_
            lam = DAMPING * (abs(a) + abs(cc)) + 1e-300
            a += lam
            cc += lam
            det = a * cc - b * b
            if not det > 0.0:
                det = lam * lam
            du = -(cc * f - b * g) / det
            dv = -(a * g - b * f) / det
            # Projected Newton: a parameter on a bound that would leave it is held,
            # the other takes the one-dimensional step.
            hold_u = (x <= u0 and du < 0.0) or (x >= u1 and du > 0.0)
            hold_v = (y <= v0 and dv < 0.0) or (y >= v1 and dv > 0.0)
            if hold_u:
                du, dv = 0.0, (0.0 if hold_v else -g / cc)
            elif hold_v:
                du, dv = -f / a, 0.0
            scale = max(abs(du) / (MAX_STEP * (u1 - u0)), abs(dv) / (MAX_STEP * (v1 - v0)))
            if scale > 1.0:
                du /= scale
                dv /= scale
            # Converged: the step left is below rounding of the parameters, so
            # the foot stays where its derivatives were just evaluated.
            if abs(du) / (u1 - u0) + abs(dv) / (v1 - v0) <= STEP_RTOL:
                break
            step = 1.0
            nx, ny = x, y
            moved_ok = False
            for _t in range(BACKTRACKS):
                nx = min(max(x + step * du, u0), u1)
                ny = min(max(y + step * dv, v0), v1)
                # Near the foot the squared distance is flat to rounding: only a
                # clear increase counts as moving away.
                if _distance2(arrays, sid, nx, ny, target, hom, scratch) <= dist * (1.0 + ACCEPT_RTOL) + 1e-300:
                    moved_ok = True
                    break
                step *= 0.5
            if not moved_ok:
                break  # a step that still moves away after the halvings is not taken
            moved = abs(nx - x) / (u1 - u0) + abs(ny - y) / (v1 - v0)
            fresh = fresh and nx == x and ny == y
            x, y = nx, ny
            if moved <= STEP_RTOL:
                break
        u[i] = x
        v[i] = y
        order = orders[i]
        if order > 2 or not fresh:
            homogeneous_at(arrays, sid, x, y, order, hom, scratch)
            rational_at(hom, order, binom, ders)
        for k in range(order + 1):
            for l in range(order + 1 - k):
                for c in range(3):
                    out[i, k, l, c] = ders[k, l, c]


def invert(
    pack: SurfacePack,
    sids: np.ndarray,
    points: np.ndarray,
    u: np.ndarray,
    v: np.ndarray,
    iterations: int = NEWTON_ITERATIONS,
) -> tuple[np.ndarray, np.ndarray]:
    """Parameters of the surface points nearest to ``points``, from nearby starts.

    Parameters
    ----------
    pack : SurfacePack
    sids : ndarray of int, shape (k,) or scalar
        Surface of the pack each point is inverted onto.
    points : ndarray of shape (k, 3)
    u, v : ndarray of shape (k,)
        Starting parameters.
    iterations : int

    Returns
    -------
    u, v : ndarray of shape (k,)
        Local minimisers of ``|S(u, v) - P|`` inside each domain (new arrays).
    """
    u, v, _ = invert_with_derivatives(pack, sids, points, u, v, 0, iterations)
    return u, v


def invert_with_derivatives(
    pack: SurfacePack,
    sids: np.ndarray,
    points: np.ndarray,
    u: np.ndarray,
    v: np.ndarray,
    orders: np.ndarray | int = 0,
    iterations: int = NEWTON_ITERATIONS,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Feet of ``points`` on their surfaces, with the surface derivatives there.

    Parameters
    ----------
    pack : SurfacePack
    sids : ndarray of int, shape (k,) or scalar
        Surface of the pack each point is inverted onto.
    points : ndarray of shape (k, 3)
    u, v : ndarray of shape (k,)
        Starting parameters.
    orders : ndarray of int, shape (k,) or scalar
        Highest derivative order wanted at each foot, 0 to :data:`MAX_ORDER`.
    iterations : int

    Returns
    -------
    u, v : ndarray of shape (k,)
        Local minimisers of ``|S(u, v) - P|`` inside each domain (new arrays).
    ders : ndarray of shape (o + 1, o + 1, k, 3)
        ``ders[a, b, i]`` is d^(a+b) S / du^a dv^b at ``(u[i], v[i])`` for
        ``a + b <= orders[i]``, zero otherwise; ``o = max(orders)``. Order 0 is
        the foot point itself.

    Notes
    -----
    Newton's method for point inversion, The NURBS Book (2nd ed.), sec. 6.1,
    eq. 6.6. Every iteration evaluates the derivatives to second order at the
    current parameters (A3.6 on the homogeneous net, A4.4 for the quotient);
    those of the last iteration are the foot's, so up to second order the foot
    and its derivatives come without another evaluation.
    """
    pts = np.ascontiguousarray(points, dtype=float).reshape(-1, 3)
    uu = np.array(u, dtype=float).ravel()
    vv = np.array(v, dtype=float).ravel()
    sids = np.array(np.broadcast_to(sids, uu.shape), dtype=np.int64)  # writable: one compiled signature
    orders = np.array(np.broadcast_to(orders, uu.shape), dtype=np.int64)  # writable: one compiled signature
    top = int(orders.max(initial=0))
    if int(orders.min(initial=0)) < 0 or top > MAX_ORDER:
        raise ValueError(f"derivative orders must lie in 0..{MAX_ORDER}")
    out = np.zeros((uu.size, top + 1, top + 1, 3))

    def work(r0: int, r1: int) -> None:
        part = slice(r0, r1)
        invert_kernel(
            pack.arrays, pack.domains, sids[part], pts[part], uu[part], vv[part],
            int(iterations), pack.max_degree, orders[part], out[part],
        )  # fmt: skip

    # every point iterates on its own: blocks of points run on threads (the kernel releases the GIL)
    run_row_blocks(work, uu.size, None if uu.size >= THREADED_POINTS else 1)
    return uu, vv, np.moveaxis(out, 0, 2)
