"""Draft angle of a face against a pull direction, on sampled grids.

The draft angle at a surface point is the angle between the surface and the
pull direction ``d``: ``draft = asin(n . d)`` with ``n`` the face's outward
unit normal (DEVELOPERS.md: ``n = Su x Sv / |Su x Sv|``, negated on a reversed
face). A wall parallel to ``d`` has draft 0; a face looking along ``+d`` has a
positive draft and leaves the mould half that moves along ``+d``; a face looking
along ``-d`` has a negative draft (common practice: the mould opens along
``d``, each half releasing the faces that look its way).

Only first derivatives are needed, so a draft map costs less than a curvature
map of the same grid.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields

import numba as nb
import numpy as np

from ..errors import BattenError
from ..nurbs.compiled_eval import JIT_OPTIONS, contract_row, grid_basis, run_row_blocks
from ..nurbs.differential import DEGENERATE_SINE, LIMIT_NUDGE, area_floor
from ..nurbs.surface import NurbsSurface

# Classes of a sample (see :func:`draft_classes`).
RELEASE_MINUS, INSUFFICIENT, RELEASE_PLUS = -1, 0, 1


def unit_pull(pull) -> np.ndarray:
    """The pull direction as a unit vector, shape (3,).

    Raises
    ------
    BattenError
        For a vector that is not three finite numbers or has zero length.
    """
    d = np.asarray(pull, dtype=float).ravel()
    if d.shape != (3,) or not np.all(np.isfinite(d)):
        raise BattenError(f"a pull direction needs three finite numbers, got {list(np.ravel(pull))}")
    length = float(np.linalg.norm(d))
    if length == 0.0:
        raise BattenError("the pull direction has zero length")
    return d / length


def draft_angles(normals: np.ndarray, pull: np.ndarray) -> np.ndarray:
    """Draft angles in degrees from unit normals.

    Parameters
    ----------
    normals : ndarray of shape (..., 3)
        Outward unit normals (face orientation applied).
    pull : ndarray of shape (3,)
        Unit pull direction.

    Returns
    -------
    draft : ndarray of shape (...)
        ``degrees(asin(n . d))`` in [-90, 90]; NaN where the normal is NaN.

    Notes
    -----
    The angle between a plane and a line is the complement of the angle between
    the plane's normal and the line: ``asin(n . d)`` (common practice), computed
    as ``atan2(n . d, |n x d|)``, which keeps full precision near +-90 degrees
    where asin loses half the digits.
    """
    sine = normals @ pull
    cosine = np.linalg.norm(np.cross(normals, pull), axis=-1)
    return np.degrees(np.arctan2(sine, cosine))


def draft_classes(draft: np.ndarray, minimum: float) -> np.ndarray:
    """Release class of every sample.

    Parameters
    ----------
    draft : ndarray of shape (...)
        Degrees.
    minimum : float
        Least draft the tool needs, degrees (the profile's ``draft_min_deg``).

    Returns
    -------
    classes : ndarray of int8, shape (...)
        RELEASE_PLUS (draft >= minimum: leaves with the half moving along +d),
        RELEASE_MINUS (draft <= -minimum), INSUFFICIENT otherwise (and NaN).
    """
    out = np.zeros(np.shape(draft), dtype=np.int8)
    with np.errstate(invalid="ignore"):
        out[draft >= minimum] = RELEASE_PLUS
        out[draft <= -minimum] = RELEASE_MINUS
        if minimum <= 0.0:  # a zero limit: exact zero draft still counts as insufficient
            out[draft == 0.0] = INSUFFICIENT
    return out


@dataclass(frozen=True, eq=False)
class DraftField:
    """Draft on the grid u x v of one face.

    Attributes
    ----------
    points, normals : ndarray of shape (a, b, 3)
        Surface points and outward unit normals (NaN where no limit exists).
    draft : ndarray of shape (a, b)
        Degrees, signed (see module notes).
    area : ndarray of shape (a, b)
        Surface area each sample stands for, mm^2: ``|Su x Sv|`` times the
        trapezoid weights of the grid (zero at degenerate samples).
    valid : ndarray of bool, shape (a, b)
        False where the tangent plane is degenerate.
    """

    points: np.ndarray
    normals: np.ndarray
    draft: np.ndarray
    area: np.ndarray
    valid: np.ndarray

    def __post_init__(self):
        for f in fields(self):
            getattr(self, f.name).setflags(write=False)


def trapezoid_weights(t: np.ndarray) -> np.ndarray:
    """Trapezoid-rule weights of increasing samples t, shape (n,) (half the neighbouring gaps)."""
    t = np.asarray(t, float)
    if t.size < 2:
        return np.zeros(t.size)
    gaps = np.diff(t)
    w = np.zeros(t.size)
    w[:-1] += 0.5 * gaps
    w[1:] += 0.5 * gaps
    return w


def _normals_block(ders: np.ndarray, sign: float, floor: float):
    """Normals (k, 3), |Su x Sv| (k,) and validity (k,) from grid derivatives (2, 2, k, 3)."""
    su, sv = ders[1, 0], ders[0, 1]
    cross = np.cross(su, sv)
    norm = np.sqrt(np.einsum("ij,ij->i", cross, cross))
    scale = np.sqrt(np.einsum("ij,ij->i", su, su) * np.einsum("ij,ij->i", sv, sv))
    valid = (norm > DEGENERATE_SINE * scale) & (norm > floor)
    normals = cross * (sign / np.where(valid, norm, 1.0))[:, None]
    return normals, np.where(valid, norm, 0.0), valid


# Fused multiply-adds, as in the curvature kernel (rounding never worse than separate steps).
_FUSED = {**JIT_OPTIONS, "fastmath": {"contract"}}


@nb.njit(**_FUSED)
def _draft_kernel(
    net, nv, p, q, bu, span_u, bv, span_v, rows, sign, sine2, floor2, pull, points, normals, area, valid, draft
):
    """Point, outward unit normal, |Su x Sv|, validity and draft on grid rows ``rows[0]:rows[1]``.

    ``net`` (nu * nv, 4) homogeneous poles; ``bu`` (a, >= 2, p+1), ``bv`` (b, >= 2, q+1)
    basis derivatives with spans; outputs flat with sample (i, j) at ``i * b + j``:
    ``points``, ``normals`` (a * b, 3), ``area`` (a * b,) (|Su x Sv|, zero where
    degenerate), ``valid`` (a * b,), ``draft`` (a * b,) in degrees against the unit ``pull``
    (3,) as :func:`draft_angles` computes it; normals and draft are NaN where degenerate.
    """
    b_count = bv.shape[0]
    row = np.zeros((2, nv, 4))
    for i in range(rows[0], rows[1]):
        contract_row(net, nv, p, bu[i], span_u[i], 2, row)
        for j in range(b_count):
            t = span_v[j] - q
            # homogeneous A00, A10 (d/du), A01 (d/dv): The NURBS Book eq. 3.17 differentiated
            a0 = a1 = a2 = a3 = u0 = u1 = u2 = u3 = v0 = v1 = v2 = v3 = 0.0
            for ib in range(q + 1):
                c0 = bv[j, 0, ib]
                c1 = bv[j, 1, ib]
                r0 = row[0, t + ib]
                r1 = row[1, t + ib]
                a0 += c0 * r0[0]
                a1 += c0 * r0[1]
                a2 += c0 * r0[2]
                a3 += c0 * r0[3]
                u0 += c0 * r1[0]
                u1 += c0 * r1[1]
                u2 += c0 * r1[2]
                u3 += c0 * r1[3]
                v0 += c1 * r0[0]
                v1 += c1 * r0[1]
                v2 += c1 * r0[2]
                v3 += c1 * r0[3]
            inv_w = 1.0 / a3
            k = i * b_count + j
            px, py, pz = a0 * inv_w, a1 * inv_w, a2 * inv_w
            # quotient rule (eq. 4.20): S_u = (A_u - w_u S) / w
            ux = (u0 - u3 * px) * inv_w
            uy = (u1 - u3 * py) * inv_w
            uz = (u2 - u3 * pz) * inv_w
            vx = (v0 - v3 * px) * inv_w
            vy = (v1 - v3 * py) * inv_w
            vz = (v2 - v3 * pz) * inv_w
            nx = uy * vz - uz * vy
            ny = uz * vx - ux * vz
            nz = ux * vy - uy * vx
            size2 = nx * nx + ny * ny + nz * nz
            lengths2 = (ux * ux + uy * uy + uz * uz) * (vx * vx + vy * vy + vz * vz)
            ok = size2 > sine2 * lengths2 and size2 > floor2
            points[k, 0], points[k, 1], points[k, 2] = px, py, pz
            valid[k] = ok
            if ok:
                size = math.sqrt(size2)
                scale = sign / size
                nx, ny, nz = nx * scale, ny * scale, nz * scale
                normals[k, 0], normals[k, 1], normals[k, 2] = nx, ny, nz
                area[k] = size
                # draft = atan2(n . d, |n x d|), as draft_angles
                sine = nx * pull[0] + ny * pull[1] + nz * pull[2]
                cx = ny * pull[2] - nz * pull[1]
                cy = nz * pull[0] - nx * pull[2]
                cz = nx * pull[1] - ny * pull[0]
                draft[k] = math.degrees(math.atan2(sine, math.sqrt(cx * cx + cy * cy + cz * cz)))
            else:
                normals[k, 0] = normals[k, 1] = normals[k, 2] = math.nan
                area[k] = 0.0
                draft[k] = math.nan


def _limit_normals(surface: NurbsSurface, u: np.ndarray, v: np.ndarray, sign: float, floor: float) -> np.ndarray:
    """Normals at degenerate samples as the limit from a parameter nudged inwards, shape (k, 3)."""
    (u0, u1), (v0, v1) = surface.domain
    un = u + np.where(u < 0.5 * (u0 + u1), 1.0, -1.0) * LIMIT_NUDGE * (u1 - u0)
    vn = v + np.where(v < 0.5 * (v0 + v1), 1.0, -1.0) * LIMIT_NUDGE * (v1 - v0)
    normals, _, ok = _normals_block(surface.derivatives_at(un, vn, 1), sign, floor)
    normals[~ok] = np.nan
    return normals


def draft_on_grid(
    surface: NurbsSurface, u: np.ndarray, v: np.ndarray, pull, reversed: bool = False, workers: int | None = None
) -> DraftField:
    """Draft angle of a face on the tensor grid u x v.

    Parameters
    ----------
    surface : NurbsSurface
    u : ndarray of shape (a,)
    v : ndarray of shape (b,)
    pull : array_like of shape (3,)
        Pull direction (any length but zero).
    reversed : bool
        The face uses the surface with its normal flipped.
    workers : int, optional
        Threads over row blocks; default: the number of cores.

    Returns
    -------
    DraftField
        Arrays of shape (a, b) or (a, b, 3).

    Notes
    -----
    One compiled pass over the grid (:func:`_draft_kernel`, in row blocks on
    threads): each grid row contracted with the homogeneous net once
    (:func:`geometry.nurbs.compiled_eval.contract_row`, The NURBS Book, 2nd ed.,
    A3.6), first derivatives by the quotient rule (eq. 4.20), then
    ``n = Su x Sv / |Su x Sv|``; ``draft = asin(n . d)`` (:func:`draft_angles`).
    """
    d = unit_pull(pull)
    u, v = surface.clip_to_domain(np.ravel(u), np.ravel(v))
    a, b = u.size, v.size
    sign = -1.0 if reversed else 1.0
    floor = area_floor(surface)
    nv = surface.shape[1]
    bu, span_u, bv, span_v = grid_basis(surface, u, v, 1)
    points = np.empty((a * b, 3))
    normals = np.empty((a * b, 3))
    jacobian = np.empty(a * b)
    valid = np.empty(a * b, dtype=bool)
    draft = np.empty(a * b)
    net = surface.pack.net

    def work(r0: int, r1: int) -> None:
        _draft_kernel(
            net, nv, surface.degree_u, surface.degree_v, bu, span_u, bv, span_v, np.array([r0, r1]),
            sign, DEGENERATE_SINE * DEGENERATE_SINE, floor * floor, d, points, normals, jacobian, valid, draft,
        )  # fmt: skip

    run_row_blocks(work, a, workers)
    points, normals = points.reshape(a, b, 3), normals.reshape(a, b, 3)
    jacobian, valid, draft = jacobian.reshape(a, b), valid.reshape(a, b), draft.reshape(a, b)
    if not valid.all():
        bad = np.nonzero(~valid)
        normals[bad] = _limit_normals(surface, u[bad[0]], v[bad[1]], sign, floor)
        draft[bad] = draft_angles(normals[bad], d)
    area = jacobian * trapezoid_weights(u)[:, None] * trapezoid_weights(v)[None, :]
    return DraftField(points, normals, draft, area, valid)


def draft_at(surface: NurbsSurface, u: np.ndarray, v: np.ndarray, pull, reversed: bool = False) -> np.ndarray:
    """Draft angles in degrees at scattered parameter pairs (u[i], v[i]), shape (k,)."""
    d = unit_pull(pull)
    u, v = surface.clip_to_domain(np.ravel(u), np.ravel(v))
    sign = -1.0 if reversed else 1.0
    floor = area_floor(surface)
    normals, _, ok = _normals_block(surface.derivatives_at(u, v, 1), sign, floor)
    if not ok.all():
        normals[~ok] = _limit_normals(surface, u[~ok], v[~ok], sign, floor)
    return draft_angles(normals, d)


def warm_up_draft() -> None:
    """Call the compiled draft kernel once on a tiny grid (loads it from its cache, or compiles it)."""
    from ..nurbs.primitives import bilinear

    surface = bilinear(np.array([[0, 0, 0], [0, 1, 0], [1, 0, 0], [1, 1, 0.5]], float))
    u = np.array([0.25, 0.75])
    draft_on_grid(surface, u, u, (0.0, 0.0, 1.0), workers=1)
