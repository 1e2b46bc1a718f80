"""Edges and trims of an OCP face as polylines on the face's NURBS.

``BRepBuilderAPI_NurbsConvert`` writes a cylinder, sphere, torus or revolution
as a rational B-spline whose parameters agree with the input's (angles) only at
the knots, and it keeps the p-curves as they were. So every (u, v) polyline here
is carried through 3-D (:class:`FaceMap`): the input face's p-curve sampled,
the input surface evaluated there, the point inverted onto the NURBS.
"""

from __future__ import annotations

import numpy as np

from ..nurbs import NurbsSurface

# Edge polylines (3-D, and the trims in (u, v)) keep their chords this close to
# the curve (mm), with this many points at least and at most per edge.
CHORD_DEFLECTION_MM = 1e-3
# ... or this fraction of the edge's length, when that is larger.
CHORD_DEFLECTION_RELATIVE = 1e-6
MIN_EDGE_SAMPLES = 5
MAX_EDGE_SAMPLES = 1000
# Relative tolerance for a trim loop that is just the domain's rectangle.
NATURAL_LOOP_RTOL = 1e-7


def edge_params(edge, face=None) -> np.ndarray:
    """Parameters along an edge where its polylines (3-D and p-curves) are sampled, shape (n,).

    Notes
    -----
    Quasi-uniform deflection sampling of the 3-D curve (``GCPnts_QuasiUniformDeflection``):
    chords stay within :data:`CHORD_DEFLECTION_MM` of the curve, at most
    :data:`MAX_EDGE_SAMPLES` points. A valid BRep edge is same-parameter (its
    p-curves share the 3-D curve's parameter), so the same parameters serve every
    face using it. An edge without a 3-D curve (collapsed) gets a few uniform ones.
    """
    from OCP.BRep import BRep_Tool
    from OCP.BRepAdaptor import BRepAdaptor_Curve
    from OCP.GCPnts import GCPnts_QuasiUniformDeflection
    from OCP.GeomAbs import GeomAbs_Line

    if BRep_Tool.Degenerated_s(edge):
        first, last = BRep_Tool.Range_s(edge, face) if face is not None else BRep_Tool.Range_s(edge)
        return np.linspace(first, last, MIN_EDGE_SAMPLES)
    first, last = BRep_Tool.Range_s(edge)
    curve = BRepAdaptor_Curve(edge)
    if curve.GetType() == GeomAbs_Line:
        return np.array([first, last])
    # A deflection relative to the edge's size bounds the work on huge edges.
    rough = np.array([curve.Value(float(t)).Coord() for t in np.linspace(first, last, 9)])
    rough_length = float(np.linalg.norm(np.diff(rough, axis=0), axis=1).sum())
    deflection = max(CHORD_DEFLECTION_MM, CHORD_DEFLECTION_RELATIVE * rough_length)
    sampler = GCPnts_QuasiUniformDeflection(curve, deflection, first, last)
    if not sampler.IsDone() or sampler.NbPoints() < 2:
        return np.linspace(first, last, MIN_EDGE_SAMPLES)
    ts = np.array([sampler.Parameter(i) for i in range(1, sampler.NbPoints() + 1)])
    if ts.size > MAX_EDGE_SAMPLES:
        ts = np.interp(np.linspace(0, ts.size - 1, MAX_EDGE_SAMPLES), np.arange(ts.size), ts)
    if ts.size < MIN_EDGE_SAMPLES:
        ts = np.linspace(first, last, MIN_EDGE_SAMPLES)
    return ts


def pcurve_points(edge, face, ts: np.ndarray) -> np.ndarray:
    """The edge's p-curve on the (input) face at the edge parameters ``ts``.

    Returns
    -------
    uv : ndarray of shape (n, 2)
        In the input surface's parameters, in the order of ``ts`` (the edge's
        own direction, not its orientation in a wire).
    """
    from OCP.BRepAdaptor import BRepAdaptor_Curve2d

    curve = BRepAdaptor_Curve2d(edge, face)
    return np.array([curve.Value(float(t)).Coord() for t in ts])


def edge_points(edge, ts: np.ndarray) -> np.ndarray:
    """The edge's 3-D curve (placed) at parameters ``ts``, shape (n, 3)."""
    from OCP.BRepAdaptor import BRepAdaptor_Curve

    curve = BRepAdaptor_Curve(edge)
    return np.array([curve.Value(float(t)).Coord() for t in ts])


