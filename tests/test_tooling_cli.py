"""Tooling checks from the profile and the command line: --pull, JSON, findings, probe.

Expected answers are the drip tray's construction (sample_surfaces/manifest.json): each
wall's draft is the angle it leans by (common practice), the front wall is short of the
usual 1 degree, the back wall is back-tapered (an undercut). Profile values are common
practice (no published source); the tests check loading and use, not the values.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from app.cli import main
from app.profiles import ProfileError, get_profile, read_profile, shipped_names
from app.review.result import SCHEMA_VERSION

jsonschema = pytest.importorskip("jsonschema")

ROOT = Path(__file__).resolve().parents[1]
SCHEMA = json.loads((ROOT / "app" / "report" / "check_schema.json").read_text())
TRAY = ROOT / "sample_surfaces" / "drip_tray.stp"
DRAFT_TOL_DEG = 1e-9


def test_shipped_profiles_carry_tooling_limits_marked_common_practice():
    for name in shipped_names():
        profile = get_profile(name)
        assert profile.tooling["pull"] is None  # the pull belongs to each part: no default direction
        assert profile.tooling["draft_min_deg"] == 1.0 and profile.tooling["cutter_radius_mm"] == 1.0
        for key in ("pull", "draft_min_deg", "cutter_radius_mm"):
            assert "common practice" in profile.basis[key]
        values = profile.as_dict()
        assert values["pull"] is None and values["draft_min_deg"] == 1.0


def test_user_profile_sets_a_pull_and_skips_the_cutter(tmp_path):
    path = tmp_path / "mould.toml"
    path.write_text('base = "class-a"\n[tooling]\npull = [0, 0, 2]\ncutter_radius_mm = "none"\n')
    profile = read_profile(path)
    assert profile.tooling["pull"] == (0.0, 0.0, 2.0)
    assert profile.tooling["cutter_radius_mm"] is None
    assert profile.tooling["draft_min_deg"] == 1.0  # from the base


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("[tooling]\npull = [0, 0, 0]\n", "pull"),
        ("[tooling]\npull = [1, 2]\n", "pull"),
        ("[tooling]\ndraft_min_deg = -1\n", "draft_min_deg"),
        ("[tooling]\ndraft_min_deg = 95\n", "below 90"),
        ("[tooling]\ncutter_radius_mm = true\n", "cutter_radius_mm"),
        ("[tooling]\nreach = 3\n", "unknown [tooling]"),
    ],
)
def test_bad_tooling_values_name_the_file_and_the_key(tmp_path, text, words):
    path = tmp_path / "bad.toml"
    path.write_text('base = "class-a"\n' + text)
    with pytest.raises(ProfileError) as err:
        read_profile(path)
    assert "bad.toml" in str(err.value) and words in str(err.value)


@pytest.fixture(scope="module")
def tray_check(tmp_path_factory):
    out = tmp_path_factory.mktemp("tooling") / "check.json"
    status = main(["check", str(TRAY), "--pull", "0", "0", "5", "--json", str(out), "--quiet", "--sections", "none"])
    return status, json.loads(out.read_text())


def test_check_with_a_pull_fails_on_the_designed_problems_and_validates(tray_check):
    status, doc = tray_check
    assert status == 1
    assert doc["schema_version"] == SCHEMA_VERSION == "1.1"  # 1.1 added the tooling entry
    jsonschema.Draft202012Validator(SCHEMA).validate(doc)
    entry = doc["files"][0]
    tooling = entry["tooling"]
    assert tooling["pull"] == [0.0, 0.0, 1.0] and tooling["pull_source"] == "--pull"
    failed = {(f["kind"], f["subject"].split(":")[0]) for f in entry["summary"]["findings"] if f["verdict"] == "fail"}
    assert ("draft", "face 1 front_wall") in failed
    assert ("undercut", "face 3 back_wall") in failed and ("undercut", "face 0 floor") in failed
    assert not any(kind == "draft" and face != "face 1 front_wall" for kind, face in failed)


def test_check_reports_each_wall_draft_exactly(tray_check):
    faces = {f["name"]: f for f in tray_check[1]["files"][0]["tooling"]["faces"]}
    # exact: the walls are planes leaning by their draft (manifest)
    for name, draft in (("front_wall", 0.3), ("left_wall", 2.0), ("right_wall", 2.0), ("back_wall", -5.0)):
        assert faces[name]["draft_range_deg"] == pytest.approx([draft, draft], abs=DRAFT_TOL_DEG)


def test_check_without_a_pull_runs_only_cutter_reach(tmp_path):
    out = tmp_path / "check.json"
    status = main(["check", str(TRAY), "--json", str(out), "--quiet", "--sections", "none"])
    tooling = json.loads(out.read_text())["files"][0]["tooling"]
    assert status == 0
    assert tooling["pull"] is None and tooling["pull_source"] == "none" and tooling["undercuts"] == []
    assert tooling["concave_radius_mm"] is None  # planes: nothing concave


def test_a_zero_pull_on_the_command_line_exits_2(capsys):
    assert main(["check", str(TRAY), "--pull", "0", "0", "0", "--quiet"]) == 2
    assert "pull" in capsys.readouterr().err


def test_probe_adds_the_signed_draft(capsys):
    # the front wall leans 0.3 degrees: its draft against +z is +0.3, against -z it is -0.3
    for pull, want in (("1", 0.3), ("-1", -0.3)):
        assert main(["probe", str(TRAY), "--at", "70", "0", "12", "--pull", "0", "0", pull]) == 0
        out = json.loads(capsys.readouterr().out)
        assert out["draft_deg"] == pytest.approx(want, abs=DRAFT_TOL_DEG)


def test_report_with_a_pull_draws_the_draft_picture(tmp_path):
    # Regression: the draft picture once asked for a view by name and the report lost every picture.
    from app.report.figures import render_figures
    from app.review.runner import ReviewSettings, review_file

    review, model = review_file(str(TRAY), ReviewSettings(pull=(0.0, 0.0, 1.0)))
    figures = render_figures(model, review)
    assert "draft" in [f.name for f in figures]
    assert "model axes" in next(f.caption for f in figures if f.name == "draft")
