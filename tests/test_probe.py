"""The point probe: nearest point, trim respect, parameter queries, the command line.

Expected answers: the nearest point of a sphere to P is R P/|P| (geometric
fact); a unit-speed plane has zero curvature; face orientation flips the normal
and the sign of the curvatures (DEVELOPERS.md sign convention); point inversion
follows The NURBS Book, 2nd ed., sec. 6.1.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from test_io_support import plate_with_hole, sphere, write_step

from app.cli import EXIT_BAD_INPUT, main
from geometry.errors import BattenError
from geometry.io import read_model
from geometry.kernel.occt_curves import EDGE_CHORD_MM
from geometry.model import Face, Model, closest_parameters, probe_point, probe_uv
from geometry.nurbs import NurbsSurface

PARAM_ATOL = 1e-10


def _bicubic(seed=5) -> NurbsSurface:
    rng = np.random.default_rng(seed)
    x, y = np.meshgrid(np.linspace(0, 30, 5), np.linspace(0, 30, 5), indexing="ij")
    poles = np.stack([x, y, rng.uniform(-4, 4, (5, 5))], axis=2)
    knots = [0, 0, 0, 0, 0.5, 1, 1, 1, 1]
    return NurbsSurface(3, 3, knots, knots, poles, rng.uniform(0.8, 1.2, (5, 5)))


def test_inversion_recovers_parameters():
    s = _bicubic()
    rng = np.random.default_rng(1)
    u, v = rng.uniform(0.05, 0.95, (2, 50))
    d = s.derivatives_at(u, v, 1)
    normal = np.cross(d[1, 0], d[0, 1])
    normal /= np.linalg.norm(normal, axis=1, keepdims=True)
    # Points off the surface along the normal invert to the foot point's parameters.
    query = d[0, 0] + 0.2 * normal
    uu, vv = closest_parameters(s, query, np.clip(u + 0.03, 0, 1), np.clip(v - 0.03, 0, 1))
    np.testing.assert_allclose(uu, u, atol=PARAM_ATOL)
    np.testing.assert_allclose(vv, v, atol=PARAM_ATOL)


def test_inversion_clamps_to_the_domain():
    s = _bicubic()
    uu, vv = closest_parameters(s, np.array([[-50.0, 15.0, 0.0]]), [0.5], [0.5])
    assert uu[0] == 0.0 and 0 < vv[0] < 1


def test_probe_uv_follows_orientation():
    s = _bicubic()
    model = Model((Face(s), Face(s, reversed=True)))
    a, b = probe_uv(model, 0, 0.3, 0.6), probe_uv(model, 1, 0.3, 0.6)
    np.testing.assert_allclose(a.normal, -np.array(b.normal), atol=1e-15)
    assert (a.k1, a.k2) == pytest.approx((-b.k2, -b.k1), abs=1e-15)
    assert a.gaussian == pytest.approx(b.gaussian, abs=1e-15)
    assert a.distance == 0.0


def test_probe_uv_rejects_bad_queries():
    model = Model((Face(_bicubic()),))
    with pytest.raises(BattenError, match="face 3 does not exist"):
        probe_uv(model, 3, 0.5, 0.5)
    with pytest.raises(BattenError, match="outside"):
        probe_uv(model, 0, 1.5, 0.5)


def test_nearest_point_on_sphere(tmp_path):
    model = read_model(write_step(sphere(8.0), tmp_path / "ball.step"))
    res = probe_point(model, np.array([3.0, -4.0, 12.0]))
    p = np.array([3.0, -4.0, 12.0])
    np.testing.assert_allclose(res.point, 8.0 * p / np.linalg.norm(p), atol=1e-9)
    assert res.distance == pytest.approx(13.0 - 8.0, abs=1e-9)


def test_nearest_point_respects_the_trim(tmp_path):
    """Above the hole of a plate the nearest point is on the hole's rim, not in the hole."""
    model = read_model(write_step(plate_with_hole(40.0, 10.0, 5.0), tmp_path / "plate.step"))
    # Above the plate, over the hole's centre: the nearest points are the top rim
    # (the hole's wall is a cylinder whose nearest point to the axis is its top edge).
    res = probe_point(model, np.array([20.0, 20.0, 10.0 + 1e-3]))
    assert res.distance == pytest.approx(np.hypot(5.0, 1e-3), abs=1e-6)
    assert np.hypot(res.point[0] - 20.0, res.point[1] - 20.0) == pytest.approx(5.0, abs=1e-6)
    assert res.inside
    # Off the top face beside the hole, just inside: the top face's trim edge.
    res = probe_point(model, np.array([20.0, 25.5, 10.0 + 3.0]))
    assert res.point[2] == pytest.approx(10.0, abs=1e-9)
    assert res.distance == pytest.approx(3.0, abs=1e-6)
    assert not res.on_trim_boundary


def test_nearest_point_snaps_to_the_trim_of_a_lone_face(tmp_path):
    """The top face alone: over its hole, the nearest point is on the hole's rim (the trim)."""
    plate = read_model(write_step(plate_with_hole(40.0, 10.0, 5.0), tmp_path / "plate.step"))
    top = max((f for f in plate.faces if len(f.loops) == 2), key=lambda f: f.surface.poles[0, 0, 2])
    res = probe_point(Model((top,)), np.array([20.0, 23.0, 10.5]))
    assert res.on_trim_boundary and res.inside
    # Exact: the rim point (20, 25, 10). The trim polyline's chords stay within EDGE_CHORD_MM
    # of the rim, but each is turned by up to half its arc's angle (chord / (2 R)), so the
    # foot of a point 2 mm away slides along the rim by up to 2 mm times that angle.
    chord = np.sqrt(8 * EDGE_CHORD_MM * 5.0)
    np.testing.assert_allclose(np.hypot(res.point[0] - 20.0, res.point[1] - 20.0), 5.0, atol=EDGE_CHORD_MM)
    np.testing.assert_allclose(res.point, [20.0, 25.0, 10.0], atol=2.0 * chord / (2 * 5.0) + EDGE_CHORD_MM)
    assert res.distance == pytest.approx(np.hypot(2.0, 0.5), abs=EDGE_CHORD_MM)


def test_cli_probe_at_and_uv(tmp_path, capsys):
    path = write_step(sphere(8.0), tmp_path / "ball.step")
    assert main(["probe", path, "--at", "0", "0", "20"]) == 0
    out = json.loads(capsys.readouterr().out)
    for key in ("face", "u", "v", "point", "normal", "distance", "gaussian", "mean", "k1", "k2", "dir1", "dir2"):
        assert key in out
    assert out["k1"] == pytest.approx(-1 / 8.0, rel=1e-8)
    assert out["distance"] == pytest.approx(12.0, rel=1e-9)
    assert main(["probe", path, "--face", "0", "--uv", str(out["u"]), "0.3"]) == 0
    again = json.loads(capsys.readouterr().out)
    assert again["distance"] == 0.0 and again["mean"] == pytest.approx(-1 / 8.0, rel=1e-8)


@pytest.mark.parametrize(
    "extra", [["--face", "7", "--uv", "0", "0"], ["--face", "0", "--uv", "99", "0"], ["--face", "0"]]
)
def test_cli_probe_bad_queries_exit_2(tmp_path, capsys, extra):
    path = write_step(sphere(8.0), tmp_path / "ball.step")
    assert main(["probe", path, *extra]) == EXIT_BAD_INPUT
    assert "batten:" in capsys.readouterr().err
