"""Fuzzing the readers with mutated bytes of small STEP, IGES and geomdl JSON files.

Whatever the damage, only Batten's own error type may escape :func:`read_model`
(a model with warnings is a fine answer too), and the kernel must print nothing
to stdout. Seed files are the kernel writers' output for a plate with a hole
(trimmed planes, a periodic cylinder) and a rational bicubic face.
"""

from __future__ import annotations

import functools
import json

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from test_io_support import bilinear_record, bspline_face, plate_with_hole, write_iges, write_step

from geometry.errors import BattenError
from geometry.io import read_model
from geometry.model import Model

FUZZ_EXAMPLES = 40


@functools.cache
def _seed_bytes(kind: str) -> bytes:
    import tempfile
    from pathlib import Path

    with tempfile.TemporaryDirectory() as folder:
        if kind == "step":
            path = write_step(plate_with_hole(), Path(folder) / "seed.step")
        elif kind == "iges":
            path = write_iges(bspline_face()[0], Path(folder) / "seed.igs")
        else:
            record = bilinear_record([[0, 0, 0], [0, 1, 0], [1, 0, 0], [1, 1, 1]])
            return json.dumps({"shape": {"type": "surface", "data": [record]}}).encode()
        return Path(path).read_bytes()


@st.composite
def mutations(draw, kind):
    data = bytearray(_seed_bytes(kind))
    for _ in range(draw(st.integers(1, 6))):
        op = draw(st.sampled_from(["flip", "delete", "insert", "truncate", "digit"]))
        at = draw(st.integers(0, max(0, len(data) - 1)))
        if op == "flip":
            data[at] = draw(st.integers(0, 255))
        elif op == "delete":
            del data[at : at + draw(st.integers(1, 64))]
        elif op == "insert":
            data[at:at] = draw(st.binary(min_size=1, max_size=16))
        elif op == "truncate":
            del data[at:]
        else:  # numbers are where geometry breaks: change digits only
            if at < len(data) and chr(data[at]).isdigit():
                data[at] = ord(draw(st.sampled_from("0123456789")))
        if not data:
            break
    return bytes(data)


@pytest.mark.parametrize(("kind", "ext"), [("step", "step"), ("iges", "igs"), ("json", "json")])
def test_only_batten_errors_escape(tmp_path_factory, capfd, kind, ext):
    folder = tmp_path_factory.mktemp(f"fuzz_{kind}")

    @settings(
        max_examples=FUZZ_EXAMPLES,
        deadline=None,
        derandomize=True,
        suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
    )
    @given(mutations(kind))
    def check(data):
        path = folder / f"mutant.{ext}"
        path.write_bytes(data)
        try:
            model = read_model(path)
        except BattenError:
            return
        assert isinstance(model, Model) and model.faces

    check()
    assert capfd.readouterr().out == ""
