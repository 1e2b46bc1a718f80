"""Edges and trims of an OCP face as polylines on the face's NURBS.

``BRepBuilderAPI_NurbsConvert`` writes a cylinder, sphere, torus or revolution
as a rational B-spline whose parameters agree with the input's (angles) only at
the knots, and it keeps the p-curves as they were. So every (u, v) polyline here
is read on the input face with its 3-D points (:meth:`EdgeParams.trace`), to be
inverted onto the NURBS by the owner (:mod:`geometry.io.carry`).
"""

from __future__ import annotations

import numpy as np

from .fast_values import curve_values, kernel_values, surface_values
from .shape import SurfaceArrays

# Edges are sampled by arc length and refined until every chord, in 3-D and of
# each p-curve on its surface, stays this close to the curve (mm): a fortieth of
# the 0.01 mm a class-A G0 check commonly asks (common practice), so a chord's
# sag never shows as a gap.
EDGE_CHORD_MM = 2.5e-4
# ... or this fraction of the edge's length, when larger (bounds work on huge models).
EDGE_CHORD_RELATIVE = 1e-7
MIN_EDGE_SAMPLES = 5
MAX_EDGE_SAMPLES = 4097
# Arc-length samples an edge starts from, and rounds of halving its worst chords.
START_EDGE_SAMPLES = 9
REFINE_ROUNDS = 14
# A p-curve's midpoint this close to its (u, v) chord's, relative to the chord, lies on it (rounding).
STRAIGHT_RTOL = 1e-12


def _arc_length_params(curve, first: float, last: float, count: int) -> np.ndarray:
    """``count`` parameters evenly spaced in arc length (``GCPnts_UniformAbscissa``), ends included."""
    from OCP.GCPnts import GCPnts_UniformAbscissa

    sampler = GCPnts_UniformAbscissa(curve, count, first, last)
    if sampler.IsDone() and sampler.NbPoints() >= 2:
        ts = np.array([sampler.Parameter(i) for i in range(1, sampler.NbPoints() + 1)])
        if np.all(np.diff(ts) > 0):
            return ts
    return np.linspace(first, last, count)


