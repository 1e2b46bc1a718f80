"""Isophotes by default show bands across the model, whatever the spread of its normals."""

from __future__ import annotations

import numpy as np
import pytest

from app.state import Mode, Session
from app.state.stripes import ISOPHOTE_PERCENTILE, ISOPHOTE_TILT_DEG, isophote_light


def test_the_toaster_gets_its_stripe_count_of_isophote_bands(sample_model):
    # The toaster's panel faces one way within about 15 degrees: at 8 bands per 180 degrees of normal angle
    # it was one dark field; the count now spreads over the panel's own range of angles.
    session = Session()
    session.show_model(sample_model("toaster_panel.stp"))
    session.set_display(mode=Mode.ISOPHOTE)
    values = np.concatenate([f[s.inside] for f, s in zip(session.stripe_fields(), session.samples, strict=True)])
    values = values[np.isfinite(values)]
    low, high = np.percentile(values, [ISOPHOTE_PERCENTILE, 100 - ISOPHOTE_PERCENTILE])
    assert high - low == pytest.approx(session.display.stripes.count, rel=1e-9)


def test_the_light_stands_off_the_mean_normal(sample_model):
    session = Session()
    session.show_model(sample_model("toaster_panel.stp"))
    stripes = session.display.stripes
    light = isophote_light(session.samples, stripes.across_reference, stripes.line_direction)
    normals = np.concatenate([s.field.normals[s.inside] for s in session.samples])
    mean = normals.mean(axis=0) / np.linalg.norm(normals.mean(axis=0))
    assert np.degrees(np.arccos(light @ mean)) == pytest.approx(ISOPHOTE_TILT_DEG)
    assert np.linalg.norm(light) == pytest.approx(1.0)
