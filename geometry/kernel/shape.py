"""What the CAD kernel's helper process hands back: faces and edges before their trims are on the NURBS.

Plain arrays and dataclasses, pickled across the pipe. Trims and edge uses are
still in each input face's own (u, v), with the input surface's 3-D point at
every sample, and surfaces are plain arrays; the owner builds the surfaces and
inverts every point onto them in one compiled call
(:func:`geometry.io.carry.on_nurbs`). So the helper imports nothing but the CAD
kernel and numpy: neither the compiled kernels nor the rest of ``geometry``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import NamedTuple

import numpy as np


class SurfaceArrays(NamedTuple):
    """A NURBS surface as arrays, in the order :class:`geometry.nurbs.surface.NurbsSurface` takes them.

    Attributes
    ----------
    degree_u, degree_v : int
    knots_u : ndarray of shape (nu + degree_u + 1,)
    knots_v : ndarray of shape (nv + degree_v + 1,)
    poles : ndarray of shape (nu, nv, 3)
    weights : ndarray of shape (nu, nv) or None
    """

    degree_u: int
    degree_v: int
    knots_u: np.ndarray
    knots_v: np.ndarray
    poles: np.ndarray
    weights: np.ndarray | None


class Skipped(NamedTuple):
    """A face of the file left out, and why (:class:`geometry.model.topology.SkippedFace` in the owner)."""

    place: int | None
    name: str
    reason: str


@dataclass
class KernelFace:
    """One kept input face.

    Attributes
    ----------
    place : int
        Its 1-based place among the file's faces.
    surface : SurfaceArrays
        Its exact NURBS, placed (the owner builds the surface).
    same_parameters : bool
        The NURBS keeps the input face's (u, v) (B-spline surfaces, planes):
        nothing to invert.
    reversed : bool
    name, body, label : str
        Name in the file, the body it belongs to, and how warnings name it.
    loops : list of (ndarray of shape (n, 2), ndarray of shape (n, 3))
        Trim polylines on the input face, outer first, with the input
        surface's points there; empty: untrimmed.
    """

    place: int
    surface: SurfaceArrays
    same_parameters: bool
    reversed: bool
    name: str
    body: str
    label: str
    loops: list[tuple[np.ndarray, np.ndarray]] = field(default_factory=list)


@dataclass
class KernelUse:
    """One face side of an edge: ``face`` indexes the kept faces; ``uv`` (n, 2) on the input face, ``points`` (n, 3)."""

    face: int
    uv: np.ndarray
    points: np.ndarray


@dataclass
class KernelEdge:
    """An edge's 3-D polyline, shape (n, 3), its uses sampled at the same parameters, and its tolerance."""

    points: np.ndarray
    uses: tuple[KernelUse, ...]
    tolerance: float


@dataclass
class KernelShape:
    """What a reader got out of one shape, before its trims are on the NURBS."""

    faces: list[KernelFace] = field(default_factory=list)
    edges: list[KernelEdge] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    n_input_faces: int = 0
    skipped: list[Skipped] = field(default_factory=list)

    def compare_with_file(self, listed: int) -> None:
        """Warn when the file lists more faces than the kernel built (the rest were unreadable)."""
        if listed > self.n_input_faces:
            lost = listed - self.n_input_faces
            self.warnings.insert(
                0, f"{lost} of the {listed} faces the file lists could not be built by the kernel and are left out"
            )
            self.skipped.extend(Skipped(None, "", "not built by the kernel") for _ in range(lost))
            self.n_input_faces = listed
