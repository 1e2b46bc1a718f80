"""The default comb scale: the longest tooth is a fixed share of the model, however gently the section bends.

A plane across a circular cylinder's axis cuts a circle of radius R, curvature
1/R everywhere (exact; The NURBS Book, 2nd ed., sec. 7.3 for the rational arc).
"""

from __future__ import annotations

import numpy as np
import pytest
from shapes import quarter_cylinder

from app.state import Session
from app.state.sectioning import COMB_REACH
from geometry.model import Face, Model

LENGTH = 40.0  # mm along the axis


@pytest.mark.parametrize("radius", [12.5, 400.0, 20_000.0])
def test_the_longest_tooth_is_a_share_of_the_model(radius):
    s = Session()
    s.show_model(Model((Face(quarter_cylinder(radius, LENGTH)),)))
    s.set_section(enabled=True, origin=(LENGTH / 2, 0.0, 0.0), normal=(1.0, 0.0, 0.0))
    (curve,) = s.sections
    np.testing.assert_allclose(np.abs(curve.curvature), 1.0 / radius, rtol=1e-6)
    teeth = np.linalg.norm(s.combs[0].tips - s.combs[0].roots, axis=1)
    assert teeth.max() == pytest.approx(COMB_REACH * s.model.size, rel=1e-9)
    s.set_section(comb_gain=0.5)
    teeth = np.linalg.norm(s.combs[0].tips - s.combs[0].roots, axis=1)
    assert teeth.max() == pytest.approx(0.5 * COMB_REACH * s.model.size, rel=1e-9)


def test_a_straight_section_has_no_teeth():
    s = Session()
    s.show_model(Model((Face(quarter_cylinder(50.0, LENGTH)),)))
    s.set_section(enabled=True, origin=(0.0, 0.0, 50.0), normal=(0.0, 1.0, 0.0))  # along the axis: straight lines
    assert s.sections
    assert np.isfinite(s.comb_scale) and s.comb_scale > 0
    for comb in s.combs:
        assert np.linalg.norm(comb.tips - comb.roots, axis=1).max() < 1e-6 * s.model.size
