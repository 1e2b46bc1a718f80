"""Colour-bar legends: a title in words with its unit, a round range, tick labels with sensible digits.

Shared by the window and the report's pictures, so both label a curvature map alike.
"""

from __future__ import annotations

import math

from app.state.settings import MEASURE_UNITS, Measure

TICKS = 5
# Round numbers a colour range may end on (times a power of ten) whose halves need no more digits, or one.
ROUND_STEPS = (1.0, 2.0, 3.0, 4.0, 6.0, 8.0, 10.0)
MOST_DECIMALS = 7
MEASURE_WORDS = {
    Measure.GAUSSIAN: "Gaussian curvature K",
    Measure.MEAN: "Mean curvature H",
    Measure.K1: "Principal curvature k1",
    Measure.K2: "Principal curvature k2",
    Measure.MAX_ABS: "Largest |k|",
    Measure.MIN_RADIUS: "Smallest radius",
}


def measure_title(measure: Measure) -> str:
    """``Mean curvature H (1/mm)``: what a colour map shows, in words, with its unit."""
    return f"{MEASURE_WORDS.get(measure, str(measure))} ({MEASURE_UNITS[measure]})"


def round_limit(value: float) -> float:
    """The smallest round number (:data:`ROUND_STEPS` times a power of ten) at or above ``value`` > 0."""
    if not value > 0 or not math.isfinite(value):
        return 1.0
    power = 10.0 ** math.floor(math.log10(value))
    for step in ROUND_STEPS:
        if step * power >= value * (1 - 1e-12):
            return step * power
    return 10.0 * power


def tick_format(low: float, high: float, ticks: int = TICKS) -> str:
    """A printf format that prints every tick of ``low..high`` with the digits it needs and no exponent.

    Ticks are evenly spaced (VTK's scalar bar): ``low + i (high - low) / (ticks - 1)``.
    """
    span = abs(high - low)
    if not span > 0 or not math.isfinite(span):
        return "%.3g"
    values = [low + i * (high - low) / (ticks - 1) for i in range(ticks)]
    for decimals in range(MOST_DECIMALS + 1):
        if all(abs(round(v, decimals) - v) <= 1e-9 * span for v in values):
            return f"%.{decimals}f"
    step = span / (ticks - 1)
    return f"%.{min(MOST_DECIMALS, max(0, 1 - math.floor(math.log10(step))))}f"
