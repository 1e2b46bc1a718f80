"""Differential geometry of a surface from its exact partial derivatives.

Sign conventions (written once in DEVELOPERS.md, used everywhere):

- unit normal ``n = (Su x Sv) / |Su x Sv|``, negated on a reversed face;
- second fundamental form ``L = Suu . n``, ``M = Suv . n``, ``N = Svv . n``, so a
  surface that bends towards its normal has positive normal curvature;
- principal curvatures ``k1 >= k2``; ``K = k1 k2``; ``H = (k1 + k2) / 2``;
- ``dir1`` is the unit direction of k1, ``dir2 = n x dir1`` that of k2, so
  (dir1, dir2, n) is a right-handed frame.

The principal curvatures are the eigenvalues of the shape operator, II
relative to I (do Carmo, *Differential Geometry of Curves and Surfaces*, 1976,
sec. 3-2 and 3-3); here they come from II written in an orthonormal tangent
frame, which is exact and keeps k1 - k2 accurate near umbilics.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np

from .compiled_curvature import OUTPUT_KEYS, UMBILIC_RELATIVE, empty_outputs, grid_kernel, scattered_kernel
from .compiled_eval import grid_basis, run_row_blocks
from .surface import NurbsSurface

# A sample is degenerate when |Su x Sv| is this small against |Su| |Sv|: the
# tangent plane is undefined there (a pole, a collapsed edge, a cusp).
DEGENERATE_SINE = 1e-9
# Nudge, as a fraction of the domain, towards the interior when re-evaluating a
# degenerate sample to report the limit values there.
LIMIT_NUDGE = 1e-4


@dataclass(frozen=True, eq=False)
class CurvatureField:
    """Curvature quantities on a set of samples (grid or scattered).

    Attributes
    ----------
    points, normals, dir1, dir2 : ndarray of shape (..., 3)
    gaussian, mean, k1, k2 : ndarray of shape (...)
        In 1/mm^2 (gaussian) and 1/mm (the others).
    valid : ndarray of bool, shape (...)
        False where the tangent plane is degenerate. Values there are the
        limits from a nearby interior parameter where that is regular, else NaN.
    umbilic : ndarray of bool, shape (...)
        True where k1 == k2: the principal directions are arbitrary there
        (dir1 follows Su).
    """

    points: np.ndarray
    normals: np.ndarray
    gaussian: np.ndarray
    mean: np.ndarray
    k1: np.ndarray
    k2: np.ndarray
    dir1: np.ndarray
    dir2: np.ndarray
    valid: np.ndarray
    umbilic: np.ndarray

    def __post_init__(self):
        for f in fields(self):
            getattr(self, f.name).setflags(write=False)

    @property
    def max_abs(self) -> np.ndarray:
        """max(|k1|, |k2|), shape (...)."""
        return np.maximum(np.abs(self.k1), np.abs(self.k2))


def _dot(a: np.ndarray, b: np.ndarray, out: np.ndarray | None = None) -> np.ndarray:
    out = np.multiply(a[0], b[0], out=out)
    out += a[1] * b[1]
    out += a[2] * b[2]
    return out


def _cross(a: np.ndarray, b: np.ndarray, out: np.ndarray | None = None) -> np.ndarray:
    if out is None:
        out = np.empty(np.broadcast_shapes(a.shape, b.shape))
    np.multiply(a[1], b[2], out=out[0])
    out[0] -= a[2] * b[1]
    np.multiply(a[2], b[0], out=out[1])
    out[1] -= a[0] * b[2]
    np.multiply(a[0], b[1], out=out[2])
    out[2] -= a[1] * b[0]
    return out


def _slot(dest: dict | None, key: str) -> np.ndarray | None:
    """Where a result goes: a caller's output block, or None for a new array."""
    return None if dest is None else dest[key]


