"""Per-face description and curvature ranges for a check.

Curvature comes from :func:`geometry.nurbs.curvature_on_grid` on each face's
trim-aware sample grid; only samples inside the trim with a regular tangent
plane count towards the ranges.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from geometry.model import Face, FaceGrid, Model, model_grids
from geometry.nurbs import CurvatureField, curvature_on_grid

# Samples over the whole model for the curvature ranges (the sampler spreads them by size and bending).
SAMPLE_BUDGET = 300_000
# |k| below this (1/mm) counts as flat: no finite minimum radius. A 1 km radius.
FLAT_CURVATURE = 1e-6


@dataclass(frozen=True)
class CurvatureRange:
    """Extreme values of the curvature quantities over the samples of one face.

    All in 1/mm (``gaussian`` in 1/mm^2); ``min_radius`` in mm, ``None`` when
    the face is flat everywhere; ``tightest`` is the (i, j) grid sample where
    ``max_abs`` is reached (not in the JSON).
    """

    k1: tuple[float, float]
    k2: tuple[float, float]
    gaussian: tuple[float, float]
    mean: tuple[float, float]
    max_abs: float
    min_radius: float | None
    samples: int
    tightest: tuple[int, int] = (0, 0)

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
    loops: int = 0
    problem: str = ""

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
            **({"problem": self.problem} if self.problem else {}),
        }


def face_fields(model: Model, budget: int = SAMPLE_BUDGET) -> list[tuple[FaceGrid, CurvatureField]]:
    """Every face's trim-aware sample grid and its exact curvature field on it.

    The window samples its faces with the same call (:func:`app.state.loading.sample_model`),
    so a face's ranges are the same wherever they are read.

    Parameters
    ----------
    model : Model
    budget : int
        Samples :func:`geometry.model.sampling.model_grids` shares out over the faces.

    Returns
    -------
    list of (FaceGrid, CurvatureField)
        Per face; field arrays of shape (a, b) or (a, b, 3).
    """
    return [
        (grid, curvature_on_grid(face.surface, grid.u, grid.v, reversed=face.reversed, workers=1))
        for face, grid in zip(model.faces, model_grids(model, budget), strict=True)
    ]


def _span(values: np.ndarray) -> tuple[float, float]:
    return float(values.min()), float(values.max())


def curvature_range(field: CurvatureField, inside: np.ndarray) -> CurvatureRange | None:
    """Curvature extremes of a face over its samples inside the trim with a regular tangent plane.

    The one face-range function: ``batten summary``, ``batten check``, the
    window's tightest-spot notes and the report all read it.

    Parameters
    ----------
    field : CurvatureField
        Arrays of shape (a, b).
    inside : ndarray of bool, shape (a, b)

    Returns
    -------
    CurvatureRange or None
        ``None`` when no inside sample has a regular tangent plane.
    """
    keep = inside & field.valid & np.isfinite(field.k1) & np.isfinite(field.k2)
    if not keep.any():
        return None
    size = np.where(keep, field.max_abs, -np.inf)
    tightest = np.unravel_index(int(np.argmax(size)), size.shape)
    max_abs = float(size[tightest])
    return CurvatureRange(
        k1=_span(field.k1[keep]),
        k2=_span(field.k2[keep]),
        gaussian=_span(field.gaussian[keep]),
        mean=_span(field.mean[keep]),
        max_abs=max_abs,
        min_radius=None if max_abs < FLAT_CURVATURE else 1.0 / max_abs,
        samples=int(keep.sum()),
        tightest=(int(tightest[0]), int(tightest[1])),
    )


def unevaluable_reason(face: Face) -> str:
    """Why no sample of a face has a regular tangent plane, in words (a degenerate control net or trim)."""
    poles = face.surface.poles.reshape(-1, 3)
    centred = poles - poles.mean(axis=0)
    scale = float(np.abs(poles).max()) or 1.0
    rank = int(np.linalg.matrix_rank(centred, tol=1e-12 * scale * len(poles)))
    if rank == 0:
        return "all control points coincide"
    if rank == 1:
        return "all control points lie on one line"
    return "no sample inside its trim has a regular tangent plane (degenerate surface or trim)"


def summarise_faces(model: Model, budget: int = SAMPLE_BUDGET) -> tuple[FaceSummary, ...]:
    """Description and curvature range of every face, in the model's order."""
    out = []
    for index, (face, (grid, field)) in enumerate(zip(model.faces, face_fields(model, budget), strict=True)):
        s = face.surface
        curve = curvature_range(field, grid.inside)
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
                curvature=curve,
                loops=len(face.loops),
                problem="" if curve is not None else unevaluable_reason(face),
            )
        )
    return tuple(out)
