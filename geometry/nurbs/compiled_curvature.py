"""Compiled principal curvatures, on grids (one fused kernel) and at scattered pairs (numba).

Every sample goes from basis functions to its curvature frame in one pass
through registers: the homogeneous derivatives A_kl (The NURBS Book, Piegl &
Tiller, 2nd ed., eq. 3.17 differentiated, with each grid row contracted with
the net once and reused along the row), the first derivatives by the quotient
rule (eq. 4.20), the second fundamental form straight from A_kl (the
tangential terms of the quotient rule vanish against the normal), and the
principal curvatures and directions from II in an orthonormal tangent frame
(do Carmo, *Differential Geometry of Curves and Surfaces*, 1976, sec. 3-2 and
3-3), as :mod:`geometry.nurbs.differential` documents. Outputs are written once, so
memory stays at the size of the outputs.
"""

from __future__ import annotations

import math

import numba as nb
import numpy as np

from .compiled_eval import JIT_OPTIONS, contract_row, homogeneous_at, make_scratch

# Fused multiply-adds (rounding at most as good as separate steps, never worse
# than the tolerances here) save a third of the arithmetic per sample.
FUSED = {**JIT_OPTIONS, "fastmath": {"contract"}}
# Principal curvatures closer than this (relative to their size) make an umbilic.
UMBILIC_RELATIVE = 1e-7


# Rows of the homogeneous-derivative block: slot(k, l) * 4 + component, with
# slots A00, A10, A01, A20, A11, A02 and components (w x, w y, w z, w).
A00, A10, A01, A20, A11, A02 = 0, 4, 8, 12, 16, 20
_SLOTS = ((A00, A01, A02), (A10, A11, -1), (A20, -1, -1))


@nb.njit(**FUSED)
def frames_from_homogeneous(h, count, sign, degenerate_sine2, floor2, outs, start):
    """Point, normal, curvatures and directions of ``count`` samples from their A_kl.

    Parameters
    ----------
    h : ndarray of shape (24, >= count)
        Homogeneous derivatives, row ``slot * 4 + component`` (see :data:`A00` ...).
    outs : tuple of ndarray
        (points, normals, dir1, dir2 of shape (n, 3); gaussian, mean, k1, k2 of
        shape (n,); valid, umbilic bool (n,)); samples go to ``start + j``.

    Notes
    -----
    The formulas of :func:`geometry.nurbs.differential._from_forms`, written without
    branches so the compiler runs several samples at once in vector registers.
    """
    pts, nrm, d1, d2, gauss, mean_out, k1_out, k2_out, valid_out, umbilic_out = outs
    for j in range(count):
        inv_w = 1.0 / h[A00 + 3, j]
        px = h[A00, j] * inv_w
        py = h[A00 + 1, j] * inv_w
        pz = h[A00 + 2, j] * inv_w
        sux = (h[A10, j] - h[A10 + 3, j] * px) * inv_w
        suy = (h[A10 + 1, j] - h[A10 + 3, j] * py) * inv_w
        suz = (h[A10 + 2, j] - h[A10 + 3, j] * pz) * inv_w
        svx = (h[A01, j] - h[A01 + 3, j] * px) * inv_w
        svy = (h[A01 + 1, j] - h[A01 + 3, j] * py) * inv_w
        svz = (h[A01 + 2, j] - h[A01 + 3, j] * pz) * inv_w
        nx = suy * svz - suz * svy
        ny = suz * svx - sux * svz
        nz = sux * svy - suy * svx
        det = nx * nx + ny * ny + nz * nz  # EG - F^2 (Lagrange's identity)
        e = sux * sux + suy * suy + suz * suz
        g = svx * svx + svy * svy + svz * svz
        f = sux * svx + suy * svy + suz * svz
        valid = (det > degenerate_sine2 * (e * g)) & (det > floor2)
        # Degenerate samples are replaced later by limits; keep their arithmetic finite.
        det = det if valid else 1.0
        e = e if valid else 1.0
        inv_root_det = 1.0 / math.sqrt(det)
        scale = sign * inv_root_det
        nx *= scale
        ny *= scale
        nz *= scale
        pn = px * nx + py * ny + pz * nz
        l_ = ((h[A20, j] * nx + h[A20 + 1, j] * ny + h[A20 + 2, j] * nz) - h[A20 + 3, j] * pn) * inv_w
        m_ = ((h[A11, j] * nx + h[A11 + 1, j] * ny + h[A11 + 2, j] * nz) - h[A11 + 3, j] * pn) * inv_w
        n_ = ((h[A02, j] * nx + h[A02 + 1, j] * ny + h[A02 + 2, j] * nz) - h[A02 + 3, j] * pn) * inv_w
        inv_e = 1.0 / e
        a = l_ * inv_e
        b = sign * (m_ * e - l_ * f) * inv_e * inv_root_det
        c = (l_ * f * f - 2.0 * m_ * e * f + n_ * e * e) * (inv_e * inv_root_det * inv_root_det)
        mean = 0.5 * (a + c)
        half_diff = 0.5 * (a - c)
        # A sum of squares: k1 - k2 keeps its precision near umbilics.
        disc = math.sqrt(half_diff * half_diff + b * b)
        k1 = mean + disc
        k2 = mean - disc
        umbilic = disc <= UMBILIC_RELATIVE * (abs(k1) + abs(k2)) + 1e-300
        # Directions are arbitrary at umbilics: take dir1 along Su (t = 0).
        disc = 1.0 if umbilic else disc
        half_diff = 1.0 if umbilic else half_diff
        b = 0.0 if umbilic else b
        cos2 = half_diff / disc
        cos_t = math.sqrt(max(0.5 * (1.0 + cos2), 0.0))
        sin_t = math.copysign(math.sqrt(max(0.5 * (1.0 - cos2), 0.0)), b)
        inv_root_e = math.sqrt(inv_e)
        t2_sv = sign * inv_root_e * e * inv_root_det
        t2_su = -t2_sv * f * inv_e
        c1u = cos_t * inv_root_e + sin_t * t2_su
        c1v = sin_t * t2_sv
        c2u = cos_t * t2_su - sin_t * inv_root_e
        c2v = cos_t * t2_sv
        i = start + j
        pts[i, 0] = px
        pts[i, 1] = py
        pts[i, 2] = pz
        nrm[i, 0] = nx
        nrm[i, 1] = ny
        nrm[i, 2] = nz
        d1[i, 0] = sux * c1u + svx * c1v
        d1[i, 1] = suy * c1u + svy * c1v
        d1[i, 2] = suz * c1u + svz * c1v
        d2[i, 0] = sux * c2u + svx * c2v
        d2[i, 1] = suy * c2u + svy * c2v
        d2[i, 2] = suz * c2u + svz * c2v
        gauss[i] = k1 * k2
        mean_out[i] = mean
        k1_out[i] = k1
        k2_out[i] = k2
        valid_out[i] = valid
        umbilic_out[i] = umbilic


