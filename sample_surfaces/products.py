"""The sample products of Batten's demo scenario, built as exact NURBS faces.

Tarnwick Appliances is an invented brand; every product, name and dimension
here is made up for the demo. Each builder returns a :class:`Sample`: named
faces plus the facts the construction guarantees (the manifest's ``expect``),
so the seam, section and check features can be tested against them.

Construction rules (cited from memory):

- G1 across a seam: the last two pole rows of one face and the first two of the
  next are collinear, row by row (The NURBS Book, 2nd ed., sec. 5.3 on
  continuity at a knot; Farin, *Curves and Surfaces for CAGD*, 5th ed., ch. 5).
- G2 across a seam: additionally the curvature of the cross-seam curves agrees,
  here either by splitting one C2 spline at a simple knot (The NURBS Book P2.5:
  C^(p-m) at a knot of multiplicity m) or by the three-row condition on a Bezier
  end, whose curvature is ``(n-1)/n * h / a^2`` for a last leg of length ``a``
  and a third-last pole at height ``h`` above the end tangent (Farin, ch. 5).
- Circular arcs are rational quadratics (The NURBS Book eq. 7.8).
"""

from __future__ import annotations

import functools
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from geometry.nurbs import NurbsSurface
from geometry.nurbs.primitives import bilinear

from .construct import arc_profile, clamped_knots, extrude_profile, greville, split_surface
from .export import SampleFace

CATALOGUE = tomllib.loads(Path(__file__).with_name("catalogue.toml").read_text(encoding="utf-8"))
# Polyline points for a seam's length: chord error below 1e-6 relative on these seams.
SEAM_LENGTH_SAMPLES = 4001


@dataclass
class Sample:
    """A product: file stem, faces in order, whether to sew, and what to expect."""

    stem: str
    product: str
    description: str
    faces: list[SampleFace]
    expect: dict = field(default_factory=dict)
    sew: bool = True


def _mid_point(surface: NurbsSurface) -> list[float]:
    (u0, u1), (v0, v1) = surface.domain
    return _xyz(surface.points_at(np.array([0.5 * (u0 + u1)]), np.array([0.5 * (v0 + v1)]))[0])


def _xyz(p) -> list[float]:
    return [round(float(c), 9) for c in p]


def _boundary(surface: NurbsSurface, side: str, n: int = 3) -> np.ndarray:
    """Points along one side of the domain ('u0', 'u1', 'v0', 'v1'), shape (n, 3)."""
    (u0, u1), (v0, v1) = surface.domain
    t = np.linspace(0.0, 1.0, n)
    if side[0] == "u":
        u = np.full(n, u0 if side == "u0" else u1)
        v = v0 + t * (v1 - v0)
    else:
        v = np.full(n, v0 if side == "v0" else v1)
        u = u0 + t * (u1 - u0)
    return surface.points_at(u, v)


def seam(a: SampleFace, side_a: str, b: SampleFace, continuity: str, **values) -> dict:
    """Manifest entry of a designed seam along ``side_a`` of face ``a``.

    Face ``b`` meets it with the opposite side (``u1`` against ``u0``), and both
    run along the seam with the same parameter (they come from one surface or
    share the along-seam knot vector).
    """
    pts = _boundary(a.surface, side_a, 3)
    dense = _boundary(a.surface, side_a, SEAM_LENGTH_SAMPLES)
    entry = {
        "faces": [a.name, b.name],
        "sides": [side_a, side_a[0] + "0"],
        "continuity": continuity,
        "start": _xyz(pts[0]),
        "point": _xyz(pts[1]),
        "end": _xyz(pts[2]),
        "length_mm": round(float(np.linalg.norm(np.diff(dense, axis=0), axis=1).sum()), 6),
        "gap_mm": 0.0,
        "angle_deg": 0.0,
        "curvature_jump": 0.0,
    }
    entry.update(values)
    return entry


def _face_list(faces: list[SampleFace]) -> list[dict]:
    return [
        {"name": f.name, "index": i, "point": _mid_point(f.surface), "trimmed": bool(f.holes or f.outer)}
        for i, f in enumerate(faces)
    ]


