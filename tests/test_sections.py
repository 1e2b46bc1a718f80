"""Plane sections of exact analytic shapes against their closed-form curvature.

Sources (named beside each check):
- ellipse x = a cos t, y = b sin t: k(t) = a b / (a^2 sin^2 t + b^2 cos^2 t)^(3/2),
  extremes a / b^2 (ends of the major axis) and b / a^2 (do Carmo, Differential
  Geometry of Curves and Surfaces, 1976, sec. 1-5, exercises; formula from memory);
  perimeter 4 a E(e^2) with the complete elliptic integral of the second kind
  (scipy.special.ellipe as the reference);
- a plane at angle theta to the axis of a cylinder of radius R cuts an ellipse of
  semi-axes R / cos(theta) and R (common practice);
- circle of radius R: k = 1/R; graph z(x): k = z'' / (1 + z'^2)^(3/2) (do Carmo sec. 1-5).

Signs follow DEVELOPERS.md: positive where the surface bends towards its normal. The
factory shapes have outward normals (cylinder, sphere, torus: sections bend away, k < 0,
except the torus's inner equator) and the cubic sweep's normal points up (+z).
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy.special import ellipe
from shapes import S, cubic_sweep, cylinder, model_of, sphere, torus

from geometry.errors import BattenError
from geometry.model import Edge, EdgeUse, Face, Model
from geometry.nurbs import NurbsSurface
from geometry.sections import SectionEngine, in_plane_axes, plane_section, section_family

CURVATURE_RTOL = 1e-9
LENGTH_RTOL = 1e-8
ON_SURFACE_TOL = 1e-10
POLE_RTOL = 1e-7


@pytest.fixture(scope="module")
def ellipse_cut():
    radius, theta = 2.0, np.radians(30.0)
    normal = np.array([np.sin(theta), 0.0, np.cos(theta)])
    section = plane_section(model_of(cylinder(radius, -3.0, 3.0)), [0, 0, 0], normal)
    return section, radius / np.cos(theta), radius


def test_ellipse_section_is_one_closed_curve_on_both_surfaces(ellipse_cut):
    section, _, radius = ellipse_cut
    assert len(section.curves) == 1
    curve = section.curves[0]
    assert curve.closed and curve.kind == "plane"
    p = curve.points
    assert_allclose(np.hypot(p[:, 0], p[:, 1]), radius, rtol=ON_SURFACE_TOL)
    assert_allclose(p @ section.normal, 0.0, atol=ON_SURFACE_TOL)
    assert_allclose(p[0], p[-1], atol=1e-12)  # closed curves repeat their first point


def test_ellipse_curvature_everywhere_matches_closed_form(ellipse_cut):
    # do Carmo 1976 sec. 1-5: k(t) = a b / (a^2 sin^2 t + b^2 cos^2 t)^(3/2)
    section, a, b = ellipse_cut
    curve = section.curves[0]
    major = np.cross([0.0, 1.0, 0.0], section.normal)  # in-plane, along the tilt
    x, y = curve.points @ major, curve.points[:, 1]
    t = np.arctan2(y / b, x / a)
    expected = a * b / (a * a * np.sin(t) ** 2 + b * b * np.cos(t) ** 2) ** 1.5
    # the outward normal: the section bends away from it, k < 0 (as the colour map's H)
    assert_allclose(curve.curvature, -expected, rtol=CURVATURE_RTOL)


def test_ellipse_curvature_extremes_and_no_inflection(ellipse_cut):
    section, a, b = ellipse_cut
    curve = section.curves[0]
    assert len(curve.inflections) == 0
    assert len(curve.extrema) == 4
    maxima = curve.extrema.curvature[curve.extrema.is_maximum]
    minima = curve.extrema.curvature[~curve.extrema.is_maximum]
    # k < 0 (outward normal): the flattest points are the maxima of the signed curvature
    assert_allclose(maxima, -b / a**2, rtol=CURVATURE_RTOL)
    assert_allclose(minima, -a / b**2, rtol=CURVATURE_RTOL)
    assert curve.figures.monotone_pieces == 4
    assert_allclose(curve.figures.max_abs_curvature, a / b**2, rtol=CURVATURE_RTOL)


def test_ellipse_slope_matches_closed_form(ellipse_cut):
    # dk/ds = (dk/dt) / (ds/dt), from the same closed form differentiated in t
    section, a, b = ellipse_cut
    curve = section.curves[0]
    major = np.cross([0.0, 1.0, 0.0], section.normal)
    t = np.arctan2(curve.points[:, 1] / b, (curve.points @ major) / a)
    q = a * a * np.sin(t) ** 2 + b * b * np.cos(t) ** 2
    expected = -3.0 * a * b * (a * a - b * b) * np.sin(t) * np.cos(t) / q**2.5 / np.sqrt(q)
    scale = a / b**2 / (a * b)
    assert_allclose(curve.slope, -expected, rtol=1e-7, atol=1e-10 * scale)  # k < 0, see above


def test_ellipse_perimeter_against_elliptic_integral(ellipse_cut):
    section, a, b = ellipse_cut
    e2 = 1.0 - (b / a) ** 2
    assert_allclose(section.curves[0].length, 4.0 * a * ellipe(e2), rtol=LENGTH_RTOL)


def test_sphere_through_centre_is_a_great_circle():
    radius = 3.0
    normal = np.array([0.3, 0.2, 1.0])
    curve = plane_section(model_of(sphere(radius)), [0, 0, 0], normal).curves[0]
    assert curve.closed
    assert_allclose(curve.curvature, -1.0 / radius, rtol=CURVATURE_RTOL)  # outward normal: H = -1/R
    assert len(curve.inflections) == 0 and len(curve.extrema) == 0
    assert curve.figures.monotone_pieces == 1
    assert_allclose(curve.length, 2 * np.pi * radius, rtol=LENGTH_RTOL)
    assert curve.figures.curvature_variation < 1e-20


def test_torus_equator_gives_two_circles():
    major, minor = 5.0, 1.5
    section = plane_section(model_of(torus(major, minor)), [0, 0, 0], [0, 0, 1])
    assert len(section.curves) == 2  # longest first
    # outer equator bends away from the outward normal, the inner one towards it (it faces the axis)
    for curve, radius, sign in zip(section.curves, (major + minor, major - minor), (-1.0, 1.0), strict=True):
        assert curve.closed
        assert_allclose(np.hypot(curve.points[:, 0], curve.points[:, 1]), radius, rtol=ON_SURFACE_TOL)
        assert_allclose(curve.curvature, sign / radius, rtol=CURVATURE_RTOL)
        assert_allclose(curve.length, 2 * np.pi * radius, rtol=LENGTH_RTOL)
        assert len(curve.inflections) == 0


def test_torus_equator_on_the_parameter_seam():
    # tilt 0: the equator runs along the tube's seam v = 0 = 1 (both domain edges)
    major, minor = 5.0, 1.5
    section = plane_section(model_of(torus(major, minor, tilt=0.0)), [0, 0, 0], [0, 0, 1])
    radii = sorted(float(np.mean(np.hypot(c.points[:, 0], c.points[:, 1]))) for c in section.curves if c.closed)
    assert_allclose(radii, [major - minor, major + minor], rtol=ON_SURFACE_TOL)


def test_cubic_sweep_has_one_inflection_at_zero():
    # z = x^3 - x: z'' = 6x changes sign once, at x = 0 (within 1e-10 in x, issue 4)
    curve = plane_section(model_of(cubic_sweep()), [0, 0.5, 0], [0, 1, 0]).curves[0]
    assert not curve.closed
    assert len(curve.inflections) == 1
    assert abs(curve.inflections.points[0, 0]) < 1e-10
    assert abs(curve.inflections.curvature[0]) < 1e-9


def test_cubic_sweep_curvature_is_the_graph_formula():
    # do Carmo sec. 1-5 for a graph; the face normal points up (+z), so the surface bends
    # towards it where z'' > 0: k = z'' / (1 + z'^2)^(3/2), whichever way the plane's normal points.
    curve = plane_section(model_of(cubic_sweep()), [0, 0.5, 0], [0, 1, 0]).curves[0]
    turned = plane_section(model_of(cubic_sweep()), [0, 0.5, 0], [0, -1, 0]).curves[0]
    x = curve.points[:, 0]
    assert np.all(np.diff(x) >= 0)
    expected = 6.0 * x / (1.0 + (3.0 * x * x - 1.0) ** 2) ** 1.5
    order = np.argsort(turned.points[:, 0])
    assert_allclose(np.interp(x, turned.points[order, 0], turned.curvature[order]), expected, atol=1e-6)
    assert_allclose(curve.curvature, expected, rtol=CURVATURE_RTOL, atol=1e-12)


def _quarter_cylinder(p0, corner, p2, height=1.0) -> NurbsSurface:
    """A quarter circle (rational quadratic, weights 1, sqrt(2)/2, 1) extruded along z."""
    arc = np.array([p0, corner, p2], float)
    poles = np.zeros((3, 2, 3))
    poles[:, :, :2] = arc[:, None, :]
    poles[:, 1, 2] = height
    weights = np.array([[1, 1], [S, S], [1, 1]])
    return NurbsSurface(2, 1, [0, 0, 0, 1, 1, 1], [0, 0, 1, 1], poles, weights)


def _s_curve_faces(radius=2.0):
    # arc B (centre (0, -R)) bends clockwise into (0, 0), arc A (centre (0, R)) anticlockwise out of it;
    # Su x Sv points to +x at (-R, -R) (towards B's centre) and to -y at (0, 0) (away from A's)
    b = _quarter_cylinder((-radius, -radius), (-radius, 0), (0, 0))
    a = _quarter_cylinder((0, 0), (radius, 0), (radius, radius))
    return b, a


@pytest.mark.parametrize("with_edges", [False, True])
def test_s_curve_joins_across_the_seam_with_an_inflection_there(with_edges):
    radius = 2.0
    b, a = _s_curve_faces(radius)
    edges = ()
    if with_edges:
        shared = np.array([[0, 0, 0], [0, 0, 1.0]])
        edges = (Edge(shared, (EdgeUse(0, [[1, 0], [1, 1]]), EdgeUse(1, [[0, 0], [0, 1]]))),)
    model = Model((Face(b), Face(a)), edges)
    section = plane_section(model, [0, 0, 0.5], [0, 0, 1])
    assert len(section.curves) == 1
    curve = section.curves[0]
    assert not curve.closed and set(curve.faces.tolist()) == {0, 1}
    # runs along +x (the first in-plane axis); B bends towards its normal, A away from it
    assert curve.points[0, 0] < curve.points[-1, 0]
    on_b = curve.faces == 0
    assert_allclose(curve.curvature[on_b], 1.0 / radius, rtol=CURVATURE_RTOL)
    assert_allclose(curve.curvature[~on_b], -1.0 / radius, rtol=CURVATURE_RTOL)
    assert len(curve.inflections) == 1 and bool(curve.inflections.at_seam[0])
    assert_allclose(curve.inflections.points[0], [0, 0, 0.5], atol=1e-12)
    assert len(curve.extrema) == 0
    assert_allclose(curve.length, np.pi * radius, rtol=LENGTH_RTOL)


def test_edge_topology_keeps_unrelated_faces_apart():
    # the two arcs touch at (0, 0) but the model's edges say they are not neighbours
    b, a = _s_curve_faces()
    lone = Edge(np.array([[5, 5, 0], [5, 5, 1.0]]), (EdgeUse(0, [[0, 0], [0, 1]]),))
    section = plane_section(Model((Face(b), Face(a)), (lone,)), [0, 0, 0.5], [0, 0, 1])
    assert len(section.curves) == 2


def test_cylinder_in_four_faces_joins_into_one_circle():
    radius = 1.5
    corners = [
        ((radius, 0), (radius, radius), (0, radius)),
        ((0, radius), (-radius, radius), (-radius, 0)),
        ((-radius, 0), (-radius, -radius), (0, -radius)),
        ((0, -radius), (radius, -radius), (radius, 0)),
    ]
    model = model_of(*(_quarter_cylinder(*c) for c in corners))
    section = plane_section(model, [0, 0, 0.3], [0, 0, 1])
    assert len(section.curves) == 1
    curve = section.curves[0]
    assert curve.closed and len(set(curve.faces.tolist())) == 4
    assert_allclose(curve.curvature, -1.0 / radius, rtol=CURVATURE_RTOL)  # Su x Sv points outwards
    assert_allclose(curve.length, 2 * np.pi * radius, rtol=LENGTH_RTOL)
    assert len(curve.inflections) == 0 and len(curve.extrema) == 0


def test_reversed_face_flips_a_plane_section_like_the_colour_map():
    # section curvature is signed by the face normal (face orientation applied), not by the plane
    one = plane_section(Model((Face(sphere(2.0)),)), [0, 0, 0.5], [0, 0, 1]).curves[0]
    two = plane_section(Model((Face(sphere(2.0), reversed=True),)), [0, 0, 0.5], [0, 0, 1]).curves[0]
    down = plane_section(Model((Face(sphere(2.0)),)), [0, 0, 0.5], [0, 0, -1]).curves[0]
    assert np.all(one.curvature < 0) and np.all(two.curvature > 0)  # outward normal: H < 0; reversed: H > 0
    assert_allclose(one.curvature, -two.curvature, rtol=1e-12)
    assert_allclose(one.sides, -two.sides, atol=1e-12)
    assert_allclose(down.curvature, one.curvature[: down.curvature.size], rtol=1e-12)


def test_family_of_parallel_planes_through_a_sphere():
    radius = 3.0
    family = section_family(model_of(sphere(radius)), [0, 0, -2.0], [0, 0, 1], count=5, spacing=1.0)
    assert len(family) == 5
    for section, z in zip(family, (-2.0, -1.0, 0.0, 1.0, 2.0), strict=True):
        assert_allclose(section.origin, [0, 0, z])
        (curve,) = section.curves
        assert_allclose(curve.curvature, -1.0 / np.sqrt(radius**2 - z**2), rtol=CURVATURE_RTOL)


def test_plane_missing_the_model_gives_no_curves():
    assert plane_section(model_of(sphere(1.0)), [0, 0, 5.0], [0, 0, 1]).curves == ()


def test_trimmed_face_keeps_only_the_inside_stretch():
    radius = 2.0
    loop = np.array([[0.1, 0.2], [0.4, 0.2], [0.4, 0.8], [0.1, 0.8]])
    surface = sphere(radius)
    model = Model((Face(surface, loops=(loop,)),))
    (curve,) = plane_section(model, [0, 0, 0], [0, 0, 1]).curves
    face = model.faces[0]
    near_trim = np.min(np.abs(curve.uv[:, :1] - [0.1, 0.4]), axis=1) < 1e-6
    assert np.all(face.inside(curve.uv[:, 0], curve.uv[:, 1]) | near_trim)
    ends = surface.points_at(np.array([0.1, 0.4]), np.array([0.5, 0.5]))
    angle = np.arctan2(ends[:, 1], ends[:, 0])
    assert_allclose(curve.length, radius * (angle[1] - angle[0]), rtol=1e-6)
    assert_allclose(np.sort(curve.uv[[0, -1], 0]), [0.1, 0.4], atol=1e-6)


def test_in_plane_axes_are_right_handed():
    for normal in np.eye(3).tolist() + [[0.3, -0.4, 0.866]]:
        n = np.asarray(normal) / np.linalg.norm(normal)
        e1, e2 = in_plane_axes(n)
        assert_allclose(np.cross(e1, e2), n, atol=1e-15)


def test_bad_plane_is_a_batten_error():
    with pytest.raises(BattenError, match="non-zero normal"):
        SectionEngine(model_of(sphere(1.0))).plane([0, 0, 0], [0, 0, 0])
    with pytest.raises(BattenError):
        SectionEngine(Model(()))


def test_results_are_read_only_and_json_ready():
    import json

    section = plane_section(model_of(cubic_sweep()), [0, 0.5, 0], [0, 1, 0])
    curve = section.curves[0]
    with pytest.raises(ValueError):
        curve.curvature[0] = 1.0
    with pytest.raises(ValueError):
        curve.inflections.points[0, 0] = 1.0
    data = json.loads(json.dumps(section.to_json()))
    entry = data["curves"][0]
    assert len(entry["points"]) == len(entry["curvature"]) == len(entry["arc_length"])
    assert set(entry["inflections"][0]) >= {"point", "s"}
    assert set(entry["extrema"][0]) >= {"point", "s", "curvature"}
    assert entry["figures"]["inflections"] == 1


@pytest.mark.parametrize("normal, point", [((1.0, 0.0, 0.0), (0, 0, 0)), ((1.0, 0.0, 1.0), (0, 0, 2.0))])
def test_sections_through_the_poles_of_a_sphere(normal, point):
    # the sphere's v = 0 and v = 1 edges collapse to its poles; circles through them
    # have radius sqrt(R^2 - d^2), d the plane's distance from the centre (common practice)
    radius = 2.0
    n = np.asarray(normal) / np.linalg.norm(normal)
    d = abs(float(np.asarray(point) @ n))
    (curve,) = plane_section(model_of(sphere(radius)), point, normal).curves
    circle = np.sqrt(radius**2 - d**2)
    assert curve.closed
    # at the pole itself the values are limits extrapolated from nudged samples; outward normal: k < 0
    assert_allclose(curve.curvature, -1.0 / circle, rtol=POLE_RTOL)
    assert_allclose(curve.length, 2 * np.pi * circle, rtol=LENGTH_RTOL)
    assert len(curve.inflections) == 0 and len(curve.extrema) == 0


@pytest.mark.parametrize("seed", range(6))
def test_random_planes_cut_a_sphere_in_circles(seed):
    # every plane at distance d < R from the centre cuts a circle of radius sqrt(R^2 - d^2)
    rng = np.random.default_rng(seed)
    radius = 2.0
    normal = rng.normal(size=3)
    normal /= np.linalg.norm(normal)
    d = rng.uniform(-0.9, 0.9) * radius
    (curve,) = plane_section(model_of(sphere(radius)), d * normal, normal).curves
    circle = np.sqrt(radius**2 - d**2)
    assert curve.closed
    assert_allclose(curve.curvature, -1.0 / circle, rtol=POLE_RTOL)
    assert_allclose(curve.length, 2 * np.pi * circle, rtol=LENGTH_RTOL)
    assert len(curve.inflections) == 0 and len(curve.extrema) == 0


def test_quick_mode_places_special_points_between_the_samples():
    # exact=False (while a plane is dragged) interpolates roots linearly between samples
    engine = SectionEngine(model_of(cubic_sweep()))
    quick = engine.plane([0, 0.5, 0], [0, 1, 0], exact=False).curves[0]
    exact = engine.plane([0, 0.5, 0], [0, 1, 0]).curves[0]
    assert len(quick.inflections) == len(exact.inflections) == 1
    assert len(quick.extrema) == len(exact.extrema)
    step = float(np.max(np.diff(exact.arc_length)))
    assert_allclose(quick.inflections.points, exact.inflections.points, atol=step)
    assert_allclose(quick.extrema.arc_length, exact.extrema.arc_length, atol=step)
