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

from geometry.model import Model
from geometry.section_results import CurvatureComb, SectionCurve

from .events import Notifier
from .loading import Progress, prepare
from .recent import RecentFiles
from .results import FaceSamples, Finding, Loaded, measure_values
from .sectioning import combs_for, sections_for
from .settings import SIGNED_MEASURES, ColourRange, DisplaySettings, SectionSettings
from .stripes import Camera, stripe_parameters

# Robust automatic colour range: ignore this share of samples at each end.
AUTO_PERCENTILE = 2.0
# At comb gain 1 a tooth of the model's typical curvature is this share of the model size.
COMB_REACH = 0.1
KIND_ORDER = ("seam", "free edge", "inflection", "curvature extreme")
VERDICT_ORDER = ("fail", "note", "pass")


class Session:
    """State of one inspection window.

    Parameters
    ----------
    recent : RecentFiles, optional
        Where the recent-files list is kept (default: in memory only).
    """

    def __init__(self, recent: RecentFiles | None = None):
        self.events = Notifier()
        self.loaded: Loaded | None = None
        self.path: str | None = None
        self.display = DisplaySettings()
        self.section = SectionSettings()
        self.sections: tuple[SectionCurve, ...] = ()
        self.combs: tuple[CurvatureComb, ...] = ()
        self.findings: tuple[Finding, ...] = ()
        self.selection: int | None = None
        self.camera: Camera | None = None
        self.recent = recent or RecentFiles(None)

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
        loaded = prepare(path, progress=progress) if progress else prepare(path)
        self.adopt(loaded, path)

    def show_model(self, model: Model) -> None:
        """Show an in-memory model (scripts and tests)."""
        self.adopt(prepare(model=model), None)

    def adopt(self, loaded: Loaded, path: str | None) -> None:
        """Make an already prepared model current (the window prepares it in a worker thread)."""
        self.loaded = loaded
        self.path = path
        lo, hi = loaded.model.bounds
        centre = tuple(float(x) for x in (lo + hi) / 2)
        spacing = max(loaded.model.size / 20, 1e-3)
        self.section = replace(self.section, origin=centre, spacing=spacing, selected=0)
        self.selection = None
        if path is not None:
            self.recent.add(path)
        self._recompute_sections()
        self.events.emit("model", "section", "sections", "findings", "selection", "recent")

    def adopt_seams(self, loaded: Loaded) -> None:
        """The seam analysis of the current model finished (measured after it was shown)."""
        if self.loaded is None or loaded.model is not self.loaded.model:
            return  # another model was opened meanwhile
        self.loaded = loaded
        self.findings = self._collect_findings()
        self.selection = None
        self.events.emit("seams", "findings", "selection")

    def forget_recent(self, path: str) -> None:
        self.recent.remove(path)
        self.events.emit("recent")

    # -- display ---------------------------------------------------------
    def set_display(self, **changes) -> None:
        """Replace display fields (mode, measure, show_seams)."""
        self.display = replace(self.display, **changes)
        self.events.emit("display")

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
        """The current measure on each face's grid, shape (a, b) each."""
        return [measure_values(s.field, self.display.measure) for s in self.samples]

    def colour_limits(self) -> tuple[float, float]:
        """Colour-map range: the user's, or robust percentiles (symmetric about 0 for signed measures)."""
        rng = self.display.colour_range
        if not rng.auto:
            return rng.low, rng.high
        values = [f[s.inside] for f, s in zip(self.measure_fields(), self.samples, strict=True)]
        values = np.concatenate(values) if values else np.zeros(0)
        values = values[np.isfinite(values)]
        if values.size == 0:
            return (-1.0, 1.0) if self.display.measure in SIGNED_MEASURES else (0.0, 1.0)
        low, high = np.percentile(values, [AUTO_PERCENTILE, 100 - AUTO_PERCENTILE])
        if self.display.measure in SIGNED_MEASURES:
            reach = max(abs(low), abs(high), 1e-12)
            return -float(reach), float(reach)
        if high <= low:
            high = low + max(abs(low) * 1e-3, 1e-12)
        return float(low), float(high)

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
        self.events.emit("section", "sections", "findings")

    @property
    def comb_scale(self) -> float:
        """Tooth length per unit curvature (mm^2)."""
        if self.model is None:
            return 0.0
        typical = self.loaded.curvature_scale or 1.0 / max(self.model.size, 1e-9)
        return self.section.comb_gain * COMB_REACH * self.model.size / typical

    @property
    def comb_spacing(self) -> float:
        return 0.0 if self.model is None else self.model.size / self.section.comb_density

    @property
    def selected_section(self) -> SectionCurve | None:
        if not self.sections:
            return None
        return self.sections[min(self.section.selected, len(self.sections) - 1)]

    def _recompute_sections(self, exact: bool = True) -> None:
        if self.loaded is None:
            self.sections, self.combs = (), ()
        else:
            self.sections = sections_for(self.loaded.engine, self.section, exact)
            self.combs = combs_for(self.sections, self.comb_scale, self.comb_spacing)
        self.findings = self._collect_findings()
        self.selection = None

    # -- findings --------------------------------------------------------
    def _collect_findings(self) -> tuple[Finding, ...]:
        if self.loaded is None:
            return ()
        found = list(self.loaded.seam_findings)
        found.extend(_section_findings(self.sections))
        found.extend(curvature_extremes(self.loaded.samples))
        # failing first, then by kind; a stable sort keeps each source's own order within
        found.sort(key=lambda f: (VERDICT_ORDER.index(f.verdict), KIND_ORDER.index(f.kind)))
        return tuple(found)

    def filtered_findings(self, kinds=None, verdicts=None) -> list[tuple[int, Finding]]:
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
    def selected_finding(self) -> Finding | None:
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


def _section_findings(sections: tuple[SectionCurve, ...]) -> list[Finding]:
    found = []
    for n, curve in enumerate(sections):
        extent = max(curve.length / 10, 1.0)
        marks = curve.inflections
        for p, s, seam in zip(marks.points, marks.arc_length, marks.at_seam, strict=True):
            where = " (across a seam)" if seam else ""
            title = f"inflection on section {n + 1} at s = {s:.1f} mm{where}"
            found.append(Finding("inflection", title, "note", p, extent, "", p))
    return found


def curvature_extremes(samples: tuple[FaceSamples, ...]) -> list[Finding]:
    """The tightest spot (largest max |k|) of each face, tightest face first."""
    found = []
    for s in samples:
        size = np.where(s.inside, s.field.max_abs, -np.inf)
        if not np.isfinite(size).any() or size.max() <= 0:
            continue
        i, j = np.unravel_index(np.argmax(size), size.shape)
        k = float(size[i, j])
        title = f"face {s.face + 1}: tightest radius {1 / k:.3g} mm"
        detail = f"max |k| {k:.4g} 1/mm (k1 {s.field.k1[i, j]:.4g}, k2 {s.field.k2[i, j]:.4g})"
        extent = min(10.0 / k, float(np.ptp(s.field.points[s.inside], axis=0).max()) or 10.0)
        found.append((k, Finding("curvature extreme", title, "note", s.field.points[i, j], extent, detail)))
    return [f for _, f in sorted(found, key=lambda pair: -pair[0])]