def _product(build):
    """Turn a builder returning (faces, expect) into one returning its :class:`Sample`.

    The file stem is the builder's name; product name, description and free-edge
    count come from its table in ``catalogue.toml``; ``expect`` gains the face list
    and empty lists for what the product does not have.
    """
    about = CATALOGUE[build.__name__]

    @functools.wraps(build)
    def make() -> Sample:
        faces, expect = build()
        for key in ("seams", "inflections", "clean_sections"):
            expect.setdefault(key, [])
        expect["faces"] = _face_list(faces)
        expect["free_edges"] = {"count": about["free_edges"], "note": about["free_note"]}
        # edges of the STEP file used by one face only: the free edges, plus both edges of a gap
        expect["unshared_edges_step"] = about.get("unshared_edges_step", about["free_edges"])
        return Sample(build.__name__, about["product"], about["description"], faces, expect, about.get("sew", True))

    return make


# -- 1. hand-held garment steamer: a tube of eight faces, all G2 -------------------

# Every cross-section is the same convex loop scaled by the half-width; one
# aspect ratio keeps the longitudinal sections free of inflections (see steamer_body).
STEAMER_HEIGHT_TO_WIDTH = 1.15


@_product
def steamer_body() -> tuple[list[SampleFace], dict]:
    """Tarnwick Plume S3 hand steamer body: grip and head, four faces around each.

    One bicubic surface, periodic around the body (uniform cubic, wrapped poles)
    and clamped along it, split at simple knots: every seam is C2, so G2 with a
    curvature jump at rounding level.

    No plane section inflects. The surface is (x, w(x) Y(v), a w(x) Z(v)) with
    one aspect ratio a. The loop (Y, Z) is a closed B-spline on a convex pole
    octagon, hence convex (variation diminishing: The NURBS Book sec. 3.2 and
    Farin, 5th ed., ch. 7), so every cross-section x = c is convex. w(x) is a
    spline function with concave coefficients at the Greville abscissae, hence
    concave (its second derivative is a spline with coefficients of the sign of
    the second differences; de Boor, *A Practical Guide to Splines*, ch. X).
    A longitudinal section y = c is z = a w g(c / w), g the concave top of the
    loop: the perspective of a concave function, concave and rising in w, and
    of concave w(x), so concave (Boyd & Vandenberghe, *Convex Optimization*,
    secs. 3.2.4 and 3.2.6); likewise z = c. All citations from memory.
    """
    x_breaks = np.linspace(0.0, 180.0, 7)
    ku = clamped_knots(x_breaks, 3)
    xs = greville(ku, 3)  # x(u) = u exactly
    # The body flares from the slim rear of the grip to the head. The half-width
    # poles climb with ever smaller steps (a concave polygon, slopes 0.15 down to
    # 0) and the last two are equal, so the body ends straight into the soleplate.
    half_width = np.array([12.5, 14.0, 16.8, 20.7, 23.9, 25.7, 26.6, 27.0, 27.0])
    half_height = STEAMER_HEIGHT_TO_WIDTH * half_width
    # Cross-section poles clockwise seen from +x (so Su x Sv points outwards),
    # starting at 180 degrees; the piece [3, 5] is centred on pole 2 (the top).
    angles = np.radians(180.0 - 45.0 * np.arange(8))
    squircle = np.where(np.arange(8) % 2 == 1, 0.92 * np.sqrt(2.0), 1.0)
    cy, cz = squircle * np.cos(angles), squircle * np.sin(angles)
    cy, cz = np.concatenate([cy, cy[:3]]), np.concatenate([cz, cz[:3]])  # wrapped poles
    poles = np.stack(
        [
            np.broadcast_to(xs[:, None], (xs.size, cy.size)),
            half_width[:, None] * cy[None, :],
            half_height[:, None] * cz[None, :],
        ],
        axis=-1,
    )
    kv = np.arange(15.0)  # uniform, unclamped: domain [3, 11] is the closed loop
    body = NurbsSurface(3, 3, ku, kv, poles)
    pieces = split_surface(body, [0.0, 90.0, 180.0], [3.0, 5.0, 7.0, 9.0, 11.0])
    sides = ("upper", "side_r", "lower", "side_l")
    faces = [
        SampleFace(f"{part}_{side}", pieces[i][j])
        for i, part in enumerate(("grip", "head"))
        for j, side in enumerate(sides)
    ]
    grip, head = faces[:4], faces[4:]
    soleplate = SampleFace("head_soleplate", _front_plane(), outer=tuple(_end_curve(f.surface) for f in head))
    seams = []
    for ring in (grip, head):
        for j in range(4):
            seams.append(seam(ring[j], "v1", ring[(j + 1) % 4], "G2", curvature_jump_exact=True))
    for j in range(4):
        seams.append(seam(grip[j], "u1", head[j], "G2", curvature_jump_exact=True))
    for face in head:
        seams.append(
            seam(
                face, "u1", soleplate, "G0", sides=["u1", "trim"], angle_deg=90.0, angle_exact=True, curvature_jump=None
            )
        )
    # Through the grip, the ring seam, the head; along the middle and off it, both ways.
    clean = [
        {"plane": _section_plane(axis, value), "count": 0}
        for axis, value in (("x", 45.0), ("x", 90.0), ("x", 135.0), ("y", 0.0), ("y", -10.0), ("z", 0.0), ("z", 15.0))
    ]
    return [*faces, soleplate], {"seams": seams, "clean_sections": clean}


