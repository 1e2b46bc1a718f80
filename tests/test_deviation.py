"""Deviation by exact point inversion against exact answers and a reference library (geomdl).

- A plane moved by e along its normal, and a cylinder of radius R against one of radius R + e about the
  same axis, lie e apart everywhere (the offset surface of a plane or cylinder is a plane or a cylinder:
  do Carmo, Differential Geometry of Curves and Surfaces, sec. 3-5, parallel surfaces; from memory).
- Knot insertion leaves a NURBS surface unchanged (The NURBS Book, 2nd ed., sec. 5.2, Algorithm A5.3),
  done here by geomdl, so the deviation must vanish to rounding.
"""

from pathlib import Path

import numpy as np
import pytest
from geomdl import operations

import geometry.nurbs
from geometry.compare import model_deviation, signed_distances
from geometry.model import Face, Model
from geometry.nurbs.primitives import bilinear, cylinder
from tests.surface_factories import random_geomdl_nurbs

EXACT = 1e-9  # mm
BUDGET = 1500  # samples: enough for the exact cases, cheap for the suite


def _plane(z: float):
    return bilinear(np.array([[0, 0, z], [0, 50, z], [80, 0, z], [80, 50, z]], float))


@pytest.mark.parametrize("offset", [0.05, 2.0, -0.7])
def test_plane_moved_along_its_normal_deviates_by_the_offset(offset):
    old, new = Model((Face(_plane(0.0), name="p"),)), Model((Face(_plane(offset), name="p"),))
    dev, samples = model_deviation(old, new, BUDGET)
    assert dev.max_mm == pytest.approx(abs(offset), abs=EXACT)
    assert dev.mean_mm == pytest.approx(abs(offset), abs=EXACT)
    # Su x Sv of this patch is +z: the new plane lies on the normal's side when offset > 0.
    np.testing.assert_allclose(samples[0][1], offset, atol=EXACT)


@pytest.mark.parametrize(("radius", "e"), [(30.0, 0.5), (12.0, -0.25)])
def test_cylinder_radius_r_to_r_plus_e_deviates_by_e(radius, e):
    old = Model((Face(cylinder(radius, 40.0), name="c"),))
    new = Model((Face(cylinder(radius + e, 40.0), name="c"),))
    dev, samples = model_deviation(old, new, BUDGET)
    assert dev.max_mm == pytest.approx(abs(e), abs=EXACT)
    assert dev.mean_mm == pytest.approx(abs(e), abs=EXACT)
    # The cylinder's normals point outwards: a larger radius deviates positively.
    np.testing.assert_allclose(samples[0][1], e, atol=EXACT)
    assert dev.faces[0].min_signed_mm == pytest.approx(e, abs=EXACT)


def test_reversed_face_flips_the_sign():
    old = Model((Face(cylinder(20.0, 10.0), reversed=True),))
    new = Model((Face(cylinder(21.0, 10.0)),))
    _, samples = model_deviation(old, new, BUDGET)
    np.testing.assert_allclose(samples[0][1], -1.0, atol=EXACT)


@pytest.mark.parametrize("seed", [1, 4])
def test_knot_insertion_by_geomdl_deviates_by_nothing(seed):
    g, before = random_geomdl_nurbs(seed)
    operations.insert_knot(g, [0.37, 0.61], [1, 2])
    after = geometry.nurbs.from_geomdl(g)
    assert after.shape != before.shape
    dev, _ = model_deviation(Model((Face(before),)), Model((Face(after),)), BUDGET)
    assert dev.max_mm < EXACT


def test_points_off_a_trimmed_face_measure_to_its_trim():
    # The 80 x 50 mm plane trimmed to its lower-left quarter in (u, v).
    loop = np.array([[0, 0], [0.5, 0], [0.5, 0.5], [0, 0.5]], float)
    face = Face(_plane(0.0), loops=(loop,))
    feet = signed_distances(Model((face,)), np.array([[60.0, 10.0, 0.0], [20.0, 10.0, 3.0]]))
    # (60, 10) is 20 mm beyond the trim edge x = 40 (u = 0.5 of the 80 mm side); (20, 10, 3) is above the face.
    np.testing.assert_allclose(np.abs(feet.signed), [20.0, 3.0], atol=1e-6)
    # The foot along the edge is found to the zoom's last step (2.5 mm / 8^6), its distance far better.
    np.testing.assert_allclose(feet.points[0], [40.0, 10.0, 0.0], atol=1e-4)


CORPUS = Path(__file__).resolve().parents[2] / "shared" / "corpus"
SELF_DEVIATION_MM = 1e-5  # a real model against itself: Newton converges to the sample itself


@pytest.mark.slow
@pytest.mark.skipif(not (CORPUS / "example-45-faces.iges").is_file(), reason="the shared corpus is not here")
def test_a_real_model_deviates_from_itself_by_nothing():
    # 45 trimmed faces written by another CAD system, small flat faces beside dense curved ones: every
    # sample must find its own face among the candidates, not only the denser neighbour's.
    from geometry.io import read_model

    model = read_model(str(CORPUS / "example-45-faces.iges"))
    dev, _ = model_deviation(model, model, 20_000)
    assert dev.max_mm < SELF_DEVIATION_MM
