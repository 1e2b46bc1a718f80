"""The colour map reads true on screen: a flat face shows the map's zero colour, lit, at any angle.

Rendered off-screen (EGL) with the window's Scene and read back pixel by pixel.
"""

from __future__ import annotations

import numpy as np
import pytest
from render_support import offscreen_scene
from shapes import PLANE_SIDE_MM, plane_model

from app.render import colours
from app.state import Measure, Mode, Session

# How far (0..255 per channel) a lit flat face may stray from the zero colour. Our choice: the eye reads a
# 10 % change in lightness as the same colour, and mid grey (127) stays far outside.
COLOUR_TOLERANCE = 26


def centre_pixel(tilt_deg: float, measure: Measure, mode: Mode = Mode.CURVATURE) -> np.ndarray:
    """RGB at the picture's centre, the plane seen ``tilt_deg`` away from its normal."""
    session = Session()
    session.show_model(plane_model())
    session.set_display(mode=mode, measure=measure)
    with offscreen_scene(session, (300, 300)) as scene:
        plotter = scene.plotter
        tilt = np.radians(tilt_deg)
        centre = np.array([PLANE_SIDE_MM / 2, PLANE_SIDE_MM / 2, 0.0])
        toward = np.array([np.sin(tilt), 0.0, np.cos(tilt)])
        plotter.camera_position = [tuple(centre + 300 * toward), tuple(centre), (0.0, 1.0, 0.0)]
        plotter.camera.SetWindowCenter(0.0, 0.0)  # the centre pixel on the plane, whatever the legend's shift
        plotter.reset_camera_clipping_range()
        image = plotter.screenshot(return_img=True)
    return image[image.shape[0] // 2, image.shape[1] // 2, :3].astype(int)


@pytest.mark.parametrize("tilt_deg", [0.0, 40.0, 70.0])
@pytest.mark.parametrize(
    ("measure", "zero_colour"),
    [
        (Measure.MEAN, colours.DIVERGING[2][1]),  # the diverging map's middle (H = 0)
        (Measure.GAUSSIAN, colours.DIVERGING[2][1]),
        (Measure.MAX_ABS, colours.ONE_SIDED[0][1]),  # |k| = 0: the calm end
        (Measure.MIN_RADIUS, colours.ONE_SIDED[0][1]),  # an infinite radius: the calm end, not "no value"
    ],
)
def test_a_flat_face_shows_the_zero_colour(tilt_deg, measure, zero_colour):
    pixel = centre_pixel(tilt_deg, measure)
    want = np.round(colours.hex_rgb(zero_colour) * 255).astype(int)
    grey = np.round(colours.hex_rgb(colours.MISSING) * 255).astype(int)
    assert np.abs(pixel - want).max() <= COLOUR_TOLERANCE, (pixel, want)
    assert np.abs(pixel - grey).max() > 3 * COLOUR_TOLERANCE


def test_tight_radii_take_the_strong_colour():
    # Minimum radius runs the other way from max |k|: tight radii in the strong end, like large |k|.
    session = Session()
    session.show_model(plane_model())
    session.set_display(mode=Mode.CURVATURE, measure=Measure.MIN_RADIUS)
    with offscreen_scene(session, (200, 200)) as scene:
        table = scene.surface_actor.mapper.lookup_table
        low, high = table.scalar_range
        strong, calm = (np.array(table.map_value(v)[:3]) for v in (low, high))
    assert np.allclose(strong, colours.hex_rgb(colours.ONE_SIDED[-1][1]), atol=0.01)
    assert np.allclose(calm, colours.hex_rgb(colours.ONE_SIDED[0][1]), atol=0.01)