def _end_curve(surface: NurbsSurface) -> tuple:
    """The boundary u = u1 of a clamped face as a 3-D B-spline curve (its last pole row)."""
    return surface.degree_v, np.array(surface.knots_v), np.array(surface.poles[-1])


def _front_plane() -> NurbsSurface:
    """The plane x = 180 as a bilinear patch, u along +y and v along +z (normal +x)."""
    y, z = np.meshgrid([-32.0, 32.0], [-34.0, 34.0], indexing="ij")
    poles = np.stack([np.full_like(y, 180.0), y, z], axis=-1)
    return NurbsSurface(1, 1, clamped_knots([-32.0, 32.0], 1), clamped_knots([-34.0, 34.0], 1), poles)


# -- 2. cooker hood visor: plane tangent to a cylinder, G1 only ----------------------

VISOR_RADIUS = 25.0


@_product
def hood_visor() -> tuple[list[SampleFace], dict]:
    """Tarnwick Aero 60 cooker hood visor: a flat panel rolling over a 25 mm bend.

    The flat face ends in two collinear pole rows on z = 0 and the bend (an exact
    quarter cylinder, rational quadratic) starts with two: the normals agree along
    the seam (G1), the cross-seam curvature jumps from 0 to -1/R (bending away
    from the +z normal).
    """
    width = 120.0
    r = VISOR_RADIUS
    kv = clamped_knots([0.0, width], 1)
    flat_profile = np.array([[-80.0, 0.0, 0.0], [-40.0, 0.0, 0.0], [0.0, 0.0, 0.0]])
    poles, _ = extrude_profile(flat_profile, None, [0.0, width, 0.0])
    flat = NurbsSurface(2, 1, clamped_knots([0.0, 80.0], 2), kv, poles)
    arc, w = arc_profile([0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, 0.0, -r], np.pi / 2)
    poles, weights = extrude_profile(arc, w, [0.0, width, 0.0])
    bend = NurbsSurface(2, 1, clamped_knots([0.0, 1.0], 2), kv, poles, weights)
    faces = [SampleFace("visor_flat", flat), SampleFace("visor_bend", bend)]
    seams = [
        seam(
            faces[0],
            "u1",
            faces[1],
            "G1",
            curvature_jump=1.0 / r,
            curvature_jump_exact=True,
            curvature_jump_rel=1.0,
            cross_curvature=[0.0, -1.0 / r],
        )
    ]
    return faces, {"seams": seams}


