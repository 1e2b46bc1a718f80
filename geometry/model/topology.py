"""The model: trimmed, oriented faces with their shared-edge topology.

Every reader (STEP, IGES, geomdl JSON) produces a :class:`Model`; every
analysis takes one. All lengths are millimetres.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from ..nurbs import compiled_regions
from ..nurbs.surface import NurbsSurface


def _frozen(a, shape_tail: tuple[int, ...]) -> np.ndarray:
    arr = np.array(a, dtype=float).reshape(-1, *shape_tail)
    arr.setflags(write=False)
    return arr


@dataclass(frozen=True, eq=False)
class Face:
    """One face of a model.

    Attributes
    ----------
    surface : NurbsSurface
        The exact underlying surface, in mm, already placed.
    reversed : bool
        The face uses the surface with its normal flipped (STEP/IGES face
        orientation); every analysis applies it.
    loops : tuple of ndarray of shape (n, 2)
        Trimming loops in the surface's (u, v), as closed polylines (first point
        not repeated). ``loops[0]`` is the outer loop, the rest are holes. Empty:
        the natural boundary of the parameter domain.
    name : str
        Label from the file, or ``""``.
    body : str
        The shell, solid or assembly instance the face belongs to.
    """

    surface: NurbsSurface
    reversed: bool = False
    loops: tuple[np.ndarray, ...] = ()
    name: str = ""
    body: str = ""

    def __post_init__(self):
        object.__setattr__(self, "loops", tuple(_frozen(lp, (2,)) for lp in self.loops))

    @property
    def sign(self) -> float:
        """+1 or -1: the factor on Su x Sv that gives the face's normal."""
        return -1.0 if self.reversed else 1.0

    @property
    def is_trimmed(self) -> bool:
        return bool(self.loops)

    def inside(self, u: np.ndarray, v: np.ndarray) -> np.ndarray:
        """Which parameter pairs lie on the face (inside its trim).

        Parameters
        ----------
        u, v : ndarray of shape (...)

        Returns
        -------
        mask : ndarray of bool, shape (...)
        """
        u = np.asarray(u, float)
        v = np.asarray(v, float)
        (u0, u1), (v0, v1) = self.surface.domain
        tol_u, tol_v = 1e-12 * (u1 - u0), 1e-12 * (v1 - v0)
        in_domain = (u >= u0 - tol_u) & (u <= u1 + tol_u) & (v >= v0 - tol_v) & (v <= v1 + tol_v)
        if not self.loops:
            return in_domain
        return in_domain & points_in_loops(np.stack([u, v], axis=-1), self.loops)


def points_in_loops(uv: np.ndarray, loops: tuple[np.ndarray, ...]) -> np.ndarray:
    """Even-odd point-in-region test against a set of closed polylines.

    Parameters
    ----------
    uv : ndarray of shape (..., 2)
    loops : tuple of ndarray of shape (n_i, 2)

    Returns
    -------
    inside : ndarray of bool, shape (...)

    Notes
    -----
    Crossing-number test (Shimrat 1962, Algorithm 112): a point is inside when a
    ray from it crosses the boundary an odd number of times. Holes need no
    special case under the even-odd rule. Compiled
    (:func:`geometry.nurbs.compiled_regions.points_in_loops`).
    """
    return compiled_regions.points_in_loops(uv, loops)


@dataclass(frozen=True, eq=False)
class EdgeUse:
    """One face's use of a topological edge.

    Attributes
    ----------
    face : int
        Index of the face in :attr:`Model.faces`.
    uv : ndarray of shape (n, 2)
        The edge as a polyline in that face's parameter space (the p-curve),
        ordered like :attr:`Edge.points` where the file allows.
    offset : float
        Largest distance (mm) from the p-curve, on the face, to the 3-D edge:
        how far the file's trim and edge disagree. 0 when not known.
    """

    face: int
    uv: np.ndarray
    offset: float = 0.0

    def __post_init__(self):
        object.__setattr__(self, "uv", _frozen(self.uv, (2,)))