class FaceMap:
    """Carries (u, v) of an input face onto its NURBS surface.

    The input surface is evaluated at the input (u, v), and the point inverted
    onto the NURBS (:func:`geometry.probe.closest_parameters`) starting from the
    same (u, v), which lies within a fraction of a knot span of the answer.
    B-spline surfaces and planes keep their parameters through the conversion,
    so their (u, v) are taken as they are.
    ``worst`` records the largest distance left (a trim off its surface).
    """

    def __init__(self, face, surface: NurbsSurface, same_parameters: bool = False):
        from OCP.BRepAdaptor import BRepAdaptor_Surface

        self.adaptor = BRepAdaptor_Surface(face)  # placed like the face
        self.surface = surface
        self.same_parameters = same_parameters
        self.worst = 0.0

    def __call__(self, uv: np.ndarray) -> np.ndarray:
        """(u, v) on the input face, shape (n, 2) -> (u, v) on the NURBS, shape (n, 2).

        All the points of a call are inverted in one compiled call; a NURBS that
        is the input surface itself (``same_parameters``) maps (u, v) to itself.
        """
        from ..probe import closest_parameters

        if len(uv) == 0 or self.same_parameters:
            return np.asarray(uv, dtype=float)
        pts = np.array([self.adaptor.Value(a, b).Coord() for a, b in uv])
        u, v = closest_parameters(self.surface, pts, uv[:, 0], uv[:, 1])
        off = np.linalg.norm(self.surface.points_at(u, v) - pts, axis=1)
        self.worst = max(self.worst, float(off.max()))
        return np.stack([u, v], axis=1)


def _wire_polyline(wire, face) -> np.ndarray:
    from OCP.BRepTools import BRepTools_WireExplorer
    from OCP.TopAbs import TopAbs_REVERSED

    chunks = []
    explorer = BRepTools_WireExplorer(wire, face)
    while explorer.More():
        edge = explorer.Current()
        uv = pcurve_points(edge, face, edge_params(edge, face))
        if edge.Orientation() == TopAbs_REVERSED:
            uv = uv[::-1]
        chunks.append(uv[:-1])
        explorer.Next()
    if not chunks:
        return np.zeros((0, 2))
    pts = np.concatenate(chunks)
    keep = np.ones(len(pts), dtype=bool)
    keep[1:] = np.any(np.abs(np.diff(pts, axis=0)) > 0, axis=1)
    return pts[keep]


def _signed_area(loop: np.ndarray) -> float:
    # Shoelace formula.
    x, y = loop[:, 0], loop[:, 1]
    return 0.5 * float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


def _is_natural(loops: list[np.ndarray], surface: NurbsSurface) -> bool:
    """One loop that runs round the whole parameter domain."""
    if len(loops) != 1:
        return False
    (u0, u1), (v0, v1) = surface.domain
    scale = np.array([u1 - u0, v1 - v0])
    box = np.array([[u0, v0], [u1, v1]])
    corners = np.stack([loops[0].min(axis=0), loops[0].max(axis=0)])
    on_box = np.all(np.abs(corners - box) <= NATURAL_LOOP_RTOL * scale)
    domain_area = scale[0] * scale[1]
    return bool(on_box and abs(abs(_signed_area(loops[0])) - domain_area) <= NATURAL_LOOP_RTOL * domain_area)


def face_loops(face, to_nurbs: FaceMap) -> tuple[np.ndarray, ...]:
    """Trimming loops of an input face on its NURBS, outer first; ``()`` for the natural boundary.

    Returns
    -------
    loops : tuple of ndarray of shape (n, 2)
    """
    from OCP.BRepTools import BRepTools
    from OCP.TopAbs import TopAbs_WIRE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    outer = BRepTools.OuterWire_s(face)
    wires = [outer] if not outer.IsNull() else []
    explorer = TopExp_Explorer(face, TopAbs_WIRE)
    while explorer.More():
        wire = TopoDS.Wire(explorer.Current())
        if outer.IsNull() or not wire.IsSame(outer):
            wires.append(wire)
        explorer.Next()
    loops = [lp for lp in (_wire_polyline(w, face) for w in wires) if len(lp) >= 3]
    if not loops:
        return ()
    sizes = np.cumsum([len(lp) for lp in loops])[:-1]
    loops = np.split(to_nurbs(np.concatenate(loops)), sizes)
    return () if _is_natural(loops, to_nurbs.surface) else tuple(loops)
