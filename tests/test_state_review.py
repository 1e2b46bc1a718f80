"""The session's review loop without a window: review file beside the model, decisions, deviation map."""

from __future__ import annotations

import shutil
from pathlib import Path

import numpy as np
import pytest

from app.review.review_file import ACCEPTED, TO_FIX, read_review_file
from app.state import Mode, Session
from app.state.revisions import compare_with, decide, finding_key, review_path_for
from geometry.errors import BattenError
from geometry.io.files import write_atomically

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"


@pytest.fixture(scope="module")
def visor(tmp_path_factory):
    """Revision A opened from a folder of its own (its review file goes beside it)."""
    folder = tmp_path_factory.mktemp("visor")
    path = folder / "hood_visor.stp"
    shutil.copy(SAMPLES / "hood_visor.stp", path)
    session = Session()
    session.open(str(path))
    return session


def _failing_seam(session):
    (finding,) = [f for f in session.findings if f.kind == "seam" and f.verdict == "fail"]
    return finding


def test_the_review_file_beside_the_model_is_used(visor):
    assert visor.review.path == review_path_for(visor.path)
    assert visor.review.path.endswith("hood_visor.review")


def test_a_decision_needs_a_name_and_an_acceptance_a_reason(visor):
    visor.review.reviewer = ""
    with pytest.raises(BattenError, match="name"):
        decide(visor, _failing_seam(visor), TO_FIX, write=write_atomically)
    visor.review.reviewer = "Ben Sample"
    with pytest.raises(BattenError, match="reason"):
        decide(visor, _failing_seam(visor), ACCEPTED, "  ", write=write_atomically)


def test_decisions_are_saved_and_a_second_replaces_the_first(visor):
    visor.review.reviewer = "Ben Sample"
    finding = _failing_seam(visor)
    decide(visor, finding, TO_FIX, write=write_atomically)
    decide(visor, finding, ACCEPTED, "agreed with tooling", write=write_atomically)
    (saved,) = read_review_file(visor.review.path).dispositions
    assert saved.decision == ACCEPTED and saved.reason == "agreed with tooling"
    assert saved.key == finding_key(visor, finding)
    assert saved.measure == "curvature jump" and saved.value == pytest.approx(1.0)


def test_notes_take_no_decision(visor):
    note = next(f for f in visor.findings if f.verdict == "note")
    assert finding_key(visor, note) is None
    assert decide(visor, note, TO_FIX) is None


def test_deviation_mode_maps_the_comparison():
    session = Session()
    session.open(str(SAMPLES / "hood_visor_rev_b.stp"))
    session.set_display(mode=Mode.DEVIATION)
    assert all(np.isnan(f).all() for f in session.measure_fields())  # nothing compared yet
    comparison = compare_with(session, str(SAMPLES / "hood_visor.stp"))
    fields = session.measure_fields()
    for f, s in zip(fields, session.samples, strict=True):
        assert np.isfinite(f[s.inside]).all()
    reach = max(float(np.nanmax(np.abs(f))) for f in fields)
    # The map interpolates a sub-grid; its extreme stays within the comparison's exact samples' spread.
    assert reach == pytest.approx(comparison.deviation.max_mm, rel=0.02)
    assert session.colour_limits() == (-session.review.deviation.reach, session.review.deviation.reach)


def test_compare_with_an_unreadable_file_keeps_the_model(tmp_path):
    session = Session()
    session.open(str(SAMPLES / "dial_plate.stp"))
    with pytest.raises(BattenError, match="missing.stp"):
        compare_with(session, str(tmp_path / "missing.stp"))
    assert session.model is not None and session.review.comparison is None
