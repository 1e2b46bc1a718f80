"""Exact placement of the section plane without a window: typed point and normal, nudges, presets, snap.

The demo panel's x-profile is the cubic Bezier with control heights (0, w, -w, 0)
over x = 0 .. 100 mm; in Bernstein form z(t) = 3 w t (1 - t) (1 - 2 t) at x = 100 t
(Farin, *Curves and Surfaces for CAGD*, 5th ed., sec. 4.1), so a plane x = X cuts
the panel along a straight line at that height.
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from app.state import Session
from app.state import plane as placing
from app.state.demo import demo_model
from app.state.settings import round_step

WAVE = 8.0  # mm, demo_model's wave height
ON_PLANE = 1e-9  # mm


def bezier_height(x: float) -> float:
    t = x / 100.0
    return 3 * WAVE * t * (1 - t) * (1 - 2 * t)


@pytest.fixture
def session():
    s = Session()
    s.show_model(demo_model())
    s.set_section(enabled=True)
    return s


def panel_curve(session):
    """The section curve lying on the wavy panel (x below 100 mm)."""
    return next(c for c in session.sections if c.points[:, 0].max() < 100.0 - 1e-6)


def test_typed_point_and_normal_cut_there(session):
    placing.set_normal(session, (2.0, 0.0, 0.0))  # any length
    placing.set_origin(session, (25.0, 30.0, 0.0))
    assert session.section.normal == (1.0, 0.0, 0.0)
    curve = panel_curve(session)
    assert_allclose(curve.points[:, 0], 25.0, atol=ON_PLANE)
    assert_allclose(curve.points[:, 2], bezier_height(25.0), atol=1e-6)
    assert "25.000, 30.000, 0.000" in placing.readout(session)


def test_bad_input_leaves_the_plane(session):
    before = session.section
    with pytest.raises(ValueError):
        placing.set_normal(session, (0.0, 0.0, 0.0))
    with pytest.raises(ValueError):
        placing.set_origin(session, (np.nan, 0.0, 0.0))
    with pytest.raises(ValueError):
        placing.set_step(session, 0.0)
    assert session.section == before


def test_nudge_moves_by_the_chosen_step(session):
    placing.set_origin(session, (20.0, 30.0, 0.0))
    placing.set_step(session, 2.5)
    placing.nudge(session, 3)
    assert_allclose(session.section.origin, (27.5, 30.0, 0.0))
    placing.nudge(session, -1)
    assert_allclose(session.section.origin, (25.0, 30.0, 0.0))
    assert_allclose(panel_curve(session).points[:, 0], 25.0, atol=ON_PLANE)


def test_offset_is_measured_from_the_model_centre(session):
    lo, hi = session.model.bounds
    placing.set_offset(session, -30.0)  # normal along x: x = centre - 30
    assert_allclose(session.section.origin[0], (lo[0] + hi[0]) / 2 - 30.0)
    assert placing.offset(session) == pytest.approx(-30.0)


def test_presets_turn_the_plane_about_its_point(session):
    placing.set_origin(session, (40.0, 30.0, 0.0))
    placing.preset(session, "y")
    assert session.section.normal == (0.0, 1.0, 0.0)
    assert session.section.origin == (40.0, 30.0, 0.0)
    # the y-plane cuts the x-profile: its inflection is at x = 50 (where z'' of the Bezier vanishes)
    assert any(np.any(np.abs(c.inflections.points[:, 0] - 50.0) < 1e-3) for c in session.sections)
    placing.preset(session, "view", view_direction=(0.0, 0.0, -3.0))
    assert session.section.normal == (0.0, 0.0, -1.0)
    with pytest.raises(ValueError):
        placing.preset(session, "view")
    with pytest.raises(ValueError):
        placing.preset(session, "diagonal")


def test_snap_puts_the_plane_through_a_finding(session):
    assert not placing.snap_to_finding(session)  # nothing selected
    index = next(i for i, f in enumerate(session.findings) if f.kind == "seam")
    where = session.findings[index].position.copy()
    session.select(index)
    assert placing.snap_to_finding(session)
    assert_allclose(session.section.origin, where)


def test_the_first_step_is_a_round_share_of_the_model():
    s = Session()
    s.show_model(demo_model())
    assert s.section.nudge_step == round_step(0.01 * s.model.size)
    assert [round_step(x) for x in (0.0123, 1.0, 1.9, 4.99, 7.3, 250.0)] == [0.01, 1.0, 1.0, 2.0, 5.0, 200.0]
