"""One face through both formats: STEP and IGES copies of a surface agree to 1e-9.

The face is a rational bicubic B-spline (written as B_SPLINE_SURFACE_WITH_KNOTS
in STEP and as entity 128 in IGES); its values are exactly printable by both
writers, so any disagreement would be the readers'.
"""

from __future__ import annotations

import numpy as np
from test_io_support import bspline_face, write_iges, write_step

from geometry.io import read_model
from geometry.kernel.occt_surface import bspline_to_nurbs
from geometry.nurbs.surface import NurbsSurface

ROUNDTRIP_ATOL_MM = 1e-9


def test_step_and_iges_agree(tmp_path):
    face, kernel_surface = bspline_face()
    from_step = read_model(write_step(face, tmp_path / "face.step")).faces[0]
    from_iges = read_model(write_iges(face, tmp_path / "face.igs")).faces[0]
    u = np.linspace(0.0, 1.0, 23)
    v = np.linspace(0.0, 1.0, 19)
    a = from_step.surface.derivatives_grid(u, v, 1)
    b = from_iges.surface.derivatives_grid(u, v, 1)
    np.testing.assert_allclose(a[0, 0], b[0, 0], atol=ROUNDTRIP_ATOL_MM)
    np.testing.assert_allclose(a[1, 0], b[1, 0], atol=ROUNDTRIP_ATOL_MM * 100)  # mm per unit parameter
    original = NurbsSurface(*bspline_to_nurbs(kernel_surface)).points_grid(u, v)
    np.testing.assert_allclose(a[0, 0], original, atol=ROUNDTRIP_ATOL_MM)
    assert from_step.reversed == from_iges.reversed
    assert from_step.loops == () and from_iges.loops == ()  # an untrimmed face
