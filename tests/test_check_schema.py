"""The check JSON follows its documented schema (app/report/check_schema.json).

Needs ``jsonschema`` (JSON Schema draft 2020-12 validator); skipped where it is
not installed.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from app.cli import main
from app.review.result import SCHEMA_ID, SCHEMA_VERSION

jsonschema = pytest.importorskip("jsonschema")

ROOT = Path(__file__).resolve().parents[1]
SCHEMA = json.loads((ROOT / "app" / "report" / "check_schema.json").read_text())
SAMPLES = ROOT / "sample_surfaces"


def test_schema_is_a_valid_draft_2020_12_schema():
    jsonschema.Draft202012Validator.check_schema(SCHEMA)


def test_schema_version_matches_the_writer():
    assert SCHEMA["properties"]["schema"]["const"] == SCHEMA_ID
    major = SCHEMA_VERSION.split(".")[0]
    assert SCHEMA["properties"]["schema_version"]["pattern"].startswith(f"^{major}\\.")


def test_check_output_validates(tmp_path):
    out = tmp_path / "check.json"
    files = [SAMPLES / "steamer_body.stp", SAMPLES / "toaster_panel.igs", tmp_path / "missing.stp"]
    main(["check", *map(str, files), "--sections", "x:2;plane:100,70,0,0,1,0", "--json", str(out), "--quiet"])
    doc = json.loads(out.read_text())
    jsonschema.Draft202012Validator(SCHEMA, format_checker=jsonschema.FormatChecker()).validate(doc)
    entry = doc["files"][0]
    assert entry["seams"] and entry["sections"] and entry["free_edges"]
    assert any(c["inflections"] for s in doc["files"][1]["sections"] for c in s["curves"])


def test_a_broken_entry_is_rejected():
    # the schema has teeth: a file entry without its summary must not validate
    doc = {
        "schema": SCHEMA_ID,
        "schema_version": SCHEMA_VERSION,
        "batten_version": "0",
        "created": "now",
        "verdict": "pass",
        "files": [{"source": "a.stp", "status": "checked"}],
    }
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(doc, SCHEMA)


def test_typed_findings_write_the_schema_1_0_fields():
    # Finding's kind and verdict are enums now; the JSON they write must stay what schema 1.x
    # documents (a change of meaning would have to raise SCHEMA_VERSION's major number)
    from app.review.result import FAIL, PASS, Finding, Kind, Verdict

    finding_schema = SCHEMA["$defs"]["finding"]
    assert SCHEMA_VERSION.split(".")[0] == "1"
    # the window-only kind is not written; schema 1.1 added the tooling kinds
    judged_kinds = (
        Kind.SEAM,
        Kind.FREE_EDGE,
        Kind.INFLECTION,
        Kind.CURVATURE,
        Kind.DRAFT,
        Kind.UNDERCUT,
        Kind.CUTTER_REACH,
        Kind.FACE,
    )
    assert set(finding_schema["properties"]["kind"]["enum"]) == {str(k) for k in judged_kinds}
    validator = jsonschema.Draft202012Validator({**finding_schema, "$defs": SCHEMA["$defs"]})
    for kind in judged_kinds:
        for verdict in (PASS, FAIL):
            entry = json.loads(json.dumps(Finding(kind, "s", "m", 1.0, 2.0, "mm", verdict, (0.0, 1.0, 2.0)).to_dict()))
            validator.validate(entry)
            assert entry["kind"] == kind.value and entry["verdict"] == Verdict(verdict).value
