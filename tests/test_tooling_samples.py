"""The drip tray sample's designed tooling problems, found on the STEP and IGES files.

The expected facts are the construction's (``sample_surfaces/manifest.json``, written by
``build_samples.py`` from exact planes): each wall's draft is the angle it leans by
(common practice), a wall short of the minimum counts its whole area, and a back-tapered
wall with the floor strip under it is an undercut.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from geometry.io import read_model
from geometry.tooling import analyse_tooling

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
TRAY = next(s for s in json.loads((SAMPLES / "manifest.json").read_text())["samples"] if s["name"] == "drip_tray")
DRAFT_TOL_DEG = 1e-9  # planes: the draft is exact
AREA_RTOL = 1e-6  # quadrature of |Su x Sv| on exact planes; trims are the natural bounds
# undercut areas come from the sample grid (about 0.4 mm spacing); each region loses a band
# about the rays' clearance (0.2 to 0.4 mm) wide along its edges, most of a 2 mm corner sliver
UNDERCUT_RTOL = 0.2


@pytest.fixture(scope="module", params=["step", "iges"])
def analysed(request):
    model = read_model(str(SAMPLES / TRAY["files"][request.param]))
    tooling = TRAY["tooling"]
    return model, analyse_tooling(model, tooling["pull"], tooling["draft_min_deg"], 1.0)


def test_every_face_has_its_designed_draft(analysed):
    model, result = analysed
    for face, figures in zip(model.faces, result.faces, strict=True):
        want = TRAY["tooling"]["draft_deg"][face.name]
        assert figures.draft_min_deg == pytest.approx(want, abs=DRAFT_TOL_DEG)
        assert figures.draft_max_deg == pytest.approx(want, abs=DRAFT_TOL_DEG)


def test_only_the_front_wall_is_short_of_draft(analysed):
    model, result = analysed
    short = {model.faces[f.face].name: f.insufficient_area for f in result.faces if f.insufficient_area > 0}
    want = {w["face"]: w["area_mm2"] for w in TRAY["tooling"]["insufficient_draft"]}
    assert set(short) == set(want)
    for name, area in want.items():
        assert short[name] == pytest.approx(area, rel=AREA_RTOL)


def test_undercuts_are_where_the_manifest_says(analysed):
    model, result = analysed
    found: dict[str, float] = {}
    for region in result.regions:
        name = model.faces[region.face].name
        found[name] = found.get(name, 0.0) + region.area
    want = {u["face"]: u for u in TRAY["tooling"]["undercuts"]}
    assert set(found) == set(want)
    for name, entry in want.items():
        assert found[name] == pytest.approx(entry["area_mm2"], rel=UNDERCUT_RTOL), name
    floor = next(r for r in result.regions if model.faces[r.face].name == "floor")
    (x0, y0), (x1, y1) = want["floor"]["box"]
    assert x0 <= floor.centre[0] <= x1 and y0 <= floor.centre[1] <= y1


def test_planes_never_limit_the_cutter_and_have_no_zero_draft_curve(analysed):
    _, result = analysed
    assert result.concave_radius_mm == np.inf
    assert result.zero_draft == ()  # every face keeps one draft: none crosses zero