def edge_params(
    edge, uses=(), surface_of=None, start=None
) -> tuple[np.ndarray, np.ndarray | None, list[tuple[np.ndarray, np.ndarray]] | None]:
    """Parameters along an edge where its polylines (3-D and p-curves) are sampled, shape (n,).

    Parameters
    ----------
    edge : OCP.TopoDS.TopoDS_Edge
    uses : sequence of (TopoDS_Edge, TopoDS_Face)
        The oriented edge on each face whose p-curve must be followed too.
    surface_of : callable, optional
        ``surface_of(face)``: the face's surface values
        (:func:`.fast_values.surface_values`), when kept for several edges.
    start : ndarray of shape (m,), optional
        Parameters to refine from instead of the arc-length start: another
        sampling of the same 3-D curve (the edge a sewn edge was made from).

    Returns
    -------
    ts : ndarray of shape (n,)
    points : ndarray of shape (n, 3) or None
        The 3-D curve at ``ts``, as the refinement evaluated it.
    traces : list of (ndarray of shape (n, 2), ndarray of shape (n, 3)), or None
        Each use's p-curve at ``ts``, and its surface's points there where the
        sag test evaluated them (NaN rows elsewhere); None, like ``points``,
        for a collapsed edge or one padded to :data:`MIN_EDGE_SAMPLES`.

    Notes
    -----
    Starts from :data:`START_EDGE_SAMPLES` points evenly spaced in arc length
    (``GCPnts_UniformAbscissa``), then halves every interval whose midpoint
    lies further than the chord bound (:data:`EDGE_CHORD_MM`) from its chord (an
    interval that passed is not checked again):
    in 3-D, and for each use, the p-curve's point on the surface against the
    surface at the middle of the (u, v) chord. A straight 3-D edge thus still
    gets as many points as its p-curves need on a curved face. A valid BRep
    edge is same-parameter (its p-curves share the 3-D curve's parameter), so
    one set of parameters serves every polyline. A collapsed edge gets a few
    uniform ones. Curves and surfaces are evaluated vectorised where their kind
    allows (:mod:`.fast_values`).
    """
    from OCP.BRep import BRep_Tool
    from OCP.BRepAdaptor import BRepAdaptor_Curve, BRepAdaptor_Curve2d, BRepAdaptor_Surface
    from OCP.GCPnts import GCPnts_AbscissaPoint

    if BRep_Tool.Degenerated_s(edge):
        face = uses[0][1] if uses else None
        first, last = BRep_Tool.Range_s(edge, face) if face is not None else BRep_Tool.Range_s(edge)
        return np.linspace(first, last, MIN_EDGE_SAMPLES), None, None
    first, last = BRep_Tool.Range_s(edge)
    curve = BRepAdaptor_Curve(edge)
    on_edge = curve_values(curve, 3)
    try:
        length = float(GCPnts_AbscissaPoint.Length_s(curve, first, last))
    except Exception:  # the kernel's own failure on a bad curve: fall back to a rough length
        length = float(np.linalg.norm(np.diff(kernel_values(curve, np.linspace(first, last, 9)), axis=0), axis=1).sum())
    bound = max(EDGE_CHORD_MM, EDGE_CHORD_RELATIVE * length)
    ts = _arc_length_params(curve, first, last, START_EDGE_SAMPLES) if start is None else np.asarray(start, float)
    surface_of = surface_of or (lambda f: surface_values(BRepAdaptor_Surface(f)))
    pcurves = [(curve_values(BRepAdaptor_Curve2d(e, f), 2), surface_of(f)) for e, f in uses]
    points = on_edge(ts)
    traces = [c2d(ts) for c2d, _ in pcurves]
    # Each p-curve's points on its surface, where the sag test evaluated them (NaN elsewhere): kept for the trims.
    on_surfaces = [np.full((ts.size, 3), np.nan) for _ in pcurves]
    # Only intervals new in a round are checked: one that passed once passes again.
    pending = np.arange(ts.size - 1)
    for _ in range(REFINE_ROUNDS):
        lo, hi = pending, pending + 1
        mid = 0.5 * (ts[lo] + ts[hi])
        mid_points = on_edge(mid)
        error = np.linalg.norm(mid_points - 0.5 * (points[lo] + points[hi]), axis=1)
        mid_traces, mid_on_surfaces = [], []
        for (c2d, surface), uv in zip(pcurves, traces, strict=True):
            uv_mid = c2d(mid)
            chord_mid = 0.5 * (uv[lo] + uv[hi])
            # Where the p-curve's midpoint lies on its (u, v) chord (a line in the parameters,
            # as iso-curves and most edges of cylinders are), the surface holds no sag to measure.
            bent = np.any(
                np.abs(uv_mid - chord_mid) > STRAIGHT_RTOL * np.abs(uv[hi] - uv[lo]).max(axis=1)[:, None], axis=1
            )
            sag, on_curve = np.zeros(mid.size), np.full((mid.size, 3), np.nan)
            if bent.any():
                on_curve[bent] = surface(uv_mid[bent])
                sag[bent] = np.linalg.norm(on_curve[bent] - surface(chord_mid[bent]), axis=1)
            error = np.maximum(error, sag)
            mid_traces.append(uv_mid)
            mid_on_surfaces.append(on_curve)
        bad = error > bound
        split = pending[bad]
        if split.size == 0 or ts.size + split.size > MAX_EDGE_SAMPLES:
            break
        ts = np.insert(ts, split + 1, mid[bad])
        points = np.insert(points, split + 1, mid_points[bad], axis=0)
        traces = [np.insert(uv, split + 1, m[bad], axis=0) for uv, m in zip(traces, mid_traces, strict=True)]
        on_surfaces = [
            np.insert(xyz, split + 1, m[bad], axis=0) for xyz, m in zip(on_surfaces, mid_on_surfaces, strict=True)
        ]
        # Interval j split becomes intervals j' and j' + 1, j' = j + the splits before it.
        first = split + np.arange(split.size)
        pending = np.stack([first, first + 1], axis=1).ravel()
    if ts.size < MIN_EDGE_SAMPLES:
        ts = np.interp(np.linspace(0, ts.size - 1, MIN_EDGE_SAMPLES), np.arange(ts.size), ts)
        return ts, None, None
    return ts, points, list(zip(traces, on_surfaces, strict=True))


class _ByShape:
    """Values keyed by a shape as ``IsSame`` tells shapes apart (its geometry and place, not its orientation)."""

    def __init__(self):
        self._buckets: dict[int, list] = {}  # hash of the shape -> [(shape, value)]

    def get(self, shape):
        """The value kept for ``shape``, or None."""
        return next((value for known, value in self._buckets.get(hash(shape), ()) if known.IsSame(shape)), None)

    def add(self, shape, value):
        """Keep ``value`` for ``shape``; returns it."""
        self._buckets.setdefault(hash(shape), []).append((shape, value))
        return value


