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
