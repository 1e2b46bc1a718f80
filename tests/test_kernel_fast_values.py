"""The vectorised curve and surface values against the CAD kernel's own evaluation (OCP, the reference).

Every face and edge of the kernel's primitives (plane, cylinder, cone, sphere,
torus), of rational and periodic B-spline surfaces and of Bezier forms is
evaluated both ways at random parameters, some outside the parameter range
(where the kernel continues the end span's polynomial).
"""

from __future__ import annotations

import numpy as np
import pytest

pytest.importorskip("OCP")

from OCP.BRepAdaptor import BRepAdaptor_Curve, BRepAdaptor_Curve2d, BRepAdaptor_Surface  # noqa: E402
from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace, BRepBuilderAPI_NurbsConvert  # noqa: E402
from OCP.BRepPrimAPI import (  # noqa: E402
    BRepPrimAPI_MakeBox,
    BRepPrimAPI_MakeCone,
    BRepPrimAPI_MakeCylinder,
    BRepPrimAPI_MakeSphere,
    BRepPrimAPI_MakeTorus,
)
from OCP.gp import gp_Ax2, gp_Dir, gp_Pnt  # noqa: E402
from OCP.TopAbs import TopAbs_EDGE, TopAbs_FACE  # noqa: E402
from OCP.TopExp import TopExp_Explorer  # noqa: E402
from OCP.TopoDS import TopoDS  # noqa: E402

from geometry.kernel import fast_values  # noqa: E402
from geometry.kernel.fast_values import kernel_on_surface, kernel_values  # noqa: E402

RNG = np.random.default_rng(20261202)
# A slanted frame, so no axis lines up with x, y or z.
FRAME = gp_Ax2(gp_Pnt(3.0, -2.0, 5.0), gp_Dir(0.3, -0.5, 0.81), gp_Dir(0.9, 0.4, -0.0814814814814815))


def _shapes():
    return {
        "box": BRepPrimAPI_MakeBox(FRAME, 10.0, 20.0, 30.0).Shape(),
        "cylinder": BRepPrimAPI_MakeCylinder(FRAME, 7.0, 12.0).Shape(),
        "cone": BRepPrimAPI_MakeCone(FRAME, 8.0, 3.0, 10.0).Shape(),
        "sphere": BRepPrimAPI_MakeSphere(FRAME, 9.0).Shape(),
        "torus": BRepPrimAPI_MakeTorus(FRAME, 20.0, 4.0).Shape(),
        # rational B-spline faces with periodic directions and rational p-curves
        "nurbs_torus": BRepBuilderAPI_NurbsConvert(BRepPrimAPI_MakeTorus(FRAME, 20.0, 4.0).Shape(), True).Shape(),
        "nurbs_cylinder": BRepBuilderAPI_NurbsConvert(BRepPrimAPI_MakeCylinder(FRAME, 7.0, 12.0).Shape(), True).Shape(),
    }


def _faces(shape):
    explorer = TopExp_Explorer(shape, TopAbs_FACE)
    while explorer.More():
        yield TopoDS.Face(explorer.Current())
        explorer.Next()


def _edges(face):
    explorer = TopExp_Explorer(face, TopAbs_EDGE)
    while explorer.More():
        yield TopoDS.Edge(explorer.Current())
        explorer.Next()


def _params(first: float, last: float, n: int = 60) -> np.ndarray:
    """Random parameters over the range and a tenth beyond each end."""
    span = last - first
    return RNG.uniform(first - 0.1 * span, last + 0.1 * span, n)


def _scale(points: np.ndarray) -> float:
    return 1.0 + float(np.abs(points).max())


@pytest.mark.parametrize("name", list(_shapes()))
def test_every_face_and_edge_is_read_fast_and_agrees_with_the_kernel(name):
    for face in _faces(_shapes()[name]):
        surface = BRepAdaptor_Surface(face)
        fast = fast_values._fast_surface(surface)
        assert fast is not None, f"{name}: surface kind {surface.GetType()} has no vectorised form"
        uv = np.stack(
            [
                _params(surface.FirstUParameter(), surface.LastUParameter()),
                _params(surface.FirstVParameter(), surface.LastVParameter()),
            ],
            axis=1,
        )
        kernel = kernel_on_surface(surface, uv)
        assert np.abs(fast(uv) - kernel).max() <= 1e-10 * _scale(kernel)
        for edge in _edges(face):
            curve = BRepAdaptor_Curve(edge)
            if curve.Is3DCurve() if hasattr(curve, "Is3DCurve") else True:
                ts = _params(curve.FirstParameter(), curve.LastParameter())
                try:
                    kernel = kernel_values(curve, ts)
                except Exception:  # a collapsed edge (sphere pole) has no 3-D curve
                    kernel = None
                if kernel is not None:
                    fast = fast_values._fast_curve(curve, 3)
                    assert fast is not None, f"{name}: curve kind {curve.GetType()} has no vectorised form"
                    assert np.abs(fast(ts) - kernel).max() <= 1e-10 * _scale(kernel)
            pcurve = BRepAdaptor_Curve2d(edge, face)
            ts = _params(pcurve.FirstParameter(), pcurve.LastParameter())
            fast = fast_values._fast_curve(pcurve, 2)
            assert fast is not None, f"{name}: p-curve kind {pcurve.GetType()} has no vectorised form"
            kernel = kernel_values(pcurve, ts, 2)
            assert np.abs(fast(ts) - kernel).max() <= 1e-10 * _scale(kernel)


