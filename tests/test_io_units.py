"""Length units: files written in inches read in millimetres.

25.4 mm per inch exactly (ISO 80000-3:2019, annex; the international inch of 1959).
"""

from __future__ import annotations

import numpy as np
import pytest
from test_io_support import box, write_iges, write_step

from geometry.io import read_model

MM_PER_INCH = 25.4


@pytest.mark.parametrize(("writer", "ext", "declared"), [(write_step, "step", "in"), (write_iges, "igs", "in")])
def test_inch_file_reads_in_mm(tmp_path, writer, ext, declared):
    # A 1 x 2 x 10 inch box, built in mm and written with the file unit set to inch.
    dims = np.array([1.0, 2.0, 10.0]) * MM_PER_INCH
    path = writer(box(*dims), tmp_path / f"box_inch.{ext}", unit="INCH" if ext == "step" else "IN")
    with open(path, "rb") as handle:
        text = handle.read().upper()
    assert b"INCH" in text  # the file really declares inches
    model = read_model(path)
    assert model.units == "mm"
    assert model.source_units == declared
    lo, hi = model.bounds
    np.testing.assert_allclose(hi - lo, dims, rtol=1e-9)


def test_mm_file_declares_mm(tmp_path):
    model = read_model(write_step(box(10, 20, 30), tmp_path / "box.step"))
    assert model.source_units == "mm"
    np.testing.assert_allclose(np.ptp(model.bounds, axis=0), [10, 20, 30], rtol=1e-12)
