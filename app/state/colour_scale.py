"""Round ends for an automatic colour range, so the legend's ticks read as plain, short numbers.

The window's range fields, its legend and the report's captions all show these
limits, so they are chosen here, once, with the session's state.
"""

from __future__ import annotations

import math

# Round numbers a signed range may end on (times a power of ten) whose halves need no more digits, or one.
ROUND_STEPS = (1.0, 2.0, 3.0, 4.0, 6.0, 8.0, 10.0)
# The narrowest automatic range, by the measure's unit: flatter models get this span rather than rounding
# noise stretched over the whole map (1e-4 1/mm is a radius of 10 m; 1e-6 1/mm² the Gaussian curvature of
# a 1 m sphere). Common practice, no published source.
SPAN_MIN = {"1/mm": 1e-4, "1/mm²": 1e-6, "mm": 1.0}
# Minimum radius of a model with no curved sample: radii from 0 up to the radius of the 1/mm floor.
FLAT_RADIUS_MM = 1.0 / SPAN_MIN["1/mm"]


def round_limit(value: float) -> float:
    """The smallest round number (:data:`ROUND_STEPS` times a power of ten) at or above ``value`` > 0."""
    if not value > 0 or not math.isfinite(value):
        return 1.0
    power = 10.0 ** math.floor(math.log10(value))
    for step in ROUND_STEPS:
        if step * power >= value * (1 - 1e-12):
            return step * power
    return 10.0 * power


def signed_limits(reach: float, unit: str) -> tuple[float, float]:
    """``(-r, r)`` with ``r`` the round number at or above ``reach`` (at least the unit's floor)."""
    limit = round_limit(max(abs(reach), SPAN_MIN.get(unit, 0.0)))
    return -limit, limit


def one_sided_limits(low: float, high: float, unit: str) -> tuple[float, float]:
    """``low`` and ``high`` rounded outwards to the leading digit of their span (at least the unit's floor).

    Radii from 96.3 to 533.5 mm become 0 to 600 mm; curvatures from 0.0019 to
    0.0104 1/mm become 0.001 to 0.011 1/mm. A range that starts at or above zero
    never rounds below it.
    """
    floor = SPAN_MIN.get(unit, 0.0)
    span = high - low
    step = max(10.0 ** math.floor(math.log10(span)) if span > 0 else 0.0, floor)
    if not step > 0:
        return low, low + 1.0
    rounded_low = math.floor(low / step * (1 + 1e-12)) * step
    if low >= 0:
        rounded_low = max(rounded_low, 0.0)
    rounded_high = max(math.ceil(high / step * (1 - 1e-12)) * step, rounded_low + floor)
    return float(rounded_low), float(rounded_high)
