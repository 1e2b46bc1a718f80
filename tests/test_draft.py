"""Draft angles on exact shapes against their closed forms.

Sources (named beside each check):
- the angle between a surface and a line is the complement of the angle between the
  surface normal and the line, draft = asin(n . d) (common practice);
- a right circular cone of half-angle a makes the angle a with its axis along every
  generator (elementary solid geometry, common practice);
- a sphere's normal at latitude phi makes the angle phi with the equator's plane, so its
  draft against the polar axis equals the latitude (common practice);
- cylinder surfaces run parallel to their axis: draft 0 (common practice).
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose
from shapes import cylinder, sphere

from geometry.errors import BattenError
from geometry.model import Face, Model
from geometry.nurbs.primitives import bilinear, revolve
from geometry.tooling import (
    INSUFFICIENT,
    RELEASE_MINUS,
    RELEASE_PLUS,
    draft_at,
    draft_classes,
    draft_on_grid,
    least_out_of_draft,
    principal_axes,
    unit_pull,
    zero_draft_curves,
)

ANGLE_TOL = 1e-9  # degrees
GRID = np.linspace(0.0, 1.0, 41)


def cone(half_angle_deg: float, opening_up: bool):
    """Right circular cone about z from z = 0 to 50: radius 80 at the wide end."""
    t = np.tan(np.radians(half_angle_deg))
    rz = [[80.0 - 50.0 * t, 0.0], [80.0, 50.0]] if opening_up else [[80.0, 0.0], [80.0 - 50.0 * t, 50.0]]
    return revolve(np.array(rz), np.ones(2), np.array([0, 0, 1, 1.0]), 1)


@pytest.mark.parametrize("half_angle", [1.0, 3.0, 15.0, 40.0])
@pytest.mark.parametrize("opening_up", [True, False])
def test_cone_draft_is_its_half_angle_everywhere(half_angle, opening_up):
    # exact: every generator of the cone makes the half-angle with its axis (common practice)
    field = draft_on_grid(cone(half_angle, opening_up), GRID, GRID, (0, 0, 1))
    # normals point away from the axis: a cone narrowing upwards looks up (+d), one widening looks down
    expected = -half_angle if opening_up else half_angle
    assert_allclose(field.draft, expected, atol=ANGLE_TOL)
    assert field.valid.all()


def test_cylinder_draft_is_zero_and_has_no_traced_curve():
    field = draft_on_grid(cylinder(10.0, 0.0, 30.0), GRID, GRID, (0, 0, 1))
    assert_allclose(field.draft, 0.0, atol=ANGLE_TOL)
    # a wall exactly along d is all zero draft, not a curve
    assert zero_draft_curves(Model((Face(cylinder(10.0, 0.0, 30.0)),)), (0, 0, 1)) == ()


def test_sphere_draft_equals_latitude():
    field = draft_on_grid(sphere(25.0), GRID, GRID, (0, 0, 1))
    latitude = np.degrees(np.arcsin(np.clip(field.points[..., 2] / 25.0, -1, 1)))
    assert_allclose(field.draft[:, 1:-1], latitude[:, 1:-1], atol=1e-9)
    # the poles are collapsed edges: the normal there is the limit from a parameter nudged
    # 1e-4 of the domain inwards (DEVELOPERS.md), which lies 1e-4 * 180 degrees off the pole
    assert not field.valid[:, 0].any() and not field.valid[:, -1].any()
    assert_allclose(field.draft[:, 0], -90.0, atol=0.02)
    assert_allclose(field.draft[:, -1], 90.0, atol=0.02)


def test_sphere_zero_draft_curve_is_the_equator():
    radius = 25.0
    curves = zero_draft_curves(Model((Face(sphere(radius)),)), (0, 0, 1))
    points = np.concatenate([c.points for c in curves])
    assert_allclose(points[:, 2], 0.0, atol=1e-9)
    assert_allclose(np.hypot(points[:, 0], points[:, 1]), radius, rtol=1e-12)
    length = sum(c.length for c in curves)
    assert length == pytest.approx(2 * np.pi * radius, rel=1e-3)  # chords of the full circle
    assert max(c.residual for c in curves) <= 1e-12


def test_tilted_sphere_pull_moves_the_zero_draft_curve_to_the_great_circle_across_it():
    d = unit_pull((1.0, 0.0, 1.0))
    curves = zero_draft_curves(Model((Face(sphere(25.0)),)), d)
    points = np.concatenate([c.points for c in curves])
    assert_allclose(points @ d, 0.0, atol=1e-9)  # the great circle normal to d
    assert sum(c.length for c in curves) == pytest.approx(2 * np.pi * 25.0, rel=1e-3)


@pytest.mark.parametrize("tilt", [0.0, 0.5, 2.0, 7.0, 30.0])
def test_plane_tilted_from_the_pull_has_draft_equal_to_the_tilt(tilt):
    # a vertical wall (normal +x) turned by tilt about y leans its normal up by tilt: draft = tilt
    t = np.radians(tilt)
    up = np.array([-np.sin(t), 0.0, np.cos(t)]) * 30.0  # the wall's rising edge, tilted back from z
    corners = np.array([[0, 0, 0], [0, 40, 0], up, up + [0, 40, 0]])
    field = draft_on_grid(bilinear(corners), GRID, GRID, (0, 0, 1))
    # normal = Su x Sv = up x y, which for tilt 0 is -x: flip the face to look along +x
    assert_allclose(-field.draft, tilt, atol=ANGLE_TOL)
    flipped = draft_on_grid(bilinear(corners), GRID, GRID, (0, 0, 1), reversed=True)
    assert_allclose(flipped.draft, tilt, atol=ANGLE_TOL)


def test_scattered_draft_matches_the_grid():
    surface = sphere(10.0)
    rng = np.random.default_rng(7)
    u, v = rng.uniform(0, 1, 50), rng.uniform(0.05, 0.95, 50)
    points = surface.points_at(u, v)
    assert_allclose(draft_at(surface, u, v, (0, 0, 2)), np.degrees(np.arcsin(points[:, 2] / 10.0)), atol=1e-9)


def test_classes_split_at_the_minimum():
    draft = np.array([-5.0, -1.0, -0.5, 0.0, 0.99, 1.0, 12.0, np.nan])
    assert draft_classes(draft, 1.0).tolist() == [
        RELEASE_MINUS,
        RELEASE_MINUS,
        INSUFFICIENT,
        INSUFFICIENT,
        INSUFFICIENT,
        RELEASE_PLUS,
        RELEASE_PLUS,
        INSUFFICIENT,
    ]


def test_sphere_area_weights_sum_to_its_area():
    u = v = np.linspace(0, 1, 401)
    field = draft_on_grid(sphere(10.0), u, v, (0, 0, 1))
    # 4 pi R^2 (exact); the trapezoid rule on 400 spans of a smooth periodic integrand
    assert field.area.sum() == pytest.approx(4 * np.pi * 100.0, rel=1e-4)


def test_bad_pull_is_refused():
    with pytest.raises(BattenError, match="zero length"):
        unit_pull((0, 0, 0))
    with pytest.raises(BattenError, match="three finite"):
        unit_pull((1, np.nan, 0))


def test_principal_axes_of_a_flat_plate_put_its_thickness_first():
    rng = np.random.default_rng(3)
    points = rng.uniform(-1, 1, (2000, 3)) * [50.0, 20.0, 2.0]
    axes = principal_axes(points, np.ones(2000))
    assert_allclose(np.abs(axes), np.eye(3)[[2, 1, 0]], atol=0.05)


def test_least_out_of_draft_picks_the_cone_axis():
    # a cone of half-angle 5 degrees is fully drafted along its own axis only
    field = draft_on_grid(cone(5.0, True), GRID, GRID, (0, 0, 1))
    pick = least_out_of_draft(field.normals.reshape(-1, 3), field.area.ravel(), field.points.reshape(-1, 3), 1.0)
    assert_allclose(np.abs(pick), [0, 0, 1], atol=1e-9)
