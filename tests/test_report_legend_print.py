"""The legend in the report's pictures is set at print size, in every picture (issue 14).

VTK lays a scalar bar's text out one render behind a change of its font sizes,
so a picture taken right after the print sizes were set carried the window's
small legend (13 px text on a 1000 px picture, about 3 pt on the page).
"""

from __future__ import annotations

import io
from pathlib import Path

import numpy as np
from PIL import Image

from app.render.legend import PRINT_LEGEND, WINDOW_LEGEND
from app.report import figures
from app.review.runner import review_model
from geometry.io import read_model

SAMPLE = Path(__file__).resolve().parents[1] / "sample_surfaces" / "toaster_panel.stp"


def _legend_ink(png: bytes) -> int:
    """Dark pixels in the picture's right strip, where the legend stands (text grows with its size squared)."""
    pixels = np.asarray(Image.open(io.BytesIO(png)))[..., :3].astype(int)
    strip = pixels[:, -pixels.shape[1] * 3 // 10 :]
    return int((strip.sum(axis=2) < 200).sum())


def test_every_curvature_picture_carries_the_print_legend():
    model = read_model(SAMPLE)
    review = review_model(model)
    session = figures.report_session(model, review)
    session.show_sections(review.section_curves, review.section_places)
    pictures = figures._Pictures(session, review)
    try:
        figures.findings_view(pictures)  # a picture without a legend first, as in every report
        shots = figures.curvature_views(pictures)
        # the same view with the window's legend, for scale
        pictures.scene.place_legend(WINDOW_LEGEND)
        pictures.plotter.render()
        pictures.plotter.render()
        window = _legend_ink(figures._png(pictures.plotter.screenshot(return_img=True)))
    finally:
        pictures.close()
    assert PRINT_LEGEND.label_size > 2 * WINDOW_LEGEND.label_size
    assert shots
    for shot in shots:
        assert _legend_ink(shot.png) > 3 * window, shot.name
