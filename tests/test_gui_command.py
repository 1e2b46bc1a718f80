"""``batten FILE`` / ``batten open FILE``: the command that starts the window."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from app.cli import EXIT_BAD_INPUT, main

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"


def test_missing_file_exits_2_without_a_window(tmp_path, capsys):
    assert main([str(tmp_path / "absent.stp")]) == EXIT_BAD_INPUT
    assert "absent.stp" in capsys.readouterr().err
    assert main(["open", str(tmp_path / "absent.stp")]) == EXIT_BAD_INPUT


@pytest.mark.gui
@pytest.mark.parametrize("with_file", [False, True], ids=["empty", "sample"])
def test_open_command_shows_the_window(qtbot, monkeypatch, tmp_path, with_file):
    from PySide6.QtWidgets import QApplication

    from app.qt.window import MainWindow

    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path))
    monkeypatch.setattr(MainWindow, "__init__", _small_window(MainWindow.__init__))
    seen = {}

    def fake_exec(app):
        window = next(w for w in QApplication.topLevelWidgets() if isinstance(w, MainWindow) and w.isVisible())
        if with_file:
            qtbot.waitUntil(
                lambda: window.session.loaded is not None and window.session.loaded.seams_measured, timeout=120_000
            )
        seen["model"] = window.session.model
        window.close()
        return 0

    monkeypatch.setattr(QApplication, "exec", fake_exec)
    argv = []
    if with_file:
        name = json.loads((SAMPLES / "manifest.json").read_text())["samples"][0]["files"]["step"]
        argv = [str(SAMPLES / name)]
    assert main(argv if with_file else ["open"]) == 0
    assert (seen["model"] is not None) == with_file


def _small_window(init):
    def patched(self, session=None, multi_samples=None):
        init(self, session, multi_samples=0)

    return patched
