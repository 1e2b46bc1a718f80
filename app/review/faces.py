"""Per-face description and curvature ranges for a check.

Curvature comes from :func:`geometry.curvature_on_grid` on each face's
trim-aware sample grid; only samples inside the trim with a regular tangent
plane count towards the ranges.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from geometry import curvature_on_grid
from geometry.model import Face, Model
from geometry.sampling import model_grids

# Samples over the whole model for the curvature ranges (the sampler spreads them by size and bending).
SAMPLE_BUDGET = 300_000
# |k| below this (1/mm) counts as flat: no finite minimum radius. A 1 km radius.
FLAT_CURVATURE = 1e-6


@dataclass(frozen=True)
class CurvatureRange:
    """Extreme values of the curvature quantities over the samples of one face.

    All in 1/mm (``gaussian`` in 1/mm^2); ``min_radius`` in mm, ``None`` when
    the face is flat everywhere.
    """

    k1: tuple[float, float]
    k2: tuple[float, float]
    gaussian: tuple[float, float]
    mean: tuple[float, float]
    max_abs: float
    min_radius: float | None
    samples: int

    def to_dict(self) -> dict:
        return {
            "k1": list(self.k1),
            "k2": list(self.k2),
            "gaussian": list(self.gaussian),
            "mean": list(self.mean),
            "max_abs": self.max_abs,
            "min_radius": self.min_radius,
            "samples": self.samples,
        }


@dataclass(frozen=True)
class FaceSummary:
    """What a report says about one face."""

    id: int
    name: str
    body: str
    degrees: tuple[int, int]
    poles: tuple[int, int]
    rational: bool
    trimmed: bool
    reversed: bool
    curvature: CurvatureRange | None

    def to_dict(self) -> dict:
        return {
            "id": self.id,
            "name": self.name,
            "body": self.body,
            "degrees": list(self.degrees),
            "poles": list(self.poles),
            "rational": self.rational,
            "trimmed": self.trimmed,
            "reversed": self.reversed,
            "curvature": None if self.curvature is None else self.curvature.to_dict(),
        }


def face_grids(model: Model, budget: int = SAMPLE_BUDGET) -> list[tuple[np.ndarray, np.ndarray, np.ndarray]]:
    """Sample parameters of every face and which of them lie inside its trim.

    The trim-aware sampler :func:`geometry.sampling.model_grids` shares ``budget``
    samples out over the faces.

    Returns
    -------
    list of (u, v, inside)
        Per face: ``u`` of shape (a,), ``v`` of shape (b,), ``inside`` bool of shape (a, b).
    """
    return [(g.u, g.v, g.inside) for g in model_grids(model, budget)]


def _span(values: np.ndarray) -> tuple[float, float]:
    return float(values.min()), float(values.max())


def curvature_range(face: Face, u: np.ndarray, v: np.ndarray, inside: np.ndarray) -> CurvatureRange | None:
    """Curvature extremes of a face over its inside samples.

    Parameters
    ----------
    face : Face
    u : ndarray of shape (a,)
    v : ndarray of shape (b,)
    inside : ndarray of bool, shape (a, b)

    Returns
    -------
    CurvatureRange or None
        ``None`` when no inside sample has a regular tangent plane.
    """
    field = curvature_on_grid(face.surface, u, v, reversed=face.reversed, workers=1)
    keep = inside & field.valid & np.isfinite(field.k1) & np.isfinite(field.k2)
    if not keep.any():
        return None
    max_abs = float(field.max_abs[keep].max())
    return CurvatureRange(
        k1=_span(field.k1[keep]),
        k2=_span(field.k2[keep]),
        gaussian=_span(field.gaussian[keep]),
        mean=_span(field.mean[keep]),
        max_abs=max_abs,
        min_radius=None if max_abs < FLAT_CURVATURE else 1.0 / max_abs,
        samples=int(keep.sum()),
    )


def summarise_faces(model: Model) -> tuple[FaceSummary, ...]:
    """Description and curvature range of every face, in the model's order."""
    out = []
    for index, (face, (u, v, inside)) in enumerate(zip(model.faces, face_grids(model), strict=True)):
        s = face.surface
        out.append(
            FaceSummary(
                id=index,
                name=face.name,
                body=face.body,
                degrees=(s.degree_u, s.degree_v),
                poles=(int(s.shape[0]), int(s.shape[1])),
                rational=s.is_rational,
                trimmed=face.is_trimmed,
                reversed=face.reversed,
                curvature=curvature_range(face, u, v, inside),
            )
        )
    return tuple(out)
