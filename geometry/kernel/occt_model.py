"""An OCP shape (from the STEP or IGES reader) as Batten faces and edges.

Each face's surface is converted to NURBS on its own (``GeomConvert``, or
``BRepBuilderAPI_NurbsConvert`` for what that refuses), so one face the kernel
cannot convert is skipped with a warning and the others kept. Trims are
carried onto the NURBS by :mod:`.occt_curves`; the shared-edge topology is
:mod:`.occt_edges`'. Lengths are already mm (the kernel's readers convert) and
placements come with each face's location.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from ..errors import BattenError
from .occt_curves import EdgeParams, InputFace, face_loops
from .occt_edges import edge_uses, indexed_map, sampling_uses, sewn_edges, shared_edges
from .occt_surface import bspline_to_nurbs, face_bspline, surface_bspline
from .shape import KernelFace, KernelShape, Skipped, SurfaceArrays

# A face whose control net spans more than this is rejected as absurd (100 km).
MAX_EXTENT_MM = 1e8

Namer = Callable[[object], str]


def _body_labels(shape, faces_map, namer: Namer | None) -> list[str]:
    """Label of the solid or shell (or free face set) each face belongs to."""
    from OCP.TopAbs import TopAbs_FACE, TopAbs_SHELL, TopAbs_SOLID

    labels = [""] * faces_map.Extent()
    for kind, word in ((TopAbs_SOLID, "solid"), (TopAbs_SHELL, "shell")):
        bodies = indexed_map(shape, kind)
        for b in range(1, bodies.Extent() + 1):
            body = bodies.FindKey(b)
            label = (namer(body) if namer else "") or f"{word} {b}"
            inner = indexed_map(body, TopAbs_FACE)
            for k in range(1, inner.Extent() + 1):
                i = faces_map.FindIndex(inner.FindKey(k)) - 1
                if i >= 0 and not labels[i]:
                    labels[i] = label
    return [lab or "free faces" for lab in labels]


def _check_extent(surface: SurfaceArrays) -> None:
    extent = np.ptp(surface.poles.reshape(-1, 3), axis=0).max()
    if extent > MAX_EXTENT_MM:
        raise BattenError(f"control net spans {extent:.3g} mm, beyond any design model ({MAX_EXTENT_MM:.0e} mm)")


def _face_surface(face) -> tuple[SurfaceArrays, bool]:
    """The exact NURBS of one input face, placed, and whether it keeps the face's (u, v).

    The surface alone is converted (:func:`.occt_surface.surface_bspline`);
    what has no exact form there goes through ``BRepBuilderAPI_NurbsConvert``.
    """
    from OCP.BRepBuilderAPI import BRepBuilderAPI_NurbsConvert
    from OCP.TopoDS import TopoDS

    try:
        bspline, placement, same = surface_bspline(face)
    except Exception:  # offset surfaces and whatever GeomConvert refuses
        converter = BRepBuilderAPI_NurbsConvert(face, True)
        if not converter.IsDone():
            raise BattenError("NURBS conversion failed") from None
        bspline, placement = face_bspline(TopoDS.Face(converter.Shape()))
        same = False
    surface = bspline_to_nurbs(bspline)
    if not np.array_equal(placement, np.eye(4)):
        # NURBS are affinely invariant: the placement moves the poles alone
        surface = surface._replace(poles=surface.poles @ placement[:3, :3].T + placement[:3, 3])
    _check_extent(surface)
    return surface, same


def _kernel_reason(exc: BaseException) -> str:
    text = str(exc).strip() or type(exc).__name__
    return text.splitlines()[0][:200]


def read_shape(shape, namer: Namer | None = None, sew: bool = False) -> KernelShape:
    """Faces and shared edges of an OCP shape.

    Parameters
    ----------
    shape : OCP.TopoDS.TopoDS_Shape
        Placed and in mm (the kernel's readers convert units).
    namer : callable, optional
        ``namer(shape) -> str``: the name the file gives a face or body, or ``""``.
    sew : bool
        When no edge of the shape joins two faces (IGES files of loose trimmed
        surfaces), find the shared edges by sewing a copy at
        :data:`geometry.kernel.occt_edges.SEW_TOLERANCE_MM`; the faces themselves
        are read as the file has them.

    Returns
    -------
    KernelShape
        Trims still on the input faces (:func:`geometry.io.carry.on_nurbs` puts
        them on the NURBS). Faces in the order the shape lists them; a face whose surface fails is
        left out, one whose trim fails is kept untrimmed, and either is named in
        ``warnings`` (by its 1-based place in the file and its name) with the cause.
    """
    from OCP.TopAbs import TopAbs_FACE, TopAbs_REVERSED
    from OCP.TopoDS import TopoDS

    out = KernelShape()
    faces_map = indexed_map(shape, TopAbs_FACE)
    out.n_input_faces = faces_map.Extent()
    bodies = _body_labels(shape, faces_map, namer)
    kept: dict[int, tuple[int, InputFace]] = {}  # input face index -> (model index, the face)
    total = faces_map.Extent()
    inputs = []  # per input face: (face, name, label, the InputFace or the reason it is skipped)
    for i in range(total):
        face = TopoDS.Face(faces_map.FindKey(i + 1))
        name = namer(face) if namer else ""
        label = f"face {i + 1} of {total} in the file" + (f" ('{name}')" if name else "")
        try:
            side = InputFace(*_face_surface(face))
        except BattenError as exc:
            inputs.append((face, name, label, str(exc)))
            continue
        except Exception as exc:  # the kernel's own failures (Standard_Failure and kin)
            inputs.append((face, name, label, f"kernel error ({_kernel_reason(exc)})"))
            continue
        kept[i] = (len(kept), side)
        inputs.append((face, name, label, side))
    # Every edge is sampled once, for every face along it; trims and edge uses share that.
    params = EdgeParams()
    try:
        listing = edge_uses(shape, faces_map, kept)
    except Exception as exc:  # topology is a bonus: keep the faces
        listing, topology_error = None, exc
    else:
        topology_error = None
        for edge, uses in listing:
            params.prime(edge, sampling_uses(uses))
    for i, (face, name, label, side) in enumerate(inputs):
        if isinstance(side, str):
            out.warnings.append(f"{label} skipped: {side}")
            out.skipped.append(Skipped(i + 1, name, side))
            continue
        try:
            loops, notes = face_loops(face, params)
            out.warnings.extend(f"{label}: {note}" for note in notes)
        except Exception as exc:  # a surface without a readable trim is still worth showing
            loops = []
            out.warnings.append(f"{label}: trim not read ({_kernel_reason(exc)}); shown untrimmed")
        reversed_ = face.Orientation() == TopAbs_REVERSED
        out.faces.append(
            KernelFace(
                i + 1,
                side.surface,
                side.same_parameters,
                reversed_,
                name,
                bodies[i],
                label,
                loops,
            )
        )
    try:
        if topology_error is not None:
            raise topology_error
        out.edges = shared_edges(shape, faces_map, kept, params, listing)
        if sew and kept and not any(len(e.uses) > 1 for e in out.edges):
            out.edges = sewn_edges(faces_map, kept, params, listing)
    except Exception as exc:  # topology is a bonus: keep the faces
        out.warnings.append(f"shared-edge topology not read: {_kernel_reason(exc)}")
    return out
