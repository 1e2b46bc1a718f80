"""Light stripes by default: isophote bands across any model, no stripes packed tighter than they can be drawn."""

from __future__ import annotations

import numpy as np
import pytest

from app.state import Mode, Session
from app.state.stripes import (
    DENSEST_ACROSS,
    ISOPHOTE_PERCENTILE,
    ISOPHOTE_TILT_DEG,
    isophote_light,
    raw_stripe_parameters,
    too_dense,
)


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


def test_stripes_denser_than_the_limit_are_not_drawn():
    # p = x / period on a 1 mm grid: the period on the surface is exactly `period` mm (exact answer)
    x, y = np.meshgrid(np.arange(50.0), np.arange(30.0), indexing="ij")
    points = np.stack([x, y, np.zeros_like(x)], axis=-1)
    for period, dense in ((2.0, False), (0.5, True)):
        mask = too_dense(x / period, points, shortest_mm=1.0)
        assert mask.all() if dense else not mask.any()
    lone = x / 2.0
    lone[10, :] = np.nan  # beside an undrawn row its neighbours are dropped too: no lone specks
    mask = too_dense(lone, points, shortest_mm=1.0)
    assert mask[9:12].all() and not mask[:8].any() and not mask[13:].any()


def test_highlight_lines_leave_out_what_is_too_dense_to_draw(sample_model):
    session = Session()
    session.show_model(sample_model("steamer_body.stp"))
    session.set_display(mode=Mode.HIGHLIGHT)
    shortest = session.model.size / DENSEST_ACROSS
    fields = session.stripe_fields()
    raw = raw_stripe_parameters(session.model, session.samples, Mode.HIGHLIGHT, session.display.stripes, None)
    dropped = 0
    for drawn, full, s in zip(fields, raw, session.samples, strict=True):
        # every sample still drawn has a stripe period of at least the shortest one
        assert not (np.isfinite(drawn) & too_dense(full, s.field.points, shortest)).any()
        dropped += int((np.isfinite(full) & ~np.isfinite(drawn))[s.inside].sum())
    assert dropped > 0  # the steamer's sides pack highlight lines tighter than that
