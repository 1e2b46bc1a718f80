"""The large sample product: a built-in oven front of several hundred faces.

Tarnwick Appliances is an invented brand; the product, names and dimensions are
made up for the demo. The repository needs one model of real size for tests and
benchmarks (reading, seams and the window on hundreds of faces). It has seams of
every class, each by construction (rules as in :mod:`sample_surfaces.products`):

- G2: a wavy bicubic fascia, a quarter-cylinder bend and a flat apron are each
  one surface split at parameter lines (The NURBS Book, 2nd ed., P2.5: a split
  away from the knots leaves the surface C2 there), ``G2_SEAMS`` of them;
- G1: fascia to bend and bend to apron, tangent (the fascia's last three pole
  rows lie flat, so its cross-seam curvature is 0 there; the bend's is 1/R),
  curvature jump exactly 1/R;
- G0 crease: the apron folds 90 degrees into a flange;
- a gap: the last flange piece sits ``GAP_MM`` low, so its two seams fail in
  position;
- free edges round the outside.
"""

from __future__ import annotations

import numpy as np

from geometry.nurbs import NurbsSurface

from .construct import arc_profile, clamped_knots, extrude_profile, greville, split_surface
from .export import SampleFace

STEM = "appliance_range"
PRODUCT = "Tarnwick Hearth 600 built-in oven front"
DESCRIPTION = (
    "Built-in oven front for the large-model tests and benchmarks: a wavy fascia (x 0..300 mm, "
    "y 0..240 mm) split into 20 x 12 faces, rolling over a 25 mm bend (3 x 12) into a flat apron "
    "(4 x 12) that folds 90 degrees into a 30 mm flange (1 x 12); the last flange piece sits 0.2 mm low."
)
WIDTH = 240.0
FASCIA_LENGTH = 300.0
BEND_RADIUS = 25.0
APRON_DEPTH = 100.0
FLANGE_DEPTH = 30.0
GAP_MM = 0.2
# Pieces along y (every part) and across it (fascia, bend, apron, flange).
ALONG = 12
ACROSS = {"fascia": 20, "bend": 3, "apron": 4, "flange": 1}


def _fascia() -> NurbsSurface:
    """Bicubic wavy panel; its last three pole rows in x lie on z = 0 (flat, curvature-free seam)."""
    nu, nv = 12, 10
    ku = clamped_knots(np.linspace(0.0, FASCIA_LENGTH, nu - 2), 3)
    kv = clamped_knots(np.linspace(0.0, WIDTH, nv - 2), 3)
    # Poles at the Greville abscissae: x(u) = u and y(v) = v exactly (linear precision,
    # The NURBS Book sec. 9.2.1, from memory), so the pieces' corners meet the bend's.
    xx, yy = np.meshgrid(greville(ku, 3), greville(kv, 3), indexing="ij")
    z = 6.0 * np.sin(xx / 45.0) * np.cos(yy / 60.0)
    z[-3:] = 0.0
    return NurbsSurface(3, 3, ku, kv, np.stack([xx, yy, z], axis=-1))


def _bend() -> NurbsSurface:
    """Quarter cylinder from (L, y, 0) heading +x, turning down to (L + R, y, -R)."""
    arc, w = arc_profile([FASCIA_LENGTH, 0.0, 0.0], [1.0, 0.0, 0.0], [FASCIA_LENGTH, 0.0, -BEND_RADIUS], np.pi / 2)
    poles, weights = extrude_profile(arc, w, [0.0, WIDTH, 0.0])
    return NurbsSurface(2, 1, clamped_knots([0.0, 1.0], 2), clamped_knots([0.0, WIDTH], 1), poles, weights)


def _plane(start, direction, length) -> NurbsSurface:
    start, direction = np.asarray(start, float), np.asarray(direction, float)
    poles, _ = extrude_profile(np.stack([start, start + length * direction]), None, [0.0, WIDTH, 0.0])
    return NurbsSurface(1, 1, clamped_knots([0.0, length], 1), clamped_knots([0.0, WIDTH], 1), poles)


def _split(name: str, surface: NurbsSurface) -> list[SampleFace]:
    (u0, u1), (v0, v1) = surface.domain
    pieces = split_surface(surface, np.linspace(u0, u1, ACROSS[name] + 1), np.linspace(v0, v1, ALONG + 1))
    return [SampleFace(f"{name}_{i:02d}_{j:02d}", piece) for i, row in enumerate(pieces) for j, piece in enumerate(row)]


def _moved(face: SampleFace, offset) -> SampleFace:
    s = face.surface
    poles = s.poles + np.asarray(offset, float)
    return SampleFace(face.name, NurbsSurface(s.degree_u, s.degree_v, s.knots_u, s.knots_v, poles, s.weights))


def oven_front() -> tuple[list[SampleFace], dict]:
    """Faces of the oven front and its designed seam counts by class.

    The fascia's normal points up (+z), the bend's and apron's outwards, the
    flange's down: one consistent orientation, so the file's shell is closed
    under sewing except at its outside and the gap.
    """
    corner = FASCIA_LENGTH + BEND_RADIUS
    parts = {
        "fascia": _fascia(),
        "bend": _bend(),
        "apron": _plane([corner, 0.0, -BEND_RADIUS], [0.0, 0.0, -1.0], APRON_DEPTH),
        "flange": _plane([corner, 0.0, -BEND_RADIUS - APRON_DEPTH], [-1.0, 0.0, 0.0], FLANGE_DEPTH),
    }
    faces = [face for name, surface in parts.items() for face in _split(name, surface)]
    faces[-1] = _moved(faces[-1], [0.0, 0.0, -GAP_MM])
    inner = sum(ALONG * (n - 1) + n * (ALONG - 1) for n in ACROSS.values())
    expect = {
        "large": True,
        "seam_classes": {
            "G2": inner - 1,  # the moved flange piece loses its seam with its neighbour
            "G1": 2 * ALONG,
            "G0_crease": ALONG - 1,
            "gap": 2,
        },
        "gap_mm": GAP_MM,
        "curvature_jump_g1": 1.0 / BEND_RADIUS,
        "crease_deg": 90.0,
    }
    return faces, expect
