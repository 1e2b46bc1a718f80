"""The inspection session: one loaded model, what the user chose to see, what was computed.

Plain Python, no Qt: the window shows this object and sends changes back
through its ``set_*`` methods; tests drive it directly. Every change announces
its topics (see :mod:`app.state.events`) after the state is consistent.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from dataclasses import replace

import numpy as np

from app.profiles import Profile, get_profile
from app.review import ReviewSettings, plane_items
from app.review.result import Kind, Verdict
from app.review.tooling_entries import run_tooling
from geometry.model import Model
from geometry.sections import CurvatureComb, SectionCurve
from geometry.tooling import unit_pull

from .colour_scale import FLAT_RADIUS_MM, one_sided_limits, signed_limits
from .events import Notifier
from .finding_groups import unique_titles
from .loading import Progress, prepare, with_seams_judged
from .recent import RecentFiles
from .results import FaceSamples, FindingEntry, Loaded, measure_values
from .review_findings import (
    curvature_extremes,
    curve_label,
    face_label,
    face_ranges,
    judged_findings,
    section_notes,
    unchecked_faces,
)
from .revisions import ReviewLoop, review_path_for
from .sectioning import comb_scale, combs_for, sections_for
from .settings import (
    MEASURE_UNITS,
    SIGNED_MEASURES,
    STEP_SHARE,
    ColourRange,
    DisplaySettings,
    Measure,
    Mode,
    SectionSettings,
    round_step,
)
from .stripes import Camera, stripe_parameters
from .tooling import starting_pull, suggested_pull, tooling_list

# Robust automatic colour range: ignore this share of samples at each end.
AUTO_PERCENTILE = 2.0
KIND_ORDER = (
    Kind.FACE,
    Kind.SEAM,
    Kind.FREE_EDGE,
    Kind.INFLECTION,
    Kind.SECTION_EXTREMUM,
    Kind.CURVATURE,
    Kind.DRAFT,
    Kind.UNDERCUT,
    Kind.CUTTER_REACH,
)
VERDICT_ORDER = (Verdict.FAIL, Verdict.NOTE, Verdict.PASS)


class Session:
    """State of one inspection window.

    Parameters
    ----------
    recent : RecentFiles, optional
        Where the recent-files list is kept (default: in memory only).
    profile : str, optional
        Tolerance profile: a shipped name or a TOML path (default: the default profile).

    Raises
    ------
    BattenError
        When ``profile`` names no profile or the file is bad.
    """

    def __init__(self, recent: RecentFiles | None = None, profile: str | None = None):
        self.events = Notifier()
        self.profile_choice: str | None = profile
        self.profile: Profile = get_profile(profile)
        self.loaded: Loaded | None = None
        self.path: str | None = None
        # the tooling view: computed when the draft mode is on, for this pull
        self.pull: tuple[float, float, float] = starting_pull(self.profile)
        self.tooling = None
        self.display = DisplaySettings()
        self.section = SectionSettings()
        self.sections: tuple[SectionCurve, ...] = ()
        self.section_places: tuple[tuple[int, int], ...] = ()  # (plane, curve) of each section curve
        self.combs: tuple[CurvatureComb, ...] = ()
        self.findings: tuple[FindingEntry, ...] = ()
        self.selection: int | None = None
        self.camera: Camera | None = None
        self.recent = recent or RecentFiles(None)
        self._face_extremes: list[FindingEntry] = []
        self._face_problems: list[FindingEntry] = []
        self.review = ReviewLoop()  # review file and comparison with an earlier revision
        self.loading: str | None = None  # the file being opened (its model not yet adopted)

    # -- what is loaded --------------------------------------------------
    @property
    def model(self) -> Model | None:
        return None if self.loaded is None else self.loaded.model

    @property
    def samples(self) -> tuple[FaceSamples, ...]:
        return () if self.loaded is None else self.loaded.samples

    def subscribe(self, topic: str, callback: Callable[[str], None]) -> Callable[[], None]:
        return self.events.subscribe(topic, callback)

    def open(self, path: str, progress: Progress | None = None) -> None:
        """Read, sample and show ``path``.

        Raises
        ------
        BattenError
            The file cannot be read; the model already shown stays as it was.
        """
        extra = {} if progress is None else {"progress": progress}
        loaded = prepare(path, profile=self.profile, **extra)
        self.adopt(loaded, path)

    def show_model(self, model: Model) -> None:
        """Show an in-memory model (scripts and tests)."""
        self.adopt(prepare(model=model, profile=self.profile), None)

    def begin_loading(self, path: str) -> None:
        """A file is being opened (off the GUI thread): the findings on record are the old model's."""
        self.loading = os.path.basename(str(path)) or str(path)
        self.events.emit("loading")

    def end_loading(self) -> None:
        """The opening failed: the model shown and its findings stand again."""
        self.loading = None
        self.events.emit("loading")

    def adopt(self, loaded: Loaded, path: str | None) -> None:
        """Make an already prepared model current (the window prepares it in a worker thread)."""
        self.loading = None
        self.loaded = loaded
        self.path = path
        # they depend on the samples alone: found once, not on every drag step of the plane
        ranges = face_ranges(loaded.samples)
        self._face_extremes = curvature_extremes(loaded.model, loaded.samples, ranges)
        self._face_problems = unchecked_faces(loaded.model, loaded.samples, ranges)
        lo, hi = loaded.model.bounds
        centre = tuple(float(x) for x in (lo + hi) / 2)
        spacing = max(loaded.model.size / 20, 1e-3)
        step = round_step(STEP_SHARE * loaded.model.size)
        self.section = replace(self.section, origin=centre, spacing=spacing, selected=0, nudge_step=step)
        self.selection = None
        if path is not None:
            self.recent.add(path)
        self._recompute_tooling()
        self._adopt_review_file(path)
        self._recompute_sections()
        self.events.emit("model", "section", "sections", "findings", "selection", "recent", "review", "loading")

    def _adopt_review_file(self, path: str | None) -> None:
        """A new model: no comparison; its review file (beside it) when there is a readable one."""
        from geometry.errors import BattenError

        reviewer = self.review.reviewer
        self.review.forget_model()
        self.review.reviewer = reviewer
        if path is not None:
            try:
                self.review.open(review_path_for(path))
            except BattenError:
                self.review.forget_model()  # a damaged file is not overwritten: the user picks one
                self.review.reviewer = reviewer

    def adopt_seams(self, loaded: Loaded) -> None:
        """The seam analysis of the current model finished (measured after it was shown)."""
        if self.loaded is None or loaded.model is not self.loaded.model:
            return  # another model was opened meanwhile
        review = loaded.seam_review
        if review is not None and review.profile.values != self.profile.values:
            loaded = with_seams_judged(loaded, profile=self.profile)  # the user changed the profile meanwhile (rare)
        self.loaded = loaded
        self.findings = self._collect_findings()
        self.selection = None
        self.events.emit("seams", "findings", "selection")

    # -- tolerance profile -----------------------------------------------
    def set_profile(self, name_or_path: str | None, remeasure: bool = True) -> None:
        """Judge everything against another profile (a shipped name or a TOML path), without reloading.

        The seams are measured again under it (their measures use its flat-curvature
        threshold), as ``batten check --profile`` would; ``remeasure=False`` leaves
        that to the caller (the window does it in a worker thread and hands the
        result to :meth:`adopt_seams`).

        Raises
        ------
        BattenError
            Unknown name or bad file; the profile in force stays as it was.
        """
        profile = get_profile(name_or_path)
        self.profile, self.profile_choice = profile, name_or_path
        if profile.values.get("pull"):
            self.pull = starting_pull(profile)
        if self.loaded is not None and remeasure:
            self.loaded = with_seams_judged(self.loaded, profile=profile)
        self._recompute_tooling()
        self.findings = self._collect_findings()
        self.selection = None
        self.events.emit("profile", "seams", "tooling", "findings", "selection")

    @property
    def review_settings(self) -> ReviewSettings:
        """What ``batten check`` needs to say about this model what the window shows.

        Returns
        -------
        app.review.ReviewSettings
            The profile in force, the section planes on screen as typed items
            (none when the section tool is off) and the draft view's pull (None when
            the draft view is not computed).
        """
        planes = self.section.planes() if self.section.enabled else []
        # the tooling checks go in when the draft view is computed, for the pull it shows
        pull = self.pull if self.tooling is not None else None
        return ReviewSettings(profile=self.profile_choice, sections=plane_items(planes), pull=pull)

    def forget_recent(self, path: str) -> None:
        self.recent.remove(path)
        self.events.emit("recent")

    def clear_recent(self) -> None:
        """Empty the recent-files list (the files themselves are untouched)."""
        self.recent.clear()
        self.events.emit("recent")

    # -- display ---------------------------------------------------------
    def set_display(self, **changes) -> None:
        """Replace display fields (mode, measure, show_seams)."""
        self.display = replace(self.display, **changes)
        if self.display.mode == Mode.DRAFT and self.tooling is None and self.loaded is not None:
            self._recompute_tooling()
            self.findings = self._collect_findings()
            self.selection = None
            self.events.emit("display", "tooling", "findings", "selection")
            return
        self.events.emit("display")

    # -- tooling ---------------------------------------------------------
    def set_pull(self, pull) -> None:
        """Set the pull direction of the draft view (any length but zero).

        Raises
        ------
        BattenError
            A zero or non-finite vector; the pull in force stays.
        """
        self.pull = tuple(float(c) for c in unit_pull(pull))
        self._recompute_tooling(force=True)
        self.findings = self._collect_findings()
        self.selection = None
        self.events.emit("tooling", "findings", "selection")

    def suggest_pull(self, how: str) -> None:
        """Set the pull to the model's thinnest axis or to the axis with the least area out of draft."""
        if self.loaded is not None:
            self.set_pull(suggested_pull(self.loaded.model, how, self.profile.limit("draft_min_deg")))

    def show_tooling(self, analysis) -> None:
        """Show an already computed tooling analysis (the report's pictures show the check's own)."""
        self.pull = tuple(float(c) for c in analysis.pull)
        self.tooling = analysis
        self.findings = self._collect_findings()
        self.selection = None
        self.events.emit("tooling", "findings", "selection")

    def _recompute_tooling(self, force: bool = False) -> None:
        """Draft, undercuts and cutter reach for the pull on screen (only while the draft view is on)."""
        self.tooling = None
        if self.loaded is not None and (force or self.display.mode == Mode.DRAFT):
            self.tooling = run_tooling(self.loaded.model, self.profile, self.pull)

    def set_stripes(self, **changes) -> None:
        """Replace stripe fields (count, width, direction)."""
        self.display = replace(self.display, stripes=replace(self.display.stripes, **changes))
        self.events.emit("display")

    def set_colour_range(self, auto: bool, low: float | None = None, high: float | None = None) -> None:
        current = self.display.colour_range
        low = current.low if low is None else float(low)
        high = current.high if high is None else float(high)
        if not auto and not low < high:
            raise ValueError("the lower colour limit must be below the upper one")
        self.display = replace(self.display, colour_range=ColourRange(auto, low, high))
        self.events.emit("display")

    def measure_fields(self) -> list[np.ndarray]:
        """The current measure on each face's grid, shape (a, b) each (deviation in mm in that mode)."""
        if self.display.mode == Mode.DEVIATION:
            deviation = self.review.deviation
            if deviation is None or len(deviation.fields) != len(self.samples):
                return [np.full(s.inside.shape, np.nan) for s in self.samples]
            return list(deviation.fields)
        return [measure_values(s.field, self.display.measure) for s in self.samples]

    @property
    def signed_values(self) -> bool:
        """The values shown are signed (colour map centred on 0)."""
        return self.display.mode == Mode.DEVIATION or self.display.measure in SIGNED_MEASURES

    def colour_limits(self) -> tuple[float, float]:
        """Colour-map range: the user's, or robust percentiles rounded outwards (symmetric about 0 if signed).

        The automatic ends are round numbers (:mod:`app.state.colour_scale`), so
        the legend's ticks read short; the values beyond them show in the end
        colours, and :meth:`value_extremes` gives the true extremes.
        """
        rng = self.display.colour_range
        if not rng.auto:
            return rng.low, rng.high
        if self.display.mode == Mode.DEVIATION:
            reach = self.review.deviation.reach if self.review.deviation is not None else 1.0
            return -reach, reach
        measure = self.display.measure
        unit = MEASURE_UNITS[measure]
        values = self._finite_values()
        if values.size == 0:
            # no finite value: a flat model (its minimum radius is infinite everywhere)
            if measure == Measure.MIN_RADIUS:
                return 0.0, FLAT_RADIUS_MM
            values = np.zeros(1)
        low, high = np.percentile(values, [AUTO_PERCENTILE, 100 - AUTO_PERCENTILE])
        if measure in SIGNED_MEASURES:
            return signed_limits(max(abs(low), abs(high)), unit)
        if measure == Measure.MIN_RADIUS:
            # radii beyond the flat radius all read as near flat: they must not squeeze the tight ones together
            high = min(high, FLAT_RADIUS_MM)
            low = min(low, 0.5 * high)
        return one_sided_limits(float(low), float(high), unit)

    def _finite_values(self) -> np.ndarray:
        """The current measure's finite values on every face, shape (n,)."""
        values = [f[s.inside] for f, s in zip(self.measure_fields(), self.samples, strict=True)]
        values = np.concatenate(values) if values else np.zeros(0)
        return values[np.isfinite(values)]

    def value_extremes(self) -> tuple[float, float]:
        """Smallest and largest value of the current map over every face (NaN when there is none).

        The minimum radius of a model with flat samples has ``inf`` as its largest value.
        """
        fields = [f[s.inside] for f, s in zip(self.measure_fields(), self.samples, strict=True)]
        values = np.concatenate(fields) if fields else np.zeros(0)
        values = values[~np.isnan(values)]
        if values.size == 0:
            return float("nan"), float("nan")
        return float(values.min()), float(values.max())

    def stripe_fields(self) -> list[np.ndarray]:
        """Stripe parameter per face for the current light mode (see :mod:`app.state.stripes`)."""
        return stripe_parameters(self.model, self.samples, self.display.mode, self.display.stripes, self.camera)

    def set_camera(self, camera: Camera) -> None:
        """The view moved: reflection lines depend on it."""
        self.camera = camera
        self.events.emit("camera")

    # -- sections --------------------------------------------------------
    def set_section(self, exact: bool = True, **changes) -> None:
        """Replace section fields (enabled, origin, normal, count, spacing, comb_gain, comb_density, selected).

        ``exact=False`` while the plane is being dragged: markers are then
        interpolated between curve samples instead of found by root finding.
        """
        self.section = replace(self.section, **changes)
        self._recompute_sections(exact)
        # the findings were recomputed and the selection cleared: its mark goes too
        self.events.emit("section", "sections", "findings", "selection")

    @property
    def comb_scale(self) -> float:
        """Tooth length per unit curvature (mm^2)."""
        if self.model is None:
            return 0.0
        return comb_scale(self.model.size, self.loaded.curvature_scale, self.section.comb_gain, self.sections)

    @property
    def comb_spacing(self) -> float:
        return 0.0 if self.model is None else self.model.size / self.section.comb_density

    @property
    def selected_section(self) -> SectionCurve | None:
        if not self.sections:
            return None
        return self.sections[min(self.section.selected, len(self.sections) - 1)]

    def select_curve(self, index: int) -> None:
        """Show section curve ``index`` (of :attr:`sections`, from 0) in the graph; nothing is recomputed."""
        if not 0 <= index < max(len(self.sections), 1):
            raise IndexError(f"no section curve {index}")
        self.section = replace(self.section, selected=int(index))
        self.events.emit("curve")

    @property
    def selected_curve_label(self) -> str:
        """``section P, curve C`` of the curve in the graph, or "" without one."""
        if not self.sections:
            return ""
        return curve_label(self.section_places[min(self.section.selected, len(self.sections) - 1)])

    def show_sections(self, curves: tuple[SectionCurve, ...], places: tuple[tuple[int, int], ...]) -> None:
        """Show curves cut elsewhere (a check's sections, for the report) with this session's combs.

        Parameters
        ----------
        curves : tuple of SectionCurve
        places : tuple of (plane, curve) pairs, one per curve (both from 0)
        """
        self.sections, self.section_places = tuple(curves), tuple(places)
        self.combs = combs_for(self.sections, self.comb_scale, self.comb_spacing)
        self.findings = self._collect_findings()
        self.selection = None
        self.events.emit("sections", "findings", "selection")

    def _recompute_sections(self, exact: bool = True) -> None:
        if self.loaded is None:
            self.sections, self.section_places, self.combs = (), (), ()
        else:
            self.sections, self.section_places = sections_for(self.loaded.engine, self.section, exact)
            self.combs = combs_for(self.sections, self.comb_scale, self.comb_spacing)
        self.findings = self._collect_findings()
        self.selection = None

    # -- findings --------------------------------------------------------
    def _collect_findings(self) -> tuple[FindingEntry, ...]:
        if self.loaded is None:
            return ()
        model, places = self.loaded.model, self.section_places
        seams = self.loaded.seam_review if self.loaded.seams_measured else None
        found = judged_findings(model, seams, self.sections, places, self.profile)
        found.extend(section_notes(self.sections, places))
        found.extend(self._face_extremes)
        found.extend(self._face_problems)
        found.extend(tooling_list(self.loaded.model, self.tooling, self.profile))
        # failing first, then by kind; a stable sort keeps each source's own order within
        found.sort(key=lambda f: (VERDICT_ORDER.index(f.verdict), KIND_ORDER.index(f.kind)))
        return tuple(unique_titles(found))

    def filtered_findings(self, kinds=None, verdicts=None) -> list[tuple[int, FindingEntry]]:
        """(index, finding) pairs whose kind and verdict are among those given (None: any)."""
        return [
            (i, f)
            for i, f in enumerate(self.findings)
            if (kinds is None or f.kind in kinds) and (verdicts is None or f.verdict in verdicts)
        ]

    def select(self, index: int | None) -> None:
        if index is not None and not 0 <= index < len(self.findings):
            raise IndexError(f"no finding {index}")
        self.selection = index
        self.events.emit("selection")

    @property
    def selected_finding(self) -> FindingEntry | None:
        return None if self.selection is None else self.findings[self.selection]

    # -- status ----------------------------------------------------------
    def describe(self) -> str:
        if self.model is None:
            return "no model"
        name = os.path.basename(self.path) if self.path else "model in memory"
        return f"{name}: {len(self.model.faces)} faces, {self.model.units}"

    def value_at(self, face: int, i: int, j: int) -> tuple[str, float]:
        """Name and value of the current measure at grid sample (i, j) of a face (the probe)."""
        measure = self.display.measure
        value = float(measure_values(self.samples[face].field, measure)[i, j])
        return measure.value, value

    def face_label(self, face: int) -> str:
        """A face's name from the file, or ``face N`` counted from 0 (as ``batten probe --face N``)."""
        return face_label(self.model, face)
