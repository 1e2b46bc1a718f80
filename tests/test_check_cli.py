"""``batten check`` as a release pipeline sees it: exit status, several files, bad input."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from app.cli import main
from app.commands.check import exit_status

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
FAILING = SAMPLES / "hood_visor.stp"  # G1 seam under a G2 profile (manifest)
CLEAN = SAMPLES / "dial_plate.stp"  # one trimmed face, nothing to flag (manifest)


@pytest.mark.parametrize(
    "verdicts, status",
    [(["pass", "pass"], 0), (["pass", "fail"], 1), (["fail", "unreadable"], 2), (["pass", "error"], 3), ([], 0)],
)
def test_exit_status_rule(verdicts, status):
    assert exit_status(verdicts) == status


def test_read_error_in_one_of_several_files_exits_2_and_reports_the_others(tmp_path, capsys):
    garbage = tmp_path / "scrap.stp"
    garbage.write_text("ISO-10303-21;\nthis is not a STEP exchange structure\n")
    missing = tmp_path / "missing.igs"
    out = tmp_path / "all.json"
    files = [FAILING, garbage, CLEAN, missing]
    status = main(["check", *map(str, files), "--sections", "none", "--json", str(out), "--jobs", "2"])
    captured = capsys.readouterr()
    assert status == 2
    doc = json.loads(out.read_text())
    entries = doc["files"]
    assert [Path(e["source"]).name for e in entries] == [f.name for f in files]  # order as given
    assert [e["status"] for e in entries] == ["checked", "unreadable", "checked", "unreadable"]
    assert [e["summary"]["verdict"] for e in entries] == ["fail", "unreadable", "pass", "unreadable"]
    assert doc["verdict"] == "unreadable"
    assert entries[1]["sha256"] is not None and entries[3]["sha256"] is None
    assert "no such file" in entries[3]["error"]
    assert entries[1]["error"]
    *lines, total = captured.out.strip().splitlines()  # files by verdict, worst first, then the totals
    assert [line.split()[:2] for line in lines] == [
        ["UNREADABLE", str(garbage)],
        ["UNREADABLE", str(missing)],
        ["FAIL", str(FAILING)],
        ["PASS", str(CLEAN)],
    ]
    assert total == "4 files: 2 unreadable, 1 fail, 1 pass"
    assert "Traceback" not in captured.err


@pytest.mark.parametrize(
    "extra, words",
    [
        (["--profile", "no-such-profile"], "no-such-profile"),
        (["--sections", "w:3"], "cannot read 'w:3'"),
        (["--report", "out.docx"], "must end in .pdf or .html"),
        (["--json", "{tmp}/nowhere/out.json"], "does not exist"),
    ],
)
def test_wrong_settings_stop_before_any_work_with_exit_2(tmp_path, capsys, extra, words):
    extra = [e.replace("{tmp}", str(tmp_path)) for e in extra]
    status = main(["check", str(CLEAN), *extra])
    err = capsys.readouterr().err
    assert status == 2
    assert words in err
    assert "Traceback" not in err


def test_user_profile_file_is_echoed_in_the_json(tmp_path):
    profile = tmp_path / "loose.toml"
    profile.write_text('name = "loose"\nbase = "class-a"\nrequired = "G1"\n')
    out = tmp_path / "r.json"
    status = main(
        ["check", str(FAILING), "--profile", str(profile), "--sections", "none", "--json", str(out), "--quiet"]
    )
    entry = json.loads(out.read_text())["files"][0]
    assert entry["profile"]["name"] == "loose" and entry["profile"]["required"] == "G1"
    assert entry["profile"]["position_mm"] == 0.01  # from the class-A base
    # the G1 seam of the visor meets a G1 requirement
    assert status == 0 and entry["summary"]["verdict"] == "pass"


def test_progress_goes_to_stderr_and_quiet_silences_it(capsys):
    main(["check", str(CLEAN), "--sections", "x:1"])
    err = capsys.readouterr().err
    assert "batten check: dial_plate.stp: reading" in err and "cutting 1 section plane(s)" in err
    main(["check", str(CLEAN), "--sections", "none", "--quiet"])
    assert capsys.readouterr().err == ""


def test_the_runner_imports_without_qt_or_vtk():
    # The window's export and the pipeline share app.review; it must stay headless and light.
    import subprocess
    import sys

    code = (
        "import sys, app.review, app.review.batch, app.commands.check, app.report; "
        "print(sorted(m for m in ('PySide6', 'pyvista', 'vtk', 'vtkmodules') if m in sys.modules))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_a_face_the_core_rejects_makes_that_file_unreadable_not_the_run(tmp_path, monkeypatch):
    import app.review.batch as batch
    from geometry.errors import SurfaceError

    def broken(path, settings, progress):
        raise SurfaceError("face 3: knot vector decreases")

    monkeypatch.setattr(batch, "review_file", broken)
    review, figures = batch.check_one(str(CLEAN), batch.ReviewSettings(), False, False)
    assert review.verdict == "unreadable" and "knot vector" in review.error and figures == ()


def test_a_kernel_crash_inside_a_pool_worker_marks_only_that_file_unreadable(tmp_path, monkeypatch):
    # Pool workers read through their own kernel helper (geometry.kernel.isolation): the crash stays in the
    # helper, the worker reports the file and goes on with the next one.
    from test_io_isolation import crashing_copy
    from test_io_support import plate_with_hole, write_step

    monkeypatch.delenv("BATTEN_READ_IN_PROCESS", raising=False)
    good = write_step(plate_with_hole(), tmp_path / "plate.step")
    bad = crashing_copy(good, tmp_path / "plate_damaged.step")
    out = tmp_path / "all.json"
    status = main(["check", str(bad), good, str(CLEAN), "--sections", "none", "--json", str(out), "--jobs", "2"])
    entries = json.loads(out.read_text())["files"]
    assert status == 2
    assert [e["status"] for e in entries] == ["unreadable", "checked", "checked"]
    assert "kernel crashed" in entries[0]["error"]
