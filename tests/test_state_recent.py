"""Recent files: most recent first, unique, bounded, persisted whole."""

from __future__ import annotations

import json
import os

from app.state.recent import KEEP, RecentFiles


def test_recent_files_order_unique_and_bounded(tmp_path):
    store = tmp_path / "conf" / "recent.json"
    recent = RecentFiles(store)
    for i in range(KEEP + 3):
        recent.add(str(tmp_path / f"m{i}.stp"))
    recent.add(str(tmp_path / "m5.stp"))
    assert len(recent.paths) == KEEP
    assert recent.paths[0] == str(tmp_path / "m5.stp")
    assert len(set(recent.paths)) == KEEP
    assert RecentFiles(store).paths == recent.paths
    assert [p.name for p in store.parent.iterdir()] == ["recent.json"]  # no temp files left


def test_damaged_store_starts_afresh(tmp_path):
    store = tmp_path / "recent.json"
    store.write_text("{not json")
    assert RecentFiles(store).paths == []
    store.write_text(json.dumps({"a": 1}))
    assert RecentFiles(store).paths == []


def test_remove_and_in_memory(tmp_path):
    recent = RecentFiles(None)
    recent.add("a.stp")
    recent.remove("a.stp")
    assert recent.paths == []
    assert os.listdir(tmp_path) == []
