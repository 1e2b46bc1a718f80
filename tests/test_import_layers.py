"""The layers of the code, as pyproject.toml's import-linter contracts state them, hold.

``lint-imports`` reads every import, those inside functions too, so no lazy
import can hide an upward dependency or a cycle.
"""

import shutil
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_import_contracts_are_kept():
    lint = shutil.which("lint-imports", path=str(Path(sys.executable).parent)) or shutil.which("lint-imports")
    assert lint is not None, "import-linter is part of the test tools (pyproject.toml, extra 'test')"
    out = subprocess.run([lint, "--no-cache"], capture_output=True, text=True, cwd=ROOT)
    assert out.returncode == 0, out.stdout + out.stderr
