"""The review loop on the sample products: compare revisions, carry dispositions, gate with them.

hood_visor has a G1 seam where class-A wants G2 (manifest); hood_visor_rev_b is the same visor with
that seam made G2 by the sample script (manifest), so comparing the two must list the seam as fixed.
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from app.cli import main
from app.review.comparison import compare_models
from app.review.dispositions import APPLIED, RE_REVIEW, STALE, apply_review
from app.review.identity import finding_keys
from app.review.result import ACCEPTED, FAIL, PASS
from app.review.review_file import ACCEPTED as DECIDE_ACCEPT
from app.review.review_file import TO_FIX, Disposition, ReviewFile, dumps, loads
from app.review.runner import ReviewSettings, load_for_review, review_model
from geometry.model import Model

ROOT = Path(__file__).resolve().parents[1]
SAMPLES = ROOT / "sample_surfaces"
VISOR_A, VISOR_B = SAMPLES / "hood_visor.stp", SAMPLES / "hood_visor_rev_b.stp"
NO_SECTIONS = ReviewSettings(sections="none")
BUDGET = 3000


@pytest.fixture(scope="module")
def visor_a():
    model = load_for_review(str(VISOR_A))
    return model, review_model(model, NO_SECTIONS)


def _moved(model: Model, dy: float) -> Model:
    """The model slid along y (the seam's direction) by dy mm; topology dropped, found again by geometry."""
    shift = np.eye(4)
    shift[1, 3] = dy
    faces = tuple(replace(f, surface=f.surface.transformed(shift)) for f in model.faces)
    return Model(faces, source=f"{model.source} moved {dy} mm", sha256="0" * 64)


def _accept_seam(review) -> ReviewFile:
    (index,) = [i for i, f in enumerate(review.findings) if f.verdict == FAIL]
    key = finding_keys(review)[index]
    finding = review.findings[index]
    why = "the soft break is the design's"
    return ReviewFile(
        (Disposition(key, DECIDE_ACCEPT, "Ada Example", "2026-12-02", why, finding.measure, finding.value),)
    )


def test_fixed_seam_is_listed_as_fixed_and_the_bend_deviates(visor_a):
    old_model, _ = visor_a
    new_model = load_for_review(str(VISOR_B))
    comparison = compare_models(old_model, new_model, NO_SECTIONS, budget=BUDGET)
    statuses = [(c.status, c.key.kind, c.key.faces) for c in comparison.findings]
    assert statuses == [("fixed", "seam", ("visor_bend", "visor_flat"))]
    (fixed,) = comparison.findings
    assert fixed.before.measure == "curvature jump" and fixed.before.value == pytest.approx(1.0)
    assert fixed.after_value == pytest.approx(0.0, abs=1e-6)  # the same measure in revision B: G2 (manifest)
    assert comparison.new.verdict == PASS
    by_name = {comparison.face_name(f.face): f for f in comparison.deviation.faces}
    assert by_name["visor_flat"].max_mm < 1e-9  # the flat is the same surface in both (manifest)
    assert by_name["visor_bend"].max_mm > 0.1
    assert [comparison.face_name(n) for n in comparison.changed_faces] == ["visor_bend"]
    doc = comparison.to_dict()
    assert doc["deviation"]["max_mm"] == pytest.approx(by_name["visor_bend"].max_mm)
    assert {f["name"] for f in doc["deviation"]["faces"]} == {"visor_flat", "visor_bend"}


def test_accepted_finding_passes_the_gate_and_survives_the_file(visor_a):
    _, review = visor_a
    assert review.verdict == FAIL
    file = loads(dumps(_accept_seam(review)))
    gated = apply_review(review, file)
    assert gated.verdict == PASS
    assert [o.status for o in gated.dispositions] == [APPLIED]
    assert sum(f.verdict == ACCEPTED for f in gated.findings) == 1
    assert gated.reviewers == ("Ada Example",)


def test_to_fix_keeps_the_gate_failing(visor_a):
    _, review = visor_a
    accepted = _accept_seam(review)
    d = accepted.dispositions[0]
    both = accepted.with_disposition(replace(d, decision=TO_FIX, reviewer="Ben Sample", reason=""))
    assert apply_review(review, both).verdict == FAIL


def test_a_finding_moved_beyond_the_tolerance_is_flagged_not_applied(visor_a):
    model, review = visor_a
    file = _accept_seam(review)
    far = apply_review(review_model(_moved(model, 5.0), NO_SECTIONS), file)
    assert [o.status for o in far.dispositions] == [RE_REVIEW]
    assert "moved 5 mm" in far.dispositions[0].note
    assert far.verdict == FAIL
    near = apply_review(review_model(_moved(model, 0.3), NO_SECTIONS), file)
    assert [o.status for o in near.dispositions] == [APPLIED]
    assert near.verdict == PASS


def test_a_disposition_of_a_fixed_finding_is_stale(visor_a):
    _, review = visor_a
    fixed = review_model(load_for_review(str(VISOR_B)), NO_SECTIONS)
    outcome = apply_review(fixed, _accept_seam(review)).dispositions[0]
    assert outcome.status == STALE and outcome.note == "now within tolerance"


def test_check_with_review_file_gates_and_reports_stale(visor_a, tmp_path, capsys):
    _, review = visor_a
    path = tmp_path / "visor.review"
    path.write_text(dumps(_accept_seam(review)))
    out = tmp_path / "check.json"
    args = ["check", str(VISOR_A), "--sections", "none", "--quiet", "--jobs", "1"]
    assert main(args) == 1
    assert main([*args, "--review", str(path), "--json", str(out)]) == 0
    doc = json.loads(out.read_text())
    jsonschema = pytest.importorskip("jsonschema")
    schema = json.loads((ROOT / "app" / "report" / "check_schema.json").read_text())
    jsonschema.Draft202012Validator(schema).validate(doc)
    entry = doc["files"][0]
    assert entry["summary"]["verdict"] == "pass"
    assert entry["review"]["accepted"] == 1 and entry["review"]["reviewers"] == ["Ada Example"]
    capsys.readouterr()
    assert main(["check", str(VISOR_B), "--sections", "none", "--quiet", "--review", str(path)]) == 0
    assert "stale: seam visor_bend / visor_flat" in capsys.readouterr().out


def test_bad_review_file_exits_2_naming_it(tmp_path, capsys):
    path = tmp_path / "broken.review"
    path.write_text("not a review\n")
    assert main(["check", str(VISOR_A), "--quiet", "--review", str(path)]) == 2
    assert "broken.review: line 1" in capsys.readouterr().err


def test_compare_command_writes_deviation_json(tmp_path, capsys):
    out = tmp_path / "cmp.json"
    status = main(["compare", str(VISOR_A), str(VISOR_B), "--sections", "x:2", "--json", str(out), "--quiet"])
    assert status == 0
    doc = json.loads(out.read_text())
    assert doc["schema"] == "batten-compare"
    assert doc["deviation"]["max_mm"] > 0 and doc["deviation"]["mean_mm"] > 0
    assert all({"name", "max_mm", "mean_mm", "max_at"} <= set(f) for f in doc["deviation"]["faces"])
    assert doc["findings"]["counts"]["fixed"] == 1
    assert {f["family"] for f in doc["trend"]["section_families"]} == {"x:2"}
    assert "1 fixed" in capsys.readouterr().out


def test_compare_unreadable_input_exits_2(tmp_path, capsys):
    assert main(["compare", str(VISOR_A), str(tmp_path / "missing.stp"), "--quiet"]) == 2
    assert "missing.stp" in capsys.readouterr().err