def shape_quantities(
    su, sv, suu, suv, svv, sign: float = 1.0, floor: float = 0.0, dest: dict | None = None
) -> dict[str, np.ndarray]:
    """Normal, curvatures and principal directions from first and second derivatives.

    Parameters
    ----------
    su, sv, suu, suv, svv : ndarray of shape (3, k)
        Component-first partial derivatives at k samples.
    sign : float
        +1 for a face used as parametrised, -1 for a reversed face.
    floor : float
        |Su x Sv| below which a sample is degenerate (see :func:`area_floor`).
    dest : dict of ndarray, optional
        Output arrays to fill (keys as returned), to save a copy.

    Returns
    -------
    dict
        ``normals, dir1, dir2`` of shape (3, k); ``gaussian, mean, k1, k2`` of
        shape (k,); ``valid, umbilic`` bool of shape (k,).

    Notes
    -----
    ``L = Suu . n``, ``M = Suv . n``, ``N = Svv . n`` (do Carmo 1976, sec. 3-3),
    then :func:`_from_forms`.
    """
    normal, det, valid, e = _unit_normal(su, sv, sign, floor, dest)
    return _from_forms(
        su, sv, normal, det, valid, e, _dot(suu, normal), _dot(suv, normal), _dot(svv, normal), sign, dest
    )


def _unit_normal(su, sv, sign, area_floor=0.0, dest=None):
    """Unit normal, |Su x Sv|^2 (1 where degenerate), validity and E = Su . Su.

    A sample is degenerate when Su and Sv are (nearly) parallel, or when
    |Su x Sv| is below ``area_floor`` (a collapsed edge, where Su or Sv is
    rounding noise and its direction means nothing).
    """
    normal = _cross(su, sv, _slot(dest, "normals"))
    det = _dot(normal, normal)  # = EG - F^2 (Lagrange's identity)
    e = _dot(su, su)
    valid = np.greater(det, (DEGENERATE_SINE * DEGENERATE_SINE) * (e * _dot(sv, sv)), out=_slot(dest, "valid"))
    valid &= det > area_floor * area_floor
    if not valid.all():  # rare: skip the masked writes on regular patches
        invalid = ~valid
        det[invalid] = 1.0
        e[invalid] = 1.0  # degenerate samples are replaced later; keep them finite
    inv_area = 1.0 / np.sqrt(det)
    inv_area *= sign
    normal *= inv_area
    return normal, det, valid, e


