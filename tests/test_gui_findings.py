"""The findings panel through the window (pytest-xvfb): the tree, the detail pane, framing, loading.

Screenshots go to tests/artifacts/ for a person to look at.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("pyvistaqt")

from PySide6.QtCore import Qt  # noqa: E402

from app.qt.window import MainWindow  # noqa: E402
from app.state import Mode  # noqa: E402
from app.state.demo import demo_model  # noqa: E402
from tests.gui_support import shoot, show_window  # noqa: E402

pytestmark = pytest.mark.gui

ROOT = Path(__file__).resolve().parents[1]
LID = ROOT / "sample_surfaces" / "console_lid.stp"
LOAD_MS = 120_000
FRAME_MARGIN_SHARE = 0.03  # each framed point stays this share of the view inside its edges


@pytest.fixture
def window(qtbot):
    w = show_window(qtbot, (1280, 860))
    yield w
    w.close()


@pytest.fixture
def lid(qtbot, window):
    if not LID.is_file():
        pytest.skip("samples not built")
    with qtbot.waitSignals([window.model_shown, window.seams_measured], timeout=LOAD_MS):
        window.open_file(str(LID))
    window.session.set_display(mode=Mode.CURVATURE)
    return window


def click_finding(qtbot, w: MainWindow, index: int) -> None:
    tree = w.findings_panel.tree
    item = w.findings_panel.item_for(index)
    parent = item.parent()
    while parent is not None:
        parent.setExpanded(True)
        parent = parent.parent()
    tree.scrollToItem(item)
    qtbot.mouseClick(tree.viewport(), Qt.MouseButton.LeftButton, pos=tree.visualItemRect(item).center())
    qtbot.waitUntil(lambda: w.session.selection == index, timeout=2000)


def length(path: np.ndarray) -> float:
    return float(np.linalg.norm(np.diff(path, axis=0), axis=1).sum())


def assert_framed(w: MainWindow, points: np.ndarray) -> None:
    """Every point inside the view, a margin from its edges."""
    seen = w.scene.to_display(points)
    size = np.array(w.view.render_window.GetSize(), float)
    margin = FRAME_MARGIN_SHARE * size
    assert np.isfinite(seen).all()
    assert (seen >= margin).all() and (seen <= size - margin).all(), (seen.min(axis=0), seen.max(axis=0), size)


def test_a_seam_and_a_free_edge_are_framed_whole(qtbot, lid):
    w = lid
    findings = w.session.findings
    seam = max((i for i, f in enumerate(findings) if f.kind == "seam"), key=lambda i: length(findings[i].path))
    edge = max((i for i, f in enumerate(findings) if f.kind == "free_edge"), key=lambda i: length(findings[i].path))
    w.session.set_section(enabled=True)  # the plane's handle is on screen too
    seam = next(i for i, f in enumerate(w.session.findings) if f.title == findings[seam].title)
    edge = next(i for i, f in enumerate(w.session.findings) if f.title == findings[edge].title)
    click_finding(qtbot, w, seam)
    path = w.session.findings[seam].path
    assert length(path) > 0.1 * w.session.model.size  # a long seam, not a point
    assert_framed(w, path)
    assert np.allclose(w.scene.lines["mark"].points, path)
    shoot(w, "lid-seam-framed")
    click_finding(qtbot, w, edge)
    assert_framed(w, w.session.findings[edge].path)
    assert np.allclose(w.scene.lines["mark"].points, w.session.findings[edge].path)  # the seam's mark is gone
    shoot(w, "lid-free-edge-framed")
    # moving the plane recomputes the findings: the mark of the old choice goes with it
    w.section_panel.forward.click()
    assert w.session.selection is None
    assert not w.scene.actors["mark"].GetVisibility()


def test_tree_groups_by_kind_and_face_and_the_pane_reads_in_full(qtbot, lid):
    w = lid
    panel = w.findings_panel
    tree = panel.tree
    tops = [tree.topLevelItem(i) for i in range(tree.topLevelItemCount())]
    assert len(tops) < len(w.session.findings)
    kinds = {f.kind for f in w.session.findings}
    assert len(tops) == len(kinds)
    for top in tops:  # only groups with a failing entry start open: this lid passes
        assert not top.isExpanded()
        assert all(f.verdict != "fail" for f in w.session.findings if top.text(1).startswith(f"{_words(f)} ("))
    leaves = panel.entries()
    assert len(leaves) == len(w.session.findings)
    titles = [item.text(1) for item in leaves]
    assert len(set(titles)) == len(titles)
    # grouped by face under each kind: the curvature notes sit under their faces' names
    curvature = next(top for top in tops if top.text(1).startswith("tightest spot"))
    assert curvature.childCount() >= 1
    # no title is cut: the column is as wide as its longest text
    metrics = tree.fontMetrics()
    widest = max(metrics.horizontalAdvance(t) for t in titles)
    assert tree.header().sectionSize(1) >= widest
    index = max(range(len(w.session.findings)), key=lambda i: len(w.session.findings[i].detail))
    click_finding(qtbot, w, index)
    finding = w.session.findings[index]
    text = panel.detail.toPlainText()
    assert finding.title in text and finding.detail in text
    shoot(w, "lid-findings-tree")


def _words(finding):
    from app.qt.findings import KIND_WORDS

    return KIND_WORDS[finding.kind]


def test_while_a_model_loads_no_old_findings_show(qtbot, window):
    if not LID.is_file():
        pytest.skip("samples not built")
    window.session.show_model(demo_model())
    panel = window.findings_panel
    assert panel.entries()
    with qtbot.waitSignals([window.model_shown, window.seams_measured], timeout=LOAD_MS):
        window.open_file(str(LID))
        assert panel.entries() == []
        assert "Opening console_lid.stp" in panel.summary.text()
        shoot(window, "lid-loading")
    assert len(panel.entries()) == len(window.session.findings) > 0
    assert "Opening" not in panel.summary.text()


def test_failing_groups_open_and_notes_folded(qtbot, window):
    window.session.show_model(demo_model())  # its seam fails (G0 where G2 is asked)
    tree = window.findings_panel.tree
    tops = {tree.topLevelItem(i).text(1).split(" (")[0]: tree.topLevelItem(i) for i in range(tree.topLevelItemCount())}
    assert tops["seams"].isExpanded()
    assert not tops["tightest spot of each face"].isExpanded()
    tops["tightest spot of each face"].setExpanded(True)  # the user's choice survives a redraw
    window.session.set_section(enabled=True)
    tops = {tree.topLevelItem(i).text(1).split(" (")[0]: tree.topLevelItem(i) for i in range(tree.topLevelItemCount())}
    assert tops["tightest spot of each face"].isExpanded()
    shoot(window, "demo-findings-tree")
