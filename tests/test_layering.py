"""The numerical core and the session state import without Qt, VTK or pyvista (STYLE.md layering)."""

import subprocess
import sys

FORBIDDEN = ("PySide6", "pyvista", "pyvistaqt", "vtk", "vtkmodules", "app")


def _modules_after_import(statement: str) -> set[str]:
    code = f"import sys; {statement}; print('\\n'.join(sorted(sys.modules)))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    return {name.split(".")[0] for name in out.stdout.split()}


def test_geometry_pulls_in_no_gui_or_app_module():
    loaded = _modules_after_import("import geometry, geometry.model, geometry.nurbs.primitives")
    assert not loaded & set(FORBIDDEN)


def test_every_geometry_module_imports_headless():
    import pathlib

    root = pathlib.Path("geometry")
    names = [".".join(p.relative_to(root).with_suffix("").parts) for p in root.rglob("*.py") if p.stem != "__init__"]
    stmt = "; ".join(f"import geometry.{n}" for n in names)
    loaded = _modules_after_import(stmt)
    assert not loaded & set(FORBIDDEN)


def test_session_state_pulls_in_no_qt():
    loaded = _modules_after_import("import app.state, app.state.session")
    assert not loaded & {"PySide6", "pyvistaqt", "pyvista", "vtk", "vtkmodules"}
