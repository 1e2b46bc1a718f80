"""``batten check`` on every bundled sample: the JSON lists exactly the intended defects.

The expected facts come from ``sample_surfaces/manifest.json``, written by the
sample builder from the constructions (exact knots, offsets and radii), not
from Batten's analyses. The expected verdict of a seam follows from the
manifest's class and angle and the profile in force: it passes when it
reaches the required class, or when it is a crease (kinked at least
``crease_deg`` all along) that meets in position.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from app.cli import main

ROOT = Path(__file__).resolve().parents[1]
SAMPLES = ROOT / "sample_surfaces"
MANIFEST = json.loads((SAMPLES / "manifest.json").read_text())["samples"]
NAMES = [s["name"] for s in MANIFEST]
RANK = {"broken": 0, "G0": 1, "G1": 2, "G2": 3}

GAP_TOL_MM = 1e-6  # manifest gaps are exact constructions
ANGLE_TOL_DEG = 1e-6
JUMP_REL_TOL = 1e-6  # of the expected curvature jump
JUMP_ABS_TOL = 1e-9  # 1/mm, for jumps that are exactly zero
INFLECTION_TOL_MM = 1e-6  # manifest points are exact roots of the section graph's second derivative


def _run_check(files: list[Path], out: Path, *extra: str) -> tuple[int, dict]:
    status = main(["check", *map(str, files), "--json", str(out), "--quiet", "--jobs", "2", *extra])
    return status, json.loads(out.read_text())


@pytest.fixture(scope="module", params=["step", "iges"])
def checked(request, tmp_path_factory):
    """One check run over every sample in one format: (exit status, JSON by sample name)."""
    files = [SAMPLES / s["files"][request.param] for s in MANIFEST]
    status, doc = _run_check(files, tmp_path_factory.mktemp(request.param) / "check.json")
    return status, {s["name"]: entry for s, entry in zip(MANIFEST, doc["files"], strict=True)}, doc


def _sample(name: str) -> dict:
    return next(s for s in MANIFEST if s["name"] == name)


def _expected_verdict(seam: dict, profile: dict) -> str:
    if RANK[seam["continuity"]] >= RANK[profile["required"]]:
        return "pass"
    crease = profile.get("crease_deg") is not None and seam["angle_deg"] >= profile["crease_deg"]
    return "pass" if crease and seam["gap_mm"] <= profile["position_mm"] else "fail"


def test_run_status_is_1_because_some_samples_fail_and_none_is_unreadable(checked):
    status, by_name, doc = checked
    assert doc["verdict"] == "fail"
    assert status == 1


@pytest.mark.parametrize("name", NAMES)
def test_faces_as_built(checked, name):
    entry = checked[1][name]
    sample = _sample(name)
    assert entry["status"] == "checked" and entry["units"] == "mm"
    assert [f["name"] for f in entry["faces"]] == [f["name"] for f in sample["faces"]]
    for face in entry["faces"]:
        assert face["curvature"] is not None and face["curvature"]["samples"] > 0


@pytest.mark.parametrize("name", NAMES)
def test_seams_exactly_as_built_with_class_and_measures(checked, name):
    entry = checked[1][name]
    expected = {frozenset(s["faces"]): s for s in _sample(name).get("seams", [])}
    found = {frozenset(s["face_names"]): s for s in entry["seams"]}
    assert set(found) == set(expected)
    for key, want in expected.items():
        got = found[key]
        assert got["continuity"] == want["continuity"], sorted(key)
        assert got["gap_max"] == pytest.approx(want["gap_mm"], abs=GAP_TOL_MM)
        assert got["angle_max_deg"] == pytest.approx(want["angle_deg"], abs=ANGLE_TOL_DEG)
        if want.get("curvature_jump") is not None:
            assert got["curvature_jump_max"] == pytest.approx(
                want["curvature_jump"], rel=JUMP_REL_TOL, abs=JUMP_ABS_TOL
            )
        assert got["verdict"] == _expected_verdict(want, entry["profile"]), sorted(key)


@pytest.mark.parametrize("name", NAMES)
def test_findings_over_tolerance_are_exactly_the_intended_defects(checked, name):
    entry = checked[1][name]
    profile = entry["profile"]
    intended = {
        frozenset(s["faces"]) for s in _sample(name).get("seams", []) if _expected_verdict(s, profile) == "fail"
    }
    over = [f for f in entry["summary"]["findings"] if f["verdict"] == "fail"]
    flagged = {frozenset(entry["seams"][f["ref"]["seam"]]["face_names"]) for f in over if f["kind"] == "seam"}
    assert flagged == intended
    assert len(over) == len(intended)
    assert entry["summary"]["verdict"] == ("fail" if intended else "pass")
    assert entry["summary"]["over_tolerance"] == len(intended)


@pytest.mark.parametrize("name", NAMES)
def test_free_edges(checked, name):
    entry = checked[1][name]
    sample = _sample(name)
    # A seam left open by a small gap is a (failing) seam, not two free edges: issue 5 sets the
    # search distance so that gaps up to 0.5 mm are matched. The manifest counts file topology.
    gapped = sum(1 for s in sample.get("seams", []) if s["gap_mm"] > 0)
    assert len(entry["free_edges"]) == sample["free_edges"]["count"] - 2 * gapped


def _plane_spec(planes: list[dict]) -> str:
    return ";".join(
        "plane:" + ",".join(f"{v:.12g}" for v in [*p["plane"]["point"], *p["plane"]["normal"]]) for p in planes
    )


@pytest.mark.parametrize("name", [s["name"] for s in MANIFEST if s.get("inflections") or s.get("clean_sections")])
def test_inflections_of_the_intended_sections(tmp_path, name):
    sample = _sample(name)
    planes = [*sample.get("inflections", []), *sample.get("clean_sections", [])]
    status, doc = _run_check(
        [SAMPLES / sample["files"]["step"]], tmp_path / "sections.json", "--sections", _plane_spec(planes)
    )
    entry = doc["files"][0]
    assert len(entry["sections"]) == len(planes)
    for section, want in zip(entry["sections"], planes, strict=True):
        got = np.array([p["point"] for c in section["curves"] for p in c["inflections"]]).reshape(-1, 3)
        assert got.shape[0] == want["count"], section["label"]
        assert sum(c["figures"]["inflections"] for c in section["curves"]) == want["count"]
        if want["count"]:
            expected = np.array(want["points"])
            nearest = np.linalg.norm(got[:, None] - expected[None], axis=2).min(axis=1)
            np.testing.assert_allclose(nearest, 0.0, atol=INFLECTION_TOL_MM)
    # The shipped profiles set no limit on inflections: they are listed, not judged.
    assert status == (
        1 if any(_expected_verdict(s, entry["profile"]) == "fail" for s in sample.get("seams", [])) else 0
    )


@pytest.mark.parametrize("name, status", [("hood_visor", 1), ("dial_plate", 0)])
def test_exit_status_of_one_file_from_the_shell(tmp_path, name, status):
    path = SAMPLES / _sample(name)["files"]["step"]
    out = subprocess.run(
        [sys.executable, "-m", "app", "check", str(path), "--sections", "none"],
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert out.returncode == status, out.stderr
    assert out.stdout.split()[0] == ("FAIL" if status else "PASS")
    assert "batten check:" in out.stderr  # progress on stderr, the verdict on stdout
