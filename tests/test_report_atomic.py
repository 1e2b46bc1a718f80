"""Writing a report or a check JSON never leaves a half-written file behind."""

from __future__ import annotations

import os

import pytest

from geometry.errors import WriteError
from geometry.io.files import write_atomically


def _leftovers(folder) -> list[str]:
    return sorted(p.name for p in folder.iterdir())


def test_bytes_and_text_are_written_whole(tmp_path):
    target = tmp_path / "out.json"
    write_atomically(target, '{"a": 1}\n')
    assert target.read_text() == '{"a": 1}\n'
    write_atomically(target, b"replaced")
    assert target.read_bytes() == b"replaced"
    assert _leftovers(tmp_path) == ["out.json"]


def test_permissions_follow_the_umask(tmp_path):
    # mkstemp makes 0600 files; a report must be readable like any file the user writes.
    target = write_atomically(tmp_path / "r.html", "x")
    umask = os.umask(0)
    os.umask(umask)
    assert target.stat().st_mode & 0o777 == 0o666 & ~umask


def test_failing_writer_leaves_no_partial_file_and_keeps_the_old_one(tmp_path):
    target = tmp_path / "report.pdf"
    target.write_bytes(b"the previous report")

    def half_then_fail(tmp: str) -> None:
        with open(tmp, "wb") as fh:
            fh.write(b"%PDF-1.4 half a document")
        raise RuntimeError("renderer crashed")

    with pytest.raises(RuntimeError, match="renderer crashed"):
        write_atomically(target, half_then_fail)
    assert target.read_bytes() == b"the previous report"
    assert _leftovers(tmp_path) == ["report.pdf"]


def test_failing_writer_with_no_previous_file_leaves_nothing(tmp_path):
    def fail(tmp: str) -> None:
        with open(tmp, "wb") as fh:
            fh.write(b"partial")
        raise OSError(28, "No space left on device")

    with pytest.raises(WriteError, match="No space left on device"):
        write_atomically(tmp_path / "out.html", fail)
    assert _leftovers(tmp_path) == []


def test_missing_folder_is_a_clear_error(tmp_path):
    with pytest.raises(WriteError, match="does not exist"):
        write_atomically(tmp_path / "nowhere" / "out.json", "x")


def test_unwritable_folder_is_a_clear_error(tmp_path):
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o500)
    try:
        if os.access(locked, os.W_OK):
            pytest.skip("running as a user who can write anywhere (root)")
        with pytest.raises(WriteError, match="cannot write"):
            write_atomically(locked / "out.json", "x")
    finally:
        locked.chmod(0o700)


def test_a_report_that_fails_half_way_leaves_nothing(tmp_path, monkeypatch):
    import app.report.writers as writers
    from app.report import write_report
    from app.review.result import FileReview

    def crash(target, reviews, figures, created, comparison=None):
        with open(target, "wb") as fh:
            fh.write(b"%PDF-1.4 first page only")
        raise OSError(5, "Input/output error")

    monkeypatch.setattr(writers, "write_pdf_file", crash)
    with pytest.raises(WriteError, match="Input/output error"):
        write_report(tmp_path / "review.pdf", [FileReview(source="a.stp", status="unreadable", error="gone")])
    assert _leftovers(tmp_path) == []
