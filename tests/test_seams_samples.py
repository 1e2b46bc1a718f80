"""Every intended seam of the bundled samples is found with the right class and verdict.

Reference: sample_surfaces/manifest.json (the sample builder's own record of what
it made: each seam's faces, class and exact gap, angle and curvature jump). The
classes there are for the class-A profile; its verdict follows from the class
(G2 passes, a designed crease passes when it meets in position, anything else fails).
"""

import json
from pathlib import Path

import numpy as np
import pytest

from app.profiles import get_profile
from geometry.io import read_model
from geometry.seams import check_seams

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
MANIFEST = SAMPLES / "manifest.json"
EXACT = 1e-6  # mm, degrees and 1/mm: "exact" values in the manifest are exact to rounding


def _cases():
    if not MANIFEST.exists():
        return []
    samples = json.loads(MANIFEST.read_text())["samples"]
    marks = {"console_lid": [pytest.mark.slow]}
    return [
        pytest.param(s, fmt, id=f"{s['name']}-{fmt}", marks=marks.get(s["name"], []))
        for s in samples
        for fmt in ("step", "iges")
        if fmt in s.get("files", {})
    ]


@pytest.fixture(scope="module")
def class_a():
    return get_profile("class-a").tolerance


@pytest.mark.parametrize(("sample", "fmt"), _cases())
def test_sample_seams_match_the_manifest(sample, fmt, class_a):
    model = read_model(SAMPLES / sample["files"][fmt])
    report = check_seams(model, class_a)
    names = [f.name for f in model.faces]
    found = {frozenset(names[i] for i in s.faces): s for s in report.seams}
    expected = {frozenset(e["faces"]): e for e in sample["seams"]}
    assert set(found) == set(expected)  # every intended seam, and no other
    assert len(report.seams) == len(expected)
    for key, want in expected.items():
        seam = found[key]
        assert seam.continuity == want["continuity"], (sorted(key), seam.as_dict()["reasons"])
        passes = want["continuity"] == "G2" or (want["continuity"] == "G0" and seam.crease)
        assert seam.verdict == ("pass" if passes else "fail")  # so no clean seam is flagged
        near = np.min(np.linalg.norm(seam.points - np.asarray(want["point"]), axis=1))
        assert near <= 1.0  # the seam runs through the manifest's point (samples are <= 1 mm apart)
        if "length_mm" in want:
            assert abs(seam.length - want["length_mm"]) <= 1e-3 * want["length_mm"]
        if want.get("gap_exact", want.get("gap_mm") == 0.0):
            assert abs(seam.worst["gap"].value - want["gap_mm"]) <= EXACT
        if want.get("angle_exact", want.get("angle_deg") == 0.0):
            assert abs(seam.worst["angle"].value - want["angle_deg"]) <= EXACT
        if want.get("curvature_jump_exact") and want.get("curvature_jump") is not None:
            assert abs(seam.worst["curvature_jump"].value - want["curvature_jump"]) <= EXACT
