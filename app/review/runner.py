"""Run every analysis of a check on one model: no Qt, no window.

The command line (``batten check``) and the window's "Export report" both
come here, so a report written from the window and one written by a release
pipeline say the same about the same model and settings.
"""

from __future__ import annotations

import hashlib
import os
import stat
from collections.abc import Callable
from dataclasses import dataclass, replace
from pathlib import Path

from app.profiles import get_profile
from geometry.errors import BattenError, ReadError
from geometry.io import ReadBudget, read_model
from geometry.model import Model

from . import findings
from .dispositions import apply_review
from .faces import summarise_faces
from .result import UNREADABLE, FileReview
from .seam_entries import seams_and_free_edges
from .section_entries import CutSections, cut_sections
from .spec import DEFAULT_SPEC, PlaneItem, planes_for, section_items, spec_text
from .tooling_entries import pull_in_force, run_tooling, tooling_entry, tooling_findings

Progress = Callable[[str], None]


@dataclass(frozen=True)
class ReviewSettings:
    """What a check is run with.

    Attributes
    ----------
    profile : str or None
        Name of a shipped tolerance profile or path of a TOML file; None for
        the default profile.
    sections : str or tuple of PlaneItem
        A SPEC (see :mod:`app.review.spec`; the command line), or typed plane
        items (the window's planes, :func:`app.review.spec.plane_items`).
    pull : tuple of 3 float or None
        Pull direction for the tooling checks, overriding the profile's.
    review_text : str
        Text of a review file (:mod:`app.review.review_file`) whose
        dispositions apply; empty for none. The text, not the path, so a result
        cache keyed on the settings sees a changed review file.
    review_source : str
        Where that text came from, for messages and the report.
    read_budget : ReadBudget
        Time and memory limits of reading each file.
    """

    profile: str | None = None
    sections: str | tuple[PlaneItem, ...] = DEFAULT_SPEC
    pull: tuple[float, float, float] | None = None
    review_text: str = ""
    review_source: str = ""

    def review(self):
        """The parsed review file, or None without one (:class:`app.review.review_file.ReviewFile`)."""
        if not self.review_text:
            return None
        from .review_file import loads

        return loads(self.review_text, self.review_source)

    read_budget: ReadBudget = ReadBudget()


def _quiet(_: str) -> None:
    pass


def review_model(model: Model, settings: ReviewSettings = ReviewSettings(), progress: Progress = _quiet) -> FileReview:
    """Every analysis of a check on a loaded model.

    Parameters
    ----------
    model : Model
    settings : ReviewSettings
    progress : callable, optional
        Called with a short line before each stage.

    Returns
    -------
    FileReview

    Raises
    ------
    BattenError
        When the settings are wrong (unknown profile, bad SPEC).
    """
    name = Path(model.source).name or "model"
    profile = get_profile(settings.profile)
    items = section_items(settings.sections)
    progress(f"{name}: curvature of {len(model.faces)} faces")
    faces = summarise_faces(model)
    progress(f"{name}: seams and free edges")
    seams, free_edges, lines, seam_warnings = seams_and_free_edges(
        model, profile, lambda done, total: progress(f"{name}: seams {done} of {total}")
    )
    planes = planes_for(items, model.bounds)
    sections, curves, places = (), (), ()
    if planes:
        progress(f"{name}: cutting {len(planes)} section plane(s)")
        sections, curves, places = cut_sections(model, planes)
    pull, pull_source = pull_in_force(profile, settings.pull)
    if pull is not None or profile.limit("cutter_radius_mm") is not None:
        progress(f"{name}: tooling checks" + (f" (pull {', '.join(f'{c:g}' for c in pull)})" if pull else ""))
    tooling = tooling_entry(model, run_tooling(model, profile, settings.pull), pull_source)
    cut = CutSections(tuple(s["label"] for s in sections), curves, places)
    found = findings.worst_first(
        [*findings.collect(seams, cut, profile, faces, model.skipped), *tooling_findings(tooling)]
    )
    review = FileReview(
        source=model.source,
        status="checked",
        sha256=model.sha256 or None,
        units=model.units,
        source_units=model.source_units,
        profile=profile.values,
        sections_spec=spec_text(settings.sections),  # the JSON form
        faces=faces,
        seams=tuple(s.as_dict() for s in seams),  # the JSON form: a FileReview is written and cached
        free_edges=tuple(e.as_dict() for e in free_edges),
        sections=sections,
        findings=found,
        warnings=(*model.warnings, *seam_warnings),
        model_size=model.size,
        face_account=model.face_account(),
        section_curves=curves,
        section_places=places,
        lines=lines,
        tooling=tooling,
    )
    dispositions = settings.review()
    return review if dispositions is None else apply_review(review, dispositions)


def file_sha256(path: str) -> str | None:
    """Hex sha256 of a regular file's bytes, or None when it is not one or cannot be opened."""
    digest = hashlib.sha256()
    try:
        if not stat.S_ISREG(os.stat(path).st_mode):  # /dev/zero would never end, a FIFO never start
            return None
        with open(path, "rb") as fh:
            for block in iter(lambda: fh.read(1 << 20), b""):
                digest.update(block)
    except OSError:
        return None
    return digest.hexdigest()


def review_file(
    path: str, settings: ReviewSettings = ReviewSettings(), progress: Progress = _quiet
) -> tuple[FileReview, Model | None]:
    """Read ``path`` and review it; a file that cannot be read gives an ``unreadable`` review.

    Returns
    -------
    review : FileReview
    model : Model or None
        None when the file could not be read.

    Raises
    ------
    BattenError
        Only for wrong settings (they concern every file alike).
    """
    progress(f"{Path(path).name}: reading")
    try:
        model = load_for_review(path, settings.read_budget)
    except ReadError as exc:
        return _unreadable(path, exc.reason), None
    return review_model(model, settings, progress), model


def load_for_review(path: str, budget: ReadBudget | None = None) -> Model:
    """Read a model to check: its source and digest filled in, at least one face.

    Raises
    ------
    ReadError
        Naming the file and the cause, for any file that cannot be checked.
    """
    try:
        model = read_model(path, budget)
    except ReadError:
        raise
    except BattenError as exc:
        raise ReadError(path, str(exc)) from None
    if not model.faces:
        raise ReadError(path, "the file holds no surfaces")
    if not model.source or not model.sha256:
        model = replace(model, source=model.source or str(path), sha256=model.sha256 or file_sha256(path) or "")
    return model


def _unreadable(path: str, reason: str) -> FileReview:
    return FileReview(source=str(path), status=UNREADABLE, error=reason, sha256=file_sha256(path))
