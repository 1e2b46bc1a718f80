"""What the session computed: sampled faces, section curves, findings. Frozen, read-only arrays."""

from __future__ import annotations

from dataclasses import dataclass, field, fields

import numpy as np

from app.review.result import Kind, Verdict
from geometry.model import Model
from geometry.nurbs import CurvatureField
from geometry.sections import SectionEngine

from .settings import Measure


def _freeze(obj) -> None:
    for f in fields(obj):
        value = getattr(obj, f.name)
        if isinstance(value, np.ndarray):
            value.setflags(write=False)


@dataclass(frozen=True, eq=False)
class FaceSamples:
    """One face on a (u, v) grid, with its trim.

    Attributes
    ----------
    face : int
        Index in ``Model.faces``.
    u : ndarray of shape (a,)
    v : ndarray of shape (b,)
    inside : ndarray of bool, shape (a, b)
        Samples on the face (inside the trim loops).
    field : CurvatureField
        Arrays of shape (a, b) or (a, b, 3).
    """

    face: int
    u: np.ndarray
    v: np.ndarray
    inside: np.ndarray
    field: CurvatureField

    def __post_init__(self):
        _freeze(self)


def measure_values(field: CurvatureField, measure: Measure) -> np.ndarray:
    """The colour-map quantity on a field's samples, shape of ``field.k1``.

    The minimum radius is 1 / max(|k1|, |k2|): infinite on a flat sample.
    """
    if measure == Measure.GAUSSIAN:
        return field.gaussian
    if measure == Measure.MEAN:
        return field.mean
    if measure == Measure.K1:
        return field.k1
    if measure == Measure.K2:
        return field.k2
    size = field.max_abs
    if measure == Measure.MAX_ABS:
        return size
    with np.errstate(divide="ignore"):
        return np.where(size > 0, 1.0 / np.where(size > 0, size, 1.0), np.inf)


@dataclass(frozen=True, eq=False)
class FindingEntry:
    """One entry of the window's findings list: a check's finding, or a note, placed on the model.

    Attributes
    ----------
    kind : app.review.Kind
    title : str
        One line for the list.
    verdict : app.review.Verdict
    position : ndarray of shape (3,)
        Where the camera goes.
    extent : float
        Size of the neighbourhood to show (mm).
    detail : str
        Longer text (tooltip).
    path : ndarray of shape (n, 3)
        The seam or edge polyline, or the point alone.
    place : str
        Where it is, for grouping: the face (or the faces of a seam), or the section curve.
    """

    kind: Kind
    title: str
    verdict: Verdict
    position: np.ndarray
    extent: float = 10.0
    detail: str = ""
    path: np.ndarray = field(default_factory=lambda: np.zeros((0, 3)))
    place: str = ""

    def __post_init__(self):
        object.__setattr__(self, "position", np.asarray(self.position, float).reshape(3))
        object.__setattr__(self, "path", np.asarray(self.path, float).reshape(-1, 3))
        _freeze(self)


@dataclass(frozen=True, eq=False)
class SeamView:
    """A seam or free edge coloured by verdict in the view.

    Attributes
    ----------
    points : ndarray of shape (n, 3)
    verdict : str
        "fail", "pass", or "free" for a free edge.
    label : str
    """

    points: np.ndarray
    verdict: str
    label: str = ""

    def __post_init__(self):
        _freeze(self)


@dataclass(frozen=True, eq=False)
class Loaded:
    """Everything read and sampled for one model, built off the GUI thread.

    Attributes
    ----------
    model : Model
    samples : tuple of FaceSamples
    seams : tuple of SeamView
    seam_review : app.state.review_findings.SeamReview or None
        The seams and free edges as the check measures them, under the profile
        they were measured with; None until measured.
    curvature_scale : float
        Typical |k| of the model (1/mm), the reference of the comb scale.
    engine : geometry.sections.engine.SectionEngine
        Cached section grids of the model.
    seams_measured : bool
        False until the seam analysis has run.
    """

    model: Model
    samples: tuple[FaceSamples, ...]
    seams: tuple[SeamView, ...] = ()
    seam_review: object = None
    curvature_scale: float = 0.0
    engine: SectionEngine | None = None
    seams_measured: bool = True
