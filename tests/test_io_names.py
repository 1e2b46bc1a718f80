"""Names the file gives faces and bodies reach the model.

ISO 10303-42 entities carry a name as their first attribute
(``ADVANCED_FACE('name', ...)``, ``MANIFOLD_SOLID_BREP('name', ...)``); the
kernel's writer leaves them empty, so the test fills two in the written text.
"""

from __future__ import annotations

from test_io_support import plate_with_hole, write_step

from geometry.io import read_model


def test_step_face_and_body_names(tmp_path):
    text = open(write_step(plate_with_hole(), tmp_path / "plate.step")).read()
    text = text.replace("ADVANCED_FACE('',", "ADVANCED_FACE('top skin',", 1)
    text = text.replace("MANIFOLD_SOLID_BREP('',", "MANIFOLD_SOLID_BREP('bracket',", 1)
    named = tmp_path / "named.step"
    named.write_text(text)
    model = read_model(named)
    assert [f.name for f in model.faces].count("top skin") == 1
    assert {f.body for f in model.faces} == {"bracket"}


def test_unnamed_bodies_are_numbered(tmp_path):
    model = read_model(write_step(plate_with_hole(), tmp_path / "plate.step"))
    assert {f.body for f in model.faces} == {"solid 1"}
    assert {f.name for f in model.faces} == {""}


def _named_assembly(path):
    """Two placed instances of one named part, written by the kernel's XCAF STEP writer (AP214)."""
    from OCP.gp import gp_Trsf, gp_Vec
    from OCP.STEPCAFControl import STEPCAFControl_Writer
    from OCP.STEPControl import STEPControl_AsIs
    from OCP.TCollection import TCollection_ExtendedString
    from OCP.TDataStd import TDataStd_Name
    from OCP.TDocStd import TDocStd_Document
    from OCP.TopLoc import TopLoc_Location
    from OCP.XCAFDoc import XCAFDoc_DocumentTool
    from test_io_support import box

    from geometry.kernel.occt_quiet import quiet_kernel

    doc = TDocStd_Document(TCollection_ExtendedString("XmlOcaf"))
    shapes = XCAFDoc_DocumentTool.ShapeTool_s(doc.Main())
    assembly = shapes.NewShape()
    TDataStd_Name.Set_s(assembly, TCollection_ExtendedString("toaster"))
    part = shapes.AddShape(box(1, 2, 3), False)
    TDataStd_Name.Set_s(part, TCollection_ExtendedString("side panel"))
    for offset in (0, 100):
        trsf = gp_Trsf()
        trsf.SetTranslation(gp_Vec(offset, 0, 0))
        instance = shapes.AddComponent(assembly, part, TopLoc_Location(trsf))
        TDataStd_Name.Set_s(instance, TCollection_ExtendedString(f"panel at x={offset}"))
    shapes.UpdateAssemblies()
    with quiet_kernel():
        writer = STEPCAFControl_Writer()
        writer.Transfer(doc, STEPControl_AsIs)
        writer.Write(str(path))
    return path


def test_assembly_instances_name_their_bodies(tmp_path):
    import numpy as np

    model = read_model(_named_assembly(tmp_path / "toaster.step"))
    assert len(model.faces) == 12
    assert {f.body for f in model.faces} == {"panel at x=0", "panel at x=100"}
    for face in model.faces:
        x = face.surface.poles[..., 0]
        assert (x.max() <= 1 + 1e-9) == (face.body == "panel at x=0")
    np.testing.assert_allclose(model.bounds, [[0, 0, 0], [101, 2, 3]], atol=1e-9)
