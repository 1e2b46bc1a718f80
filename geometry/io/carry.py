"""The kernel's faces and edges onto their NURBS: every trim and edge-use point inverted in one call.

The helper process reads trims and edge uses in each input face's own (u, v),
with the input surface's 3-D point at every sample (:mod:`.kernel_shape`).
Where the NURBS has other parameters than the input surface (cylinders, cones,
spheres, tori and revolutions convert with angles that agree only at the knots),
each point is inverted onto the NURBS starting from its input (u, v), which lies
within a fraction of a knot span of the answer: The NURBS Book, 2nd ed.,
eq. 6.6 (Newton), all points of all faces in one compiled call
(:func:`geometry.nurbs.compiled_inversion.invert` on a pack of the surfaces).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from ..errors import SurfaceError
from ..kernel.shape import KernelShape
from ..model.topology import Edge, EdgeUse, Face, SkippedFace
from ..nurbs.compiled_eval import SurfacePack, derivatives
from ..nurbs.compiled_inversion import invert
from ..nurbs.surface import NurbsSurface

# A trim point further than this from its surface earns the face a warning (mm).
TRIM_WARN_MM = 1e-3
# Relative tolerance for a trim loop that is just the domain's rectangle.
NATURAL_LOOP_RTOL = 1e-7
# A loop enclosing less than this fraction of the domain's area has none.
LOOP_AREA_RTOL = 1e-12


@dataclass
class ShapeContents:
    """Faces and edges of one model, trims on the NURBS (from :func:`on_nurbs` or the JSON reader)."""

    faces: list[Face] = field(default_factory=list)
    edges: list[Edge] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    n_input_faces: int = 0
    skipped: list[SkippedFace] = field(default_factory=list)


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


def _trim_loops(uv_loops: list[np.ndarray], surface: NurbsSurface) -> tuple[tuple[np.ndarray, ...], list[str]]:
    """Loops on the NURBS as a face keeps them: ``()`` for the natural boundary or an outer loop without area."""
    if not uv_loops:
        return (), []
    (u0, u1), (v0, v1) = surface.domain
    tiny = LOOP_AREA_RTOL * (u1 - u0) * (v1 - v0)
    if abs(_signed_area(uv_loops[0])) <= tiny:
        return (), ["outer trim wire encloses no area; the face is used untrimmed"]
    kept, notes = [uv_loops[0]], []
    for loop in uv_loops[1:]:
        if abs(_signed_area(loop)) <= tiny:
            notes.append("a hole's trim wire encloses no area; it is left out")
        else:
            kept.append(loop)
    return (() if _is_natural(kept, surface) else tuple(kept)), notes


def polyline_offset(points: np.ndarray, polyline: np.ndarray, sizes: np.ndarray | None = None) -> np.ndarray:
    """Distance of each point to its polyline near the vertex of the same index, shape (n,).

    Parameters
    ----------
    points : ndarray of shape (n, 3)
    polyline : ndarray of shape (n, 3)
        Sampled at the same curve parameters (a same-parameter edge), so the
        closest segments are those around the same index; the two segments on
        each side are searched.
    sizes : ndarray of int, shape (m,), optional
        ``points`` and ``polyline`` hold ``m`` polylines one after another, of
        these lengths (default: one); each point is measured against its own.
    """
    n = polyline.shape[0]
    sizes = np.array([n]) if sizes is None else np.asarray(sizes, dtype=np.int64)
    first = np.repeat(np.cumsum(sizes) - sizes, sizes)  # each point's polyline start
    last_segment = first + np.repeat(np.maximum(sizes - 2, 0), sizes)
    best = np.linalg.norm(points - polyline, axis=1)
    index = np.arange(n)
    for shift in (-2, -1, 0, 1):
        start = np.clip(index + shift, first, last_segment)
        end = np.minimum(start + 1, first + np.repeat(sizes - 1, sizes))
        a, d = polyline[start], polyline[end] - polyline[start]
        lam = np.clip(np.einsum("ij,ij->i", points - a, d) / np.maximum(np.einsum("ij,ij->i", d, d), 1e-300), 0, 1)
        best = np.minimum(best, np.linalg.norm(points - a - lam[:, None] * d, axis=1))
    return best


def _use_offsets(shape: KernelShape, pack: SurfacePack, carried: list[np.ndarray], first_use: int) -> np.ndarray:
    """How far each edge use, on its NURBS at its carried (u, v), strays from its 3-D edge, shape (uses,)."""
    uses = [(use, edge) for edge in shape.edges for use in edge.uses]
    if not uses:
        return np.zeros(0)
    sizes = np.array([len(use.uv) for use, _ in uses], dtype=np.int64)
    uv = np.concatenate([carried[first_use + k] for k in range(len(uses))]).reshape(-1, 2)
    sids = np.repeat([use.face for use, _ in uses], sizes)
    on_face = derivatives(pack, sids, uv[:, 0], uv[:, 1], 0)[0, 0]
    edge_points = np.concatenate([np.asarray(edge.points, float).reshape(-1, 3) for _, edge in uses])
    off = polyline_offset(on_face, edge_points, sizes)
    starts = np.cumsum(sizes) - sizes
    out = np.zeros(len(uses))
    full = sizes > 0
    out[full] = np.maximum.reduceat(off, starts[full]) if off.size else 0.0
    return out


def _valid_faces(shape: KernelShape) -> tuple[KernelShape, list[NurbsSurface]]:
    """The faces whose arrays make a valid NURBS, with their surfaces; the others skipped with the reason.

    Edge uses are renumbered to the faces kept; an edge left without a use is dropped.
    """
    surfaces, kept, new_index = [], [], {}
    warnings, skipped = list(shape.warnings), [SkippedFace(*s) for s in shape.skipped]
    for i, face in enumerate(shape.faces):
        try:
            surfaces.append(NurbsSurface(*face.surface))
        except SurfaceError as exc:
            warnings.append(f"{face.label} skipped: {exc}")
            skipped.append(SkippedFace(face.place, face.name, str(exc)))
            continue
        new_index[i] = len(kept)
        kept.append(face)
    edges = shape.edges
    if len(kept) < len(shape.faces):
        edges = []
        for edge in shape.edges:
            uses = tuple(replace(u, face=new_index[u.face]) for u in edge.uses if u.face in new_index)
            if uses:
                edges.append(replace(edge, uses=uses))
    return KernelShape(kept, edges, warnings, shape.n_input_faces, skipped), surfaces


def on_nurbs(shape: KernelShape) -> ShapeContents:
    """Faces and edges with every trim and edge use in its NURBS's (u, v).

    Parameters
    ----------
    shape : KernelShape
        As the reader gave it (:func:`geometry.kernel.occt_model.read_shape`).

    Returns
    -------
    ShapeContents
        One :class:`Face` per kernel face, in order, except those whose arrays
        are no valid NURBS (skipped, with the reason); a face whose trim lies
        more than :data:`TRIM_WARN_MM` off its NURBS is named in ``warnings``.

    Notes
    -----
    Every point to carry (trim loops and edge uses of the faces whose NURBS
    has other parameters) goes through one :func:`invert` call on a pack of the
    surfaces, started from its input (u, v); one more call evaluates the NURBS
    at the answers to measure how far each trim loop lies off its surface, and
    one at every edge use to measure how far it strays from its 3-D edge
    (``EdgeUse.offset``, on the surface the analyses evaluate).
    """
    shape, surfaces = _valid_faces(shape)
    # Every (u, v) polyline in one list: the faces' loops, then the edges' uses.
    owners, uvs, points = [], [], []
    for i, face in enumerate(shape.faces):
        for uv, pts in face.loops:
            owners.append(i)
            uvs.append(np.asarray(uv, float).reshape(-1, 2))
            points.append(np.asarray(pts, float).reshape(-1, 3))
    for edge in shape.edges:
        for use in edge.uses:
            owners.append(use.face)
            uvs.append(np.asarray(use.uv, float).reshape(-1, 2))
            points.append(np.asarray(use.points, float).reshape(-1, 3))
    n_loops = len(owners) - sum(len(e.uses) for e in shape.edges)
    carried = list(uvs)
    moving = [k for k, i in enumerate(owners) if not shape.faces[i].same_parameters and len(uvs[k])]
    worst = np.zeros(len(surfaces))
    pack = SurfacePack.of(surfaces)
    if moving:
        sids = np.concatenate([np.full(len(uvs[k]), owners[k], dtype=np.int64) for k in moving])
        start = np.concatenate([uvs[k] for k in moving])
        target = np.concatenate([points[k] for k in moving])
        u, v = invert(pack, sids, target, start[:, 0], start[:, 1])
        off = np.linalg.norm(derivatives(pack, sids, u, v, 0)[0, 0] - target, axis=1)
        on_loop = np.concatenate([np.full(len(uvs[k]), k < n_loops) for k in moving])
        np.maximum.at(worst, sids[on_loop], off[on_loop])
        answers = np.split(np.stack([u, v], axis=1), np.cumsum([len(uvs[k]) for k in moving])[:-1])
        for k, uv in zip(moving, answers, strict=True):
            carried[k] = uv
    out = ShapeContents(warnings=shape.warnings, n_input_faces=shape.n_input_faces, skipped=shape.skipped)
    at = 0
    for i, (face, surface) in enumerate(zip(shape.faces, surfaces, strict=True)):
        loops, notes = _trim_loops(carried[at : at + len(face.loops)], surface)
        at += len(face.loops)
        out.warnings.extend(f"{face.label}: {note}" for note in notes)
        if worst[i] > TRIM_WARN_MM:
            out.warnings.append(f"{face.label}: its trim lies up to {worst[i]:.3g} mm off its surface")
        out.faces.append(Face(surface, face.reversed, loops, face.name, face.body))
    offsets = iter(_use_offsets(shape, pack, carried, at))
    for edge in shape.edges:
        uses = []
        for use in edge.uses:
            uses.append(EdgeUse(use.face, carried[at], float(next(offsets))))
            at += 1
        out.edges.append(Edge(edge.points, tuple(uses), edge.tolerance))
    return out
