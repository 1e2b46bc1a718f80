"""Compiled principal curvatures, on grids (one fused kernel) and at scattered pairs (numba).

Every sample goes from basis functions to its curvature frame in one pass
through registers: the homogeneous derivatives A_kl (The NURBS Book, Piegl &
Tiller, 2nd ed., eq. 3.17 differentiated, with each grid row contracted with
the net once and reused along the row), the first derivatives by the quotient
rule (eq. 4.20), the second fundamental form straight from A_kl (the
tangential terms of the quotient rule vanish against the normal), and the
principal curvatures and directions from II in an orthonormal tangent frame
(do Carmo, *Differential Geometry of Curves and Surfaces*, 1976, sec. 3-2 and
3-3), as :mod:`geometry.differential` documents. Outputs are written once, so
memory stays at the size of the outputs.
"""

from __future__ import annotations

import math

import numba as nb
import numpy as np

from .compiled_eval import JIT_OPTIONS, homogeneous_at, make_scratch

# Principal curvatures closer than this (relative to their size) make an umbilic.
UMBILIC_RELATIVE = 1e-7


@nb.njit(inline="always", **JIT_OPTIONS)
def frame_from_homogeneous(hom, sign, degenerate_sine2, floor2, outs, i):
    """Point, normal, curvatures and directions of one sample from A_kl (3, 3, 4).

    Writes sample ``i`` of ``outs`` = (points, normals, dir1, dir2 of shape
    (n, 3); gaussian, mean, k1, k2 of shape (n,); valid, umbilic bool (n,));
    the formulas are those of :func:`geometry.differential._from_forms`.
    """
    inv_w = 1.0 / hom[0, 0, 3]
    px = hom[0, 0, 0] * inv_w
    py = hom[0, 0, 1] * inv_w
    pz = hom[0, 0, 2] * inv_w
    sux = (hom[1, 0, 0] - hom[1, 0, 3] * px) * inv_w
    suy = (hom[1, 0, 1] - hom[1, 0, 3] * py) * inv_w
    suz = (hom[1, 0, 2] - hom[1, 0, 3] * pz) * inv_w
    svx = (hom[0, 1, 0] - hom[0, 1, 3] * px) * inv_w
    svy = (hom[0, 1, 1] - hom[0, 1, 3] * py) * inv_w
    svz = (hom[0, 1, 2] - hom[0, 1, 3] * pz) * inv_w
    nx = suy * svz - suz * svy
    ny = suz * svx - sux * svz
    nz = sux * svy - suy * svx
    det = nx * nx + ny * ny + nz * nz  # EG - F^2 (Lagrange's identity)
    e = sux * sux + suy * suy + suz * suz
    g = svx * svx + svy * svy + svz * svz
    f = sux * svx + suy * svy + suz * svz
    valid = det > degenerate_sine2 * (e * g) and det > floor2
    if not valid:  # replaced later by limits; keep the arithmetic finite
        det = 1.0
        e = 1.0
    inv_root_det = 1.0 / math.sqrt(det)
    scale = sign * inv_root_det
    nx *= scale
    ny *= scale
    nz *= scale
    pn = px * nx + py * ny + pz * nz
    l_ = ((hom[2, 0, 0] * nx + hom[2, 0, 1] * ny + hom[2, 0, 2] * nz) - hom[2, 0, 3] * pn) * inv_w
    m_ = ((hom[1, 1, 0] * nx + hom[1, 1, 1] * ny + hom[1, 1, 2] * nz) - hom[1, 1, 3] * pn) * inv_w
    n_ = ((hom[0, 2, 0] * nx + hom[0, 2, 1] * ny + hom[0, 2, 2] * nz) - hom[0, 2, 3] * pn) * inv_w
    inv_e = 1.0 / e
    a = l_ * inv_e
    b = (m_ * e - l_ * f) * inv_e * inv_root_det
    if sign < 0:
        b = -b
    c = (l_ * f * f - 2.0 * m_ * e * f + n_ * e * e) * (inv_e / det)
    mean = 0.5 * (a + c)
    half_diff = 0.5 * (a - c)
    disc = math.hypot(half_diff, b)
    k1 = mean + disc
    k2 = mean - disc
    umbilic = disc <= UMBILIC_RELATIVE * (abs(k1) + abs(k2)) + 1e-300
    if umbilic:  # directions are arbitrary there: dir1 along Su
        disc = 1.0
        half_diff = 1.0
        b = 0.0
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
    pts, nrm, d1, d2, gauss, mean_out, k1_out, k2_out, valid_out, umbilic_out = outs
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


@nb.njit(**JIT_OPTIONS)
def grid_kernel(net, nv, p, q, bu, span_u, bv, span_v, rows, sign, sine2, floor2, outs):
    """Fused curvature on the grid rows ``rows[0]:rows[1]`` of ``u x v``.

    ``net`` (nu * nv, 4) homogeneous poles; ``bu`` (a, 3, p+1), ``bv`` (b, 3, q+1)
    basis derivatives with spans; ``outs`` as for :func:`frame_from_homogeneous`
    with sample (i, j) at ``i * b + j``.
    """
    b_count = bv.shape[0]
    # row_net[k, jpole, c] = sum_a Nu^(k)_a P^w[span - p + a, jpole, c]
    row_net = np.zeros((3, nv, 4))
    hom = np.zeros((3, 3, 4))
    for i in range(rows[0], rows[1]):
        s = span_u[i]
        for k in range(3):
            for jp in range(nv):
                for c in range(4):
                    row_net[k, jp, c] = 0.0
            for ia in range(p + 1):
                coef = bu[i, k, ia]
                if coef == 0.0:
                    continue
                base = (s - p + ia) * nv
                for jp in range(nv):
                    for c in range(4):
                        row_net[k, jp, c] += coef * net[base + jp, c]
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
                    hom[k, l, 0] = h0
                    hom[k, l, 1] = h1
                    hom[k, l, 2] = h2
                    hom[k, l, 3] = h3
            frame_from_homogeneous(hom, sign, sine2, floor2, outs, i * b_count + j)


@nb.njit(**JIT_OPTIONS)
def scattered_kernel(arrays, sids, u, v, signs, floors2, sine2, max_degree, outs):
    """Curvature frames at scattered pairs (on packed surfaces ``sids``)."""
    scratch = make_scratch(max_degree, 2)
    hom = np.zeros((3, 3, 4))
    for i in range(u.size):
        sid = sids[i]
        homogeneous_at(arrays, sid, u[i], v[i], 2, hom, scratch)
        frame_from_homogeneous(hom, signs[sid], sine2, floors2[sid], outs, i)


OUTPUT_KEYS = ("points", "normals", "dir1", "dir2", "gaussian", "mean", "k1", "k2", "valid", "umbilic")


def empty_outputs(n: int) -> tuple[np.ndarray, ...]:
    """Output arrays for n samples, in the order of :data:`OUTPUT_KEYS`."""
    vectors = tuple(np.empty((n, 3)) for _ in range(4))
    scalars = tuple(np.empty(n) for _ in range(4))
    return (*vectors, *scalars, np.empty(n, dtype=np.bool_), np.empty(n, dtype=np.bool_))
