"""``batten section`` end to end: the sample products' deliberate inflections, bad input, atomic JSON.

The expected inflections are the sample manifest's (sample_surfaces/manifest.json),
which its builder derives from the construction of each product ("exact roots of
the piecewise-linear second derivative of the section graph"), not from this code.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import numpy as np
import pytest

from app.cli import main

SAMPLES = Path(__file__).resolve().parent.parent / "sample_surfaces"
MANIFEST = json.loads((SAMPLES / "manifest.json").read_text()) if (SAMPLES / "manifest.json").exists() else {}
# mm between the manifest's inflection points and ours (the files store poles to 1e-9 mm or so)
INFLECTION_TOL_MM = 1e-6


def _cases(key):
    for sample in MANIFEST.get("samples", ()):
        for entry in sample.get(key, ()):
            for fmt in ("step", "iges"):
                yield pytest.param(sample["files"][fmt], entry, id=f"{sample['name']}-{fmt}-{entry['plane']['normal']}")


def _section(tmp_path, file, plane, *extra) -> dict:
    out = tmp_path / "cut.json"
    argv = [
        "section",
        str(SAMPLES / file),
        "--plane",
        *map(str, plane["point"]),
        *map(str, plane["normal"]),
        "--json",
        str(out),
        *extra,
    ]
    assert main(argv) == 0
    return json.loads(out.read_text())


@pytest.mark.parametrize("file, entry", list(_cases("inflections")))
def test_section_finds_each_samples_deliberate_inflections(tmp_path, file, entry):
    data = _section(tmp_path, file, entry["plane"])
    found = np.array([i["point"] for c in data["curves"] for i in c["inflections"]]).reshape(-1, 3)
    assert found.shape[0] == entry["count"]
    expected = np.array(entry["points"])
    distance = np.linalg.norm(found[:, None, :] - expected[None, :, :], axis=-1).min(axis=0)
    assert distance.max() < INFLECTION_TOL_MM
    for curve in data["curves"]:
        assert curve["figures"]["inflections"] == len(curve["inflections"])


@pytest.mark.parametrize("file, entry", list(_cases("clean_sections")))
def test_clean_sections_of_the_samples_do_not_inflect(tmp_path, file, entry):
    data = _section(tmp_path, file, entry["plane"])
    assert data["curves"]
    assert sum(len(c["inflections"]) for c in data["curves"]) == entry["count"] == 0


def test_section_json_has_the_promised_fields(tmp_path):
    data = _section(tmp_path, "toaster_panel.stp", {"point": [0, 70, 0], "normal": [0, 1, 0]})
    curve = data["curves"][0]
    assert len(curve["points"]) == len(curve["arc_length"]) == len(curve["curvature"])
    assert curve["arc_length"][0] == 0.0 and curve["arc_length"][-1] == pytest.approx(curve["length"])
    assert all({"point", "s"} <= set(i) for i in curve["inflections"])
    assert all({"point", "s", "curvature"} <= set(e) for e in curve["extrema"])
    assert set(curve["figures"]) >= {
        "inflections",
        "extrema",
        "monotone_pieces",
        "max_abs_curvature",
        "curvature_variation",
    }


def test_section_family_and_printing(capsys):
    argv = [
        "section",
        str(SAMPLES / "toaster_panel.stp"),
        "--plane",
        "0",
        "20",
        "0",
        "0",
        "1",
        "0",
        "--count",
        "3",
        "--spacing",
        "30",
    ]
    assert main(argv) == 0
    data = json.loads(capsys.readouterr().out)
    assert [p["point"][1] for p in data["planes"]] == [20.0, 50.0, 80.0]
    assert sorted({c["section"] for c in data["curves"]}) == [0, 1, 2]


def test_json_is_written_atomically(tmp_path):
    _section(tmp_path, "toaster_panel.stp", {"point": [0, 70, 0], "normal": [0, 1, 0]})
    assert sorted(os.listdir(tmp_path)) == ["cut.json"]  # no temporary file left behind


@pytest.mark.parametrize(
    "extra, message",
    [
        (["--plane", "0", "0", "0", "0", "0", "0"], "non-zero vector"),
        (["--plane", "0", "0", "0", "0", "0", "1", "--count", "2"], "needs a non-zero --spacing"),
        (["--plane", "0", "0", "0", "0", "0", "1", "--count", "0"], "must be 1 to 200"),
        (["--plane", "0", "0", "nan", "0", "0", "1"], "finite"),
        (["--plane", "0", "0", "0", "0", "0", "1", "--json", "/no/such/folder/out.json"], "does not exist"),
    ],
)
def test_bad_input_is_one_line_and_exit_2(capsys, extra, message):
    assert main(["section", str(SAMPLES / "toaster_panel.stp"), *extra]) == 2
    err = capsys.readouterr().err.strip()
    assert message in err and "\n" not in err


def test_missing_file_is_exit_2(capsys, tmp_path):
    assert main(["section", str(tmp_path / "none.stp"), "--plane", "0", "0", "0", "0", "0", "1"]) == 2
    assert "none.stp" in capsys.readouterr().err
