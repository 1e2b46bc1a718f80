"""Legends of the colour maps (window and report): round ranges, plain ticks, titles that draw as written,
clipped ends stated with the true extremes."""

from __future__ import annotations

import numpy as np
import pytest
from render_support import offscreen_scene
from shapes import plane_model

from app.render.legend import clipped_ends, figure, measure_title, tick_format, vtk_text
from app.state import Measure, Mode, Session
from app.state.colour_scale import FLAT_RADIUS_MM, SPAN_MIN, one_sided_limits, round_limit, signed_limits
from app.state.demo import demo_model

TICKS = 5


@pytest.mark.parametrize(
    ("value", "limit", "fmt"), [(0.00806, 0.01, "%.3f"), (0.0631, 0.08, "%.2f"), (1.9e-5, 2e-5, "%.5f")]
)
def test_legend_ranges_are_round_and_ticks_plain(value, limit, fmt):
    assert round_limit(value) == pytest.approx(limit)
    assert tick_format(-limit, limit) == fmt
    assert "e" not in (fmt % -limit)


@pytest.mark.parametrize(
    ("low", "high", "unit", "want", "fmt"),
    [
        (96.27, 533.48, "mm", (0.0, 600.0), "%.0f"),  # the toaster's radii: 0, 150, ..., 600
        (0.001874, 0.010388, "1/mm", (0.001, 0.011), "%.4f"),
        (0.0, 0.0, "1/mm", (0.0, SPAN_MIN["1/mm"]), "%.6f"),  # a flat model's max |k|
    ],
)
def test_one_sided_ranges_round_outwards(low, high, unit, want, fmt):
    got = one_sided_limits(low, high, unit)
    assert got == pytest.approx(want)
    assert got[0] <= low and got[1] >= high
    assert tick_format(*got) == fmt


def test_ticks_never_print_more_digits_than_the_step_needs():
    # 96.27..533.48 is exact at 7 decimals, which is noise: two significant digits of the step are enough.
    assert tick_format(96.27, 533.48) == "%.0f"
    assert tick_format(-0.00806, 0.00806) == "%.4f"


def test_a_flat_model_gets_a_readable_range():
    # The drip tray's legend read "0.000000" at every tick: rounding noise stretched over the map.
    session = Session()
    session.show_model(plane_model())
    session.set_display(mode=Mode.CURVATURE, measure=Measure.MEAN)
    low, high = session.colour_limits()
    assert (low, high) == signed_limits(0.0, "1/mm") == (-SPAN_MIN["1/mm"], SPAN_MIN["1/mm"])
    ticks = [tick_format(low, high) % (low + i * (high - low) / (TICKS - 1)) for i in range(TICKS)]
    assert len(set(ticks)) == TICKS and "e" not in "".join(ticks)
    session.set_display(measure=Measure.MIN_RADIUS)
    assert session.colour_limits() == (0.0, FLAT_RADIUS_MM)


def test_titles_draw_the_bars_of_max_k():
    # VTK's MathText takes "|" for a column separator and drops it: the legend writes U+2223 instead.
    assert measure_title(Measure.MAX_ABS) == "Largest |k| (1/mm)"
    assert vtk_text("Largest |k|") == "Largest \u2223k\u2223"
    session = Session()
    session.show_model(demo_model())
    session.set_display(mode=Mode.CURVATURE, measure=Measure.MAX_ABS)
    with offscreen_scene(session, (400, 300)) as scene:
        plotter = scene.plotter
        bar = plotter.scalar_bars[scene.legend]
        assert "|" not in bar.GetTitle() and "\u2223k\u2223" in bar.GetTitle()
        assert bar.GetTitleTextProperty().GetFontFile().endswith("DejaVuSans.ttf")
        assert bar.GetVerticalTitleSeparation() > 0  # the title stands clear of the top tick
        # the bar stands right of the model: the view's centre moves right while a legend is shown
        assert plotter.camera.GetWindowCenter()[0] > 0
        session.set_display(mode=Mode.SHADED)
        scene.update_surface()
        assert plotter.camera.GetWindowCenter()[0] == 0


def test_clipped_ends_state_the_true_extremes():
    # minimum radius: the tight end is the low one, and the flat faces lie beyond the calm end
    below, above = clipped_ends(Measure.MIN_RADIUS, (7.87, 600.0), (5.81, np.inf), "mm")
    assert below == "tightest radius 5.81 mm"
    assert above == "flat faces and larger radii"
    below, above = clipped_ends(Measure.MEAN, (-0.01, 0.01), (-0.0138, 0.004), "1/mm")
    assert below == "lowest \u22120.0138 1/mm" and above is None
    assert clipped_ends(Measure.MEAN, (-0.01, 0.01), (-0.01, 0.01), "1/mm") == (None, None)


def test_the_scene_shows_the_clipped_end_on_its_legend():
    session = Session()
    session.show_model(demo_model())
    session.set_display(mode=Mode.CURVATURE, measure=Measure.MEAN)
    low, high = session.colour_limits()
    smallest, largest = session.value_extremes()
    session.set_colour_range(False, low / 2, high / 2)  # narrower than the data on both sides
    with offscreen_scene(session, (400, 300)) as scene:
        plotter = scene.plotter
        bar = plotter.scalar_bars[scene.legend]
        assert bar.GetDrawAboveRangeSwatch() and bar.GetDrawBelowRangeSwatch()
        words = scene.legend_ends.GetInput()
        assert f"highest {figure(largest)}" in words and f"lowest {figure(smallest)}" in words
        session.set_colour_range(True)
        scene.update_surface()
        assert not plotter.scalar_bars[scene.legend].GetDrawAboveRangeSwatch() or largest > high


def test_figures_read_plain():
    assert figure(5.8123) == "5.81"
    assert figure(-0.0631) == "\u22120.0631"
    assert figure(1.2345e-5) == "0.0000123"


def _display_x(plotter, points: np.ndarray) -> np.ndarray:
    """Pixel columns of world points (n, 3) -> (n,), by the camera's own composite projection (VTK)."""
    width, height = plotter.window_size
    matrix = plotter.camera.GetCompositeProjectionTransformMatrix(width / height, -1, 1)
    m = np.array([[matrix.GetElement(i, j) for j in range(4)] for i in range(4)])
    clip = np.c_[points, np.ones(len(points))] @ m.T
    return (clip[:, 0] / clip[:, 3] + 1) / 2 * width


@pytest.mark.parametrize("size", [(260, 600), (420, 420), (900, 400)])
def test_a_fitted_model_clears_the_legend_in_narrow_and_wide_views(size):
    # A wide model in a narrow view was cut at the left edge: the picture moves left to make room
    # for the legend, and the fit did not allow for it.
    session = Session()
    session.show_model(demo_model())
    session.set_display(mode=Mode.CURVATURE, measure=Measure.MEAN)
    with offscreen_scene(session, size) as scene:
        plotter = scene.plotter
        for direction in ("xy", "xz", "yz", "iso"):
            getattr(plotter, f"view_{direction}")() if direction != "iso" else plotter.view_isometric()
            scene.fit()
            plotter.render()
            points = np.vstack([s.field.points.reshape(-1, 3) for s in session.samples])
            xs = _display_x(plotter, points)
            left_of_bar = plotter.scalar_bars[scene.legend].GetPositionCoordinate().GetValue()[0] * size[0]
            assert xs.min() >= 0 and xs.max() <= left_of_bar, direction