def _from_forms(su, sv, normal, det, valid, e, l_, m_, n_, sign, dest=None):
    """Curvatures and directions from Su, Sv, the unit normal, E and L, M, N.

    Parameters
    ----------
    su, sv, normal : ndarray of shape (3, k)
    det, e, l_, m_, n_ : ndarray of shape (k,)
        EG - F^2, E, and the second fundamental form.
    valid : ndarray of bool, shape (k,)
    sign : float
    dest : dict of ndarray, optional

    Notes
    -----
    II is written in the orthonormal tangent frame ``t1 = Su/|Su|``,
    ``t2 = n x t1`` as the symmetric matrix [[a, b], [b, c]] with ``a = L/E``,
    ``b = s (M E - L F) / (E sqrt(EG - F^2))`` and
    ``c = (L F^2 - 2 M E F + N E^2) / (E (EG - F^2))`` (s the orientation sign:
    t2 = s (E Sv - F Su) / sqrt(E (EG - F^2))). Its eigenvalues are
    ``H +- hypot((a - c)/2, b)``, a sum of squares, so k1 - k2 keeps full
    precision near umbilics (``sqrt(H^2 - K)`` would lose half the digits). The
    k1 direction is ``cos(t) t1 + sin(t) t2`` with ``tan(2t) = 2b / (a - c)``,
    from the half-angle formulas with t in (-pi/2, pi/2], so dir1 . Su >= 0.
    """
    f = _dot(su, sv)
    inv_e = 1.0 / e
    a = l_ * inv_e
    inv_root_det = 1.0 / np.sqrt(det)
    b = m_ * e
    b -= l_ * f
    b *= inv_e * inv_root_det
    if sign < 0:
        np.negative(b, out=b)
    c = l_ * f * f
    c -= 2.0 * m_ * e * f
    c += n_ * e * e
    c *= inv_e / det
    mean = np.add(a, c, out=_slot(dest, "mean"))
    mean *= 0.5
    half_diff = a - c
    half_diff *= 0.5
    disc = np.hypot(half_diff, b)
    k1 = np.add(mean, disc, out=_slot(dest, "k1"))
    k2 = np.subtract(mean, disc, out=_slot(dest, "k2"))
    gaussian = np.multiply(k1, k2, out=_slot(dest, "gaussian"))
    umbilic = np.less_equal(disc, UMBILIC_RELATIVE * (np.abs(k1) + np.abs(k2)) + 1e-300, out=_slot(dest, "umbilic"))
    if umbilic.any():  # directions are arbitrary there: take t = 0 (along Su)
        disc[umbilic] = 1.0
        half_diff[umbilic] = 1.0
        b[umbilic] = 0.0
    cos2 = half_diff / disc
    cos_t = np.sqrt(np.maximum(0.5 * (1.0 + cos2), 0.0))
    sin_t = np.copysign(np.sqrt(np.maximum(0.5 * (1.0 - cos2), 0.0)), b)
    # dir1 = cos t t1 + sin t t2 and dir2 = cos t t2 - sin t t1 written as
    # combinations of Su and Sv (t1 = Su/sqrt(E), t2 = s (E Sv - F Su)/sqrt(E det)).
    inv_root_e = np.sqrt(inv_e)
    t2_sv = sign * inv_root_e * e * inv_root_det  # coefficient of Sv in t2
    t2_su = -t2_sv * f * inv_e  # coefficient of Su in t2
    d1 = np.multiply(su, cos_t * inv_root_e + sin_t * t2_su, out=_slot(dest, "dir1"))
    d1 += sv * (sin_t * t2_sv)
    d2 = np.multiply(su, cos_t * t2_su - sin_t * inv_root_e, out=_slot(dest, "dir2"))
    d2 += sv * (cos_t * t2_sv)
    return {
        "normals": normal,
        "gaussian": gaussian,
        "mean": mean,
        "k1": k1,
        "k2": k2,
        "dir1": d1,
        "dir2": d2,
        "valid": valid,
        "umbilic": umbilic,
    }


def area_floor(surface: NurbsSurface) -> float:
    """|Su x Sv| below which a sample counts as degenerate, from the net's size.

    ``1e-9 * (extent / u-length) * (extent / v-length)``: rounding noise in a
    vanishing derivative is about 1e-14 of the extent, far below it.
    """
    poles = surface.poles.reshape(-1, 3)
    extent = float(np.linalg.norm(poles.max(axis=0) - poles.min(axis=0))) or 1.0
    (u0, u1), (v0, v1) = surface.domain
    return 1e-9 * extent * extent / ((u1 - u0) * (v1 - v0))


def _frames(pack, sids, u: np.ndarray, v: np.ndarray, signs: np.ndarray, floors: np.ndarray) -> dict[str, np.ndarray]:
    """Curvature frames at scattered pairs on packed surfaces, arrays of shape (k, 3) or (k,)."""
    outs = empty_outputs(u.size)
    scattered_kernel(
        pack.arrays,
        np.array(np.broadcast_to(sids, u.shape), dtype=np.int64),  # writable: one compiled signature
        np.ascontiguousarray(u, dtype=float),
        np.ascontiguousarray(v, dtype=float),
        np.asarray(signs, dtype=float).reshape(-1),
        np.square(np.asarray(floors, dtype=float).reshape(-1)),
        DEGENERATE_SINE * DEGENERATE_SINE,
        pack.max_degree,
        outs,
    )
    return dict(zip(OUTPUT_KEYS, outs, strict=True))


