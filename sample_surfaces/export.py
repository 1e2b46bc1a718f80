"""Write sample products as STEP (AP214) and IGES (5.3) through the OCP kernel.

Each :class:`~geometry.nurbs.surface.NurbsSurface` becomes a ``Geom_BSplineSurface`` and
a face; faces meant to meet are sewn (``BRepBuilderAPI_Sewing``) so the STEP file
carries shared edges; face and product names go through an XCAF document so
STEP holds them (``PRODUCT`` and ``ADVANCED_FACE`` names); IGES gets each face's
name as a 406 form 15 property and a D-section label.
IGES is written in face mode (entities 128 inside 144): it has no shared-edge
topology, so a reader matches IGES seams by geometry.

Output is deterministic: the header time stamps are replaced by a fixed date
and the IGES author by the builder's name; files are written to a temporary
name and moved into place (no half-written file).
"""

from __future__ import annotations

import contextlib
import os
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from geometry.nurbs import NurbsSurface

# Vertices and edges closer than this are joined by the sewing; far below the
# 0.02 mm gap sample, so that gap stays open.
SEW_TOLERANCE = 1e-4
# Tolerance handed to the face builder (OCP's own default precision).
FACE_TOLERANCE = 1e-7
FIXED_STAMP_STEP = "2026-01-01T00:00:00"
FIXED_STAMP_IGES = "20260101.000000"  # same 15 characters as the kernel's stamp
AUTHOR = "Batten sample builder"
COMPANY = "Tarnwick Appliances (fictitious)"


@dataclass(frozen=True)
class SampleFace:
    """One named face of a sample: a surface, optional trim, orientation.

    ``outer`` trims the face to a closed loop of 3-D B-spline curves
    ``(degree, knots, poles)`` lying on the surface, in order and counter-clockwise
    in (u, v); ``holes`` cuts circles ``(centre_uv, radius_uv)`` out of it.
    """

    name: str
    surface: NurbsSurface
    holes: tuple = ()
    reversed: bool = False
    outer: tuple = ()


@dataclass(frozen=True)
class WrittenSample:
    """What the kernel made of a sample: face order, sewing statistics."""

    face_names: tuple[str, ...]
    free_edges: int
    shared_edges: int
    files: dict = field(default_factory=dict)


def _quiet():
    try:
        from geometry.kernel.occt_quiet import quiet_kernel
    except ImportError:  # the reader package may be mid-change; output is noise only
        return contextlib.nullcontext()
    return quiet_kernel()


def _knot_arrays(knots: np.ndarray):
    from OCP.collections import Array1_double, Array1_int

    values, counts = np.unique(knots, return_counts=True)
    kv = Array1_double(1, values.size)
    km = Array1_int(1, values.size)
    for i, (value, count) in enumerate(zip(values, counts, strict=True)):
        kv.SetValue(i + 1, float(value))
        km.SetValue(i + 1, int(count))
    return kv, km


def occ_surface(surface: NurbsSurface):
    """The ``Geom_BSplineSurface`` equal to a :class:`NurbsSurface` (clamped nets)."""
    from OCP.collections import Array2_double, Array2_gp_Pnt
    from OCP.Geom import Geom_BSplineSurface
    from OCP.gp import gp_Pnt

    nu, nv = surface.shape
    poles = Array2_gp_Pnt(1, nu, 1, nv)
    for i in range(nu):
        for j in range(nv):
            poles.SetValue(i + 1, j + 1, gp_Pnt(*map(float, surface.poles[i, j])))
    uk, um = _knot_arrays(surface.knots_u)
    vk, vm = _knot_arrays(surface.knots_v)
    p, q = surface.degree_u, surface.degree_v
    if surface.weights is None:
        return Geom_BSplineSurface(poles, uk, vk, um, vm, p, q, False, False)
    weights = Array2_double(1, nu, 1, nv)
    for i in range(nu):
        for j in range(nv):
            weights.SetValue(i + 1, j + 1, float(surface.weights[i, j]))
    return Geom_BSplineSurface(poles, weights, uk, vk, um, vm, p, q, False, False)


