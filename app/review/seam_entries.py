"""Seams and free edges of a model, typed, as the check and the window judge them; their lines for the pictures.

The entries are plain typed results (:class:`SeamEntry`, :class:`FreeEdgeEntry`);
their ``as_dict`` is the JSON form, made only where a result is written or cached.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from app.profiles import Profile
from geometry.model import Model

if TYPE_CHECKING:  # for the annotations only: scipy.spatial behind it costs ~0.3 s at start-up
    from geometry.seams import FreeEdge, SeamResult


@dataclass(frozen=True, eq=False)
class Line:
    """A polyline to draw in the pictures: a seam or a free edge (never in the JSON)."""

    kind: str  # "seam" or "free_edge"
    verdict: str
    points: np.ndarray


@dataclass(frozen=True, eq=False)
class SeamEntry:
    """One measured seam with its number and the names of its faces.

    Attributes
    ----------
    id : int
        From 0, in the order of the check.
    face_names : tuple of str
        Side a's and side b's face names (``face N`` for an unnamed face).
    result : geometry.seams.SeamResult
    """

    id: int
    face_names: tuple[str, ...]
    result: SeamResult

    def as_dict(self) -> dict:
        """The ``seams`` entry of the check's JSON."""
        return {"id": self.id, "face_names": list(self.face_names), **self.result.as_dict()}


@dataclass(frozen=True, eq=False)
class FreeEdgeEntry:
    """One free edge with its number and its face's name.

    Attributes
    ----------
    id : int
    face_name : str
    edge : geometry.seams.FreeEdge
    """

    id: int
    face_name: str
    edge: FreeEdge

    @property
    def length(self) -> float:
        return self.edge.length

    def as_dict(self) -> dict:
        """The ``free_edges`` entry of the check's JSON."""
        return {"id": self.id, "face_name": self.face_name, **self.edge.as_dict()}


def seams_and_free_edges(model: Model, profile: Profile, progress=None):
    """Seams and free edges measured by :func:`geometry.seams.check_seams` under ``profile``.

    Returns
    -------
    seams : tuple of SeamEntry
    free_edges : tuple of FreeEdgeEntry
    lines : tuple of Line
        Seams first (in ``seams`` order), then free edges.
    warnings : tuple of str
        What the seam check says about the data (``SeamReport.warnings``).

    ``progress(done, total)`` is called as seams are measured.
    """
    # Imported here: scipy.spatial behind it costs ~0.3 s, and app.review is imported for `batten --help`.
    from geometry.seams import check_seams

    report = check_seams(model, profile.tolerance, progress=progress)
    names = [f.name or f"face {i}" for i, f in enumerate(model.faces)]
    seams = tuple(SeamEntry(i, tuple(names[f] for f in seam.faces), seam) for i, seam in enumerate(report.seams))
    free = tuple(FreeEdgeEntry(i, names[edge.face], edge) for i, edge in enumerate(report.free_edges))
    lines = [Line("seam", s.verdict, np.asarray(s.points)) for s in report.seams]
    lines += [Line("free_edge", "", np.asarray(e.points)) for e in report.free_edges]
    return seams, free, tuple(lines), report.warnings
