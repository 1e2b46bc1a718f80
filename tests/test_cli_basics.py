"""The batten entry point: help, version, and bad input as exit status 2."""

import subprocess
import sys

import geometry
from app.cli import main


def _run(*args):
    return subprocess.run([sys.executable, "-m", "app", *args], capture_output=True, text=True, timeout=120)


def test_help_lists_commands():
    out = _run("--help")
    assert out.returncode == 0
    for name in ("probe", "section", "check"):
        assert name in out.stdout


def test_version():
    out = _run("--version")
    assert out.returncode == 0 and geometry.__version__ in out.stdout


def test_installed_console_script_exists():
    import shutil

    assert shutil.which("batten", path=str(__import__("pathlib").Path(sys.executable).parent))


def test_battenerror_becomes_one_line_and_exit_2(monkeypatch, capsys):
    import app.cli as cli

    monkeypatch.setattr(cli, "COMMANDS", {"boom": ("tests.fake_command", "raises a read error")})
    status = main(["boom", "broken.step"])
    err = capsys.readouterr().err
    assert status == 2
    assert err.strip() == "batten: broken.step: not a STEP or IGES file"


def test_window_without_a_display_says_so_and_exits_2():
    import os

    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    out = subprocess.run(
        [sys.executable, "-m", "app", "sample_surfaces/hood_visor.stp"],
        capture_output=True,
        text=True,
        timeout=120,
        env=env,
    )
    assert out.returncode == 2
    assert "no display" in out.stderr and "Traceback" not in out.stderr
