"""Compiled evaluation of NURBS surfaces at scattered parameters (numba).

Scattered work (Newton steps, point inversion, edge and trim sampling) comes in
many small batches; in numpy each batch pays tens of microseconds per array
operation, which dominated reading and seam checks of real models. These
kernels walk the points one by one in compiled code instead, with no Python
per point and no temporaries per point.

Surfaces are handed over as a :class:`SurfacePack`: the knot vectors and
homogeneous nets of one or many surfaces concatenated into flat arrays with
offsets, so one call serves every face of a model.

Algorithms, The NURBS Book (Piegl & Tiller, 2nd ed., 1997): knot span A2.1,
basis functions and derivatives A2.3, surface derivatives of the homogeneous
form A3.6 (eq. 3.17 differentiated), rational quotient A4.4 (eq. 4.20).
"""

from __future__ import annotations

import os
import threading
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass

import numba as nb
import numpy as np

# Highest degree the compiled kernels size their scratch for (validate_knots allows 25).
MAX_DEGREE = 25
# Highest derivative order of the scattered kernels.
MAX_ORDER = 3

JIT_OPTIONS = {"cache": True, "nogil": True, "fastmath": False, "error_model": "numpy"}


@nb.njit(**JIT_OPTIONS)
def find_span(knots, p, n, u):
    """Knot span of ``u`` (A2.1): ``knots[s] <= u < knots[s+1]``, non-empty, s in [p, n-1]."""
    lo, hi = 0, knots.size
    while lo < hi:  # first index with knots[i] > u (searchsorted right)
        mid = (lo + hi) // 2
        if knots[mid] <= u:
            lo = mid + 1
        else:
            hi = mid
    s = min(max(lo - 1, p), n - 1)
    if knots[s] >= knots[s + 1]:
        # The domain's end or a knot of full multiplicity: the last non-empty span holding u.
        lo, hi = 0, knots.size
        while lo < hi:  # first index with knots[i] >= u (searchsorted left)
            mid = (lo + hi) // 2
            if knots[mid] < u:
                lo = mid + 1
            else:
                hi = mid
        s = min(max(lo - 1, p), n - 1)
    return s


@nb.njit(**JIT_OPTIONS)
def basis_ders(knots, s, u, p, order, ders, ndu, a, left, right):
    """Non-zero basis functions and derivatives at ``u`` in span ``s`` (A2.3).

    Fills ``ders[k, r]`` (k <= order, r <= p) with the k-th derivative of
    N_{s-p+r, p}; rows above the degree are zero. ``ndu`` (p+1, p+1), ``a``
    (2, p+1), ``left`` and ``right`` (p+1,) are scratch. On a non-empty span
    every knot difference divided by is positive.
    """
    ndu[0, 0] = 1.0
    for j in range(1, p + 1):
        left[j] = u - knots[s + 1 - j]
        right[j] = knots[s + j] - u
        saved = 0.0
        for r in range(j):
            ndu[j, r] = right[r + 1] + left[j - r]
            temp = ndu[r, j - 1] / ndu[j, r]
            ndu[r, j] = saved + right[r + 1] * temp
            saved = left[j - r] * temp
        ndu[j, j] = saved
    for j in range(p + 1):
        ders[0, j] = ndu[j, p]
    for k in range(1, order + 1):
        for j in range(p + 1):
            ders[k, j] = 0.0
    top = min(order, p)
    for r in range(p + 1):
        s1, s2 = 0, 1
        a[0, 0] = 1.0
        for k in range(1, top + 1):
            d = 0.0
            rk, pk = r - k, p - k
            if r >= k:
                a[s2, 0] = a[s1, 0] / ndu[pk + 1, rk]
                d = a[s2, 0] * ndu[rk, pk]
            j1 = 1 if rk >= -1 else -rk
            j2 = k - 1 if r - 1 <= pk else p - r
            for j in range(j1, j2 + 1):
                a[s2, j] = (a[s1, j] - a[s1, j - 1]) / ndu[pk + 1, rk + j]
                d += a[s2, j] * ndu[rk + j, pk]
            if r <= pk:
                a[s2, k] = -a[s1, k - 1] / ndu[pk + 1, r]
                d += a[s2, k] * ndu[r, pk]
            ders[k, r] = d
            s1, s2 = s2, s1
    factor = p
    for k in range(1, top + 1):
        for j in range(p + 1):
            ders[k, j] *= factor
        factor *= p - k


