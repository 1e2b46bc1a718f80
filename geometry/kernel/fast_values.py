"""The kernel's curves and surfaces evaluated at many parameters in one numpy call.

OCP evaluates one point per call from Python (about a microsecond and a half
each, with the Python around it): sampling a large model's edges asked it
millions of times. The common kinds (lines, conics, B-splines and Bezier
curves; planes, cylinders, cones, spheres, tori, B-spline and Bezier surfaces)
are read once into arrays here and evaluated vectorised; anything else keeps
the kernel's own per-point evaluation. Each fast evaluator is checked against
the kernel's at a few parameters when it is built and is only used when they
agree (:data:`AGREE_RTOL`), so a convention read wrongly costs speed, never a
wrong point.

Numpy only: the helper process imports nothing but the kernel and numpy.
"""

from __future__ import annotations

import itertools
from collections.abc import Callable

import numpy as np

from .occt_surface import bspline_to_nurbs

Evaluator = Callable[[np.ndarray], np.ndarray]
# A fast evaluator must give the kernel's points to this fraction of the geometry's size (rounding).
AGREE_RTOL = 1e-9


# The kernel evaluates one point per call from Python: plain floats in (tolist) and one flat
# buffer out (fromiter) keep the Python around each call small.
def kernel_values(curve, ts: np.ndarray, width: int = 3) -> np.ndarray:
    """A 3-D (``width`` 3) or 2-D (``width`` 2) curve adaptor at parameters ``ts`` of shape (n,), shape (n, width)."""
    value, ts = curve.Value, np.asarray(ts, dtype=float).ravel().tolist()
    flat = itertools.chain.from_iterable(value(t).Coord() for t in ts)
    return np.fromiter(flat, float, count=width * len(ts)).reshape(-1, width)


def kernel_on_surface(surface, uv: np.ndarray) -> np.ndarray:
    """A surface adaptor at (u, v) of shape (n, 2), one kernel call per point, shape (n, 3)."""
    value, uv = surface.Value, np.asarray(uv, dtype=float).reshape(-1, 2).tolist()
    flat = itertools.chain.from_iterable(value(a, b).Coord() for a, b in uv)
    return np.fromiter(flat, float, count=3 * len(uv)).reshape(-1, 3)