class EdgeParams:
    """:func:`edge_params` once per edge of a shape, shared by every polyline drawn along it.

    The trims of each face and the shared-edge topology follow the same edges:
    sampled once with every face's p-curve (:meth:`prime`), an edge serves
    them all, and its trim polylines and edge uses agree point for point.
    What the sampling evaluated (the 3-D curve, each p-curve) is kept, and
    each p-curve's points on its surface are evaluated once (:meth:`trace`).
    Each face's surface is read into its evaluator once (:meth:`surface`).
    """

    def __init__(self):
        self._found = _ByShape()  # edge -> [edge, ts, 3-D points, [(oriented edge, face, uv, xyz)]]
        self._surfaces = _ByShape()  # face -> its surface's values
        self._starts = _ByShape()  # edge -> the parameters its sampling starts from

    def seed(self, edge, ts: np.ndarray) -> None:
        """Start ``edge``'s sampling from ``ts`` of shape (m,) (a sampling of the same 3-D curve), not from scratch."""
        self._starts.add(edge, ts)

    def sampled(self, edge) -> np.ndarray | None:
        """The parameters ``edge`` was sampled at, shape (n,), or None when it has not been sampled."""
        entry = self._found.get(edge)
        return None if entry is None else entry[1]

    def surface(self, face):
        """The face's surface values (:func:`.fast_values.surface_values`), built once per face."""
        from OCP.BRepAdaptor import BRepAdaptor_Surface

        values = self._surfaces.get(face)
        return values if values is not None else self._surfaces.add(face, surface_values(BRepAdaptor_Surface(face)))

    def prime(self, edge, uses) -> None:
        """Sample ``edge`` for ``uses`` now; a failure is left to the caller that needs it."""
        try:
            self(edge, uses)
        except Exception:  # the kernel's own failure on one curve: raised again where it matters
            pass

    def _entry(self, edge, uses=()) -> list:
        entry = self._found.get(edge)
        if entry is None:
            ts, points, traces = edge_params(edge, uses, self.surface, self._starts.get(edge))
            known = [] if traces is None else [[e, f, uv, xyz] for (e, f), (uv, xyz) in zip(uses, traces, strict=True)]
            entry = self._found.add(edge, [edge, ts, points, known])
        return entry

    def __call__(self, edge, uses=()) -> np.ndarray:
        """:func:`edge_params` of ``edge``: sampled for ``uses`` unless already sampled (for any uses)."""
        return self._entry(edge, uses)[1]

    def points(self, edge) -> np.ndarray:
        """The edge's 3-D curve (placed) at its parameters, shape (n, 3)."""
        entry = self._entry(edge)
        if entry[2] is None:
            entry[2] = edge_points(edge, entry[1])
        return entry[2]

    def trace(self, edge, face) -> tuple[np.ndarray, np.ndarray]:
        """The oriented edge's p-curve on ``face`` at the edge's parameters, and the face's surface there.

        Returns
        -------
        uv : ndarray of shape (n, 2)
            In the input surface's parameters, in the order of the edge's
            parameters (its own direction, not its orientation in a wire).
        xyz : ndarray of shape (n, 3)
        """
        from OCP.BRep import BRep_Tool

        entry = self._entry(edge, [(edge, face)])
        for known in entry[3]:
            # the same p-curve: the same face and, where the edge is closed on it (two p-curves), the same orientation
            if known[1].IsEqual(face) and (known[0].IsEqual(edge) or not BRep_Tool.IsClosed_s(edge, face)):
                break
        else:
            uv = pcurve_points(edge, face, entry[1])
            known = [edge, face, uv, np.full((len(uv), 3), np.nan)]
            entry[3].append(known)
        missing = np.isnan(known[3]).any(axis=1)
        if missing.any():  # evaluated once: the next face side along this edge reads them
            known[3][missing] = self.surface(face)(known[2][missing])
        return known[2], known[3]


def pcurve_points(edge, face, ts: np.ndarray) -> np.ndarray:
    """The edge's p-curve on the (input) face at the edge parameters ``ts``.

    Returns
    -------
    uv : ndarray of shape (n, 2)
        In the input surface's parameters, in the order of ``ts`` (the edge's
        own direction, not its orientation in a wire).
    """
    from OCP.BRepAdaptor import BRepAdaptor_Curve2d

    return curve_values(BRepAdaptor_Curve2d(edge, face), 2)(ts)