def test_values_switch_to_the_fast_form_only_after_enough_points_and_give_the_same_points():
    face = next(_faces(_shapes()["nurbs_torus"]))
    surface = BRepAdaptor_Surface(face)
    values = fast_values.surface_values(surface)
    uv = np.stack([_params(0.0, 1.0, 10), _params(0.0, 1.0, 10)], axis=1)
    before = values(uv)
    assert values._now == values._kernel  # a few points: the kernel, nothing read into arrays
    many = np.tile(uv, (fast_values.SWITCH_AFTER_POINTS // 10 + 1, 1))
    after = values(many)
    assert values._now != values._kernel
    np.testing.assert_allclose(after[: len(uv)], before, rtol=0, atol=1e-10 * _scale(before))


def test_a_form_that_disagrees_with_the_kernel_is_not_used(monkeypatch):
    face = next(_faces(_shapes()["cylinder"]))
    surface = BRepAdaptor_Surface(face)

    def wrong(adaptor):
        return lambda uv: np.zeros((len(np.reshape(uv, (-1, 2))), 3))

    monkeypatch.setattr(fast_values, "_fast_surface", wrong)
    values = fast_values.surface_values(surface)
    uv = np.array([[0.5, 1.0]] * (fast_values.SWITCH_AFTER_POINTS + 1))
    np.testing.assert_allclose(values(uv), kernel_on_surface(surface, uv), rtol=0, atol=1e-12)
    assert values._now == values._kernel


def test_a_bezier_face_agrees_with_the_kernel():
    from OCP.collections import Array2_gp_Pnt
    from OCP.Geom import Geom_BezierSurface

    poles = Array2_gp_Pnt(1, 3, 1, 4)
    for i in range(3):
        for j in range(4):
            poles.SetValue(i + 1, j + 1, gp_Pnt(10.0 * i, 8.0 * j, 3.0 * np.sin(i + 2 * j)))
    face = BRepBuilderAPI_MakeFace(Geom_BezierSurface(poles), 1e-7).Face()
    surface = BRepAdaptor_Surface(face)
    fast = fast_values._fast_surface(surface)
    uv = np.stack([_params(0.0, 1.0), _params(0.0, 1.0)], axis=1)
    kernel = kernel_on_surface(surface, uv)
    assert np.abs(fast(uv) - kernel).max() <= 1e-10 * _scale(kernel)


def test_basis_functions_sum_to_one_and_match_the_nurbs_book_example():
    # The NURBS Book (Piegl & Tiller, 2nd ed.), Ex2.3: U = {0,0,0,1,2,3,4,4,5,5,5}, p = 2, u = 5/2:
    # N(2,2) = 1/8, N(3,2) = 6/8, N(4,2) = 1/8 (from memory of the worked example; the sum is 1 either way).
    knots = np.array([0, 0, 0, 1, 2, 3, 4, 4, 5, 5, 5], dtype=float)
    span, values = fast_values.basis(knots, 2, np.array([2.5]))
    assert span[0] == 4
    np.testing.assert_allclose(values[0], [1 / 8, 6 / 8, 1 / 8])
    t = RNG.uniform(0.0, 5.0, 200)
    _, values = fast_values.basis(knots, 2, t)
    np.testing.assert_allclose(values.sum(axis=1), 1.0)


def test_an_iso_parameter_pcurve_keeps_its_constant_coordinate_exactly():
    """Seams tell iso-lines by exact equality of u (or v): the fast form must not add rounding to it."""
    from OCP.collections import Array1_double, Array1_gp_Pnt2d, Array1_int
    from OCP.Geom2d import Geom2d_BSplineCurve
    from OCP.Geom2dAdaptor import Geom2dAdaptor_Curve
    from OCP.gp import gp_Pnt2d

    u0 = 0.1  # not a binary fraction
    ys = [0.0, 0.37, 1.1, 1.9, 2.3, 3.0]
    poles = Array1_gp_Pnt2d(1, len(ys))
    for i, y in enumerate(ys):
        poles.SetValue(i + 1, gp_Pnt2d(u0, y))
    knots, mults = Array1_double(1, 4), Array1_int(1, 4)
    for i, (k, m) in enumerate(zip([0.0, 0.3, 0.7, 1.0], [4, 1, 1, 4], strict=True)):
        knots.SetValue(i + 1, k)
        mults.SetValue(i + 1, m)
    fast = fast_values._fast_curve(Geom2dAdaptor_Curve(Geom2d_BSplineCurve(poles, knots, mults, 3)), 2)
    uv = fast(np.linspace(0.0, 1.0, 1001))
    assert np.all(uv[:, 0] == u0)