@_product
def hood_visor_rev_b() -> tuple[list[SampleFace], dict]:
    """Revision B of the hood visor: the bend eased into the flat, so the seam is G2.

    The same flat panel; the bend is a quartic Bezier profile from the seam
    down to (25, y, -25). Its first three poles lie on the flat's plane, so its
    curvature at the seam is ``(n-1)/n * h / a^2 = 0`` with ``h = 0`` (Farin,
    ch. 5, cited from memory), equal to the flat's: the G1 seam of revision A is
    fixed. The control polygon turns one way only, so sections do not inflect.
    """
    width = 120.0
    kv = clamped_knots([0.0, width], 1)
    flat_profile = np.array([[-80.0, 0.0, 0.0], [-40.0, 0.0, 0.0], [0.0, 0.0, 0.0]])
    poles, _ = extrude_profile(flat_profile, None, [0.0, width, 0.0])
    flat = NurbsSurface(2, 1, clamped_knots([0.0, 80.0], 2), kv, poles)
    profile = np.array([[0.0, 0.0, 0.0], [10.0, 0.0, 0.0], [18.0, 0.0, 0.0], [25.0, 0.0, -8.0], [25.0, 0.0, -25.0]])
    poles, _ = extrude_profile(profile, None, [0.0, width, 0.0])
    bend = NurbsSurface(4, 1, clamped_knots([0.0, 1.0], 4), kv, poles)
    faces = [SampleFace("visor_flat", flat), SampleFace("visor_bend", bend)]
    seams = [
        seam(
            faces[0],
            "u1",
            faces[1],
            "G2",
            curvature_jump=0.0,
            curvature_jump_exact=True,
            curvature_jump_rel=0.0,
            cross_curvature=[0.0, 0.0],
        )
    ]
    return faces, {"seams": seams}


# -- 3. toaster side panel: a pressed bump whose sections inflect --------------------

# `batten check` cuts this many evenly spaced planes across x and across y by default.
DEFAULT_SECTIONS_PER_AXIS = 5


@_product
def toaster_panel() -> tuple[list[SampleFace], dict]:
    """Tarnwick Crisp 2 toaster side panel: a gently crowned panel with a pressed bump.

    x(u) = u and y(v) = v exactly (poles at Greville abscissae), so the section by
    a plane y = c is the graph z = f(x, c) and its curvature has the sign of
    f_xx: the crown alone keeps f_xx < 0; the bump's foot makes it positive, so
    a section through the bump inflects (three or four times).
    """
    ku = clamped_knots(np.linspace(0.0, 160.0, 9), 3)
    kv = clamped_knots(np.linspace(0.0, 110.0, 7), 3)
    gx, gy = greville(ku, 3), greville(kv, 3)
    x, y = np.meshgrid(gx, gy, indexing="ij")
    z = 6.0 - (x - 80.0) ** 2 / 800.0 - (y - 55.0) ** 2 / 1200.0
    bump = np.zeros_like(z)
    bump[6, 5] = 4.0
    bump[[5, 7], 5] = 1.5
    bump[6, [4, 6]] = 1.5
    surface = NurbsSurface(3, 3, ku, kv, np.stack([x, y, z + bump], axis=-1))
    face = SampleFace("side_panel", surface)
    sections = [
        _inflection_section(surface, "side_panel", "y", 70.0),
        _inflection_section(surface, "side_panel", "x", 100.0),
    ]
    clean = [{"plane": _section_plane("y", 10.0), "count": 0}, {"plane": _section_plane("x", 20.0), "count": 0}]
    # The planes a default `batten check` cuts (x:5;y:5: sixths of the 160 x 110 mm panel).
    default = [
        _inflection_section(surface, "side_panel", axis, size * i / (DEFAULT_SECTIONS_PER_AXIS + 1))
        for axis, size in (("x", 160.0), ("y", 110.0))
        for i in range(1, DEFAULT_SECTIONS_PER_AXIS + 1)
    ]
    return [face], {"inflections": sections, "clean_sections": clean, "default_sections": default}


def _section_plane(axis: str, value: float) -> dict:
    """The plane ``axis = value`` (axis "x", "y" or "z") as point and normal."""
    normal = [float(axis == a) for a in "xyz"]
    return {"point": [value * c for c in normal], "normal": normal}