@dataclass(frozen=True, eq=False)
class Edge:
    """A topological edge of the model, as the file's shared-edge topology gives it.

    Attributes
    ----------
    points : ndarray of shape (n, 3)
        The 3-D edge as a polyline in mm.
    uses : tuple of EdgeUse
        One use per face bounded by the edge: two for a seam, one for a free
        edge (more for a non-manifold edge).
    tolerance : float
        The file's own tolerance of the edge (mm), 0 when it gives none.
    """

    points: np.ndarray
    uses: tuple[EdgeUse, ...] = ()
    tolerance: float = 0.0

    def __post_init__(self):
        object.__setattr__(self, "points", _frozen(self.points, (3,)))
        object.__setattr__(self, "uses", tuple(self.uses))

    @property
    def faces(self) -> tuple[int, ...]:
        return tuple(use.face for use in self.uses)

    @property
    def length(self) -> float:
        return float(np.linalg.norm(np.diff(self.points, axis=0), axis=1).sum())


@dataclass(frozen=True)
class SkippedFace:
    """A face of the file that is not in the model, and why.

    Attributes
    ----------
    place : int or None
        Its 1-based place among the file's faces, None when the kernel never
        built it (only the count is known).
    name : str
    reason : str
    """

    place: int | None
    name: str
    reason: str

    def as_dict(self) -> dict:
        return {"place": self.place, "name": self.name, "reason": self.reason}


@dataclass(frozen=True, eq=False)
class Model:
    """A loaded design model.

    Attributes
    ----------
    faces : tuple of Face
    edges : tuple of Edge
        Shared-edge topology read from the file; empty when the file has none
        (the seam analysis then matches boundaries geometrically).
    source : str
        Path of the file it was read from.
    sha256 : str
        Hex digest of the file's bytes.
    units : str
        Always ``"mm"`` once read (readers convert).
    source_units : str
        The unit the file declared.
    warnings : tuple of str
        What the reader skipped or repaired, face by face.
    skipped : tuple of SkippedFace
        Faces of the file left out, each with its reason:
        ``faces_in_file == len(faces) + len(skipped)``.
    """

    faces: tuple[Face, ...]
    edges: tuple[Edge, ...] = ()
    source: str = ""
    sha256: str = ""
    units: str = "mm"
    source_units: str = "mm"
    warnings: tuple[str, ...] = field(default_factory=tuple)
    skipped: tuple[SkippedFace, ...] = field(default_factory=tuple)

    def __post_init__(self):
        object.__setattr__(self, "faces", tuple(self.faces))
        object.__setattr__(self, "edges", tuple(self.edges))
        object.__setattr__(self, "warnings", tuple(self.warnings))
        object.__setattr__(self, "skipped", tuple(self.skipped))

    @property
    def faces_in_file(self) -> int:
        """Faces the file holds: those analysed plus those skipped."""
        return len(self.faces) + len(self.skipped)

    def face_account(self) -> dict:
        """Every face of the file accounted for, as plain data (JSON, reports, the window)."""
        return {
            "in_file": self.faces_in_file,
            "analysed": len(self.faces),
            "skipped": [s.as_dict() for s in self.skipped],
        }

    @cached_property
    def bounds(self) -> np.ndarray:
        """Axis-aligned box of the control nets, shape (2, 3): min and max corner (read-only).

        The convex-hull property (The NURBS Book, P4.9) makes this a box that
        holds every face. Computed once: the seam search asks for it per edge.
        """
        if not self.faces:
            box = np.zeros((2, 3))
        else:
            pts = np.concatenate([f.surface.poles.reshape(-1, 3) for f in self.faces])
            box = np.stack([pts.min(axis=0), pts.max(axis=0)])
        box.setflags(write=False)
        return box

    @property
    def size(self) -> float:
        """Diagonal of :attr:`bounds` in mm."""
        lo, hi = self.bounds
        return float(np.linalg.norm(hi - lo))
