"""The shared-edge topology of an OCP shape as Batten edges.

Edges and the faces using them come from ``TopExp::MapShapesAndUniqueAncestors``
(edge -> faces). Every use is sampled at the same edge parameters as the 3-D
polyline (and later carried onto its face's NURBS), so ``use.uv[i]`` on the face is
``edge.points[i]`` within the file's edge tolerance; how far the p-curve
actually strays from the 3-D edge is measured on the NURBS by the owner
(:func:`geometry.io.carry.on_nurbs`; the seam check reports a file whose
p-curve and edge disagree).

Seam edges of periodic faces (one face on both sides, ``BRep_Tool::IsClosed``)
are listed with two uses of the same face index: the p-curves at both ends of
the periodic direction. Seam analyses between faces skip edges whose uses name
one face only. Degenerate edges (the collapsed pole of a sphere) have no 3-D
curve and are not listed.
"""

from __future__ import annotations

import numpy as np

from .fast_values import kernel_values
from .occt_curves import EdgeParams, InputFace
from .shape import KernelEdge, KernelUse

# Loose faces whose edges lie this close are taken to share them (IGES without
# topology); well below the 0.01 mm a G0 check commonly asks (common practice),
# so a real gap stays a gap.
SEW_TOLERANCE_MM = 1e-3
# A sewn edge and its source edge are one curve when they agree this closely at the same parameters (rounding).
SAME_CURVE_MM = 1e-9


def indexed_map(shape, kind):
    """Sub-shapes of one kind, each once, in exploration order (``TopExp::MapShapes``)."""
    from OCP.collections import IndexedMap_TopoDS_Shape_TopTools_ShapeMapHasher
    from OCP.TopExp import TopExp

    found = IndexedMap_TopoDS_Shape_TopTools_ShapeMapHasher()
    TopExp.MapShapes_s(shape, kind, found)
    return found


def _listed(shapes) -> list:
    """The shapes of a ``TopTools_ListOfShape``; First/Last for the usual one or two (iterating costs ms)."""
    n = shapes.Size()
    if n == 0:
        return []
    return [shapes.First(), shapes.Last()][:n] if n <= 2 else list(shapes)


def edge_uses(shape, faces_map, kept: dict[int, tuple[int, InputFace]]) -> list[tuple]:
    """Every non-degenerate edge used by a kept face, with its uses.

    Returns
    -------
    list of (edge, uses)
        ``uses``: (oriented edge, input face, model face index, its :class:`InputFace`)
        for each kept face side; a seam edge of a periodic face has both sides.
    """
    from OCP.BRep import BRep_Tool
    from OCP.collections import IndexedDataMap_TopoDS_Shape_List_TopoDS_Shape_TopTools_ShapeMapHasher as EdgeFaces
    from OCP.TopAbs import TopAbs_EDGE, TopAbs_FACE, TopAbs_FORWARD, TopAbs_REVERSED
    from OCP.TopExp import TopExp
    from OCP.TopoDS import TopoDS

    edge_faces = EdgeFaces()
    TopExp.MapShapesAndUniqueAncestors_s(shape, TopAbs_EDGE, TopAbs_FACE, edge_faces)
    listing = []
    for k in range(1, edge_faces.Extent() + 1):
        edge = TopoDS.Edge(edge_faces.FindKey(k))
        if BRep_Tool.Degenerated_s(edge):
            continue
        sides = [a for a in _listed(edge_faces.FindFromIndex(k)) if faces_map.FindIndex(a) - 1 in kept]
        if not sides:
            continue
        oriented = []
        for ancestor in sides:
            index, input_face = kept[faces_map.FindIndex(ancestor) - 1]
            face = TopoDS.Face(ancestor)
            closed = BRep_Tool.IsClosed_s(edge, face)
            for side in (TopAbs_FORWARD, TopAbs_REVERSED) if closed else (edge.Orientation(),):
                oriented.append((TopoDS.Edge(edge.Oriented(side)), face, index, input_face))
        listing.append((edge, oriented))
    return listing


def sampling_uses(uses) -> list[tuple]:
    """The (oriented edge, face) pairs whose p-curves an edge's sampling follows."""
    return [(e, f) for e, f, _, _ in uses]


def shared_edges(
    shape, faces_map, kept: dict[int, tuple[int, InputFace]], params: EdgeParams | None = None, listing=None
) -> list[KernelEdge]:
    """Every non-degenerate edge with one use per (kept) face side, matched point for point.

    ``listing`` is :func:`edge_uses` of the shape when already made; ``params``
    the edges' sampling shared with the trims (:class:`.occt_curves.EdgeParams`).
    """
    from OCP.BRep import BRep_Tool

    params = params if params is not None else EdgeParams()
    listing = listing if listing is not None else edge_uses(shape, faces_map, kept)
    edges = []
    for edge, oriented in listing:
        params(edge, sampling_uses(oriented))  # sampled for every face along it before any one face asks
        points = params.points(edge)
        uses = []
        for e, face, index, _ in oriented:
            uses.append(KernelUse(index, *params.trace(e, face)))
        edges.append(KernelEdge(points, tuple(uses), float(BRep_Tool.Tolerance_s(edge))))
    return edges


def _same_curve(edge, other, ts: np.ndarray) -> bool:
    """Whether two edges run along the same 3-D curve with the same parameters (checked at a few of ``ts``)."""
    from OCP.BRep import BRep_Tool
    from OCP.BRepAdaptor import BRepAdaptor_Curve

    if not np.allclose(BRep_Tool.Range_s(edge), BRep_Tool.Range_s(other), rtol=0, atol=1e-12):
        return False
    at = ts[np.linspace(0, ts.size - 1, min(ts.size, 5)).astype(int)]
    here, there = kernel_values(BRepAdaptor_Curve(edge), at), kernel_values(BRepAdaptor_Curve(other), at)
    return bool(np.abs(here - there).max() <= SAME_CURVE_MM)


def sewn_edges(
    faces_map, kept: dict[int, tuple[int, InputFace]], params: EdgeParams | None = None, listing=None
) -> list[KernelEdge]:
    """Shared edges of loose faces, from a sewn copy (``BRepBuilderAPI_Sewing``).

    ``params`` and ``listing``: the loose faces' own edges as already sampled
    (:func:`edge_uses`). Sewing keeps one of the two 3-D curves it joins, so a
    sewn edge starts its sampling from its source edge's, and only the other
    face's new p-curve may ask for more points.
    """
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Sewing
    from OCP.TopAbs import TopAbs_FACE
    from OCP.TopoDS import TopoDS

    sewing = BRepBuilderAPI_Sewing(SEW_TOLERANCE_MM)
    for i in kept:
        sewing.Add(faces_map.FindKey(i + 1))
    sewing.Perform()
    sewn = sewing.SewedShape()
    seeded = EdgeParams()
    for edge, _ in listing or ():
        ts = params.sampled(edge) if params is not None else None
        if ts is None or ts.size < 2:
            continue
        joined = TopoDS.Edge(sewing.ModifiedSubShape(edge)) if sewing.IsModifiedSubShape(edge) else edge
        if _same_curve(edge, joined, ts):
            seeded.seed(joined, ts)
    sewn_faces = indexed_map(sewn, TopAbs_FACE)
    sewn_kept = {}
    for i, entry in kept.items():
        face = faces_map.FindKey(i + 1)
        j = sewn_faces.FindIndex(sewing.Modified(face) if sewing.IsModified(face) else face) - 1
        if j >= 0:
            sewn_kept[j] = entry
    return shared_edges(sewn, sewn_faces, sewn_kept, seeded)
