"""The findings tree without a window: kinds, then faces or section curves; titles that read alike told apart."""

from __future__ import annotations

import numpy as np

from app.review.result import Kind, Verdict
from app.state import FindingEntry, Session
from app.state.demo import demo_model
from app.state.finding_groups import group_findings, place_of, unique_titles
from app.state.session import KIND_ORDER


def entry(kind, title, verdict=Verdict.NOTE, position=(0.0, 0.0, 0.0), place=""):
    return FindingEntry(kind, title, verdict, np.array(position), place=place)


def test_titles_that_read_alike_get_their_place():
    edges = [
        entry(Kind.FREE_EDGE, "free edge of side, 110.1 mm", position=(0, 0, 0), place="side"),
        entry(Kind.FREE_EDGE, "free edge of side, 110.1 mm", position=(0, 50, 0), place="side"),
        entry(Kind.FREE_EDGE, "free edge of side, 110.1 mm", position=(0, 50, 0), place="side"),
        entry(Kind.FREE_EDGE, "free edge of top, 20.0 mm", place="top"),
    ]
    titles = [f.title for f in unique_titles(edges)]
    assert len(set(titles)) == len(titles)
    assert titles[0] == "free edge of side, 110.1 mm near (0.0, 0.0, 0.0)"
    assert titles[1].endswith("near (0.0, 50.0, 0.0) #1") and titles[2].endswith("#2")
    assert titles[3] == "free edge of top, 20.0 mm"


def test_groups_by_kind_then_place_failing_first():
    found = [
        entry(Kind.SEAM, "seam a / b: G1", Verdict.PASS, place="a / b"),
        entry(Kind.SEAM, "seam b / c: G0", Verdict.FAIL, place="b / c"),
        entry(Kind.CURVATURE, "a: tightest radius 5 mm", place="a"),
        entry(Kind.CURVATURE, "b: tightest radius 9 mm"),  # no place: the title's head
    ]
    groups = group_findings(list(enumerate(found)), KIND_ORDER)
    assert [g.kind for g in groups] == [Kind.SEAM, Kind.CURVATURE]
    assert [p.place for p in groups[0].places] == ["b / c", "a / b"]
    assert groups[0].failing == 1 and not groups[0].notes_only
    assert groups[1].notes_only  # folded by default
    assert place_of(found[3]) == "b"


def test_every_finding_of_a_session_is_unique_and_placed():
    s = Session()
    s.show_model(demo_model())
    s.set_section(enabled=True, normal=(0.0, 1.0, 0.0), count=3, spacing=10.0)
    titles = [f.title for f in s.findings]
    assert len(set(titles)) == len(titles)
    assert all(f.place for f in s.findings)
    groups = group_findings(list(enumerate(s.findings)), KIND_ORDER)
    assert sorted(i for g in groups for i, _ in g.entries) == list(range(len(s.findings)))