# |f_xx| at a knot below this fraction of its largest value is zero (rounding).
SECOND_DERIVATIVE_ZERO = 1e-12


def _inflection_section(surface: NurbsSurface, face: str, axis: str, value: float) -> dict:
    """Where the section ``axis = value`` of a bicubic graph face inflects.

    With x = u and y = v the section y = c is z = f(x, c), whose curvature has the
    sign of f_xx. The second derivative of a cubic spline is a continuous
    piecewise linear spline (degree p - 2), so its sign changes, and their exact
    places, follow from its values at the knots (The NURBS Book sec. 3.3 on
    derivatives, from memory): a root inside a span where the values there
    differ in sign, or the knot itself where f_xx is zero at it (to rounding)
    between values of opposite sign.
    """
    along_u = axis == "y"
    knots = np.unique(surface.knots_u if along_u else surface.knots_v)
    fixed = np.full(knots.size, value)
    ders = surface.derivatives_at(*((knots, fixed) if along_u else (fixed, knots)), 2)
    d2 = ders[2, 0, :, 2] if along_u else ders[0, 2, :, 2]
    signs = np.where(np.abs(d2) > SECOND_DERIVATIVE_ZERO * np.abs(d2).max(), np.sign(d2), 0.0)
    nonzero = np.flatnonzero(signs)
    a, b = nonzero[:-1], nonzero[1:]
    a, b = a[signs[a] != signs[b]], b[signs[a] != signs[b]]
    inside = b == a + 1  # a root inside the span; else f_xx is zero at the knot(s) between
    lo, hi = d2[a], d2[b]
    roots = np.where(
        inside, knots[a] + (knots[b] - knots[a]) * lo / np.where(inside, lo - hi, 1.0), knots[(a + b) // 2]
    )
    fixed = np.full(roots.size, value)
    ru, rv = (roots, fixed) if along_u else (fixed, roots)
    return {
        "face": face,
        "plane": _section_plane(axis, value),
        "count": int(roots.size),
        "points": [_xyz(p) for p in surface.points_at(ru, rv)],
        "uv": [[round(float(a), 9), round(float(b), 9)] for a, b in zip(ru, rv, strict=True)],
        "how": "exact roots of the piecewise-linear second derivative of the section graph",
    }


# -- 4. heat gun side covers: 0.02 mm gap -----------------------------------------------

GAP_MM = 0.02


@_product
def heatgun_covers() -> tuple[list[SampleFace], dict]:
    """Tarnwick Blaze 2000 heat gun side covers: two panels 0.02 mm apart.

    One extruded cubic profile split at a simple knot (C2), then the front half
    moved by 0.02 mm along the cross-seam unit tangent at the seam. The seam line
    is straight (along y) and the move is perpendicular to it, so the gap is
    0.02 mm along the whole seam; normals and curvatures are unchanged by a
    translation, so angle and curvature jump stay at zero.
    """
    ku = clamped_knots([0.0, 30.0, 60.0, 90.0, 120.0], 3)
    gx = greville(ku, 3)
    # Crown off the seam, so the move across it is not along an axis.
    profile = np.stack([gx, np.zeros_like(gx), 30.0 - (gx - 45.0) ** 2 / 150.0], axis=1)
    poles, _ = extrude_profile(profile, None, [0.0, 140.0, 0.0])
    cover = NurbsSurface(3, 1, ku, clamped_knots([0.0, 140.0], 1), poles)
    rear, front = (row[0] for row in split_surface(cover, [0.0, 60.0, 120.0], [0.0, 140.0]))
    tangent = rear.derivatives_at(np.array([60.0]), np.array([0.0]), 1)[1, 0, 0]
    shift = np.eye(4)
    shift[:3, 3] = GAP_MM * tangent / np.linalg.norm(tangent)
    faces = [SampleFace("cover_rear", rear), SampleFace("cover_front", front.transformed(shift))]
    seams = [
        seam(
            faces[0],
            "u1",
            faces[1],
            "broken",
            gap_mm=GAP_MM,
            gap_exact=True,
            curvature_jump_exact=True,
            note="fails position at the common-practice 0.01 mm tolerance; normals and curvature match exactly",
        )
    ]
    return faces, {"seams": seams}


# -- 5. bread bin roll top: a clean G2 blend ----------------------------------------------

BLEND_RADIUS = 30.0


@_product
def breadbin_roll_top() -> tuple[list[SampleFace], dict]:
    """Tarnwick Keep bread bin roll top: flat top, quintic G2 blend, cylindrical front.

    The blend is a degree-5 Bezier profile: its first three poles are collinear on
    the flat (end curvature 0 = the flat's), its last three satisfy the three-row
    condition for curvature 1/R at the end, where the R = 30 mm front cylinder
    starts with the same tangent. Its control polygon is convex, so the blend has
    no inflection (variation diminishing, Farin ch. 5).
    """
    length = 200.0
    r = BLEND_RADIUS
    kv = clamped_knots([0.0, length], 1)
    along = [0.0, length, 0.0]
    theta = np.radians(45.0)
    tangent = np.array([np.cos(theta), 0.0, -np.sin(theta)])
    to_centre = np.array([-np.sin(theta), 0.0, -np.cos(theta)])  # right of travel: the curve turns clockwise
    end = np.array([40.0, 0.0, -12.0])
    leg = 8.0
    height = 5.0 * leg**2 / (4.0 * r)  # (n-1)/n * h / a^2 = 1/R with n = 5
    blend_profile = np.array(
        [
            [0.0, 0.0, 0.0],
            [leg, 0.0, 0.0],
            [2 * leg, 0.0, 0.0],
            end - 2 * leg * tangent + height * to_centre,
            end - leg * tangent,
            end,
        ]
    )
    poles, _ = extrude_profile(blend_profile, None, along)
    blend = NurbsSurface(5, 1, clamped_knots([0.0, 1.0], 5), kv, poles)
    flat_poles, _ = extrude_profile(np.array([[-60.0, 0.0, 0.0], [0.0, 0.0, 0.0]]), None, along)
    flat = NurbsSurface(1, 1, clamped_knots([0.0, 60.0], 1), kv, flat_poles)
    arc, w = arc_profile(end, tangent, end + r * to_centre, np.pi / 4)
    poles, weights = extrude_profile(arc, w, along)
    front = NurbsSurface(2, 1, clamped_knots([0.0, 1.0], 2), kv, poles, weights)
    faces = [SampleFace("top_flat", flat), SampleFace("top_blend", blend), SampleFace("front_roll", front)]
    seams = [
        seam(faces[0], "u1", faces[1], "G2", curvature_jump_exact=True, cross_curvature=[0.0, 0.0]),
        seam(faces[1], "u1", faces[2], "G2", curvature_jump_exact=True, cross_curvature=[-1.0 / r, -1.0 / r]),
    ]
    return faces, {
        "seams": seams,
        "clean_sections": [{"plane": _section_plane("y", 100.0), "count": 0}],
    }


# -- 6. console lid: a 5 x 6 patch grid for benchmarks --------------------------------------


@_product
def console_lid() -> tuple[list[SampleFace], dict]:
    """Tarnwick Hearth induction hob console lid: 30 bicubic patches, all G2.

    One bicubic B-spline (5 x 6 spans, simple knots) cut at every interior knot:
    49 seams, all C2.
    """
    ku = clamped_knots(np.linspace(0.0, 240.0, 6), 3)
    kv = clamped_knots(np.linspace(0.0, 180.0, 7), 3)
    x, y = np.meshgrid(greville(ku, 3), greville(kv, 3), indexing="ij")
    z = 18.0 - (x - 120.0) ** 2 / 1600.0 - (y - 90.0) ** 2 / 1100.0 + 1.2 * np.sin(x / 40.0) * np.cos(y / 50.0)
    lid = NurbsSurface(3, 3, ku, kv, np.stack([x, y, z], axis=-1))
    pieces = split_surface(lid, np.unique(ku), np.unique(kv))
    grid = [[SampleFace(f"lid_r{i}c{j}", s) for j, s in enumerate(row)] for i, row in enumerate(pieces)]
    seams = []
    for i, row in enumerate(grid):
        for j, face in enumerate(row):
            if i + 1 < len(grid):
                seams.append(seam(face, "u1", grid[i + 1][j], "G2", curvature_jump_exact=True))
            if j + 1 < len(row):
                seams.append(seam(face, "v1", row[j + 1], "G2", curvature_jump_exact=True))
    faces = [f for row in grid for f in row]
    return faces, {"seams": seams}


# -- 7. fan heater dial plate: a trimmed face with a hole -----------------------------------

DIAL_HOLE_RADIUS = 12.0


@_product
def dial_plate() -> tuple[list[SampleFace], dict]:
    """Tarnwick Ember fan heater dial plate: one crowned face with a round dial hole.

    x(u) = u and y(v) = v, so the hole, a circle of radius 12 in (u, v), is the
    curve on the face above the circle of radius 12 mm in the xy plane.
    """
    ku = clamped_knots([0.0, 50.0, 100.0], 3)
    kv = clamped_knots([0.0, 70.0], 3)
    x, y = np.meshgrid(greville(ku, 3), greville(kv, 3), indexing="ij")
    z = 4.0 - (x - 50.0) ** 2 / 900.0 - (y - 35.0) ** 2 / 700.0
    plate = NurbsSurface(3, 3, ku, kv, np.stack([x, y, z], axis=-1))
    centre = (62.0, 35.0)
    face = SampleFace("dial_plate", plate, holes=((centre, DIAL_HOLE_RADIUS),))
    return [face], {
        "trim": {
            "face": "dial_plate",
            "loops": 2,
            "hole_centre_uv": list(centre),
            "hole_radius_uv": DIAL_HOLE_RADIUS,
        }
    }


# -- 8. drip tray: tooling problems (a wall short of draft, a back-tapered wall) -------

TRAY_LENGTH, TRAY_WIDTH, TRAY_DEPTH = 140.0, 90.0, 25.0
# Draft of each wall against the pull +z, degrees: the front wall is short of the usual
# 1 degree minimum, the back wall leans over the floor (back-tapered: an undercut).
TRAY_DRAFT_DEG = {"front_wall": 0.3, "left_wall": 2.0, "right_wall": 2.0, "back_wall": -5.0}
TRAY_PULL = [0.0, 0.0, 1.0]


def _plane_normal(surface: NurbsSurface) -> np.ndarray:
    ders = surface.derivatives_at(np.array([0.5]), np.array([0.5]), 1)
    n = np.cross(ders[1, 0, 0], ders[0, 1, 0])
    return n / np.linalg.norm(n)


@_product
def drip_tray() -> tuple[list[SampleFace], dict]:
    """Tarnwick Brewline coffee machine drip tray: an open tray with two tooling problems.

    Seen from its pocket (normals Su x Sv point into it, the side the mould's core
    touches), pulled along +z. Every face is a plane (bilinear patch): the floor
    z = 0 and four walls leaning out by their draft; a wall x = -z tan(a) leans
    by a from the pull, so its draft is a (common practice: draft is the angle
    between the wall and the pull). The front wall has 0.3 degrees, short of the
    usual 1 degree minimum; the back wall leans in by 5 degrees over the floor:
    it can only leave downwards, through the floor, so all of it is an undercut,
    and so is the floor strip under its overhang (x 0..L, y W - t..W with
    t = depth tan 5 degrees). Walls meet the floor and each other at sharp creases.
    """
    length, width, depth = TRAY_LENGTH, TRAY_WIDTH, TRAY_DEPTH
    lean = {name: depth * np.tan(np.radians(a)) for name, a in TRAY_DRAFT_DEG.items()}
    p00, p10 = np.array([0.0, 0.0, 0.0]), np.array([length, 0.0, 0.0])
    p01, p11 = np.array([0.0, width, 0.0]), np.array([length, width, 0.0])
    dx_l, dx_r, dy_f, dy_b = lean["left_wall"], lean["right_wall"], lean["front_wall"], lean["back_wall"]
    t00 = np.array([-dx_l, -dy_f, depth])
    t10 = np.array([length + dx_r, -dy_f, depth])
    t01 = np.array([-dx_l, width + dy_b, depth])
    t11 = np.array([length + dx_r, width + dy_b, depth])
    # corners (u0v0, u0v1, u1v0, u1v1), chosen so that Su x Sv points into the tray and
    # every shared edge runs the same way on both faces
    floor = SampleFace("floor", bilinear(np.array([p00, p01, p10, p11])))
    front = SampleFace("front_wall", bilinear(np.array([p00, p10, t00, t10])))  # u up, v along +x
    back = SampleFace("back_wall", bilinear(np.array([p01, t01, p11, t11])))  # u along +x, v up
    left = SampleFace("left_wall", bilinear(np.array([p00, t00, p01, t01])))  # u along +y, v up
    right = SampleFace("right_wall", bilinear(np.array([p10, p11, t10, t11])))  # u up, v along +y
    faces = [floor, front, right, back, left]

    def crease(a, side_a, b, side_b):
        angle = float(np.degrees(np.arccos(np.clip(_plane_normal(a.surface) @ _plane_normal(b.surface), -1, 1))))
        return seam(
            a, side_a, b, "G0", sides=[side_a, side_b], angle_deg=round(angle, 9), angle_exact=True, curvature_jump=None
        )

    seams = [
        crease(floor, "v0", front, "u0"),
        crease(floor, "u1", right, "u0"),
        crease(floor, "v1", back, "v0"),
        crease(floor, "u0", left, "v0"),
        crease(front, "v0", left, "u0"),
        crease(front, "v1", right, "v0"),
        crease(left, "u1", back, "u0"),
        crease(back, "u1", right, "v1"),
    ]
    slant = {name: depth / np.cos(np.radians(a)) for name, a in TRAY_DRAFT_DEG.items()}
    # a wall is a trapezoid: its mean width times its slant height
    wall_area = {
        "front_wall": slant["front_wall"] * (length + 0.5 * (dx_l + dx_r)),
        "back_wall": slant["back_wall"] * (length + 0.5 * (dx_l + dx_r)),
        "left_wall": slant["left_wall"] * (width + 0.5 * (dy_f + dy_b)),
        "right_wall": slant["right_wall"] * (width + 0.5 * (dy_f + dy_b)),
    }
    overhang = -dy_b
    tooling = {
        "pull": TRAY_PULL,
        "draft_min_deg": 1.0,
        "draft_deg": {"floor": 90.0, **TRAY_DRAFT_DEG},
        "insufficient_draft": [{"face": "front_wall", "area_mm2": round(float(wall_area["front_wall"]), 6)}],
        "undercuts": [
            {
                "face": "back_wall",
                "area_mm2": round(float(wall_area["back_wall"]), 6),
                "point": _mid_point(back.surface),
                "why": "leans 5 degrees over the floor: leaves only downwards, through the floor",
            },
            {
                "face": "floor",
                "area_mm2": round(float(length * overhang), 6),
                "box": [[0.0, round(width - overhang, 9)], [length, width]],
                "why": "the strip under the back wall's overhang",
            },
        ]
        + [
            {
                # below the overhang, y > W - t: a triangle of t x depth / 2 seen from the side, on a wall
                # leaning by its draft a (area element 1 / cos a)
                "face": side,
                "area_mm2": round(float(0.5 * overhang * depth / np.cos(np.radians(TRAY_DRAFT_DEG[side]))), 6),
                "why": "the corner under the back wall's overhang",
            }
            for side in ("right_wall", "left_wall")
        ],
        "concave_radius_mm": None,
    }
    return faces, {"seams": seams, "tooling": tooling}


ALL = (
    steamer_body,
    hood_visor,
    hood_visor_rev_b,
    toaster_panel,
    heatgun_covers,
    breadbin_roll_top,
    console_lid,
    dial_plate,
    drip_tray,
)