def _hole_wire(geom_surface, centre, radius):
    """A closed edge on the surface: the circle (u, v) = centre + radius (cos, sin), reversed."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeWire
    from OCP.BRepLib import BRepLib
    from OCP.Geom2d import Geom2d_Circle
    from OCP.gp import gp_Ax2d, gp_Dir2d, gp_Pnt2d

    circle = Geom2d_Circle(gp_Ax2d(gp_Pnt2d(*map(float, centre)), gp_Dir2d(1.0, 0.0)), float(radius))
    edge = BRepBuilderAPI_MakeEdge(circle, geom_surface).Edge()
    BRepLib.BuildCurves3d_s(edge)
    # A hole runs clockwise in (u, v): the face's material stays on its left.
    return BRepBuilderAPI_MakeWire(edge).Wire().Reversed()


def occ_curve(degree: int, knots: np.ndarray, poles: np.ndarray):
    """The ``Geom_BSplineCurve`` with these clamped knots and poles of shape (n, 3)."""
    from OCP.collections import Array1_gp_Pnt
    from OCP.Geom import Geom_BSplineCurve
    from OCP.gp import gp_Pnt

    points = Array1_gp_Pnt(1, len(poles))
    for i, p in enumerate(poles):
        points.SetValue(i + 1, gp_Pnt(*map(float, p)))
    values, counts = _knot_arrays(knots)
    return Geom_BSplineCurve(points, values, counts, int(degree))


def _outer_face(geom, curves):
    """Face on ``geom`` bounded by a loop of 3-D curves; the kernel adds the p-curves."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge, BRepBuilderAPI_MakeFace, BRepBuilderAPI_MakeWire
    from OCP.ShapeFix import ShapeFix_Face

    wire = BRepBuilderAPI_MakeWire()
    for degree, knots, poles in curves:
        wire.Add(BRepBuilderAPI_MakeEdge(occ_curve(degree, knots, poles)).Edge())
    fix = ShapeFix_Face(BRepBuilderAPI_MakeFace(geom, wire.Wire(), True).Face())
    fix.Perform()
    return fix.Face()


