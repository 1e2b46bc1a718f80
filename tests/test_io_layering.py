"""Importing the readers, the sampler and the probe loads neither OCP nor any GUI library.

Layering rule of the project brief: geometry is numpy/scipy only; the readers
import the kernel lazily inside functions. Checked in a fresh interpreter.
"""

from __future__ import annotations

import subprocess
import sys

CODE = """
import sys
import geometry.io, geometry.kernel.step, geometry.kernel.iges, geometry.io.geomdl_json
import geometry.model.sampling, geometry.model.probe
import app.commands.probe, app.commands.summary
bad = sorted(m for m in sys.modules if m.split('.')[0] in ('OCP', 'PySide6', 'vtk', 'pyvista', 'vtkmodules'))
print(','.join(bad))
"""


def test_no_kernel_or_gui_at_import():
    result = subprocess.run([sys.executable, "-c", CODE], capture_output=True, text=True, check=True)
    assert result.stdout.strip() == ""


HELPER = """
import sys
import geometry.kernel.worker, geometry.kernel.step, geometry.kernel.iges
heavy = {'numba', 'llvmlite', 'scipy', 'PySide6', 'vtkmodules'}
print(','.join(sorted({m.split('.')[0] for m in sys.modules} & heavy)))
own = ('geometry.kernel', 'geometry.errors')
print(','.join(sorted(m for m in sys.modules if m.startswith('geometry.') and not m.startswith(own))))
"""


def test_the_kernel_helper_imports_the_kernel_alone():
    """The helper process starts with OCP and numpy only: no compiled kernels, no scipy, nothing else of geometry.

    Its start-up is on the critical path of every read (the owner waits for its answer).
    """
    result = subprocess.run([sys.executable, "-c", HELPER], capture_output=True, text=True, check=True)
    assert result.stdout.splitlines() == ["", ""]
