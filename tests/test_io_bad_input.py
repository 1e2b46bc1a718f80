"""Bad input: a clear ReadError naming the file and the cause; good faces kept.

The cases are those of issue 3 (missing, empty, truncated, wrong format, no
surfaces, broken faces among good ones, absurd sizes, NaN); the broken files are
the kernel writers' output with deliberate damage.
"""

from __future__ import annotations

import json
import struct
import zlib

import numpy as np
import pytest
from test_io_support import bilinear_record, box, bspline_face, plate_with_hole, write_iges, write_step

from app.cli import EXIT_BAD_INPUT, main
from geometry.errors import ReadError
from geometry.io import read_model


def _reason(path) -> str:
    with pytest.raises(ReadError) as info:
        read_model(path)
    assert str(path) in str(info.value)
    return info.value.reason


def _png_bytes() -> bytes:
    """A valid 1x1 PNG (PNG spec, ISO/IEC 15948: signature, IHDR, IDAT, IEND)."""

    def chunk(kind, data):
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data))

    ihdr = struct.pack(">IIBBBBB", 1, 1, 8, 0, 0, 0, 0)
    return (
        b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", ihdr) + chunk(b"IDAT", zlib.compress(b"\x00\x00")) + chunk(b"IEND", b"")
    )


def test_missing_file(tmp_path):
    assert "no such file" in _reason(tmp_path / "absent.step")


def test_folder(tmp_path):
    assert "folder" in _reason(tmp_path)


@pytest.mark.parametrize("content", [b"", b"   \n\n"])
def test_empty_file(tmp_path, content):
    path = tmp_path / "empty.step"
    path.write_bytes(content)
    assert "empty" in _reason(path)


def test_png_renamed_step(tmp_path):
    path = tmp_path / "picture.step"
    path.write_bytes(_png_bytes())
    assert "not a STEP, IGES or JSON surface file" in _reason(path)


def test_text_that_is_no_step(tmp_path):
    path = tmp_path / "notes.stp"
    path.write_text("these are not the surfaces you are looking for\n")
    assert "STEP" in _reason(path)


@pytest.mark.parametrize(("name", "expected"), [("tiny.igs", "not an IGES file"), ("tiny.step", "not a STEP file")])
def test_short_text_named_as_a_model(tmp_path, name, expected):
    # A few bytes of text with a model's extension: the cause is the format, not a missing surface.
    path = tmp_path / name
    path.write_bytes(b"hello\n")
    reason = _reason(path)
    assert expected in reason
    assert "geomdl" not in reason


@pytest.mark.parametrize(("writer", "ext"), [(write_step, "step"), (write_iges, "igs")])
def test_truncated(tmp_path, writer, ext):
    data = open(writer(plate_with_hole(), tmp_path / f"full.{ext}"), "rb").read()
    path = tmp_path / f"cut.{ext}"
    path.write_bytes(data[: len(data) // 2])
    reason = _reason(path)
    assert ext[:2].upper() in reason.upper() or "face" in reason


def test_no_surfaces(tmp_path):
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge
    from OCP.gp import gp_Pnt

    edge = BRepBuilderAPI_MakeEdge(gp_Pnt(0, 0, 0), gp_Pnt(10, 0, 0)).Edge()
    assert "no surfaces" in _reason(write_step(edge, tmp_path / "wire.step"))


def test_broken_face_among_good_ones(tmp_path):
    path = write_step(plate_with_hole(), tmp_path / "plate.step")
    text = open(path).read()
    first_plane = text.index("= PLANE(")
    damaged = text[:first_plane] + "= CARTESIAN_POINT(" + text[first_plane + len("= PLANE(") :]
    broken = tmp_path / "plate_broken.step"
    broken.write_text(damaged)
    model = read_model(broken)
    assert len(model.faces) == 6  # of 7
    assert any("1 of the 7 faces" in w for w in model.warnings)


def test_absurd_face_skipped_good_face_kept(tmp_path):
    from OCP.BRep import BRep_Builder
    from OCP.gp import gp_Pnt, gp_Trsf
    from OCP.TopLoc import TopLoc_Location
    from OCP.TopoDS import TopoDS_Compound

    good, _ = bspline_face()
    trsf = gp_Trsf()
    trsf.SetScale(gp_Pnt(0, 0, 0), 1e10)  # 80 mm wide -> 8e11 mm
    huge = bspline_face(seed=4)[0].Moved(TopLoc_Location(trsf))
    builder, compound = BRep_Builder(), TopoDS_Compound()
    builder.MakeCompound(compound)
    builder.Add(compound, good)
    builder.Add(compound, huge)
    for path in (write_step(compound, tmp_path / "two.step"), write_iges(compound, tmp_path / "two.igs")):
        model = read_model(path)
        assert len(model.faces) == 1
        assert np.ptp(model.bounds, axis=0).max() < 100
        assert any("beyond any design model" in w for w in model.warnings), model.warnings


def test_nan_poles_skipped(tmp_path):
    good = [[0, 0, 0], [0, 1, 0], [1, 0, 0], [1, 1, 0]]
    bad = [[0, 0, 0], [0, 1, float("nan")], [1, 0, 0], [1, 1, 0]]
    path = tmp_path / "two.json"
    path.write_text(json.dumps({"shape": {"type": "surface", "data": [bilinear_record(good), bilinear_record(bad)]}}))
    model = read_model(path)
    assert len(model.faces) == 1
    assert "surface 2 skipped" in model.warnings[0] and "NaN" in model.warnings[0]
    path.write_text(json.dumps({"shape": {"type": "surface", "data": [bilinear_record(bad)]}}))
    assert "none usable" in _reason(path)


@pytest.mark.parametrize(
    "text", ["{", '{"shape": {"type": "curve", "data": []}}', '{"shape": 3}', '{"shape": {"type": "surface"}}']
)
def test_bad_geomdl_json(tmp_path, text):
    path = tmp_path / "bad.json"
    path.write_text(text)
    _reason(path)


def test_cli_exit_status_and_message(tmp_path, capsys):
    path = tmp_path / "picture.igs"
    path.write_bytes(_png_bytes())
    assert main(["probe", str(path), "--at", "0", "0", "0"]) == EXIT_BAD_INPUT
    captured = capsys.readouterr()
    assert str(path) in captured.err and "Traceback" not in captured.err
    assert captured.out == ""


def test_kernel_prints_nothing_to_stdout(tmp_path, capfd):
    path = write_step(box(1, 2, 3), tmp_path / "box.step")
    capfd.readouterr()
    read_model(path)
    broken = tmp_path / "broken.step"
    broken.write_text(open(path).read()[:400])
    with pytest.raises(ReadError):
        read_model(broken)
    assert capfd.readouterr().out == ""