def make_face(face: SampleFace):
    """A ``TopoDS_Face`` on the face's surface: natural or ``outer`` bounds, minus its holes."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace
    from OCP.TopoDS import TopoDS

    geom = occ_surface(face.surface)
    if face.outer:
        builder = BRepBuilderAPI_MakeFace(_outer_face(geom, face.outer))
    else:
        builder = BRepBuilderAPI_MakeFace(geom, FACE_TOLERANCE)
    if face.holes:
        builder = BRepBuilderAPI_MakeFace(builder.Face())
        for centre, radius in face.holes:
            builder.Add(TopoDS.Wire(_hole_wire(geom, centre, radius)))
    result = builder.Face()
    if face.reversed:
        result = TopoDS.Face(result.Reversed())
    return result


def assemble(faces: list[SampleFace], sew: bool = True):
    """Faces sewn into a shell (or gathered in a compound), in the given order.

    Returns
    -------
    shape : TopoDS_Shape
    named : list of (TopoDS_Face, str)
        The faces as they sit in ``shape`` with their names.
    free_edges, shared_edges : int
        From the sewing (0, 0 when not sewn).
    """
    from OCP.BRep import BRep_Builder
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Sewing
    from OCP.TopAbs import TopAbs_FACE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS, TopoDS_Compound

    built = [make_face(f) for f in faces]
    if not sew or len(built) == 1:
        compound = TopoDS_Compound()
        builder = BRep_Builder()
        builder.MakeCompound(compound)
        for f in built:
            builder.Add(compound, f)
        return compound, [(b, f.name) for b, f in zip(built, faces, strict=True)], 0, 0
    sewing = BRepBuilderAPI_Sewing(SEW_TOLERANCE)
    for f in built:
        sewing.Add(f)
    with _quiet():
        sewing.Perform()
    shape = sewing.SewedShape()
    sewn = [TopoDS.Face(sewing.Modified(f)) if sewing.IsModified(f) else f for f in built]
    named = []
    explorer = TopExp_Explorer(shape, TopAbs_FACE)
    while explorer.More():
        current = TopoDS.Face(explorer.Current())
        index = next(i for i, f in enumerate(sewn) if f.IsSame(current))
        named.append((current, faces[index].name))
        explorer.Next()
    return shape, named, sewing.NbFreeEdges(), sewing.NbContigousEdges()


def _document(shape, named, product: str):
    from OCP.TCollection import TCollection_ExtendedString
    from OCP.TDataStd import TDataStd_Name
    from OCP.TDocStd import TDocStd_Document
    from OCP.XCAFDoc import XCAFDoc_DocumentTool

    doc = TDocStd_Document(TCollection_ExtendedString("MDTV-XCAF"))
    tool = XCAFDoc_DocumentTool.ShapeTool_s(doc.Main())
    label = tool.AddShape(shape, False)
    TDataStd_Name.Set_s(label, TCollection_ExtendedString(product))
    for face, name in named:
        sub = tool.AddSubShape(label, face)
        TDataStd_Name.Set_s(sub, TCollection_ExtendedString(name))
    return doc


def _replace_atomically(tmp: Path, path: Path, fix) -> None:
    text = tmp.read_text(encoding="ascii")
    tmp.write_text(fix(text), encoding="ascii", newline="\n")
    os.replace(tmp, path)


def _fix_step(text: str) -> str:
    return re.sub(r"(FILE_NAME\('[^']*',)'[^']*'", rf"\1'{FIXED_STAMP_STEP}'", text, count=1)


def _fix_iges(text: str) -> str:
    # IGES global section: dates are 15-character Hollerith strings; same length
    # keeps the 72-column records intact (IGES 5.3 sec. 2.2.4).
    return re.sub(r"15H\d{8}\.\d{6}", f"15H{FIXED_STAMP_IGES}", text)


def write_step(shape, named, product: str, path: Path) -> None:
    """STEP AP214 with product and face names, deterministic header."""
    from OCP.Interface import Interface_Static
    from OCP.STEPCAFControl import STEPCAFControl_Writer
    from OCP.STEPControl import STEPControl_AsIs

    doc = _document(shape, named, product)
    tmp = path.with_name(f".{path.stem}.tmp{path.suffix}")
    with _quiet():
        writer = STEPCAFControl_Writer()
        # Set after the writer exists: its constructor resets the statics.
        Interface_Static.SetCVal_s("write.step.schema", "AP214IS")
        Interface_Static.SetCVal_s("write.step.unit", "MM")
        Interface_Static.SetIVal_s("write.stepcaf.subshapes.name", 1)
        writer.SetNameMode(True)
        ok = writer.Transfer(doc, STEPControl_AsIs) and int(writer.Write(str(tmp))) == 1
    if not ok:
        raise RuntimeError(f"STEP writer failed for {path}")
    _replace_atomically(tmp, path, _fix_step)


def _iges_header(model, file_name: str) -> None:
    """Fixed author, company, file name and dates in the IGES global section."""
    from OCP.TCollection import TCollection_HAsciiString as Text

    header = model.GlobalSection()
    header.SetAuthorName(Text(AUTHOR))
    header.SetCompanyName(Text(COMPANY))
    header.SetFileName(Text(file_name))
    header.SetDate(Text(FIXED_STAMP_IGES))
    header.SetLastChangeDate(Text(FIXED_STAMP_IGES))
    model.SetGlobalSection(header)


def write_iges(named, path: Path) -> None:
    """IGES 5.3 in face mode: one 144 (on a 128) per face, named by a 406 form 15 on each.

    The XCAF IGES writer orders its name entities by memory address, so the
    plain writer is used and the names are attached to the 144 entities here,
    in face order (IGES 5.3 sec. 4.135 name property; D-section label too).
    """
    from OCP.IGESBasic import IGESBasic_Name
    from OCP.IGESControl import IGESControl_Writer
    from OCP.TCollection import TCollection_HAsciiString as Text

    tmp = path.with_name(f".{path.stem}.tmp{path.suffix}")
    with _quiet():
        writer = IGESControl_Writer("MM", 0)
        for face, _ in named:
            writer.AddShape(face)
        writer.ComputeModel()
        model = writer.Model()
        trimmed = [model.Entity(i) for i in range(1, model.NbEntities() + 1) if model.Entity(i).TypeNumber() == 144]
        if len(trimmed) != len(named):
            raise RuntimeError(f"IGES writer made {len(trimmed)} trimmed surfaces for {len(named)} faces in {path}")
        for entity, (_, name) in zip(trimmed, named, strict=True):
            # The 128 too: a reader may map a face with natural bounds to its surface.
            for target in (entity, entity.Surface()):
                label = IGESBasic_Name()
                label.Init(1, Text(name))
                target.AddProperty(label)
                target.SetLabel(Text(name[:8]))
                model.AddWithRefs(label)
        _iges_header(model, path.name)
        ok = writer.Write(str(tmp))
    if not ok:
        raise RuntimeError(f"IGES writer failed for {path}")
    _replace_atomically(tmp, path, _fix_iges)


def write_sample(faces: list[SampleFace], product: str, stem: Path, sew: bool = True) -> WrittenSample:
    """Write ``stem.stp`` and ``stem.igs``; return face order and sewing counts."""
    shape, named, free, shared = assemble(faces, sew)
    step, iges = stem.with_suffix(".stp"), stem.with_suffix(".igs")
    write_step(shape, named, product, step)
    write_iges(named, iges)
    return WrittenSample(tuple(n for _, n in named), free, shared, {"step": step.name, "iges": iges.name})
