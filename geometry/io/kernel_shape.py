"""What the CAD kernel's helper process hands back: faces and edges before their trims are on the NURBS.

Plain arrays and dataclasses, pickled across the pipe. Trims and edge uses are
still in each input face's own (u, v), with the input surface's 3-D point at
every sample; the owner inverts them all onto the NURBS in one compiled call
(:func:`geometry.io.carry.on_nurbs`), so the helper never starts the compiled
kernels (about a second of its start-up).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..model.topology import SkippedFace
from ..nurbs.surface import NurbsSurface


@dataclass
class KernelFace:
    """One kept input face.

    Attributes
    ----------
    surface : NurbsSurface
        Its exact NURBS, placed.
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

    surface: NurbsSurface
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
    offset: float


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
    skipped: list[SkippedFace] = field(default_factory=list)

    def compare_with_file(self, listed: int) -> None:
        """Warn when the file lists more faces than the kernel built (the rest were unreadable)."""
        if listed > self.n_input_faces:
            lost = listed - self.n_input_faces
            self.warnings.insert(
                0, f"{lost} of the {listed} faces the file lists could not be built by the kernel and are left out"
            )
            self.skipped.extend(SkippedFace(None, "", "not built by the kernel") for _ in range(lost))
            self.n_input_faces = listed
