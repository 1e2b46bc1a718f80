"""The window's review loop: the review file beside the model and a comparison with an earlier revision.

Plain Python, no Qt. :class:`ReviewLoop` keeps the review file's dispositions,
the reviewer's name and, after "Compare with...", the comparison and the
signed deviation on the window's own sample grid (the "deviation" display
mode). Each finding the window lists is known by the same identity the check
uses (:mod:`app.review.identity`), so a decision made here applies to
``batten check --review`` on the same file.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from dataclasses import dataclass
from datetime import date

import numpy as np

from app.review.identity import FindingKey, midpoint
from app.review.review_file import Disposition, ReviewFile, dumps, read_review_file

from .results import FaceSamples, FindingEntry

REVIEW_SUFFIX = ".review"
# Window samples measured exactly for the deviation map; beyond this a coarser grid is measured and
# interpolated in (u, v) (the map is a picture; the numbers come from the comparison itself).
DEVIATION_MAP_SAMPLES = 60_000


def review_path_for(model_path: str) -> str:
    """The review file that goes with a model: same folder and stem, ``.review``."""
    return os.path.splitext(model_path)[0] + REVIEW_SUFFIX


@dataclass(frozen=True, eq=False)
class DeviationMap:
    """Signed deviation of the model on screen from an earlier revision, per face on the window's grid.

    Attributes
    ----------
    fields : tuple of ndarray of shape (a, b)
        mm, NaN outside the trim; positive on the side the earlier revision's normal points to.
    reach : float
        Largest |deviation| (mm), for a symmetric colour range.
    old_source : str
    """

    fields: tuple[np.ndarray, ...]
    reach: float
    old_source: str


def _midpoint(points: np.ndarray) -> np.ndarray:
    return np.asarray(midpoint(points), float)


def finding_key(session, finding: FindingEntry) -> FindingKey | None:
    """The check's identity of a finding the window lists, or None for notes the check does not judge.

    Seams: the two faces' names and the midpoint of the seam's line; section
    curves judged for inflections: the faces the curve crosses and its first
    inflection (the curve's middle when it has none).
    """
    loaded = session.loaded
    if loaded is None or finding.verdict == "note" or len(finding.path) == 0:
        return None
    middle = _midpoint(finding.path)
    if finding.kind == "seam" and loaded.seam_review is not None:
        review = loaded.seam_review
        for seam, line in zip(review.seams, review.lines, strict=False):
            points = np.asarray(line.points, float)
            if points.shape == finding.path.shape and np.allclose(_midpoint(points), middle):
                return FindingKey("seam", tuple(sorted(seam.face_names)), tuple(float(x) for x in middle))
    if finding.kind == "inflection":
        for curve in session.sections:
            if curve.points.shape == finding.path.shape and np.allclose(curve.points, finding.path):
                names = tuple(sorted({session.face_label(int(f)) for f in np.unique(curve.faces)}))
                marks = curve.inflections.points
                anchor = marks[0] if len(marks) else curve.points[len(curve.points) // 2]
                return FindingKey("inflection", names, tuple(float(x) for x in anchor))
    return None


class ReviewLoop:
    """Dispositions and comparison of the session's model.

    Attributes
    ----------
    path : str or None
        The review file decisions are saved to (None: none chosen yet).
    file : ReviewFile
    reviewer : str
        Name written with each decision.
    comparison : app.review.comparison.Comparison or None
    deviation : DeviationMap or None
    """

    def __init__(self):
        self.path: str | None = None
        self.file = ReviewFile()
        self.reviewer = ""
        self.comparison = None
        self.deviation: DeviationMap | None = None

    def forget_model(self) -> None:
        """A new model: its own review file and no comparison."""
        self.path, self.file = None, ReviewFile()
        self.comparison, self.deviation = None, None

    def open(self, path: str) -> None:
        """Use the review file at ``path``; a file that does not exist yet starts empty.

        Raises
        ------
        BattenError
            A file that exists but is not a well-formed review file.
        """
        self.file = read_review_file(path) if os.path.exists(path) else ReviewFile(source=path)
        self.path = path

    def decisions_on(self, key: FindingKey | None, tolerance: float | None = None) -> list[Disposition]:
        """Dispositions of the file recorded for this finding (same kind and faces, within the place tolerance)."""
        if key is None:
            return []
        reach = self.file.place_tolerance_mm if tolerance is None else tolerance
        return [d for d in self.file.dispositions if d.key.same_subject(key) and d.key.distance(key) <= reach]

    def decide(
        self,
        key: FindingKey,
        decision: str,
        reason: str = "",
        measure: str = "",
        value: float | None = None,
        write: Callable[[str, str], object] | None = None,
    ) -> Disposition:
        """Record the reviewer's decision on a finding and save the review file at once.

        ``write(path, text)`` saves the file; the window passes the report
        layer's atomic writer (this layer sits below it).

        Raises
        ------
        BattenError
            No reviewer name, no reason for an acceptance, or the file cannot be written.
        """
        from app.review.review_file import ACCEPTED
        from geometry.errors import BattenError

        if not self.reviewer.strip():
            raise BattenError("enter the reviewer's name first")
        if decision == ACCEPTED and not reason.strip():
            raise BattenError("an accepted finding needs a reason")
        if self.path is None:
            raise BattenError("choose a review file first")
        # Replace this reviewer's earlier decision on the same finding, even where it was recorded a little apart.
        earlier = [d for d in self.decisions_on(key) if d.reviewer == self.reviewer.strip()]
        file = self.file
        for d in earlier:
            file = ReviewFile(tuple(x for x in file.dispositions if x is not d), file.place_tolerance_mm, file.source)
        made = Disposition(
            key, decision, self.reviewer.strip(), date.today().isoformat(), reason.strip(), measure, value
        )
        file = file.with_disposition(made)
        if write is None:
            raise BattenError("no writer for the review file")
        write(self.path, dumps(file))
        self.file = read_review_file(self.path)  # what is on disk is what counts
        return made


def deviation_map(old_model, samples: tuple[FaceSamples, ...], old_source: str) -> DeviationMap:
    """Signed deviation of every window sample from ``old_model`` (one batched inversion for all faces).

    Parameters
    ----------
    old_model : Model
    samples : tuple of FaceSamples
        The window's grids of the model on screen.
    old_source : str

    Returns
    -------
    DeviationMap
    """
    from geometry.compare import ReferenceModel

    total = sum(int(s.inside.sum()) for s in samples)
    stride = max(1, int(np.ceil(np.sqrt(total / DEVIATION_MAP_SAMPLES))))
    coarse = []
    for s in samples:
        iu = np.unique(np.r_[np.arange(0, len(s.u), stride), len(s.u) - 1])
        iv = np.unique(np.r_[np.arange(0, len(s.v), stride), len(s.v) - 1])
        coarse.append((iu, iv, s.field.points[np.ix_(iu, iv)]))
    points = np.concatenate([c[2].reshape(-1, 3) for c in coarse]) if coarse else np.zeros((0, 3))
    signed = ReferenceModel(old_model).signed_distances(points).signed
    sizes = np.cumsum([c[2].shape[0] * c[2].shape[1] for c in coarse])[:-1]
    fields = []
    for s, (iu, iv, pts), values in zip(samples, coarse, np.split(signed, sizes), strict=True):
        grid = values.reshape(pts.shape[:2])
        fields.append(np.where(s.inside, _fill(s, iu, iv, grid), np.nan))
    finite = [np.abs(f[np.isfinite(f)]) for f in fields]
    reach = max([1e-6, *(float(f.max()) for f in finite if f.size)])
    return DeviationMap(tuple(fields), reach, old_source)


def _fill(s: FaceSamples, iu: np.ndarray, iv: np.ndarray, grid: np.ndarray) -> np.ndarray:
    """Values on the face's full grid from those on the sub-grid (iu, iv): bilinear in (u, v)."""
    if len(iu) == len(s.u) and len(iv) == len(s.v):
        return grid
    from scipy.interpolate import RegularGridInterpolator

    uu, vv = np.meshgrid(s.u, s.v, indexing="ij")
    if len(iu) < 2 or len(iv) < 2:
        return np.full(uu.shape, float(np.nanmean(grid)))
    interp = RegularGridInterpolator((s.u[iu], s.v[iv]), grid, bounds_error=False, fill_value=None)
    return interp(np.stack([uu, vv], axis=-1))


def judged_value(session, key: FindingKey) -> tuple[str, float | None]:
    """The measure and value the check gives the finding with this identity (what the reviewer saw)."""
    from app.review import findings as review

    from .review_findings import cut_sections

    loaded = session.loaded
    if loaded is None or loaded.seam_review is None:
        return "", None
    seams = loaded.seam_review
    cut = cut_sections(session.sections, session.section_places)
    flat = {pair: n for n, pair in enumerate(session.section_places)}
    for f in review.collect(seams.seams, cut, session.profile):
        if f.kind == "seam" and key.kind == "seam":
            seam = seams.seams[f.ref["seam"]]
            here = midpoint(seams.lines[f.ref["seam"]].points)
            same_faces = tuple(sorted(seam.face_names)) == key.faces
            if same_faces and key.distance(FindingKey("seam", key.faces, here)) < 1e-6:
                return f.measure, f.value
        elif f.kind == "inflection" and key.kind == "inflection":
            curve = session.sections[flat[f.ref["section"], f.ref["curve"]]]
            marks = curve.inflections.points
            anchor = marks[0] if len(marks) else curve.points[len(curve.points) // 2]
            if key.distance(FindingKey("inflection", key.faces, tuple(anchor))) < 1e-6:
                return f.measure, f.value
    return "", None


def decide(session, finding: FindingEntry, decision: str, reason: str = "", write=None) -> Disposition | None:
    """Record a decision on a finding the window lists and save the review file; None for a note.

    Raises
    ------
    BattenError
        See :meth:`ReviewLoop.decide`.
    """
    key = finding_key(session, finding)
    if key is None:
        return None
    measure, value = judged_value(session, key)
    made = session.review.decide(key, decision, reason, measure, value, write)
    session.events.emit("review")
    return made


def open_review_file(session, path: str) -> None:
    """Use ``path`` as the session's review file (created on the first decision when it does not exist)."""
    session.review.open(path)
    session.events.emit("review")


def comparison_for(model, samples, settings, old_path: str, progress=None):
    """Compare ``model`` with an earlier revision read from ``old_path``; nothing of a session is touched.

    Runs :func:`app.review.comparison.compare_models` (the same code as
    ``batten compare``) and maps the deviation on the window's grid. Reads
    only immutable inputs, so a worker thread may run it.

    Parameters
    ----------
    model : Model
        The later revision (on screen).
    samples : tuple of FaceSamples
        Its sample grids (the deviation is mapped on them).
    settings : ReviewSettings
    old_path : str
    progress : callable(str), optional

    Returns
    -------
    (Comparison, DeviationMap)

    Raises
    ------
    BattenError
        The file cannot be read.
    """
    from app.review.comparison import compare_models
    from app.review.runner import load_for_review

    say = progress or (lambda _: None)
    old_model = load_for_review(old_path)
    comparison = compare_models(old_model, model, settings, say)
    say("mapping the deviation")
    return comparison, deviation_map(old_model, samples, old_path)


def show_comparison(session, comparison, deviation) -> None:
    """Make a comparison of the model on screen current (see :func:`comparison_for`)."""
    session.review.comparison = comparison
    session.review.deviation = deviation
    session.events.emit("review", "display")


def compare_with(session, old_path: str, progress=None):
    """Compare the model on screen with an earlier revision read from ``old_path`` and show it.

    Raises
    ------
    BattenError
        The file cannot be read, or there is no model on screen.
    """
    from geometry.errors import BattenError

    if session.model is None:
        raise BattenError("open the later revision first, then compare it with an earlier one")
    comparison, deviation = comparison_for(session.model, session.samples, session.review_settings, old_path, progress)
    show_comparison(session, comparison, deviation)
    return comparison


def decision_mark(session, finding: FindingEntry) -> str:
    """`` [accepted: Ada Example]`` / `` [to fix: ...]`` after a finding's title, or ""."""
    decisions = session.review.decisions_on(finding_key(session, finding)) if session.review.file.dispositions else []
    if not decisions:
        return ""
    return " [" + "; ".join(f"{d.decision}: {d.reviewer}" for d in decisions) + "]"
