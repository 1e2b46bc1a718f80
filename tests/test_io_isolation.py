"""A crash of the CAD kernel on a damaged file becomes a ReadError; Batten carries on.

The damaged file is the kernel's own STEP output with one entity's ``=`` glued to
a stray digit (``#30 =1DIRECTION(...)``, the direction of a line's vector): the
OCP 8.0 STEP reader dereferences the missing entity and dies with a segmentation
fault, which the reader's helper process absorbs (found by the fuzz test).
"""

from __future__ import annotations

import multiprocessing
import os
import re
import threading
import time
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path

import pytest
from test_io_support import plate_with_hole, write_step

from geometry.errors import ReadError
from geometry.io import read_model
from geometry.kernel import isolation

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
# Generous bounds so a slow shared machine never fails the test, while a hang still ends it.
RESULT_TIMEOUT_S = 180.0
SHUTDOWN_TIMEOUT_S = 60.0


def crashing_copy(path, out):
    text = open(path).read()
    direction = re.search(r"#\d+ = VECTOR\('',#(\d+),", text).group(1)
    out.write_text(text.replace(f"#{direction} = DIRECTION(", f"#{direction} =1DIRECTION(", 1))
    return out


def test_kernel_crash_is_a_read_error(tmp_path, monkeypatch):
    monkeypatch.delenv("BATTEN_READ_IN_PROCESS", raising=False)
    good = write_step(plate_with_hole(), tmp_path / "plate.step")
    bad = crashing_copy(good, tmp_path / "plate_damaged.step")
    with pytest.raises(ReadError) as info:
        read_model(bad)
    assert str(bad) in str(info.value)
    assert "crashed" in info.value.reason
    # The helper process is replaced: the next file reads as usual.
    assert len(read_model(good).faces) == 7


def _read_in_pool_worker(path: str) -> tuple[int, int]:
    """Runs in the pool worker: the face count and the pid of the worker's reader helper."""
    os.environ.pop("BATTEN_READ_IN_PROCESS", None)
    faces = len(read_model(path).faces)
    return faces, isolation._WORKER.pid


def _gone(pid: int, timeout: float) -> bool:
    end = time.monotonic() + timeout
    while time.monotonic() < end:
        try:
            os.kill(pid, 0)
        except ProcessLookupError:
            return True
        with open(f"/proc/{pid}/stat") as stat:  # an exited process not yet reaped by its new parent
            if stat.read().split(") ")[1].startswith("Z"):
                return True
        time.sleep(0.1)
    return False


def test_a_spawned_pool_worker_that_read_a_model_exits_and_stops_its_helper():
    # app/review/batch.py reads models in spawn-started pool workers; each worker's helper must stop with it.
    pool = ProcessPoolExecutor(1, mp_context=multiprocessing.get_context("spawn"))
    try:
        faces, helper = pool.submit(_read_in_pool_worker, str(SAMPLES / "hood_visor.stp")).result(RESULT_TIMEOUT_S)
        assert faces == 2  # two faces meeting at one seam (sample_surfaces/manifest.json)
        shutdown = threading.Thread(target=pool.shutdown, daemon=True)
        shutdown.start()
        shutdown.join(SHUTDOWN_TIMEOUT_S)
        assert not shutdown.is_alive(), "the pool worker did not exit"
        assert _gone(helper, SHUTDOWN_TIMEOUT_S), "the reader's helper outlived its pool worker"
    finally:
        for process in list((pool._processes or {}).values()):  # only after a failure: never leave a hang behind
            process.kill()


def _read_in_forked_child(path: str, answers) -> None:
    answers.put(_read_in_pool_worker(path))


def test_a_forked_child_uses_its_own_helper_and_stops_it_on_exit(monkeypatch):
    # A fork-started worker leaves through os._exit (no atexit): the multiprocessing finaliser stops its
    # helper. It must not talk to the parent's helper through the inherited pipes either.
    monkeypatch.delenv("BATTEN_READ_IN_PROCESS", raising=False)
    sample = str(SAMPLES / "hood_visor.stp")
    read_model(sample)
    parents = isolation._WORKER.pid
    context = multiprocessing.get_context("fork")
    answers = context.Queue()
    child = context.Process(target=_read_in_forked_child, args=(sample, answers))
    child.start()
    try:
        faces, helper = answers.get(timeout=RESULT_TIMEOUT_S)
        child.join(SHUTDOWN_TIMEOUT_S)
        assert child.exitcode == 0, "the forked child did not exit"
    finally:
        if child.is_alive():
            child.kill()
    assert faces == 2 and helper != parents
    assert _gone(helper, SHUTDOWN_TIMEOUT_S), "the child's helper outlived it"
    assert len(read_model(sample).faces) == 2 and isolation._WORKER.pid == parents  # the parent's still serves