def edge_points(edge, ts: np.ndarray) -> np.ndarray:
    """The edge's 3-D curve (placed) at parameters ``ts``, shape (n, 3)."""
    from OCP.BRepAdaptor import BRepAdaptor_Curve

    return curve_values(BRepAdaptor_Curve(edge), 3)(ts)


class InputFace:
    """An input face's NURBS, and whether it shares the face's own (u, v).

    The trims and edge uses read here stay in the input face's (u, v), each
    point with the input surface's 3-D point there (:meth:`EdgeParams.trace`);
    the process that owns the model carries them onto the NURBS in one compiled
    call (:func:`geometry.io.carry.on_nurbs`).
    """

    def __init__(self, surface: SurfaceArrays, same_parameters: bool = False):
        self.surface = surface
        self.same_parameters = same_parameters


# A wire is open when its ends lie further apart (on the surface) than this
# fraction of its length, and further than this many times its edges' tolerance.
OPEN_WIRE_FRACTION = 1e-3
OPEN_WIRE_TOLERANCES = 10.0


class TrimProblem(Exception):
    """A trim wire that cannot bound a region (open or without area); the message says which and why."""


def _wire_polyline(wire, face, params: EdgeParams) -> tuple[np.ndarray, np.ndarray]:
    """The wire as a closed (u, v) polyline, first point not repeated, and the surface's points there.

    Returns
    -------
    uv : ndarray of shape (n, 2)
    xyz : ndarray of shape (n, 3)

    Raises
    ------
    TrimProblem
        When its ends do not meet on the surface (an open wire).
    """
    from OCP.BRep import BRep_Tool
    from OCP.BRepTools import BRepTools_WireExplorer
    from OCP.TopAbs import TopAbs_REVERSED

    chunks, tolerance = [], 0.0
    explorer = BRepTools_WireExplorer(wire, face)
    while explorer.More():
        edge = explorer.Current()
        uv, xyz = params.trace(edge, face)
        if edge.Orientation() == TopAbs_REVERSED:
            uv, xyz = uv[::-1], xyz[::-1]
        chunks.append((uv, xyz))
        tolerance = max(tolerance, BRep_Tool.Tolerance_s(edge))
        explorer.Next()
    if not chunks:
        return np.zeros((0, 2)), np.zeros((0, 3))
    path = np.concatenate([xyz for _, xyz in chunks])
    length = float(np.linalg.norm(np.diff(path, axis=0), axis=1).sum())
    gap = float(np.linalg.norm(chunks[-1][1][-1] - chunks[0][1][0]))
    if gap > OPEN_WIRE_FRACTION * length and gap > OPEN_WIRE_TOLERANCES * tolerance:
        raise TrimProblem(f"trim wire of {len(chunks)} edge(s) is open: its ends lie {gap:.3g} mm apart")
    pts = np.concatenate([uv[:-1] for uv, _ in chunks])
    xyz = np.concatenate([xyz[:-1] for _, xyz in chunks])
    keep = np.ones(len(pts), dtype=bool)
    keep[1:] = np.any(np.abs(np.diff(pts, axis=0)) > 0, axis=1)
    return pts[keep], xyz[keep]


def face_loops(face, params: EdgeParams | None = None) -> tuple[list[tuple[np.ndarray, np.ndarray]], list[str]]:
    """Trimming wires of an input face as closed (u, v) polylines on it, outer first.

    ``params`` gives each edge's sampling parameters (shared with the other
    faces along it); by default each edge is sampled for this face alone.

    Returns
    -------
    loops : list of (ndarray of shape (n, 2), ndarray of shape (n, 3))
        In the input face's (u, v), with the surface's points there; empty
        when the face is used untrimmed.
    notes : list of str
        What was set aside and why: an open outer wire leaves the face
        untrimmed (its surface shown whole, never reduced to nothing); such a
        hole is left out. Loops without area are judged on the NURBS
        (:func:`geometry.io.carry.on_nurbs`).
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
    params = params if params is not None else EdgeParams()
    polylines, notes = [], []
    for k, wire in enumerate(wires):
        which = "outer trim" if k == 0 and not outer.IsNull() else "a hole"
        try:
            loop = _wire_polyline(wire, face, params)
            if len(loop[0]) < 3:
                raise TrimProblem(f"trim wire has {len(loop[0])} distinct point(s)")
        except TrimProblem as exc:
            if which == "outer trim":
                return [], [f"{exc}; the face is used untrimmed"]
            notes.append(f"{exc}; this hole is left out")
            continue
        polylines.append(loop)
    return polylines, notes
