"""Section curvature against independent references; iso-parameter and boundary curves; combs.

References:
- geomdl 5.4 surface derivatives and normals (``Surface.derivatives``,
  ``operations.normal``) for Meusnier's theorem: the normal curvature in the
  curve's direction equals k cos(angle between the curve's principal normal and
  the surface normal) (do Carmo, Differential Geometry of Curves and Surfaces,
  1976, sec. 3-2, Meusnier; normal curvature II/I from sec. 3-2/3-3);
- scipy.interpolate.BSpline derivatives for the curvature |C' x C''| / |C'|^3 of
  an iso-parameter curve (do Carmo sec. 1-5);
- scipy.optimize.brentq for the vectorised root finder.
"""

from __future__ import annotations

import numpy as np
import pytest
from geomdl import BSpline, operations
from numpy.testing import assert_allclose
from scipy.interpolate import BSpline as ScipyBSpline
from scipy.optimize import brentq
from shapes import cubic_sweep, model_of, sphere
from surface_factories import random_geomdl_nurbs

from geometry.model import Face, Model
from geometry.nurbs import NurbsSurface, from_geomdl
from geometry.sections import SectionEngine, curvature_comb, plane_section, scale_for_longest_tooth
from geometry.sections.features import illinois_roots

REFERENCE_RTOL = 1e-8


def _geomdl_bicubic(seed: int = 7):
    """A polynomial bicubic with interior knots: geomdl object and Batten surface."""
    rng = np.random.default_rng(seed)
    nu, nv = 6, 5
    poles = np.zeros((nu, nv, 3))
    poles[..., 0] = np.arange(nu)[:, None] * 20.0
    poles[..., 1] = np.arange(nv)[None, :] * 20.0
    poles[..., 2] = rng.normal(scale=8.0, size=(nu, nv))
    surf = BSpline.Surface()
    surf.degree_u = surf.degree_v = 3
    surf.ctrlpts_size_u, surf.ctrlpts_size_v = nu, nv
    surf.ctrlpts = poles.reshape(-1, 3).tolist()
    surf.knotvector_u = [0, 0, 0, 0, 0.3, 0.6, 1, 1, 1, 1]
    surf.knotvector_v = [0, 0, 0, 0, 0.45, 1, 1, 1, 1]
    return surf, from_geomdl(surf)


def _geomdl_normal_curvature(surf, uv, direction):
    """II/I of the geomdl surface at uv in the 3-D tangent direction (do Carmo sec. 3-3)."""
    d = np.asarray(surf.derivatives(uv[0], uv[1], order=2), float)
    su, sv, suu, suv, svv = d[1, 0], d[0, 1], d[2, 0], d[1, 1], d[0, 2]
    n = np.asarray(operations.normal(surf, list(uv))[1], float)
    n /= np.linalg.norm(n)
    ab = np.linalg.lstsq(np.stack([su, sv], axis=1), direction, rcond=None)[0]
    first = ab @ np.array([[su @ su, su @ sv], [su @ sv, sv @ sv]]) @ ab
    second = ab @ np.array([[suu @ n, suv @ n], [suv @ n, svv @ n]]) @ ab
    return second / first, n


@pytest.mark.parametrize("seed", [3, 11])
def test_plane_section_curvature_obeys_meusnier_against_geomdl(seed):
    surf, surface = random_geomdl_nurbs(seed)
    centre = surface.points_at(np.array([0.5]), np.array([0.5]))[0]
    normal = np.array([1.0, 0.4, 0.3])
    section = plane_section(Model((Face(surface),)), centre, normal)
    curve = section.curves[0]
    picks = np.linspace(3, curve.points.shape[0] - 4, 12).astype(int)
    for i in picks:
        k_n, n = _geomdl_normal_curvature(surf, curve.uv[i], curve.tangents[i])
        # Meusnier: k_n = k cos(phi), cos(phi) = (in-plane normal) . (surface normal)
        assert_allclose(curve.curvature[i] * (curve.sides[i] @ n), k_n, rtol=REFERENCE_RTOL, atol=1e-12)


