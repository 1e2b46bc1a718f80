"""Fixtures every test module shares.

The repository root is on ``sys.path`` through pytest's ``pythonpath`` setting
(pyproject.toml), so ``sample_surfaces`` and ``tests/shapes.py`` import without
path edits in the modules.
"""

from __future__ import annotations

from functools import cache
from pathlib import Path

import pytest

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"


@cache
def _read_sample(name: str):
    from geometry.io import read_model

    return read_model(SAMPLES / name)


@pytest.fixture(scope="session")
def samples_dir() -> Path:
    """The folder of the bundled sample products (built by sample_surfaces/build_samples.py)."""
    return SAMPLES


@pytest.fixture(scope="session")
def sample_model():
    """``sample_model("toaster_panel.stp")``: a bundled sample read once per test run (models are immutable)."""
    return _read_sample


@pytest.fixture(autouse=True)
def _private_user_dirs(tmp_path_factory, monkeypatch):
    # `batten check` caches results in the user's cache folder by default: keep tests out of the real one.
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path_factory.mktemp("xdg-cache")))
    # the window's remembered settings and recent files: never the user's own (app/qt/settings_store.py)
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path_factory.mktemp("xdg-config")))
