"""`batten check --junit`: valid against the common JUnit XML schema, and the same failures as the JSON."""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from pathlib import Path

import xmlschema

from app.cli import main

HERE = Path(__file__).resolve().parent
SAMPLES = HERE.parent / "sample_surfaces"
SCHEMA = HERE / "data" / "junit.xsd"  # Apache Ant's JUnit result schema; source in the file's header


def test_junit_validates_and_counts_the_same_failures_as_the_json(tmp_path):
    scrap = tmp_path / "scrap.igs"
    scrap.write_text("not an IGES file at all\n")
    files = [SAMPLES / "hood_visor.stp", scrap, SAMPLES / "dial_plate.stp"]
    xml_out, json_out = tmp_path / "gate.xml", tmp_path / "gate.json"
    status = main(
        ["check", *map(str, files), "--junit", str(xml_out), "--json", str(json_out), "--sections", "x:2", "--no-cache"]
    )
    assert status == 2

    xmlschema.XMLSchema(SCHEMA).validate(str(xml_out))
    doc = json.loads(json_out.read_text())
    suites = ET.parse(xml_out).getroot().findall("testsuite")
    assert [s.get("name") for s in suites] == [e["source"] for e in doc["files"]]
    for suite, entry in zip(suites, doc["files"], strict=True):
        summary = entry["summary"]
        failures = suite.findall("testcase/failure")
        assert int(suite.get("failures")) == len(failures) == summary["over_tolerance"]
        assert int(suite.get("tests")) == len(suite.findall("testcase")) == 1 + len(summary["findings"])
        assert int(suite.get("errors")) == (entry["status"] == "unreadable")
        failing = [f for f in summary["findings"] if f["verdict"] == "fail"]
        for failure, finding in zip(failures, failing, strict=True):
            assert finding["subject"] in failure.text and finding["measure"] in failure.text
            assert "over the limit" in failure.get("message")
    assert sum(int(s.get("failures")) for s in suites) > 0
    assert suites[1].find("testcase/error").get("type") == "unreadable"


def test_names_and_messages_xml_cannot_carry_still_give_a_valid_file():
    from datetime import datetime

    from app.review.junit import SuiteRun, junit_text
    from app.review.result import FileReview

    review = FileReview(source="vault/pa\udcffnel\x01.stp", status="unreadable", error="bad byte \x00 at 12")
    text = junit_text([review], [SuiteRun(cached=False)], datetime(2026, 1, 2, 3, 4, 5), "0.0")
    xmlschema.XMLSchema(SCHEMA).validate(text)
    suite = ET.fromstring(text).find("testsuite")
    assert suite.get("name") == "vault/pa\ufffdnel\ufffd.stp" and suite.get("timestamp") == "2026-01-02T03:04:05"
    assert suite.find("testcase/error").text == "bad byte \ufffd at 12"