def basis(knots: np.ndarray, degree: int, t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Knot spans and the non-zero B-spline basis functions at many parameters.

    The NURBS Book (Piegl & Tiller, 2nd ed., 1997), A2.1 (span, here by
    ``searchsorted``) and A2.2 (basis functions), vectorised over ``t``.

    Parameters
    ----------
    knots : ndarray of shape (m + degree + 1,)
        Full knot vector of ``m`` poles.
    degree : int
    t : ndarray of shape (n,)
        Outside the domain ``[knots[degree], knots[m]]`` the end span's
        polynomial continues (as the kernel extrapolates).

    Returns
    -------
    span : ndarray of shape (n,), int
        Poles ``span - degree .. span`` carry the point.
    values : ndarray of shape (n, degree + 1)
    """
    m = knots.size - degree - 1
    # the last non-empty span at or before t: knots[span] <= t < knots[span + 1], so no zero
    # denominators; the domain's end takes the last non-empty span (its end may sit on repeated knots)
    last = m - 1
    while knots[last + 1] <= knots[last]:
        last -= 1
    span = np.clip(np.searchsorted(knots, t, side="right") - 1, degree, last)
    # rows per basis function (contiguous over the points), The NURBS Book A2.2
    values = np.empty((degree + 1, t.size))
    values[0] = 1.0
    left = np.empty((degree + 1, t.size))
    right = np.empty((degree + 1, t.size))
    for j in range(1, degree + 1):
        np.subtract(t, knots[span + 1 - j], out=left[j])
        np.subtract(knots[span + j], t, out=right[j])
        saved = 0.0
        for r in range(j):
            temp = values[r] / (right[r + 1] + left[j - r])
            values[r] = saved + right[r + 1] * temp
            saved = left[j - r] * temp
        values[j] = saved
    return span, values.T


def _wrap(t: np.ndarray, start: float, period: float | None) -> np.ndarray:
    return t if period is None else start + np.mod(t - start, period)


def _bspline_curve(knots, degree, poles, weights, period) -> Evaluator:
    """A B-spline curve, The NURBS Book A4.1 (rational: homogeneous coordinates), vectorised.

    Summed about the first pole of each point's span: a coordinate the span's
    poles share (the u of an iso-parameter p-curve) comes out exactly, as the
    kernel gives it, not within rounding of it (seams and trims tell iso-lines
    by exact equality).
    """
    start = knots[degree]
    offsets = np.arange(degree + 1)

    def values(ts: np.ndarray) -> np.ndarray:
        span, n = basis(knots, degree, _wrap(np.asarray(ts, dtype=float).ravel(), start, period))
        index = span[:, None] - degree + offsets
        local = poles[index]
        base = local[:, 0]
        local = local - base[:, None]
        if weights is not None:
            n = n * weights[index]
            return base + np.einsum("nk,nkd->nd", n, local) / n.sum(axis=1)[:, None]
        return base + np.einsum("nk,nkd->nd", n, local)

    return values


def _bspline_surface(arrays, periods) -> Evaluator:
    """A NURBS surface, The NURBS Book A4.3 (rational: homogeneous coordinates), vectorised."""
    p, q, ku, kv, poles, weights = arrays
    du, dv = np.arange(p + 1), np.arange(q + 1)
    base = poles[0, 0].copy()  # summed about the first pole: a coordinate every pole shares comes out exact
    poles = poles - base

    def values(uv: np.ndarray) -> np.ndarray:
        uv = np.asarray(uv, dtype=float).reshape(-1, 2)
        su, nu = basis(ku, p, _wrap(uv[:, 0], ku[p], periods[0]))
        sv, nv = basis(kv, q, _wrap(uv[:, 1], kv[q], periods[1]))
        iu = (su[:, None] - p + du)[:, :, None]
        iv = (sv[:, None] - q + dv)[:, None, :]
        w = nu[:, :, None] * nv[:, None, :]
        if weights is not None:
            w = w * weights[iu, iv]
            return base + np.einsum("nij,nijd->nd", w, poles[iu, iv]) / w.sum(axis=(1, 2))[:, None]
        return base + np.einsum("nij,nijd->nd", w, poles[iu, iv])

    return values


def _curve_poles(curve, dim: int) -> tuple[np.ndarray, np.ndarray | None]:
    count = curve.NbPoles()
    poles = np.array([curve.Pole(i).Coord() for i in range(1, count + 1)], dtype=float).reshape(count, dim)
    weights = np.array([curve.Weight(i) for i in range(1, count + 1)]) if curve.IsRational() else None
    return poles, weights


def _from_bspline_curve(curve, dim: int) -> Evaluator:
    period = None
    if curve.IsPeriodic():
        period = curve.Period()
        curve = curve.Copy()
        curve.SetNotPeriodic()  # the wrapped poles written out, same parameters over one period
    poles, weights = _curve_poles(curve, dim)
    knots = curve.KnotSequence()
    knots = np.array([knots.Value(i) for i in range(knots.Lower(), knots.Upper() + 1)], dtype=float)
    return _bspline_curve(knots, curve.Degree(), poles, weights, period)


def _from_bezier_curve(curve, dim: int) -> Evaluator:
    poles, weights = _curve_poles(curve, dim)
    degree = curve.Degree()
    knots = np.concatenate([np.zeros(degree + 1), np.ones(degree + 1)])
    return _bspline_curve(knots, degree, poles, weights, None)


def _frame(ax, dim: int) -> tuple[np.ndarray, ...]:
    origin = np.array(ax.Location().Coord(), dtype=float)
    x = np.array(ax.XDirection().Coord(), dtype=float)
    y = np.array(ax.YDirection().Coord(), dtype=float)
    z = np.array(ax.Direction().Coord(), dtype=float) if dim == 3 else None
    return origin, x, y, z


def _conic(ax, dim: int, a: float, b: float) -> Evaluator:
    """Circle (a = b = R) or ellipse: (a cos t) X + (b sin t) Y + C, in the kernel's order (OCCT ``ElCLib``)."""
    origin, x, y, _ = _frame(ax, dim)

    def values(ts: np.ndarray) -> np.ndarray:
        ts = np.asarray(ts, dtype=float).ravel()[:, None]
        return ((a * np.cos(ts)) * x + (b * np.sin(ts)) * y) + origin

    return values


def _line(line) -> Evaluator:
    origin = np.array(line.Location().Coord(), dtype=float)
    direction = np.array(line.Direction().Coord(), dtype=float)

    def values(ts: np.ndarray) -> np.ndarray:
        return np.asarray(ts, dtype=float).ravel()[:, None] * direction + origin

    return values


def _fast_curve(adaptor, dim: int) -> Evaluator | None:
    from OCP.GeomAbs import (
        GeomAbs_BezierCurve,
        GeomAbs_BSplineCurve,
        GeomAbs_Circle,
        GeomAbs_Ellipse,
        GeomAbs_Line,
    )

    kind = adaptor.GetType()
    if kind == GeomAbs_Line:
        return _line(adaptor.Line())
    if kind == GeomAbs_Circle:
        circle = adaptor.Circle()
        return _conic(circle.Position(), dim, circle.Radius(), circle.Radius())
    if kind == GeomAbs_Ellipse:
        ellipse = adaptor.Ellipse()
        return _conic(ellipse.Position(), dim, ellipse.MajorRadius(), ellipse.MinorRadius())
    if kind == GeomAbs_BSplineCurve:
        return _from_bspline_curve(adaptor.BSpline(), dim)
    if kind == GeomAbs_BezierCurve:
        return _from_bezier_curve(adaptor.Bezier(), dim)
    return None


def _elementary(kind: str, ax, *sizes: float) -> Evaluator:
    """Plane, cylinder, cone, sphere and torus in their frame (OCCT ``ElSLib`` parametrisations)."""
    origin, x, y, z = _frame(ax, 3)

    def values(uv: np.ndarray) -> np.ndarray:
        uv = np.asarray(uv, dtype=float).reshape(-1, 2)
        u, v = uv[:, :1], uv[:, 1:]
        if kind == "plane":
            return origin + u * x + v * y
        ring = np.cos(u) * x + np.sin(u) * y
        if kind == "cylinder":
            (radius,) = sizes
            return origin + radius * ring + v * z
        if kind == "cone":
            radius, angle = sizes
            return origin + (radius + v * np.sin(angle)) * ring + v * np.cos(angle) * z
        if kind == "sphere":
            (radius,) = sizes
            return origin + radius * np.cos(v) * ring + radius * np.sin(v) * z
        major, minor = sizes  # torus
        return origin + (major + minor * np.cos(v)) * ring + minor * np.sin(v) * z

    return values


# The elementary surfaces by kind: their name here, the adaptor's accessor and the sizes read from it.
_ELEMENTARY = {
    "GeomAbs_Plane": ("plane", "Plane", ()),
    "GeomAbs_Cylinder": ("cylinder", "Cylinder", ("Radius",)),
    "GeomAbs_Cone": ("cone", "Cone", ("RefRadius", "SemiAngle")),
    "GeomAbs_Sphere": ("sphere", "Sphere", ("Radius",)),
    "GeomAbs_Torus": ("torus", "Torus", ("MajorRadius", "MinorRadius")),
}


def _fast_surface(adaptor) -> Evaluator | None:
    from OCP.GeomAbs import GeomAbs_BezierSurface, GeomAbs_BSplineSurface

    kind = adaptor.GetType()
    if kind.name in _ELEMENTARY:
        name, accessor, sizes = _ELEMENTARY[kind.name]
        form = getattr(adaptor, accessor)()
        return _elementary(name, form.Position(), *(getattr(form, size)() for size in sizes))
    if kind == GeomAbs_BSplineSurface:
        surface = adaptor.BSpline()
        periods = (
            surface.UPeriod() if surface.IsUPeriodic() else None,
            surface.VPeriod() if surface.IsVPeriodic() else None,
        )
        return _bspline_surface(bspline_to_nurbs(surface), periods)
    if kind == GeomAbs_BezierSurface:
        from OCP.GeomConvert import GeomConvert

        return _bspline_surface(bspline_to_nurbs(GeomConvert.SurfaceToBSplineSurface_s(adaptor.Bezier())), (None, None))
    return None


def _agrees(fast: np.ndarray, kernel: np.ndarray) -> bool:
    scale = 1.0 + float(np.abs(kernel).max())
    return bool(np.all(np.isfinite(fast)) and np.abs(fast - kernel).max() <= AGREE_RTOL * scale)


def _checked(fast: Evaluator | None, probe: np.ndarray, kernel: Evaluator) -> Evaluator | None:
    """``fast`` when it gives the kernel's points at ``probe``, else None."""
    if fast is not None:
        try:
            if _agrees(fast(probe), kernel(probe)):
                return fast
        except Exception:  # an array the kernel gave in a shape not foreseen: the kernel evaluates
            pass
    return None


def _probe(first: float, last: float) -> np.ndarray:
    span = last - first
    if not np.isfinite(span) or span > 1e6:  # an unbounded range: near its start
        first, span = (0.0 if not np.isfinite(first) else first), 1.0
    return first + span * np.array([0.0, 0.173, 0.5, 0.791, 1.0])


# Points a curve or surface is asked for, one kernel call each, before it is read into arrays:
# reading (poles, the agreement check) costs about as much as this many kernel calls, and
# most edges of a mechanical part need fewer points than that.
SWITCH_AFTER_POINTS = 256


class _Values:
    """Kernel evaluation at first; once asked for :data:`SWITCH_AFTER_POINTS`, the vectorised form if it agrees."""

    def __init__(self, kernel: Evaluator, build: Callable[[], tuple[Evaluator | None, np.ndarray]]):
        self._kernel, self._build = kernel, build
        self._now: Evaluator = kernel
        self._asked = 0

    def __call__(self, at: np.ndarray) -> np.ndarray:
        if self._build is not None:
            self._asked += len(at)
            if self._asked > SWITCH_AFTER_POINTS:
                build, self._build = self._build, None
                try:
                    fast, probe = build()
                except Exception:  # a kind or form not foreseen: the kernel evaluates
                    fast, probe = None, None
                self._now = _checked(fast, probe, self._kernel) or self._kernel
        return self._now(at)


def curve_values(adaptor, dim: int = 3) -> Evaluator:
    """The values of a curve adaptor (``BRepAdaptor_Curve`` or ``_Curve2d``) at parameters, vectorised where it can.

    Returns
    -------
    callable
        ``f(ts)`` with ``ts`` of shape (n,) gives shape (n, dim).
    """

    def kernel(ts):
        return kernel_values(adaptor, ts, dim)

    def build():
        return _fast_curve(adaptor, dim), _probe(adaptor.FirstParameter(), adaptor.LastParameter())

    return _Values(kernel, build)


def surface_values(adaptor) -> Evaluator:
    """The values of a ``BRepAdaptor_Surface`` at (u, v), vectorised where it can.

    Returns
    -------
    callable
        ``f(uv)`` with ``uv`` of shape (n, 2) gives shape (n, 3).
    """

    def kernel(uv):
        return kernel_on_surface(adaptor, uv)

    def build():
        u = _probe(adaptor.FirstUParameter(), adaptor.LastUParameter())
        v = _probe(adaptor.FirstVParameter(), adaptor.LastVParameter())
        return _fast_surface(adaptor), np.stack([u, v[[2, 0, 4, 1, 3]]], axis=1)

    return _Values(kernel, build)