@dataclass(frozen=True, eq=False)
class SurfacePack:
    """One or many NURBS surfaces as flat arrays for the compiled kernels.

    Attributes
    ----------
    degrees : ndarray of int, shape (m, 2)
    counts : ndarray of int, shape (m, 2)
        Pole counts (nu, nv).
    knot_starts : ndarray of int, shape (m, 2)
        Offsets of each knot vector in ``knots``.
    knots : ndarray of shape (K,)
    net_starts : ndarray of int, shape (m,)
        Offset of each net's first pole in ``net``; pole (i, j) is at ``start + i * nv + j``.
    net : ndarray of shape (P, 4)
        Homogeneous poles (w x, w y, w z, w).
    domains : ndarray of shape (m, 4)
        (u0, u1, v0, v1) of each surface.
    """

    degrees: np.ndarray
    counts: np.ndarray
    knot_starts: np.ndarray
    knots: np.ndarray
    net_starts: np.ndarray
    net: np.ndarray
    domains: np.ndarray

    @classmethod
    def of(cls, surfaces) -> SurfacePack:
        """Pack a sequence of :class:`~geometry.nurbs.surface.NurbsSurface`."""
        surfaces = list(surfaces)
        degrees = np.array([(s.degree_u, s.degree_v) for s in surfaces], dtype=np.int64).reshape(-1, 2)
        counts = np.array([s.shape for s in surfaces], dtype=np.int64).reshape(-1, 2)
        knot_list, starts, at = [], [], 0
        for s in surfaces:
            starts.append((at, at + s.knots_u.size))
            knot_list += [s.knots_u, s.knots_v]
            at += s.knots_u.size + s.knots_v.size
        sizes = counts[:, 0] * counts[:, 1]
        net_starts = np.concatenate([[0], np.cumsum(sizes)[:-1]]).astype(np.int64)
        net = np.concatenate([s.homogeneous.reshape(-1, 4) for s in surfaces]) if surfaces else np.zeros((0, 4))
        domains = np.array([[*s.domain[0], *s.domain[1]] for s in surfaces], dtype=float).reshape(-1, 4)
        return cls(
            degrees,
            counts,
            np.array(starts, dtype=np.int64).reshape(-1, 2),
            np.concatenate(knot_list) if knot_list else np.zeros(0),
            net_starts,
            np.ascontiguousarray(net, dtype=float),
            domains,
        )

    @property
    def arrays(self) -> tuple:
        """The arrays in the order the kernels take them."""
        return (self.degrees, self.counts, self.knot_starts, self.knots, self.net_starts, self.net)

    @property
    def max_degree(self) -> int:
        return int(self.degrees.max()) if self.degrees.size else 1


@nb.njit(**JIT_OPTIONS)
def binomials(n):
    out = np.zeros((n + 1, n + 1))
    for i in range(n + 1):
        out[i, 0] = 1.0
        for j in range(1, i + 1):
            out[i, j] = out[i - 1, j - 1] + (out[i - 1, j] if j < i else 0.0)
    return out


@nb.njit(**JIT_OPTIONS)
def homogeneous_at(arrays, sid, u, v, order, hom, scratch):
    """Derivatives A_kl (k + l <= order) of the homogeneous surface ``sid`` at (u, v).

    ``hom`` (order+1, order+1, 4) is filled (entries with k + l > order are
    zero); ``scratch`` is from :func:`make_scratch`. Returns True when the
    surface is rational somewhere in the active poles (weights not all 1).
    """
    degrees, counts, knot_starts, knots, net_starts, net = arrays
    p, q = degrees[sid, 0], degrees[sid, 1]
    nu, nv = counts[sid, 0], counts[sid, 1]
    ku = knots[knot_starts[sid, 0] : knot_starts[sid, 0] + nu + p + 1]
    kv = knots[knot_starts[sid, 1] : knot_starts[sid, 1] + nv + q + 1]
    du, dv, ndu, a, left, right, row = scratch
    # Clip into the domain: rounding just outside it is harmless.
    u = min(max(u, ku[p]), ku[nu])
    v = min(max(v, kv[q]), kv[nv])
    su = find_span(ku, p, nu, u)
    sv = find_span(kv, q, nv, v)
    basis_ders(ku, su, u, p, order, du, ndu, a, left, right)
    basis_ders(kv, sv, v, q, order, dv, ndu, a, left, right)
    base = net_starts[sid]
    for k in range(order + 1):
        for l in range(order + 1):
            for c in range(4):
                hom[k, l, c] = 0.0
    for k in range(order + 1):
        # row[b, c] = sum_a Nu^(k)_a P^w[su - p + a, sv - q + b, c]
        for b in range(q + 1):
            for c in range(4):
                row[b, c] = 0.0
        for ia in range(p + 1):
            coef = du[k, ia]
            if coef == 0.0:
                continue
            at = base + (su - p + ia) * nv + sv - q
            for b in range(q + 1):
                for c in range(4):
                    row[b, c] += coef * net[at + b, c]
        for l in range(order + 1 - k):
            for b in range(q + 1):
                coef = dv[l, b]
                for c in range(4):
                    hom[k, l, c] += coef * row[b, c]


