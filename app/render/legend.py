"""Colour-bar legends: a title in words with its unit, tick labels with sensible digits, clipped ends stated.

Shared by the window and the report's pictures, so both label a colour map alike.

VTK hands text containing ``|`` to its MathText renderer, which reads the bar
as a column separator and drops it ("max |k|" came out as "max k" on a broken
baseline); legend text is therefore set in DejaVu Sans (shipped with
matplotlib) through FreeType, with the bar written as U+2223, which that font
draws as the same upright stroke.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from importlib.util import find_spec
from pathlib import Path

import numpy as np

from app.state.settings import MEASURE_UNITS, Measure

TICKS = 5
MOST_DECIMALS = 7
MEASURE_WORDS = {
    Measure.GAUSSIAN: "Gaussian curvature K",
    Measure.MEAN: "Mean curvature H",
    Measure.K1: "Principal curvature k1",
    Measure.K2: "Principal curvature k2",
    Measure.MAX_ABS: "Largest |k|",
    Measure.MIN_RADIUS: "Smallest radius",
}
# Font sizes (points of the render window) in the window; the report sets its own for print.
TITLE_SIZE, LABEL_SIZE = 15, 13
# Pixels between the title's foot and the top tick label.
TITLE_GAP = 12
VTK_FONT_FILE = 4  # vtkTextProperty font family "from a file" (VTK_FONT_FILE)


@dataclass(frozen=True)
class LegendPlace:
    """Where a legend stands (normalised viewport units, the bar's lower left corner and size) and its fonts."""

    x: float
    y: float
    width: float
    height: float
    title_size: int
    label_size: int


# In the window: a slim bar at the right edge. The scene shifts the model left by SHIFT so they do not meet.
WINDOW_LEGEND = LegendPlace(0.87, 0.3, 0.05, 0.5, TITLE_SIZE, LABEL_SIZE)
# The report's pictures are printed at about an eighth of a millimetre per pixel: larger text, a longer bar.
PRINT_LEGEND = LegendPlace(0.8, 0.26, 0.045, 0.54, 32, 30)
# How far (share of half the view's width) the model moves left while a legend is shown.
SHIFT = 0.14
# Width of a DejaVu Sans character, as a share of the font size (a generous average), and the least gap
# kept between the legend's text and the view's right edge, pixels.
CHARACTER_WIDTH = 0.62
EDGE_GAP_PX = 6
# The clipped-ends text stands right-aligned at this share of the view's width, this far below the bar.
ENDS_RIGHT, ENDS_BELOW = 0.99, 0.03


def fitted(where: LegendPlace, title: str, labels: tuple[str, ...], view_px: int) -> LegendPlace:
    """``where`` moved left just enough that the title (centred over the bar) and the tick labels fit the view.

    A fixed place in viewport units cut the title off in a narrow view (``Mean curvatur``).

    Parameters
    ----------
    where : LegendPlace
    title : str
        The title as drawn; its longest line counts.
    labels : tuple of str
        The tick labels as drawn; the longest counts.
    view_px : int
        Width of the view in pixels.
    """
    if view_px <= 0:
        return where
    title_px = CHARACTER_WIDTH * where.title_size * max((len(line) for line in title.split("\n")), default=0)
    label_px = CHARACTER_WIDTH * where.label_size * max((len(text) for text in labels), default=0) + 8
    gap, half_bar = EDGE_GAP_PX / view_px, where.width / 2
    # the title is centred on the bar; the labels stand right of it
    x = min(where.x, 1 - gap - half_bar - title_px / 2 / view_px, 1 - gap - where.width - label_px / view_px)
    return replace(where, x=max(x, 0.0))


def legend_boxes(
    where: LegendPlace, title: str, labels: tuple[str, ...], ends: str, size: tuple[int, int]
) -> np.ndarray:
    """Pixels a legend at ``where`` covers: its title, its bar with the tick labels, and its ends text.

    Measured from the view's top left, with the same character widths as
    :func:`fitted`; three boxes rather than one, so a picture may use the room
    between them (a long model beside the bar, under the title).

    Parameters
    ----------
    where : LegendPlace
        As placed (after :func:`fitted`).
    title : str
    labels : tuple of str
        Tick labels as drawn.
    ends : str
        The text under the bar naming clipped ends (right-aligned at the view's edge), lines split by newlines.
    size : (int, int)
        Width and height of the view in pixels.

    Returns
    -------
    ndarray of shape (k, 4)
        Boxes (left, top, right, bottom); the ends text's only when there is one.
    """
    width, height = size
    lines = title.split("\n")
    title_px = CHARACTER_WIDTH * where.title_size * max((len(line) for line in lines), default=0)
    label_px = CHARACTER_WIDTH * where.label_size * max((len(text) for text in labels), default=0) + 8
    bar_left, bar_right = where.x * width, (where.x + where.width) * width
    centre = (bar_left + bar_right) / 2
    bar_top, bar_bottom = (1 - where.y - where.height) * height, (1 - where.y) * height
    title_top = bar_top - TITLE_GAP - 1.25 * where.title_size * len(lines) - where.label_size / 2
    boxes = [
        (centre - title_px / 2, title_top, centre + title_px / 2, bar_top - where.label_size / 2),
        (bar_left, bar_top - where.label_size / 2, bar_right + label_px, bar_bottom + where.label_size / 2),
    ]
    ends_lines = ends.split("\n") if ends else []
    if ends_lines:
        ends_top = (1 - where.y + ENDS_BELOW) * height
        ends_left = ENDS_RIGHT * width - CHARACTER_WIDTH * where.label_size * max(map(len, ends_lines))
        boxes.append((ends_left, ends_top, ENDS_RIGHT * width, ends_top + 1.25 * where.label_size * len(ends_lines)))
    return np.asarray(boxes, float)


def measure_title(measure: Measure) -> str:
    """``Mean curvature H (1/mm)``: what a colour map shows, in words, with its unit."""
    return f"{MEASURE_WORDS.get(measure, str(measure))} ({MEASURE_UNITS[measure]})"


def font_file() -> str | None:
    """DejaVu Sans from the installed matplotlib (None if missing: VTK's own font then)."""
    spec = find_spec("matplotlib")
    if spec is None or not spec.submodule_search_locations:
        return None
    path = Path(spec.submodule_search_locations[0]) / "mpl-data" / "fonts" / "ttf" / "DejaVuSans.ttf"
    return str(path) if path.is_file() else None


def vtk_text(text: str) -> str:
    """``text`` as VTK draws it literally: the bar ``|`` as U+2223 (see the module notes)."""
    return text.replace("|", "\u2223")


def tick_decimals(low: float, high: float, ticks: int = TICKS) -> int:
    """Decimals that print every tick of ``low..high`` exactly, or to two significant digits of the step.

    Ticks are evenly spaced (VTK's scalar bar): ``low + i (high - low) / (ticks - 1)``.
    """
    span = abs(high - low)
    if not span > 0 or not math.isfinite(span):
        return 3
    step = span / (ticks - 1)
    most = min(MOST_DECIMALS, max(0, 1 - math.floor(math.log10(step))))
    values = [low + i * (high - low) / (ticks - 1) for i in range(ticks)]
    for decimals in range(most + 1):
        if all(abs(round(v, decimals) - v) <= 1e-9 * span for v in values):
            return decimals
    return most


def tick_format(low: float, high: float, ticks: int = TICKS) -> str:
    """A printf format that prints every tick of ``low..high`` with the digits it needs and no exponent."""
    return f"%.{tick_decimals(low, high, ticks)}f"


def figure(value: float, digits: int = 3) -> str:
    """``value`` to ``digits`` significant digits in plain decimals (no exponent, no "-0")."""
    if value == 0 or not math.isfinite(value):
        return "0" if value == 0 else str(value)
    decimals = min(MOST_DECIMALS + 2, max(0, digits - 1 - math.floor(math.log10(abs(value)))))
    text = f"{value:.{decimals}f}"
    return text[1:] if text.startswith("-") and float(text) == 0 else text.replace("-", "\u2212")


def clipped_ends(
    measure: Measure | None, limits: tuple[float, float], extremes: tuple[float, float], unit: str
) -> tuple[str | None, str | None]:
    """Words for the legend's end swatches where values run past the range: (below, above), None where not.

    Parameters
    ----------
    measure : Measure or None
        None for a map that is not a curvature measure (deviation).
    limits : (float, float)
        The colour range.
    extremes : (float, float)
        The smallest and largest value on the model (``inf`` for a flat sample's radius).
    unit : str
    """
    low, high = limits
    smallest, largest = extremes
    slack = 1e-9 * max(abs(high - low), 1e-300)
    below = above = None
    if math.isfinite(smallest) and smallest < low - slack:
        if measure == Measure.MIN_RADIUS:
            below = f"tightest radius {figure(smallest)} {unit}"
        else:
            below = f"lowest {figure(smallest)} {unit}"
    if largest > high + slack:
        if measure == Measure.MIN_RADIUS:
            above = "flat faces and larger radii" if math.isinf(largest) else f"largest radius {figure(largest)} {unit}"
        elif math.isfinite(largest):
            above = f"highest {figure(largest)} {unit}"
    return below, above


def _style_text(prop, size: int) -> None:
    path = font_file()
    if path is not None:
        prop.SetFontFamily(VTK_FONT_FILE)
        prop.SetFontFile(path)
    prop.SetFontSize(size)
    prop.SetColor(0.0, 0.0, 0.0)
    prop.SetShadow(False)
    prop.BoldOff()
    prop.ItalicOff()


def ends_text(words: str):
    """The ``vtkTextActor`` under a legend that names the true extremes beyond its clipped ends."""
    from vtkmodules.vtkRenderingCore import vtkTextActor

    actor = vtkTextActor()
    actor.SetInput(vtk_text(words))
    actor.GetPositionCoordinate().SetCoordinateSystemToNormalizedViewport()
    prop = actor.GetTextProperty()
    prop.SetJustificationToRight()
    prop.SetVerticalJustificationToTop()
    actor.SetVisibility(bool(words))
    return actor


def place_legend(bar, ends, where: LegendPlace) -> None:
    """Fonts, sizes and place of a ``vtkScalarBarActor`` and its ends text (:func:`ends_text`, or None).

    DejaVu Sans throughout, the title clear of the top tick, the ends text
    right-aligned under the bar.
    """
    bar.SetPosition(where.x, where.y)
    bar.SetPosition2(where.width, where.height)
    bar.UnconstrainedFontSizeOn()  # the sizes below, not sizes squeezed to the bar's width
    bar.SetVerticalTitleSeparation(TITLE_GAP)
    bar.SetTextPad(4)
    bar.SetTitle(vtk_text(bar.GetTitle()))
    _style_text(bar.GetTitleTextProperty(), where.title_size)
    _style_text(bar.GetLabelTextProperty(), where.label_size)
    _style_text(bar.GetAnnotationTextProperty(), where.label_size)
    if ends is not None:
        _style_text(ends.GetTextProperty(), where.label_size)
        ends.GetTextProperty().SetJustificationToRight()
        ends.GetTextProperty().SetVerticalJustificationToTop()
        ends.SetPosition(ENDS_RIGHT, where.y - ENDS_BELOW)