def _fix_degenerate(surface: NurbsSurface, u: np.ndarray, v: np.ndarray, q: dict, sign: float) -> None:
    """Replace values at degenerate samples by limits from a nudged parameter.

    ``q`` holds arrays of shape (k, 3) or (k,) for the k samples at ``u``, ``v``.
    """
    bad = np.flatnonzero(~q["valid"])
    if bad.size == 0:
        return
    (u0, u1), (v0, v1) = surface.domain
    ub, vb = u[bad], v[bad]
    un = ub + np.where(ub < 0.5 * (u0 + u1), 1.0, -1.0) * LIMIT_NUDGE * (u1 - u0)
    vn = vb + np.where(vb < 0.5 * (v0 + v1), 1.0, -1.0) * LIMIT_NUDGE * (v1 - v0)
    near = _frames(surface.pack, 0, un, vn, np.array([sign]), np.array([area_floor(surface)]))
    still_bad = ~near["valid"]
    for key in ("normals", "dir1", "dir2", "gaussian", "mean", "k1", "k2"):
        vals = near[key]
        vals[still_bad] = np.nan
        q[key][bad] = vals
    q["umbilic"][bad] = near["umbilic"] & ~still_bad


def _field(q: dict[str, np.ndarray], shape: tuple[int, ...]) -> CurvatureField:
    return CurvatureField(**{key: arr.reshape(*shape, *arr.shape[1:]) for key, arr in q.items()})


def curvature_at(surface: NurbsSurface, u: np.ndarray, v: np.ndarray, reversed: bool = False) -> CurvatureField:
    """Curvature field at scattered parameter pairs.

    Parameters
    ----------
    surface : NurbsSurface
    u, v : ndarray of shape (k,)
    reversed : bool
        The face uses the surface with its normal flipped.

    Returns
    -------
    CurvatureField
        Arrays of shape (k,) or (k, 3).

    Notes
    -----
    Compiled (:func:`geometry.nurbs.compiled_curvature.scattered_kernel`): the
    formulas of :func:`_from_forms` one sample at a time.
    """
    u, v = surface.clip_to_domain(np.ravel(u), np.ravel(v))
    sign = -1.0 if reversed else 1.0
    q = _frames(surface.pack, 0, u, v, np.array([sign]), np.array([area_floor(surface)]))
    _fix_degenerate(surface, u, v, q, sign)
    return _field(q, u.shape)


def curvature_on_grid(
    surface: NurbsSurface, u: np.ndarray, v: np.ndarray, reversed: bool = False, workers: int | None = None
) -> CurvatureField:
    """Curvature field on the tensor grid u x v.

    Parameters
    ----------
    surface : NurbsSurface
    u : ndarray of shape (a,)
    v : ndarray of shape (b,)
    reversed : bool
        The face uses the surface with its normal flipped.
    workers : int, optional
        Threads over row blocks (the compiled kernel releases the GIL);
        default: the number of cores.

    Returns
    -------
    CurvatureField
        Arrays of shape (a, b) or (a, b, 3).

    Notes
    -----
    One fused compiled kernel (:func:`geometry.nurbs.compiled_curvature.grid_kernel`):
    basis derivatives of each parameter once (The NURBS Book A2.3), each grid
    row contracted with the homogeneous net once, then per sample the
    homogeneous derivatives, the rational quotient rule (eq. 4.20, folded into
    the second form: the tangential terms vanish against the normal) and
    :func:`_from_forms`, written straight into the outputs, so memory stays
    at the size of the outputs.
    """
    u, v = surface.clip_to_domain(np.ravel(u), np.ravel(v))
    a, b = u.size, v.size
    sign = -1.0 if reversed else 1.0
    nv = surface.shape[1]
    bu, span_u, bv, span_v = grid_basis(surface, u, v, 2)
    outs = empty_outputs(a * b)
    floor = area_floor(surface)
    net = surface.pack.net

    def work(r0: int, r1: int) -> None:
        grid_kernel(
            net, nv, surface.degree_u, surface.degree_v, bu, span_u, bv, span_v, np.array([r0, r1]),
            sign, DEGENERATE_SINE * DEGENERATE_SINE, floor * floor, outs,
        )  # fmt: skip

    run_row_blocks(work, a, workers)
    q = dict(zip(OUTPUT_KEYS, outs, strict=True))
    if not q["valid"].all():
        bad = np.flatnonzero(~q["valid"])
        sub = {key: arr[bad] for key, arr in q.items()}
        _fix_degenerate(surface, u[bad // b], v[bad % b], sub, sign)
        for key, arr in sub.items():
            q[key][bad] = arr
    return _field(q, (a, b))
