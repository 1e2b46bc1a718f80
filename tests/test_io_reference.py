"""Our NURBS evaluation of read surfaces against OCP's own (reference library check).

For each surface the kernel builds (periodic B-splines from converted spheres and
tori with their reduced pole nets, a rational bicubic with an interior knot), the
converted :class:`NurbsSurface` is evaluated with its derivatives at random
parameters and compared with ``Geom_BSplineSurface.D2`` of the same surface.
"""

from __future__ import annotations

import numpy as np
import pytest
from test_io_support import bspline_face, sphere, torus

from geometry.kernel.occt_surface import bspline_to_nurbs, face_bspline
from geometry.nurbs.surface import NurbsSurface

POINT_ATOL_MM = 1e-9
# Derivatives scale with the surface size over the parameter range.
DERIVATIVE_RTOL = 1e-9


def _converted_bspline(shape):
    from OCP.BRepBuilderAPI import BRepBuilderAPI_NurbsConvert
    from OCP.TopAbs import TopAbs_FACE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    face = TopoDS.Face(TopExp_Explorer(BRepBuilderAPI_NurbsConvert(shape, True).Shape(), TopAbs_FACE).Current())
    return face_bspline(face)[0]


def _kernel_d2(surface, u, v):
    from OCP.gp import gp_Pnt, gp_Vec

    out = []
    for a, b in zip(u, v, strict=True):
        p, vecs = gp_Pnt(), [gp_Vec() for _ in range(5)]
        surface.D2(float(a), float(b), p, *vecs)
        out.append([p.Coord(), *(w.Coord() for w in vecs)])
    return np.array(out)  # (k, 6, 3): S, Su, Sv, Suu, Svv, Suv


CASES = {
    "sphere (u-periodic)": lambda: _converted_bspline(sphere(10.0)),
    "torus (u- and v-periodic)": lambda: _converted_bspline(torus(20.0, 5.0)),
    "rational bicubic": lambda: bspline_face()[1],
}


@pytest.mark.parametrize("case", sorted(CASES))
def test_matches_kernel_evaluation(case):
    kernel = CASES[case]()
    ours = NurbsSurface(*bspline_to_nurbs(kernel))
    (u0, u1), (v0, v1) = ours.domain
    rng = np.random.default_rng(11)
    u = rng.uniform(u0, u1, 60)
    v = rng.uniform(v0, v1, 60)
    ref = _kernel_d2(kernel, u, v)
    d = ours.derivatives_at(u, v, 2)
    mine = np.stack([d[0, 0], d[1, 0], d[0, 1], d[2, 0], d[0, 2], d[1, 1]], axis=1)
    np.testing.assert_allclose(mine[:, 0], ref[:, 0], atol=POINT_ATOL_MM)
    scale = np.abs(ref[:, 1:]).max()
    np.testing.assert_allclose(mine[:, 1:], ref[:, 1:], atol=DERIVATIVE_RTOL * scale)
    # The periodic kernel surface is written out unwrapped: same parameter range.
    assert (u0, u1, v0, v1) == pytest.approx(kernel.Bounds())
