"""Shared helpers of the reader tests: exact shapes written by the kernel's own writers.

The files are written through OCP's STEP and IGES writers (the reference
implementation of the formats here) into pytest's tmp_path; nothing is invented.
"""

from __future__ import annotations

import os

import numpy as np

from geometry.kernel.occt_quiet import quiet_kernel


def write_step(shape, path, unit: str = "MM") -> str:
    """Write an OCP shape as STEP (AP214 default schema) in the given length unit."""
    from OCP.Interface import Interface_Static
    from OCP.STEPControl import STEPControl_AsIs, STEPControl_Writer

    with quiet_kernel():
        writer = STEPControl_Writer()
        Interface_Static.SetCVal_s("write.step.unit", unit)
        try:
            writer.Transfer(shape, STEPControl_AsIs)
            writer.Write(os.fspath(path))
        finally:
            Interface_Static.SetCVal_s("write.step.unit", "MM")
    return os.fspath(path)


def write_iges(shape, path, unit: str = "MM") -> str:
    """Write an OCP shape as IGES 5.3 (faces mode, default spline continuity)."""
    from OCP.IGESControl import IGESControl_Writer

    with quiet_kernel():
        writer = IGESControl_Writer(unit, 0)
        writer.AddShape(shape)
        writer.ComputeModel()
        writer.Write(os.fspath(path))
    return os.fspath(path)


def sphere(radius: float):
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeSphere

    return BRepPrimAPI_MakeSphere(radius).Shape()


def cylinder(radius: float, height: float):
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeCylinder

    return BRepPrimAPI_MakeCylinder(radius, height).Shape()


def torus(major: float, minor: float):
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeTorus

    return BRepPrimAPI_MakeTorus(major, minor).Shape()


def box(dx: float, dy: float, dz: float):
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeBox

    return BRepPrimAPI_MakeBox(dx, dy, dz).Shape()


def plate_with_hole(size: float = 40.0, thickness: float = 10.0, radius: float = 5.0):
    """A square plate with a round through-hole at its centre (trimmed planar faces)."""
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Cut
    from OCP.BRepPrimAPI import BRepPrimAPI_MakeBox, BRepPrimAPI_MakeCylinder
    from OCP.gp import gp_Ax2, gp_Dir, gp_Pnt

    plate = BRepPrimAPI_MakeBox(size, size, thickness).Shape()
    axis = gp_Ax2(gp_Pnt(size / 2, size / 2, -1.0), gp_Dir(0, 0, 1))
    return BRepAlgoAPI_Cut(plate, BRepPrimAPI_MakeCylinder(axis, radius, thickness + 2.0).Shape()).Shape()


def bspline_face(seed: int = 3):
    """A bicubic rational B-spline face over [0, 1]^2 with an interior knot, as an OCP face.

    Heights and weights are rounded to 3 and 2 decimals so that both writers
    print them exactly (the IGES writer keeps about ten significant digits).

    Returns
    -------
    face : OCP.TopoDS.TopoDS_Face
    surface : OCP.Geom.Geom_BSplineSurface
    """
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace
    from OCP.collections import Array1_double, Array1_int, Array2_double, Array2_gp_Pnt
    from OCP.Geom import Geom_BSplineSurface
    from OCP.gp import gp_Pnt

    rng = np.random.default_rng(seed)
    n = 5
    poles = Array2_gp_Pnt(1, n, 1, n)
    weights = Array2_double(1, n, 1, n)
    for i in range(n):
        for j in range(n):
            poles.SetValue(i + 1, j + 1, gp_Pnt(20.0 * i, 20.0 * j, round(float(rng.uniform(-5, 5)), 3)))
            weights.SetValue(i + 1, j + 1, round(float(rng.uniform(0.7, 1.4)), 2))
    knots = Array1_double(1, 3)
    mults = Array1_int(1, 3)
    for k, (t, m) in enumerate(((0.0, 4), (0.4, 1), (1.0, 4))):
        knots.SetValue(k + 1, t)
        mults.SetValue(k + 1, m)
    surface = Geom_BSplineSurface(poles, weights, knots, knots, mults, mults, 3, 3)
    return BRepBuilderAPI_MakeFace(surface, 1e-7).Face(), surface


def bilinear_record(points, weights=None) -> dict:
    """One surface record of geomdl's JSON exchange (geomdl 5.4 ``export_dict_surf`` layout).

    A bilinear patch over [0, 1]^2 with the four given control points, u-major.
    """
    record = {
        "type": "spline",
        "degree_u": 1,
        "degree_v": 1,
        "size_u": 2,
        "size_v": 2,
        "knotvector_u": [0, 0, 1, 1],
        "knotvector_v": [0, 0, 1, 1],
        "control_points": {"points": points},
    }
    if weights is not None:
        record["control_points"]["weights"] = weights
    return record
