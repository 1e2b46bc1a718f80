"""Reading, sampling and analysing a model for the window: one pure function, safe off the GUI thread.

The reader (:func:`geometry.io.read_model`), the trim-aware sampler
(:func:`geometry.model.sampling.model_grids`), the section engine and the seam
analysis are the core's; this file only strings them together with progress.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace

import numpy as np

from app.profiles import Profile, get_profile
from app.review.faces import SAMPLE_BUDGET as FACE_SAMPLES
from geometry.errors import BattenError, ReadError
from geometry.io import read_model
from geometry.model import FaceGrid, Model, model_grids
from geometry.nurbs import curvature_on_grid
from geometry.sections import SectionEngine

from .results import FaceSamples, Loaded
from .review_findings import review_seams

# Total samples the display grids of a model get (geometry.model.sampling shares them out): the
# check's own, so the window's face ranges and the check's are computed on the same samples.
SAMPLE_BUDGET = FACE_SAMPLES

Progress = Callable[[float, str], None]


def _no_progress(fraction: float, message: str) -> None:
    pass


def sample_face(model: Model, index: int, grid: FaceGrid) -> FaceSamples:
    """A face's curvature field on its grid; degenerate samples count as off the face."""
    face = model.faces[index]
    field = curvature_on_grid(face.surface, grid.u, grid.v, reversed=face.reversed, workers=1)
    return FaceSamples(index, np.asarray(grid.u), np.asarray(grid.v), grid.inside & field.valid, field)


def typical_curvature(samples: tuple[FaceSamples, ...]) -> float:
    """The 90th percentile of max |k| over all samples on faces (1/mm), 0 for a flat model."""
    values = np.concatenate([s.field.max_abs[s.inside] for s in samples]) if samples else np.zeros(0)
    values = values[np.isfinite(values)]
    return float(np.percentile(values, 90)) if values.size else 0.0


def sample_model(model: Model, progress: Progress = _no_progress) -> tuple[FaceSamples, ...]:
    """Every face's curvature field on its display grid (the window's and the report's samples).

    Raises
    ------
    ReadError
        A face that cannot be evaluated, named.
    """
    progress(0.3, "choosing samples")
    grids = model_grids(model, SAMPLE_BUDGET)
    samples = []
    for i, grid in enumerate(grids):
        progress(0.3 + 0.4 * i / len(grids), f"curvature of face {i + 1} of {len(grids)}")
        try:
            samples.append(sample_face(model, i, grid))
        except BattenError as exc:
            raise ReadError(model.source or "model", f"face {i + 1} cannot be evaluated: {exc}") from exc
    return tuple(samples)


def prepare(
    path: str | None = None,
    model: Model | None = None,
    progress: Progress = _no_progress,
    seams: bool = True,
    profile: Profile | None = None,
) -> Loaded:
    """Read (unless ``model`` is given), sample and analyse a model.

    Parameters
    ----------
    path : str, optional
    model : Model, optional
        An in-memory model (scripts, tests); ``path`` is then ignored.
    progress : callable(fraction, message)
    seams : bool
        Measure the seams too; the window leaves them to :func:`with_seams_judged`
        afterwards, so the model shows before the slowest analysis ends.
    profile : Profile, optional
        Tolerances the seams are judged against (default: the default profile).

    Raises
    ------
    BattenError
        Anything wrong with the file, with the file named.
    """
    if model is None:
        progress(0.0, f"reading {path}")
        model = read_model(path)
    name = model.source or str(path)
    if not model.faces:
        raise ReadError(name, "the model holds no faces")
    samples = sample_model(model, progress)
    progress(0.7, "preparing sections")
    engine = SectionEngine(model)
    loaded = Loaded(model, samples, curvature_scale=typical_curvature(samples), engine=engine, seams_measured=False)
    if seams:
        loaded = with_seams_judged(loaded, progress, profile)
    progress(1.0, "ready")
    return loaded


def with_seams_judged(loaded: Loaded, progress: Progress = _no_progress, profile: Profile | None = None) -> Loaded:
    """The same bundle with its seams and free edges measured against ``profile`` (default: the default profile).

    The measuring is the check's own (:func:`app.state.review_findings.review_seams`),
    so the window and ``batten check`` judge a seam alike.
    """
    progress(0.8, "measuring seams")

    def seams_done(done: int, total: int) -> None:
        progress(0.8 + 0.2 * done / max(total, 1), f"seams {done} of {total}")

    reviewed = review_seams(loaded.model, profile or get_profile(None), seams_done)
    return replace(loaded, seams=reviewed.views, seam_review=reviewed, seams_measured=True)