def test_iso_curve_curvature_against_scipy_bspline():
    surf, surface = _geomdl_bicubic()
    v0 = 0.37
    engine = SectionEngine(Model((Face(surface),)))
    (curve,) = engine.iso_curves(0, "v", [v0])
    assert curve.kind == "iso_v" and curve.parameter == v0
    # the iso-curve v = v0 of a polynomial surface is the B-spline with poles sum_j N_j(v0) P_ij
    knots_v = np.asarray(surf.knotvector_v, float)
    weights_v = ScipyBSpline.design_matrix([v0], knots_v, 3).toarray()[0]
    rows = np.einsum("j,ijk->ik", weights_v, surface.poles)
    ref = ScipyBSpline(np.asarray(surf.knotvector_u, float), rows, 3)
    u = curve.uv[:, 0]
    c1, c2 = ref.derivative(1)(u), ref.derivative(2)(u)
    expected = np.linalg.norm(np.cross(c1, c2), axis=1) / np.linalg.norm(c1, axis=1) ** 3
    assert_allclose(curve.abs_curvature, expected, rtol=REFERENCE_RTOL)
    assert_allclose(curve.points, ref(u), atol=1e-10)
    # signed curvature of a surface curve: the face's normal curvature along it (geomdl normal)
    for i in (0, curve.points.shape[0] // 2, curve.points.shape[0] - 1):
        k_n, _ = _geomdl_normal_curvature(surf, curve.uv[i], curve.tangents[i])
        assert_allclose(curve.curvature[i], k_n, rtol=REFERENCE_RTOL, atol=1e-12)


def test_iso_curve_slope_matches_differences_of_the_exact_curvature():
    # dk/ds is exact (third derivatives); compare with central differences of k(s)
    _, surface = _geomdl_bicubic()
    engine = SectionEngine(Model((Face(surface),)), point_spacing=0.05)
    (curve,) = engine.iso_curves(0, "u", [0.5])
    smooth = curve.spans[1:-1] == curve.spans[2:]
    smooth &= curve.spans[1:-1] == curve.spans[:-2]
    s, k = curve.arc_length, curve.curvature
    diff = (k[2:] - k[:-2]) / (s[2:] - s[:-2])
    assert_allclose(curve.slope[1:-1][smooth], diff[smooth], rtol=1e-3, atol=1e-3 * np.abs(diff).max())


def test_reversed_face_flips_iso_curve_curvature():
    _, surface = _geomdl_bicubic()
    one = SectionEngine(Model((Face(surface),))).iso_curves(0, "u", [0.4])[0]
    two = SectionEngine(Model((Face(surface, reversed=True),))).iso_curves(0, "u", [0.4])[0]
    assert_allclose(two.curvature, -one.curvature, rtol=1e-12)


def test_profile_iso_curve_inflects_at_zero():
    # v = const of the cubic sweep is the profile z = x^3 - x itself (u maps linearly to x)
    (curve,) = SectionEngine(model_of(cubic_sweep())).iso_curves(0, "v", [0.5])
    assert len(curve.inflections) == 1
    assert abs(curve.inflections.points[0, 0]) < 1e-10
    assert abs(curve.inflections.uv[0, 0] - 0.5) < 1e-10


def test_boundary_curves_of_the_cubic_sweep():
    curves = SectionEngine(model_of(cubic_sweep())).boundary_curves(0)
    assert len(curves) == 4 and all(c.kind == "boundary" for c in curves)
    inflections = sorted(len(c.inflections) for c in curves)
    assert inflections == [0, 0, 1, 1]  # the two straight rulings, the two profiles
    straight = [c for c in curves if len(c.inflections) == 0]
    assert all(c.figures.max_abs_curvature < 1e-12 for c in straight)


def test_boundary_curves_skip_collapsed_edges():
    # a sphere's v = 0 and v = 1 edges are its poles
    curves = SectionEngine(model_of(sphere(1.0))).boundary_curves(0)
    assert len(curves) == 2  # the seam u = 0 and u = 1, each a half meridian
    assert_allclose([c.length for c in curves], np.pi, rtol=1e-8)


def test_bicubic_with_simple_knots_gives_extrema_at_knots():
    # a C2 bicubic's dk/ds jumps at simple knots: an extremum there is the knot crossing
    _, surface = _geomdl_bicubic()
    section = plane_section(Model((Face(surface),)), [50.0, 40.0, 0.0], [0.0, 1.0, 0.0])
    curve = section.curves[0]
    at_knot = curve.extrema.at_knot
    knots_u = np.array([0.3, 0.6])
    if np.any(at_knot):
        assert np.min(np.abs(curve.extrema.uv[at_knot, 0, None] - knots_u), axis=1).max() < 1e-9
    assert curve.figures.monotone_pieces == len(curve.extrema) + 1


def test_comb_teeth_are_curvature_times_scale():
    radius = 2.0
    curve = plane_section(model_of(sphere(radius)), [0, 0, 0], [0, 0, 1]).curves[0]
    comb = curvature_comb(curve, scale=0.5)
    length = np.linalg.norm(comb.tips - comb.roots, axis=1)
    assert_allclose(length, 0.5 / radius, rtol=1e-12)
    # positive scale: teeth towards the centre of curvature (the sphere's centre here)
    assert_allclose(np.linalg.norm(comb.tips, axis=1), radius - 0.5 / radius, rtol=1e-10)
    assert comb.closed and comb.envelope.shape[0] == comb.tips.shape[0] + 1


def test_comb_at_a_spacing_and_flip_at_the_inflection():
    curve = plane_section(model_of(cubic_sweep()), [0, 0.5, 0], [0, 1, 0]).curves[0]
    comb = curvature_comb(curve, scale=0.1, spacing=0.25)
    assert_allclose(np.diff(comb.arc_length)[:-1], 0.25)
    assert comb.arc_length[-1] == pytest.approx(curve.length)
    side = np.einsum("ij,j->i", comb.tips - comb.roots, [0, 0, 1.0])
    assert np.all(side[comb.roots[:, 0] < -0.1] < 0) and np.all(side[comb.roots[:, 0] > 0.1] > 0)
    assert scale_for_longest_tooth([curve], 10.0) == pytest.approx(10.0 / np.max(np.abs(curve.curvature)))


def test_illinois_roots_against_brentq():
    funcs = [np.cos, lambda t: t**3 - 0.2, lambda t: np.tanh(20 * (t - 0.7))]
    lo, hi = np.array([1.0, 0.0, 0.0]), np.array([2.0, 1.0, 1.0])

    def value(sel, t):
        x = lo[sel] + t * (hi[sel] - lo[sel])
        return np.array([funcs[i](xi) for i, xi in zip(sel, x, strict=True)])

    idx = np.arange(3)
    t = illinois_roots(value, value(idx, np.zeros(3)), value(idx, np.ones(3)))
    expected = [brentq(f, a, b, xtol=1e-15) for f, a, b in zip(funcs, lo, hi, strict=True)]
    assert_allclose(lo + t * (hi - lo), expected, atol=1e-11)


def test_trim_loop_sides_on_a_sphere_bend_like_the_sphere():
    # every normal curvature of a sphere is +-1/R (do Carmo sec. 3-2: all points umbilic);
    # a rectangular loop in (u, v) gives four stretches split at its corners
    radius = 2.0
    loop = np.array([[0.1, 0.2], [0.4, 0.2], [0.4, 0.8], [0.1, 0.8]])
    model = Model((Face(sphere(radius), loops=(loop,)),))
    curves = SectionEngine(model).boundary_curves(0)
    assert len(curves) == 4 and all(c.kind == "trim" for c in curves)
    from geometry.nurbs import curvature_at

    sign = np.sign(curvature_at(model.faces[0].surface, np.array([0.25]), np.array([0.5])).mean[0])
    for curve in curves:
        assert_allclose(curve.curvature, sign / radius, rtol=1e-9)
        assert not curve.closed and len(curve.inflections) == 0


def test_trim_hole_on_a_flat_face_is_a_circle():
    # a flat face bends nowhere (k_n = 0); the hole's own curvature is 1/r (a 96-gon
    # interpolated by a periodic cubic spline: second derivatives good to a few 1e-4)
    poles = np.zeros((2, 2, 3))
    poles[..., 0], poles[..., 1] = [[0, 0], [100, 100]], [[0, 100], [0, 100]]
    flat = NurbsSurface(1, 1, [0, 0, 1, 1], [0, 0, 1, 1], poles)
    angle = np.linspace(0, 2 * np.pi, 96, endpoint=False)
    hole = np.stack([0.5 + 0.2 * np.cos(angle), 0.5 + 0.2 * np.sin(angle)], axis=1)
    outer = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]])
    curves = SectionEngine(Model((Face(flat, loops=(outer, hole)),))).boundary_curves(0)
    (circle,) = [c for c in curves if c.parameter == 1.0]
    assert circle.closed
    assert_allclose(circle.abs_curvature, 1.0 / 20.0, rtol=1e-3)
    assert_allclose(circle.length, 2 * np.pi * 20.0, rtol=1e-6)
    assert np.max(np.abs(circle.curvature)) < 1e-12 and len(circle.inflections) == 0
