"""The window's tooling state without a window: draft view, pull, suggestions, findings.

Expected answers are the drip tray's construction (sample_surfaces/manifest.json): the tray is
25 mm deep, 90 and 140 mm across, and its walls lean out from z, so its thinnest axis and the
axis with the least area out of draft are both z (geometric facts of the construction).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from app.state import Mode, Session
from geometry.errors import BattenError

TRAY = Path(__file__).resolve().parents[1] / "sample_surfaces" / "drip_tray.stp"


@pytest.fixture(scope="module")
def session():
    s = Session()
    s.open(str(TRAY))
    return s


def test_draft_view_is_computed_when_shown_and_lists_the_check_findings(session):
    heard = []
    session.subscribe("tooling", heard.append)
    session.set_display(mode=Mode.SHADED)
    session.set_pull((0, 0, 1))
    session.set_display(mode=Mode.DRAFT)
    assert session.tooling is not None and heard
    kinds = {f.kind for f in session.findings if f.verdict == "fail"}
    assert {"draft", "undercut"} <= kinds
    assert any("front_wall" in f.title for f in session.findings if f.kind == "draft")
    # the window's report says what the window shows: same pull
    assert session.review_settings.pull == (0.0, 0.0, 1.0)


def test_turning_the_pull_over_swaps_the_draft_sign(session):
    session.set_pull((0, 0, -3))
    assert session.pull == (0.0, 0.0, -1.0)
    walls = {m.grid.inside.shape: m for m in session.tooling.maps}
    assert walls  # computed for the new pull
    draft = np.concatenate([m.field.draft[m.grid.inside] for m in session.tooling.maps])
    assert draft.min() == pytest.approx(-90.0, abs=1e-9)  # the floor now looks against the pull
    session.set_pull((0, 0, 1))


def test_a_zero_pull_is_refused_and_the_pull_stays(session):
    with pytest.raises(BattenError):
        session.set_pull((0, 0, 0))
    assert session.pull == (0.0, 0.0, 1.0)


@pytest.mark.parametrize("how", ["thinnest axis", "least out of draft"])
def test_suggested_pulls_find_the_tray_axis(session, how):
    session.set_pull((1, 0, 0))
    session.suggest_pull(how)
    # the principal axis leans a little towards the back wall, which slopes unlike the front one
    assert np.allclose(np.abs(session.pull), (0, 0, 1), atol=0.01)
