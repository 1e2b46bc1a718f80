"""A crash of the CAD kernel on a damaged file becomes a ReadError; Batten carries on.

The damaged file is the kernel's own STEP output with one entity's ``=`` glued to
a stray digit (``#30 =1DIRECTION(...)``, the direction of a line's vector): the
OCP 8.0 STEP reader dereferences the missing entity and dies with a segmentation
fault, which the reader's helper process absorbs (found by the fuzz test).
"""

from __future__ import annotations

import re

import pytest
from test_io_support import plate_with_hole, write_step

from geometry.errors import ReadError
from geometry.io import read_model


def _crashing_copy(path, out):
    text = open(path).read()
    direction = re.search(r"#\d+ = VECTOR\('',#(\d+),", text).group(1)
    out.write_text(text.replace(f"#{direction} = DIRECTION(", f"#{direction} =1DIRECTION(", 1))
    return out


def test_kernel_crash_is_a_read_error(tmp_path, monkeypatch):
    monkeypatch.delenv("BATTEN_READ_IN_PROCESS", raising=False)
    good = write_step(plate_with_hole(), tmp_path / "plate.step")
    bad = _crashing_copy(good, tmp_path / "plate_damaged.step")
    with pytest.raises(ReadError) as info:
        read_model(bad)
    assert str(bad) in str(info.value)
    assert "crashed" in info.value.reason
    # The helper process is replaced: the next file reads as usual.
    assert len(read_model(good).faces) == 7