@nb.njit(**FUSED)
def grid_kernel(net, nv, p, q, bu, span_u, bv, span_v, rows, sign, sine2, floor2, outs):
    """Fused curvature on the grid rows ``rows[0]:rows[1]`` of ``u x v``.

    ``net`` (nu * nv, 4) homogeneous poles; ``bu`` (a, 3, p+1), ``bv`` (b, 3, q+1)
    basis derivatives with spans; ``outs`` as for :func:`frames_from_homogeneous`
    with sample (i, j) at ``i * b + j``.
    """
    b_count = bv.shape[0]
    # row_net[k, jpole, c] = sum_a Nu^(k)_a P^w[span - p + a, jpole, c]
    row_net = np.zeros((3, nv, 4))
    h = np.zeros((24, b_count))
    for i in range(rows[0], rows[1]):
        contract_row(net, nv, p, bu[i], span_u[i], 3, row_net)
        for j in range(b_count):
            t = span_v[j] - q
            for k in range(3):
                for l in range(3 - k):
                    h0 = h1 = h2 = h3 = 0.0
                    for ib in range(q + 1):
                        coef = bv[j, l, ib]
                        h0 += coef * row_net[k, t + ib, 0]
                        h1 += coef * row_net[k, t + ib, 1]
                        h2 += coef * row_net[k, t + ib, 2]
                        h3 += coef * row_net[k, t + ib, 3]
                    slot = _SLOTS[k][l]
                    h[slot, j] = h0
                    h[slot + 1, j] = h1
                    h[slot + 2, j] = h2
                    h[slot + 3, j] = h3
        frames_from_homogeneous(h, b_count, sign, sine2, floor2, outs, i * b_count)


@nb.njit(**JIT_OPTIONS)
def scattered_kernel(arrays, sids, u, v, signs, floors2, sine2, max_degree, outs):
    """Curvature frames at scattered pairs (on packed surfaces ``sids``)."""
    scratch = make_scratch(max_degree, 2)
    hom = np.zeros((3, 3, 4))
    block = 256
    h = np.zeros((24, block))
    for start in range(0, u.size, block):
        count = min(block, u.size - start)
        for j in range(count):
            i = start + j
            homogeneous_at(arrays, sids[i], u[i], v[i], 2, hom, scratch)
            for k in range(3):
                for l in range(3 - k):
                    for c in range(4):
                        h[_SLOTS[k][l] + c, j] = hom[k, l, c]
        # One sign and floor per block: split blocks where the surface changes.
        j0 = 0
        while j0 < count:
            sid = sids[start + j0]
            j1 = j0 + 1
            while j1 < count and sids[start + j1] == sid:
                j1 += 1
            frames_from_homogeneous(h[:, j0:j1], j1 - j0, signs[sid], sine2, floors2[sid], outs, start + j0)
            j0 = j1


OUTPUT_KEYS = ("points", "normals", "dir1", "dir2", "gaussian", "mean", "k1", "k2", "valid", "umbilic")


def empty_outputs(n: int) -> tuple[np.ndarray, ...]:
    """Output arrays for n samples, in the order of :data:`OUTPUT_KEYS`."""
    vectors = tuple(np.empty((n, 3)) for _ in range(4))
    scalars = tuple(np.empty(n) for _ in range(4))
    return (*vectors, *scalars, np.empty(n, dtype=np.bool_), np.empty(n, dtype=np.bool_))
