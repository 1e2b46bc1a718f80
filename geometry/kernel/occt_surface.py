"""An OCP surface as the arrays of a Batten :class:`~geometry.nurbs.surface.NurbsSurface`.

Everything here runs on one face at a time and imports OCP lazily (the rest of
``geometry`` never needs the kernel).
"""

from __future__ import annotations

import numpy as np

from ..errors import SurfaceError
from .shape import SurfaceArrays


def _array1(seq) -> np.ndarray:
    return np.array([seq.Value(i) for i in range(seq.Lower(), seq.Upper() + 1)], dtype=float)


def bspline_to_nurbs(surface) -> SurfaceArrays:
    """The NURBS equal to an OCP ``Geom_BSplineSurface``, as arrays.

    Parameters
    ----------
    surface : OCP.Geom.Geom_BSplineSurface
        Not modified (a copy is made when it is periodic).

    Returns
    -------
    SurfaceArrays
        Poles of shape (nu, nv, 3), weights (nu, nv) or ``None``, full knot
        vectors (OCP's distinct knots repeated by their multiplicities).

    Notes
    -----
    OCP stores a periodic direction with a reduced pole net (the wrapped poles
    are implied). ``SetUNotPeriodic`` / ``SetVNotPeriodic`` rewrite it exactly as
    a non-periodic, possibly unclamped, B-spline over the same parameter range
    (the wrapped poles written out), which ``NurbsSurface`` evaluates as is.
    """
    if surface.IsUPeriodic() or surface.IsVPeriodic():
        surface = surface.Copy()
        if surface.IsUPeriodic():
            surface.SetUNotPeriodic()
        if surface.IsVPeriodic():
            surface.SetVNotPeriodic()
    nu, nv = surface.NbUPoles(), surface.NbVPoles()
    # Pole() and Weight() one at a time: the array accessors hand out views of
    # the kernel's storage that Python would free a second time.
    poles = np.empty((nu, nv, 3))
    for i in range(nu):
        for j in range(nv):
            poles[i, j] = surface.Pole(i + 1, j + 1).Coord()
    weights = None
    if surface.IsURational() or surface.IsVRational():
        weights = np.array([[surface.Weight(i + 1, j + 1) for j in range(nv)] for i in range(nu)])
    return SurfaceArrays(
        surface.UDegree(),
        surface.VDegree(),
        _array1(surface.UKnotSequence()),
        _array1(surface.VKnotSequence()),
        poles,
        weights,
    )


def surface_bspline(face):
    """The face's underlying surface as an exact ``Geom_BSplineSurface``, and its placement.

    Parameters
    ----------
    face : OCP.TopoDS.TopoDS_Face
        As read (not converted).

    Returns
    -------
    surface : OCP.Geom.Geom_BSplineSurface
    placement : ndarray of shape (4, 4)
    same_parameters : bool
        The B-spline has the input surface's parametrisation (B-spline
        surfaces and planes), so trims need no re-projection.

    Raises
    ------
    SurfaceError
        When the surface has no exact B-spline form here (offset surfaces and
        the like); :func:`face_bspline` after ``BRepBuilderAPI_NurbsConvert``
        handles those.

    Notes
    -----
    A B-spline surface is taken as it is. Any other surface is cut to the
    face's parameter box (``BRepTools::UVBounds``; planes, cylinders and cones
    are unbounded) and converted exactly by ``GeomConvert``: the rational forms
    of The NURBS Book (2nd ed.) ch. 7-8. This gives the same surface
    ``BRepBuilderAPI_NurbsConvert`` would, without rebuilding every edge and
    p-curve of the face, which costs a hundred times more.
    """
    from OCP.BRep import BRep_Tool
    from OCP.BRepTools import BRepTools
    from OCP.Geom import Geom_BSplineSurface, Geom_OffsetSurface, Geom_Plane, Geom_RectangularTrimmedSurface
    from OCP.GeomConvert import GeomConvert
    from OCP.TopLoc import TopLoc_Location

    location = TopLoc_Location()
    surface = BRep_Tool.Surface_s(face, location)
    if surface is None:
        raise SurfaceError("face has no surface")
    same = isinstance(surface, (Geom_BSplineSurface, Geom_Plane))  # a plane converts to a bilinear patch
    if not isinstance(surface, Geom_BSplineSurface):
        if isinstance(surface, Geom_OffsetSurface):
            raise SurfaceError("offset surface: no exact B-spline form")
        u0, u1, v0, v1 = BRepTools.UVBounds_s(face)
        if not (u1 > u0 and v1 > v0):
            raise SurfaceError("face has an empty parameter box")
        surface = GeomConvert.SurfaceToBSplineSurface_s(Geom_RectangularTrimmedSurface(surface, u0, u1, v0, v1))
        if surface is None or not isinstance(surface, Geom_BSplineSurface):
            raise SurfaceError("surface has no exact B-spline form")
    return surface, location_matrix(location), same


def face_bspline(face):
    """The face's surface as a ``Geom_BSplineSurface`` and its placement.

    Parameters
    ----------
    face : OCP.TopoDS.TopoDS_Face
        A face already through ``BRepBuilderAPI_NurbsConvert``.

    Returns
    -------
    surface : OCP.Geom.Geom_BSplineSurface
    placement : ndarray of shape (4, 4)
        The face's location as an affine matrix (identity when unplaced).

    Raises
    ------
    SurfaceError
        When the converted face still has no B-spline surface.
    """
    from OCP.BRep import BRep_Tool
    from OCP.Geom import Geom_BSplineSurface
    from OCP.TopLoc import TopLoc_Location

    location = TopLoc_Location()
    surface = BRep_Tool.Surface_s(face, location)
    if surface is None or not isinstance(surface, Geom_BSplineSurface):
        kind = "no surface" if surface is None else surface.DynamicType().Name()
        raise SurfaceError(f"surface could not be converted to NURBS ({kind})")
    return surface, location_matrix(location)


def location_matrix(location) -> np.ndarray:
    """A ``TopLoc_Location`` as a 4x4 affine matrix, shape (4, 4)."""
    trsf = location.Transformation()
    m = np.eye(4)
    for r in range(3):
        for c in range(4):
            m[r, c] = trsf.Value(r + 1, c + 1)
    return m
