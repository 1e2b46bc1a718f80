"""What the user chose to see: display mode, colour range, stripes, section plane and combs.

Every settings object is a frozen dataclass; the session replaces it whole
(``dataclasses.replace``), so a widget can compare old and new and nothing
changes behind anyone's back.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from enum import StrEnum

import numpy as np


class Mode(StrEnum):
    """What the faces show."""

    SHADED = "shaded"
    CURVATURE = "curvature"
    REFLECTION = "reflection lines"
    HIGHLIGHT = "highlight lines"
    ISOPHOTE = "isophotes"
    DRAFT = "draft"
    DEVIATION = "deviation"


STRIPE_MODES = (Mode.REFLECTION, Mode.HIGHLIGHT, Mode.ISOPHOTE)


class Measure(StrEnum):
    """Curvature quantity of the colour map."""

    GAUSSIAN = "gaussian"
    MEAN = "mean"
    K1 = "k1"
    K2 = "k2"
    MAX_ABS = "max |k|"
    MIN_RADIUS = "minimum radius"


# Modes whose faces carry a colour-mapped value.
VALUE_MODES = (Mode.CURVATURE, Mode.DEVIATION)
# Signed measures get a colour map centred on zero.
SIGNED_MEASURES = (Measure.GAUSSIAN, Measure.MEAN, Measure.K1, Measure.K2)
MEASURE_UNITS = {
    Measure.GAUSSIAN: "1/mm²",
    Measure.MEAN: "1/mm",
    Measure.K1: "1/mm",
    Measure.K2: "1/mm",
    Measure.MAX_ABS: "1/mm",
    Measure.MIN_RADIUS: "mm",
}

AXES = {"x": (1.0, 0.0, 0.0), "y": (0.0, 1.0, 0.0), "z": (0.0, 0.0, 1.0)}


@dataclass(frozen=True)
class ColourRange:
    """Automatic (from the data, robust percentiles) or user-given limits of the colour map."""

    auto: bool = True
    low: float = -0.01
    high: float = 0.01


@dataclass(frozen=True)
class StripeSettings:
    """Light stripes.

    Attributes
    ----------
    count : int
        Stripes across the model (highlight lines), across the model's range
        of normal angles (isophotes), or per 180 degrees of reflected-ray
        angle (reflection lines).
    width : float
        Share of each stripe period the light line covers, in (0, 1).
    direction : str
        Axis the light lines run along: "x", "y" or "z".
    """

    count: int = 8
    width: float = 0.35
    direction: str = "x"

    def __post_init__(self):
        if self.count < 1:
            raise ValueError("stripe count must be at least 1")
        if not 0.0 < self.width < 1.0:
            raise ValueError("stripe width must be between 0 and 1 (a share of the period)")
        if self.direction not in AXES:
            raise ValueError(f"stripe direction must be one of {', '.join(AXES)}")

    @property
    def line_direction(self) -> np.ndarray:
        return np.array(AXES[self.direction])

    @property
    def across_reference(self) -> np.ndarray:
        """A direction normal to the lines: the next axis round."""
        names = list(AXES)
        return np.array(AXES[names[(names.index(self.direction) + 2) % 3]])


@dataclass(frozen=True)
class DisplaySettings:
    mode: Mode = Mode.SHADED
    measure: Measure = Measure.MEAN
    colour_range: ColourRange = field(default_factory=ColourRange)
    stripes: StripeSettings = field(default_factory=StripeSettings)
    show_seams: bool = True

    def __post_init__(self):
        # accept the plain names too ("curvature", "gaussian"); unknown ones raise ValueError
        object.__setattr__(self, "mode", Mode(self.mode))
        object.__setattr__(self, "measure", Measure(self.measure))


# The nudge step a new model starts with, as a share of the model size (rounded to 1, 2 or 5 x 10^n mm).
STEP_SHARE = 0.01


def round_step(length: float) -> float:
    """The 1, 2 or 5 x 10^n mm at or below ``length`` (a step the user can add up in their head)."""
    if not np.isfinite(length) or length <= 0:
        return 1.0
    decade = 10.0 ** np.floor(np.log10(length))
    return float(decade * max(m for m in (1.0, 2.0, 5.0) if m * decade <= length * (1 + 1e-9)))


@dataclass(frozen=True)
class SectionSettings:
    """The section tool.

    Attributes
    ----------
    enabled : bool
    origin, normal : tuple of 3 floats
        The first plane (mm; normal normalised by the session).
    count : int
        Number of parallel planes, stepping ``spacing`` mm along the normal.
    spacing : float
    comb_gain : float
        Multiplier on the automatic comb scale (the longest tooth of the
        sections on screen reaches a tenth of the model size at gain 1).
    comb_density : int
        Teeth per model size of arc length.
    selected : int
        Index of the curve shown in the graph.
    nudge_step : float
        How far one nudge moves the plane along its normal (mm).
    """

    enabled: bool = False
    origin: tuple[float, float, float] = (0.0, 0.0, 0.0)
    normal: tuple[float, float, float] = (1.0, 0.0, 0.0)
    count: int = 1
    spacing: float = 10.0
    comb_gain: float = 1.0
    comb_density: int = 120
    selected: int = 0
    nudge_step: float = 1.0

    def __post_init__(self):
        n = np.asarray(self.normal, float)
        if n.shape != (3,) or not np.isfinite(n).all() or np.linalg.norm(n) == 0:
            raise ValueError("section normal must be a non-zero 3-vector")
        object.__setattr__(self, "normal", tuple(float(x) for x in n / np.linalg.norm(n)))
        object.__setattr__(self, "origin", tuple(float(x) for x in self.origin))
        if self.count < 1:
            raise ValueError("section count must be at least 1")
        if self.comb_density < 2:
            raise ValueError("comb density must be at least 2 teeth")
        if not self.nudge_step > 0:
            raise ValueError("the nudge step must be a positive length")

    def planes(self) -> list[tuple[np.ndarray, np.ndarray]]:
        """(origin, normal) of each plane of the family, shape (3,) each."""
        n = np.array(self.normal)
        o = np.array(self.origin)
        return [(o + i * self.spacing * n, n) for i in range(self.count)]
