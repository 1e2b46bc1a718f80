"""Importing the readers, the sampler and the probe loads neither OCP nor any GUI library.

Layering rule of the project brief: geometry is numpy/scipy only; the readers
import the kernel lazily inside functions. Checked in a fresh interpreter.
"""

from __future__ import annotations

import subprocess
import sys

CODE = """
import sys
import geometry.io, geometry.io.step, geometry.io.iges, geometry.io.geomdl_json
import geometry.model.sampling, geometry.model.probe
import app.commands.probe, app.commands.summary
bad = sorted(m for m in sys.modules if m.split('.')[0] in ('OCP', 'PySide6', 'vtk', 'pyvista', 'vtkmodules'))
print(','.join(bad))
"""


def test_no_kernel_or_gui_at_import():
    result = subprocess.run([sys.executable, "-c", CODE], capture_output=True, text=True, check=True)
    assert result.stdout.strip() == ""
