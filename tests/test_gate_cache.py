"""Incremental runs: results of unchanged files come from the cache, and nothing else does."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

import app.review.batch as batch
from app.cli import main

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
FAILING = SAMPLES / "hood_visor.stp"  # G1 seam under a G2 profile (manifest)
CLEAN = SAMPLES / "dial_plate.stp"  # nothing to flag (manifest)


def _document(path: Path) -> dict:
    doc = json.loads(path.read_text())
    doc.pop("created")  # the only field that names the moment of the run
    return doc


@pytest.fixture
def counted(monkeypatch):
    """Counts the files analysed in this process (runs use --jobs 1)."""
    analysed = []
    original = batch.check_one

    def check_one(path, *args, **kwargs):
        analysed.append(Path(path).name)
        return original(path, *args, **kwargs)

    monkeypatch.setattr(batch, "check_one", check_one)
    return analysed


def test_a_second_run_over_unchanged_files_reads_every_result_from_the_cache(tmp_path, monkeypatch, capsys):
    base = ["check", str(FAILING), str(CLEAN), "--sections", "x:1", "--cache", str(tmp_path / "c"), "--jobs", "1"]
    first = main([*base, "--json", str(tmp_path / "first.json"), "--quiet"])
    capsys.readouterr()

    def no_analysis(*args, **kwargs):
        raise AssertionError("a file was analysed although its result was cached")

    monkeypatch.setattr(batch, "check_one", no_analysis)
    monkeypatch.setattr(batch, "review_file", no_analysis)
    second = main([*base, "--json", str(tmp_path / "second.json")])
    captured = capsys.readouterr()
    assert first == second == 1
    assert _document(tmp_path / "first.json") == _document(tmp_path / "second.json")
    assert "[1/2] hood_visor.stp: fail (cached)" in captured.err
    assert "from cache" in captured.out.splitlines()[0] and captured.out.splitlines()[-1].endswith("(2 from cache)")


def test_changed_content_profile_or_sections_miss_the_cache_and_a_moved_file_hits_it(tmp_path, counted):
    model = tmp_path / "plate.stp"
    shutil.copyfile(CLEAN, model)
    common = ["--cache", str(tmp_path / "c"), "--jobs", "1", "--quiet"]
    cache = [*common, "--sections", "none"]
    main(["check", str(model), *cache])
    main(["check", str(model), *cache, "--profile", "technical"])
    main(["check", str(model), *common, "--sections", "x:1"])
    assert counted == ["plate.stp"] * 3
    moved = tmp_path / "moved.stp"
    model.rename(moved)
    out = tmp_path / "moved.json"
    main(["check", str(moved), *cache, "--json", str(out)])
    assert counted == ["plate.stp"] * 3  # same bytes, same settings: served from the cache
    assert json.loads(out.read_text())["files"][0]["source"] == str(moved)
    moved.write_bytes(moved.read_bytes().replace(b"ENDSEC;", b"ENDSEC; ", 1))  # same model, other bytes
    main(["check", str(moved), *cache])
    main(["check", str(moved), "--no-cache", "--jobs", "1", "--quiet", "--sections", "none"])
    assert counted == ["plate.stp"] * 3 + ["moved.stp"] * 2


def test_unreadable_files_are_not_cached(tmp_path, counted):
    scrap = tmp_path / "scrap.stp"
    scrap.write_text("ISO-10303-21;\nnot a STEP exchange structure\n")
    for _ in range(2):
        assert main(["check", str(scrap), "--cache", str(tmp_path / "c"), "--jobs", "1", "--quiet"]) == 2
    assert counted == ["scrap.stp", "scrap.stp"]
