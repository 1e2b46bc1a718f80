"""`batten check --cluster` on a Dask LocalCluster (2 worker processes) started inside the test."""

from __future__ import annotations

import json
import logging
import math
import os
import sys
import time
from functools import partial
from pathlib import Path

import pytest

import app.review.batch as batch
from app.cli import main

distributed = pytest.importorskip("distributed")

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
FILES = [SAMPLES / "hood_visor.stp", SAMPLES / "hood_visor.igs", SAMPLES / "heatgun_covers.igs"]
VICTIM = "hood_visor.igs"
RUN = ["--sections", "x:1", "--no-cache", "--quiet"]
FLOAT_RTOL, FLOAT_ATOL = 1e-9, 1e-12  # rounding only (mm and 1/mm values)

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def scheduler():
    import dask
    from distributed import LocalCluster

    # One file per worker at a time, so a worker's death is blamed on the file that caused it alone.
    with (
        dask.config.set({"distributed.scheduler.worker-saturation": 1.0}),
        LocalCluster(
            n_workers=2, threads_per_worker=1, processes=True, dashboard_address=":0", silence_logs=logging.CRITICAL
        ) as cluster,
    ):
        yield cluster.scheduler_address


def kill_worker_on(path, settings, pictures, progress, marker_dir: str, times: int):
    """Test hook run on a worker: end the worker's process the first ``times`` times it gets the victim."""
    if Path(path).name == VICTIM:
        tries = len(os.listdir(marker_dir))
        if tries < times:
            Path(marker_dir, f"try{tries}").touch()
            os._exit(1)
    start = time.perf_counter()
    review, figures = batch.check_one(path, settings, pictures, progress)
    return review, figures, time.perf_counter() - start


def _files(path: Path) -> list[dict]:
    return json.loads(path.read_text())["files"]


def assert_same_record(a, b, where="files"):
    """Equal JSON values, floats to the last few bits: dask workers run numpy's BLAS on one thread, so sums
    may round differently from a local process (seen: 4e-15 relative on a section length)."""
    assert type(a) is type(b), where
    if isinstance(a, dict):
        assert a.keys() == b.keys(), where
        for key in a:
            assert_same_record(a[key], b[key], f"{where}.{key}")
    elif isinstance(a, list):
        assert len(a) == len(b), where
        for i, (x, y) in enumerate(zip(a, b, strict=True)):
            assert_same_record(x, y, f"{where}[{i}]")
    elif isinstance(a, float):
        assert math.isclose(a, b, rel_tol=FLOAT_RTOL, abs_tol=FLOAT_ATOL), where
    else:
        assert a == b, where


@pytest.fixture(scope="module")
def local_json(tmp_path_factory):
    out = tmp_path_factory.mktemp("local") / "local.json"
    main(["check", *map(str, FILES), *RUN, "--json", str(out), "--jobs", "1"])
    return _files(out)


def test_the_cluster_run_gives_the_local_run_json(scheduler, local_json, tmp_path):
    out = tmp_path / "cluster.json"
    status = main(["check", *map(str, FILES), *RUN, "--json", str(out), "--cluster", scheduler])
    assert status == 1
    assert_same_record(_files(out), local_json)


def test_a_file_whose_worker_died_is_checked_again_on_another_worker(scheduler, local_json, tmp_path, monkeypatch):
    import cloudpickle

    cloudpickle.register_pickle_by_value(sys.modules[__name__])  # the hook is not importable on workers
    markers = tmp_path / "tries"
    markers.mkdir()
    monkeypatch.setattr(batch, "timed_check", partial(kill_worker_on, marker_dir=str(markers), times=1))
    out = tmp_path / "retried.json"
    status = main(["check", *map(str, FILES), *RUN, "--json", str(out), "--cluster", scheduler])
    assert sorted(os.listdir(markers)) == ["try0"]  # one worker was taken down ...
    assert status == 1  # ... and its file was checked all the same
    assert_same_record(_files(out), local_json)


def test_a_file_that_kills_two_workers_is_unreadable_and_the_others_are_checked(
    scheduler, local_json, tmp_path, monkeypatch
):
    import cloudpickle

    cloudpickle.register_pickle_by_value(sys.modules[__name__])  # the hook is not importable on workers
    markers = tmp_path / "tries"
    markers.mkdir()
    monkeypatch.setattr(batch, "timed_check", partial(kill_worker_on, marker_dir=str(markers), times=99))
    out = tmp_path / "killed.json"
    status = main(["check", *map(str, FILES), *RUN, "--json", str(out), "--cluster", scheduler])
    entries = _files(out)
    assert status == 2 and len(os.listdir(markers)) == 2
    assert [e["status"] for e in entries] == ["checked", "unreadable", "checked"]
    assert "two" in entries[1]["error"] or "twice" in entries[1]["error"]
    assert_same_record([entries[0], entries[2]], [local_json[0], local_json[2]])
