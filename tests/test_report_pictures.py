"""The report's pictures as a reader sees them: the surface fills the picture, a flat model is called flat."""

from __future__ import annotations

import io
from pathlib import Path

import numpy as np
from PIL import Image

from app.render import colours
from app.render.legend import PRINT_LEGEND
from app.report.figures import FRAME_GAP, IMAGE_SIZE, render_figures
from app.review.runner import ReviewSettings, review_model
from geometry.io import read_model
from tests.shapes import plane_model

SAMPLE = Path(__file__).resolve().parents[1] / "sample_surfaces" / "toaster_panel.stp"
# A pixel this far (sum of channel differences) from the background gradient's colour in its row is the model.
INK = 40


def _model_box(png: bytes) -> tuple[float, float]:
    """Width and height (shares of the picture) of the box round the pixels that are not background."""
    pixels = np.asarray(Image.open(io.BytesIO(png)).convert("RGB")).astype(int)
    rows = np.linspace(0.0, 1.0, pixels.shape[0])[:, None]
    top, bottom = colours.hex_rgb(colours.BACKGROUND_TOP) * 255, colours.hex_rgb(colours.BACKGROUND_BOTTOM) * 255
    background = top + rows * (bottom - top)  # VTK's gradient runs from the bottom colour up to the top one
    ink = np.abs(pixels - background[:, None, :]).sum(axis=2) > INK
    ys, xs = np.nonzero(ink)
    return (xs.max() - xs.min()) / pixels.shape[1], (ys.max() - ys.min()) / pixels.shape[0]


def test_the_surface_fills_each_picture():
    model = read_model(SAMPLE)
    figures = render_figures(model, review_model(model, ReviewSettings(sections="x:2")))
    shots = [f for f in figures if not f.name.startswith("family")]
    assert len(shots) >= 5
    free_width = (PRINT_LEGEND.x * IMAGE_SIZE[0] - 2 * FRAME_GAP) / IMAGE_SIZE[0]
    for shot in shots:
        width, height = _model_box(shot.png)
        # framed to 90% of the free part one way or the other (the legend's strip counts as ink where shown)
        assert width > 0.8 * free_width or height > 0.8, (shot.name, width, height)


def test_a_flat_model_is_called_flat():
    model = plane_model()
    figures = render_figures(model, review_model(model, ReviewSettings(sections="x:1")))
    captions = [f.caption for f in figures if f.name.startswith("curvature")]
    assert len(captions) == 3
    for caption in captions:
        assert "every face is flat" in caption and "from 0 to 0" not in caption
    plots = [f.caption for f in figures if f.name.startswith("family")]
    assert plots and all("Every curve of this family is straight" in c for c in plots)
    (combs,) = [f.caption for f in figures if f.name == "combs"]
    assert "the combs have no teeth" in combs
