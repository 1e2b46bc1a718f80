"""``batten summary``: per-face curvature ranges against exact values.

A cylinder of radius R (outward normals) has k1 = 0 and k2 = -1/R everywhere
(do Carmo 1976, sec. 3-3; sign by Batten's convention), its caps are flat.
"""

from __future__ import annotations

import json

import pytest
from test_io_support import cylinder, write_iges

from app.cli import EXIT_BAD_INPUT, main


def test_summary_json_of_a_cylinder(tmp_path, capsys):
    path = write_iges(cylinder(4.0, 10.0), tmp_path / "can.igs")
    assert main(["summary", path, "--json", "--samples", "5000"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["units"] == "mm" and len(doc["sha256"]) == 64
    side = [f for f in doc["faces"] if f["min_radius_mm"] is not None]
    assert len(side) == 1 and len(doc["faces"]) == 3
    assert side[0]["k2"] == pytest.approx([-0.25, -0.25], rel=1e-9)
    assert side[0]["k1"] == pytest.approx([0.0, 0.0], abs=1e-10)
    assert side[0]["min_radius_mm"] == pytest.approx(4.0, rel=1e-9)


def test_summary_table_and_bad_file(tmp_path, capsys):
    path = write_iges(cylinder(4.0, 10.0), tmp_path / "can.igs")
    assert main(["summary", path]) == 0
    out = capsys.readouterr().out
    assert "faces    3" in out and "review aid" in out
    empty = tmp_path / "empty.igs"
    empty.write_bytes(b"")
    assert main(["summary", str(empty)]) == EXIT_BAD_INPUT
    assert "empty" in capsys.readouterr().err


def test_probe_takes_negative_coordinates_in_scientific_notation(tmp_path, capsys):
    """``--at -1e-08 -4.5 -.5``: argparse alone reads "-1e-08" as an option; a coordinate is a number."""
    path = write_iges(cylinder(4.0, 10.0), tmp_path / "can.igs")
    assert main(["probe", path, "--at", "-1e-08", "-4.5E+00", "-.5"]) == 0
    doc = json.loads(capsys.readouterr().out)
    # 0.5 mm outside the side (radius 4) and 0.5 mm below the bottom cap (z = 0): the nearest point is their rim
    assert doc["distance"] == pytest.approx(0.5 * 2**0.5, abs=1e-6)
