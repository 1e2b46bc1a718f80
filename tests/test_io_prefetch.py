"""A command sends its one file's read ahead (geometry.kernel.isolation.prefetch); the read then takes that answer."""

from __future__ import annotations

import signal
from pathlib import Path

import numpy as np
import pytest

from app.cli import main
from geometry.io import ReadBudget, read_model
from geometry.kernel import isolation

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
VISOR = SAMPLES / "hood_visor.stp"
HEATGUN = SAMPLES / "heatgun_covers.stp"


@pytest.fixture(autouse=True)
def _own_helper(monkeypatch):
    monkeypatch.delenv("BATTEN_READ_IN_PROCESS", raising=False)
    isolation._stop_worker(graceful=False)
    yield
    isolation._stop_worker(graceful=False)


def _faces(model):
    return [(f.surface.poles, f.loops) for f in model.faces]


def _same(a, b):
    assert len(a) == len(b)
    for (poles_a, loops_a), (poles_b, loops_b) in zip(a, b, strict=True):
        assert np.array_equal(poles_a, poles_b)
        assert all(np.array_equal(x, y) for x, y in zip(loops_a, loops_b, strict=True))


def test_the_read_takes_the_answer_sent_ahead():
    expected = _faces(read_model(VISOR))
    isolation._stop_worker(graceful=False)
    isolation.prefetch("step", str(VISOR))
    assert isolation._PENDING is not None
    helper = isolation._WORKER.pid
    _same(_faces(read_model(VISOR)), expected)
    assert isolation._PENDING is None and isolation._WORKER.pid == helper  # asked once, same helper


def test_a_read_of_another_file_or_budget_drops_the_answer_sent_ahead():
    isolation.prefetch("step", str(VISOR))
    helper = isolation._WORKER.pid
    assert len(read_model(HEATGUN).faces) == 2
    assert isolation._PENDING is None and isolation._WORKER.pid != helper  # the busy helper was replaced
    isolation.prefetch("step", str(VISOR), ReadBudget(timeout_s=500))
    assert len(read_model(VISOR).faces) == 2  # the default budget: not the request sent ahead
    assert isolation._PENDING is None


def test_an_answer_nobody_takes_does_not_hold_up_the_exit():
    isolation.prefetch("step", str(VISOR))
    worker = isolation._WORKER
    isolation._stop_worker()  # what the exit runs: graceful, but the helper is busy for nobody
    assert worker.returncode == -signal.SIGKILL


def test_a_file_whose_numbers_fail_the_screen_is_not_sent(tmp_path):
    bad = tmp_path / "bad.stp"
    text = VISOR.read_text()
    bad.write_text(text.replace("CARTESIAN_POINT('',(", "CARTESIAN_POINT('',(1.E+400,", 1))
    isolation.prefetch("step", str(bad))
    assert isolation._PENDING is None and isolation._WORKER is not None  # only the helper started
    assert main(["probe", str(bad), "--at", "0", "0", "0"]) == 2  # the read itself says why


def test_the_command_line_reads_ahead_with_the_budget_of_its_options(capsys):
    assert main(["probe", str(VISOR), "--at", "0", "0", "0", "--read-timeout", "300"]) == 0
    assert '"face"' in capsys.readouterr().out
    assert isolation._PENDING is None
    with pytest.raises(SystemExit) as stop:  # a wrong option: the command's own parser says so, once
        main(["probe", str(VISOR), "--at", "0", "0", "0", "--read-timeout", "abc"])
    assert stop.value.code == 2 and capsys.readouterr().err.count("invalid float value") == 1
