"""Seams and free edges of a model as the check's plain dicts, and their lines for the pictures."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from app.profiles import Profile
from geometry.model import Model


@dataclass(frozen=True, eq=False)
class Line:
    """A polyline to draw in the pictures: a seam or a free edge (never in the JSON)."""

    kind: str  # "seam" or "free_edge"
    verdict: str
    points: np.ndarray


def seams_and_free_edges(model: Model, profile: Profile, progress=None):
    """Seams and free edges measured by :func:`geometry.seams.check.check_seams` under ``profile``.

    Returns
    -------
    seams, free_edges : tuple of dict
        ``SeamResult.as_dict()`` with ``id`` and ``face_names`` added; the free
        edges of ``SeamReport.as_dict()`` with ``id`` and ``face_name``.
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
    seams = []
    lines = []
    for i, seam in enumerate(report.seams):
        entry = {"id": i, "face_names": [names[f] for f in seam.faces], **seam.as_dict()}
        seams.append(entry)
        lines.append(Line("seam", seam.verdict, np.asarray(seam.points)))
    free = []
    for i, (edge, entry) in enumerate(zip(report.free_edges, report.as_dict()["free_edges"], strict=True)):
        free.append({"id": i, "face_name": names[edge.face], **entry})
        lines.append(Line("free_edge", "", np.asarray(edge.points)))
    return tuple(seams), tuple(free), tuple(lines), report.warnings
