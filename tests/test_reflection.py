"""Reflection lines, highlight lines and isophotes against closed forms on exact surfaces.

Surfaces are exact rational NURBS (a plane, a circular cylinder in the
standard rational quadratic form, The NURBS Book 2nd ed., sec. 7.3, eq. 7.8 with
w = cos 45 deg), so every expected value is a formula of elementary geometry.
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose
from shapes import quarter_cylinder

from geometry.nurbs import NurbsSurface, curvature_on_grid
from geometry.reflection import (
    LightPlane,
    eye_rays,
    highlight_distance,
    highlight_parameter,
    isophote_angle,
    reflection_angle,
    reflection_parameter,
)

EXACT = 1e-9  # rounding of a few dozen flops on values of order 1..100


def plane_face(size: float = 100.0) -> NurbsSurface:
    """The square [0, size]^2 of the plane z = 0 as a bilinear patch; normal +z."""
    poles = np.array([[[0, 0, 0], [0, size, 0]], [[size, 0, 0], [size, size, 0]]], float)
    return NurbsSurface(1, 1, [0, 0, 1, 1], [0, 0, 1, 1], poles)


def outward_cylinder(radius=20.0, length=50.0):
    surface = quarter_cylinder(radius, length)
    field = curvature_on_grid(surface, np.linspace(0, 1, 41), np.linspace(0, 1, 5), workers=1)
    radial = field.points * [0, 1, 1]
    if np.mean(np.sum(field.normals * radial, axis=-1)) < 0:
        field = curvature_on_grid(surface, np.linspace(0, 1, 41), np.linspace(0, 1, 5), reversed=True, workers=1)
    theta = np.arctan2(field.points[..., 2], field.points[..., 1])  # polar angle from +y towards +z
    return field, theta


def test_isophote_of_a_plane_is_constant():
    field = curvature_on_grid(plane_face(), np.linspace(0, 1, 9), np.linspace(0, 1, 9), workers=1)
    light = np.array([1.0, 2.0, 2.0])  # |light| = 3: cos = 2/3 against +z
    angle = isophote_angle(field.normals, light)
    assert_allclose(angle, np.degrees(np.arccos(2.0 / 3.0)), atol=EXACT)


def test_isophote_on_cylinder_is_the_polar_angle():
    # n = (0, cos t, sin t) against L = +y: angle = t (elementary).
    field, theta = outward_cylinder()
    assert_allclose(isophote_angle(field.normals, [0, 1, 0]), np.degrees(theta), atol=1e-7)


def test_highlight_parameter_on_cylinder_matches_closed_form():
    # Light lines along x in the plane y = H. The normal line of (x, R cos t, R sin t)
    # reaches y = H at z = H tan t (similar triangles), independent of R: the across
    # coordinate (plane frame: across = normal x along = (0,1,0) x (1,0,0) = -z) is -H tan t.
    height = 70.0
    field, theta = outward_cylinder()
    inner = np.abs(np.cos(theta)) > 0.05  # normal nearly parallel to the light plane: no crossing
    s = highlight_parameter(field.points, field.normals, LightPlane((1, 0, 0), (0, 1, 0), (0, height, 0)))
    assert_allclose(s[inner], -height * np.tan(theta[inner]), rtol=1e-9, atol=1e-9)


def test_highlight_parameter_zero_where_beier_chen_distance_is_zero():
    # Beier & Chen 1994 eq. 2 distance to the light line through the plane point
    # vanishes exactly where the piercing coordinate does; elsewhere both grow together.
    field, _ = outward_cylinder()
    s = highlight_parameter(field.points, field.normals, LightPlane((1, 0, 0), (0, 1, 0), (0, 70, 10)))
    d = highlight_distance(field.points, field.normals, [0, 70, 10], [1, 0, 0])
    near = np.abs(s) < 1e-6
    assert_allclose(d[near], 0.0, atol=1e-6)
    far = np.isfinite(s) & (np.abs(s) > 1.0)
    assert np.all(d[far] > 0)


def test_reflection_angle_on_a_plane_mirror_is_uniform_and_equals_view_angle():
    # Parallel view direction d = (0, sin a, -cos a) off a mirror z = 0 reflects to
    # (0, sin a, cos a): at angle a from the up direction +z about the lines along x.
    field = curvature_on_grid(plane_face(), np.linspace(0, 1, 7), np.linspace(0, 1, 7), workers=1)
    a = np.radians(25.0)
    rays = eye_rays(field.points, None, [0, np.sin(a), -np.cos(a)])
    angle = reflection_angle(field.normals, rays, [1, 0, 0], [0, 0, 1])
    # across = up x along = z x x = +y, so the angle is +a.
    assert_allclose(angle, 25.0, atol=EXACT)


def test_reflection_angle_on_cylinder_doubles_the_polar_angle():
    # Law of reflection: d = (0, 0, -1) at n = (0, cos t, sin t) gives
    # r = d - 2 (d . n) n = (0, sin 2t, -cos 2t).
    field, theta = outward_cylinder()
    angle = reflection_angle(field.normals, eye_rays(field.points, None, [0, 0, -1]), [1, 0, 0], [0, 1, 0])
    # frame: normal = +y, across = y x x = -z  -> angle = atan2(-r_z, r_y) = atan2(cos 2t, sin 2t) = 90 - 2t
    expected = 90.0 - 2.0 * np.degrees(theta)
    assert_allclose(angle, expected, atol=1e-7)


def test_reflection_parameter_on_a_plane_mirror_matches_mirror_image():
    # Eye at height h over the mirror z = 0, light plane z = H, lines along x. The
    # reflected ray from the eye via (x, y, 0) reaches z = H at y (1 + H / h): the eye's
    # mirror image (0, 0, -h) seen through the point, similar triangles.
    h, height = 40.0, 100.0
    field = curvature_on_grid(plane_face(), np.linspace(0, 1, 6), np.linspace(0, 1, 6), workers=1)
    rays = eye_rays(field.points, [0, 0, h])
    s = reflection_parameter(field.points, field.normals, rays, LightPlane((1, 0, 0), (0, 0, 1), (0, 0, height)))
    # across = z x x = +y
    assert_allclose(s, field.points[..., 1] * (1 + height / h), rtol=1e-12, atol=1e-9)


def test_reflection_parameter_is_nan_when_the_ray_runs_away_from_the_lights():
    field = curvature_on_grid(plane_face(), np.linspace(0, 1, 3), np.linspace(0, 1, 3), workers=1)
    rays = eye_rays(field.points, [0, 0, 40])
    s = reflection_parameter(field.points, field.normals, rays, LightPlane((1, 0, 0), (0, 0, 1), (0, 0, -100)))
    assert np.all(np.isnan(s))


@pytest.mark.parametrize("shape", [(5,), (4, 6)])
def test_fields_keep_sample_shape(shape):
    rng = np.random.default_rng(6)
    normals = rng.normal(size=(*shape, 3))
    normals /= np.linalg.norm(normals, axis=-1, keepdims=True)
    points = rng.normal(size=(*shape, 3))
    assert isophote_angle(normals, [0, 0, 1]).shape == shape
    assert highlight_parameter(points, normals, LightPlane((1, 0, 0), (0, 0, 1), (0, 0, 9))).shape == shape
    assert reflection_angle(normals, eye_rays(points, [0, 0, 50]), [1, 0, 0], [0, 0, 1]).shape == shape
