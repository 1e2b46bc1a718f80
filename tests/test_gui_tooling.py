"""The draft view in the window: typed pull, overlays, findings in the panel (under Xvfb).

Expected answers are the drip tray's construction (sample_surfaces/manifest.json).
"""

from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from test_gui_window import SAMPLES, open_and_wait, shoot, window  # noqa: E402,F401

from app.state import Mode  # noqa: E402

pytestmark = pytest.mark.gui


def test_draft_view_of_the_drip_tray(qtbot, window):  # noqa: F811 - the fixture
    open_and_wait(qtbot, window, SAMPLES / "drip_tray.stp")
    window.session.set_display(mode=Mode.DRAFT)
    panel = window.display_panel
    for box, value in zip(panel.pull, (0.0, 0.0, 2.0), strict=True):
        box.setValue(value)
    panel.apply_pull.click()
    qtbot.wait(30)
    assert window.session.pull == (0.0, 0.0, 1.0)
    assert {"tooling undercut", "tooling pull"} <= set(window.scene.actors)
    assert window.scene.legend == "Draft\n(degrees)"
    kinds = [f.kind for f in window.session.findings if f.verdict == "fail"]
    assert kinds.count("undercut") == 4 and kinds.count("draft") == 1  # back wall, floor strip, two corners
    assert len(window.findings_panel.entries()) == len(window.session.findings)
    assert shoot(window, "drip_tray-draft-typed").stat().st_size > 10_000
    # a zero vector is refused: the pull in force stays, and the boxes show it again
    for box in panel.pull:
        box.setValue(0.0)
    panel.apply_pull.click()
    assert window.session.pull == (0.0, 0.0, 1.0)
    assert [box.value() for box in panel.pull] == [0.0, 0.0, 1.0]
    # leaving the draft view drops its overlays
    window.session.set_display(mode=Mode.SHADED)
    assert not any(name.startswith("tooling ") for name in window.scene.actors)