@nb.njit(**JIT_OPTIONS)
def rational_at(hom, order, binom, ders):
    """Derivatives S_kl of the rational surface from A_kl (A4.4, eq. 4.20), into ``ders`` (o+1, o+1, 3)."""
    w0 = hom[0, 0, 3]
    for k in range(order + 1):
        for l in range(order + 1):
            for c in range(3):
                ders[k, l, c] = 0.0
    for k in range(order + 1):
        for l in range(order + 1 - k):
            for c in range(3):
                acc = hom[k, l, c]
                for j in range(1, l + 1):
                    acc -= binom[l, j] * hom[0, j, 3] * ders[k, l - j, c]
                for i in range(1, k + 1):
                    acc -= binom[k, i] * hom[i, 0, 3] * ders[k - i, l, c]
                    for j in range(1, l + 1):
                        acc -= binom[k, i] * binom[l, j] * hom[i, j, 3] * ders[k - i, l - j, c]
                ders[k, l, c] = acc / w0


@nb.njit(**JIT_OPTIONS)
def make_scratch(max_degree, max_order):
    n = max_degree + 1
    return (
        np.zeros((max_order + 1, n)),
        np.zeros((max_order + 1, n)),
        np.zeros((n, n)),
        np.zeros((2, n)),
        np.zeros(n),
        np.zeros(n),
        np.zeros((n, 4)),
    )


@nb.njit(**JIT_OPTIONS)
def derivatives_kernel(arrays, sids, u, v, order, max_degree, out):
    """S_kl at every (sids[i], u[i], v[i]) into ``out`` of shape (order+1, order+1, k, 3)."""
    scratch = make_scratch(max_degree, order)
    binom = binomials(order)
    hom = np.zeros((order + 1, order + 1, 4))
    ders = np.zeros((order + 1, order + 1, 3))
    for i in range(u.size):
        homogeneous_at(arrays, sids[i], u[i], v[i], order, hom, scratch)
        rational_at(hom, order, binom, ders)
        for k in range(order + 1):
            for l in range(order + 1 - k):
                for c in range(3):
                    out[k, l, i, c] = ders[k, l, c]


def derivatives(pack: SurfacePack, sids: np.ndarray, u: np.ndarray, v: np.ndarray, order: int) -> np.ndarray:
    """Partial derivatives of packed surfaces at scattered parameters.

    Parameters
    ----------
    pack : SurfacePack
    sids : ndarray of int, shape (k,)
        Which surface of the pack each pair is on.
    u, v : ndarray of shape (k,)
        Parameters (clipped into each surface's domain).
    order : int
        0 to :data:`MAX_ORDER`.

    Returns
    -------
    ders : ndarray of shape (order + 1, order + 1, k, 3)
        ``ders[k, l]`` is d^(k+l) S / du^k dv^l; entries with k + l > order are zero.
    """
    u = np.ascontiguousarray(u, dtype=float).ravel()
    v = np.ascontiguousarray(v, dtype=float).ravel()
    sids = np.array(np.broadcast_to(sids, u.shape), dtype=np.int64)  # writable: one compiled signature
    out = np.zeros((order + 1, order + 1, u.size, 3))
    derivatives_kernel(pack.arrays, sids, u, v, int(order), pack.max_degree, out)
    return out


@nb.njit(**JIT_OPTIONS)
def knot_spans_kernel(arrays, sids, u, v, out):
    """Knot spans (A2.1) of every (sids[i], u[i], v[i]) into ``out`` (k, 2)."""
    degrees, counts, knot_starts, knots, _, _ = arrays
    for i in range(u.size):
        sid = sids[i]
        p, q = degrees[sid, 0], degrees[sid, 1]
        nu, nv = counts[sid, 0], counts[sid, 1]
        ku = knots[knot_starts[sid, 0] : knot_starts[sid, 0] + nu + p + 1]
        kv = knots[knot_starts[sid, 1] : knot_starts[sid, 1] + nv + q + 1]
        out[i, 0] = find_span(ku, p, nu, min(max(u[i], ku[p]), ku[nu]))
        out[i, 1] = find_span(kv, q, nv, min(max(v[i], kv[q]), kv[nv]))


def knot_spans(pack: SurfacePack, sids: np.ndarray, u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """Knot span indices of scattered parameters on packed surfaces (The NURBS Book, 2nd ed., A2.1).

    Parameters
    ----------
    pack : SurfacePack
    sids : ndarray of int, shape (k,)
    u, v : ndarray of shape (k,)
        Clipped into each surface's domain.

    Returns
    -------
    ndarray of int, shape (k, 2)
        The span in u and in v: ``knots[s] <= u < knots[s + 1]`` (the last
        non-empty span at the domain's end).
    """
    u = np.ascontiguousarray(u, dtype=float).ravel()
    v = np.ascontiguousarray(v, dtype=float).ravel()
    sids = np.array(np.broadcast_to(sids, u.shape), dtype=np.int64)  # writable: one compiled signature
    out = np.zeros((u.size, 2), dtype=np.int64)
    knot_spans_kernel(pack.arrays, sids, u, v, out)
    return out


@nb.njit(**JIT_OPTIONS)
def basis_rows_kernel(knots, p, n, u, order, ders, spans):
    """Basis derivatives of many parameters: ``ders`` (k, order+1, p+1), ``spans`` (k,)."""
    m = p + 1
    ndu = np.zeros((m, m))
    a = np.zeros((2, m))
    left = np.zeros(m)
    right = np.zeros(m)
    lo, hi = knots[p], knots[n]
    for i in range(u.size):
        x = min(max(u[i], lo), hi)
        s = find_span(knots, p, n, x)
        spans[i] = s
        basis_ders(knots, s, x, p, order, ders[i], ndu, a, left, right)


def basis_rows(
    knots: np.ndarray, degree: int, n_poles: int, u: np.ndarray, order: int
) -> tuple[np.ndarray, np.ndarray]:
    """Non-zero basis functions and derivatives at many parameters (A2.1, A2.3).

    Parameters
    ----------
    knots : ndarray of shape (n_poles + degree + 1,)
    degree, n_poles, order : int
    u : ndarray of shape (k,)

    Returns
    -------
    ders : ndarray of shape (k, order + 1, degree + 1)
        ``ders[i, d, r]``: d-th derivative of N_{s_i - p + r, p} at ``u[i]``.
    spans : ndarray of int, shape (k,)
    """
    u = np.ascontiguousarray(u, dtype=float).ravel()
    ders = np.zeros((u.size, order + 1, degree + 1))
    spans = np.zeros(u.size, dtype=np.int64)
    basis_rows_kernel(np.ascontiguousarray(knots, dtype=float), int(degree), int(n_poles), u, int(order), ders, spans)
    return ders, spans


@nb.njit(**JIT_OPTIONS)
def contract_row(net, nv, p, coefs, span, count, row):
    """One grid row of the net: ``row[k, j, c] = sum_a coefs[k, a] P^w[span - p + a, j, c]`` for k < count.

    ``net`` (nu * nv, 4) homogeneous poles, ``coefs`` (>= count, p + 1) the u-basis
    derivatives of the row's parameter, ``row`` (>= count, nv, 4) overwritten.
    The first half of The NURBS Book A3.6 (2nd ed.), done once per row and reused
    by every sample along it.
    """
    for k in range(count):
        for jp in range(nv):
            for c in range(4):
                row[k, jp, c] = 0.0
        for ia in range(p + 1):
            coef = coefs[k, ia]
            if coef == 0.0:
                continue
            base = (span - p + ia) * nv
            for jp in range(nv):
                for c in range(4):
                    row[k, jp, c] += coef * net[base + jp, c]


@nb.njit(**JIT_OPTIONS)
def grid_derivatives_kernel(net, nv, p, q, bu, span_u, bv, span_v, order, out):
    """S_kl on the grid u x v into ``out`` (order+1, order+1, a, b, 3); A3.6 and A4.4 per sample.

    Each grid row is contracted with the net once (``row[k]``) and reused along the row.
    """
    a_count, b_count = bu.shape[0], bv.shape[0]
    binom = binomials(order)
    row = np.zeros((order + 1, nv, 4))
    hom = np.zeros((order + 1, order + 1, 4))
    ders = np.zeros((order + 1, order + 1, 3))
    for i in range(a_count):
        contract_row(net, nv, p, bu[i], span_u[i], order + 1, row)
        for j in range(b_count):
            t = span_v[j] - q
            for k in range(order + 1):
                for l in range(order + 1 - k):
                    for c in range(4):
                        acc = 0.0
                        for ib in range(q + 1):
                            acc += bv[j, l, ib] * row[k, t + ib, c]
                        hom[k, l, c] = acc
            rational_at(hom, order, binom, ders)
            for k in range(order + 1):
                for l in range(order + 1 - k):
                    for c in range(3):
                        out[k, l, i, j, c] = ders[k, l, c]


def grid_derivatives(surface, u: np.ndarray, v: np.ndarray, order: int) -> np.ndarray:
    """Partial derivatives of a :class:`~geometry.nurbs.surface.NurbsSurface` on the grid u x v.

    Parameters
    ----------
    surface : NurbsSurface
    u : ndarray of shape (a,)
    v : ndarray of shape (b,)
    order : int

    Returns
    -------
    ders : ndarray of shape (order + 1, order + 1, a, b, 3)
        Entries with k + l > order are zero.
    """
    bu, span_u, bv, span_v = grid_basis(surface, u, v, order)
    out = np.zeros((order + 1, order + 1, bu.shape[0], bv.shape[0], 3))
    grid_derivatives_kernel(
        surface.pack.net, surface.shape[1], surface.degree_u, surface.degree_v, bu, span_u, bv, span_v, int(order), out
    )
    return out


def grid_basis(surface, u: np.ndarray, v: np.ndarray, order: int):
    """Basis rows and spans of both directions of a grid u x v, what every grid kernel takes.

    Returns
    -------
    bu : ndarray of shape (a, order + 1, degree_u + 1)
    span_u : ndarray of int, shape (a,)
    bv : ndarray of shape (b, order + 1, degree_v + 1)
    span_v : ndarray of int, shape (b,)
    """
    nu, nv = surface.shape
    bu, span_u = basis_rows(surface.knots_u, surface.degree_u, nu, u, order)
    bv, span_v = basis_rows(surface.knots_v, surface.degree_v, nv, v, order)
    return bu, span_u, bv, span_v


_POOLS: dict[tuple[int, int], ThreadPoolExecutor] = {}
_POOLS_LOCK = threading.Lock()
_POOL_PREFIX = "batten-rows"


def _pool(workers: int) -> ThreadPoolExecutor:
    """One lasting pool of ``workers`` threads per process: starting threads per grid cost more than small grids.

    Keyed by process too: a forked child inherits the pool object but not its threads.
    """
    key = (os.getpid(), workers)
    with _POOLS_LOCK:
        if key not in _POOLS:
            _POOLS[key] = ThreadPoolExecutor(workers, thread_name_prefix=_POOL_PREFIX)
        return _POOLS[key]


def run_row_blocks(
    work: Callable[[int, int], None], rows: int, workers: int | None, max_rows: int | None = None
) -> None:
    """Call ``work(r0, r1)`` on consecutive blocks of grid rows ``[r0, r1)``, on threads.

    The compiled kernels release the interpreter lock (``nogil``), so the blocks
    run in parallel. Two blocks per worker even out uneven rows; ``max_rows``
    bounds a block so that its temporaries stay small.

    Parameters
    ----------
    work : callable
        Fills the outputs of rows ``r0`` to ``r1 - 1``.
    rows : int
        Number of grid rows.
    workers : int, optional
        Threads; default: the number of cores.
    max_rows : int, optional
        Most rows in one block.
    """
    workers = max(1, min(workers or os.cpu_count() or 1, max(rows, 1)))
    count = 2 * workers if workers > 1 else 1
    if max_rows:
        count = max(count, -(-rows // max_rows))
    edges = np.linspace(0, rows, count + 1).astype(np.int64)
    blocks = [(int(r0), int(r1)) for r0, r1 in zip(edges[:-1], edges[1:], strict=True) if r1 > r0]
    # A block that itself asks for blocks (a pool thread) runs them inline: waiting on its own
    # pool could leave every thread waiting.
    nested = threading.current_thread().name.startswith(_POOL_PREFIX)
    if workers > 1 and len(blocks) > 1 and not nested:
        list(_pool(workers).map(lambda block: work(*block), blocks))
    else:
        for block in blocks:
            work(*block)
