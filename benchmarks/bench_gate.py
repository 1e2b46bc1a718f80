"""Release gate throughput: files per minute checked locally (1 and 2 jobs), on a 2-worker Dask
LocalCluster, and served from the result cache.

The reference is the local run with one job (every file in this process, one
after another); every other line prints its ratio to it. The pool and the
cluster pay for their worker processes' start and imports inside the timed
run, except the cluster's own start-up (a standing cluster is started once).
No cache is used except on the last line, which repeats the run over a cache
the run before it filled.

Run: ``.venv/bin/python benchmarks/bench_gate.py [PATH ...]`` (default: every
sample in ``sample_surfaces/``; give ``../shared/corpus`` for real files).
"""

from __future__ import annotations

import contextlib
import io
import logging
import sys
import tempfile
import time
from dataclasses import replace
from pathlib import Path

from app.review.batch import BatchOptions, run_batch
from app.review.discover import discover

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"


def _timed(options: BatchOptions) -> float:
    start = time.perf_counter()
    with contextlib.redirect_stdout(io.StringIO()):
        run_batch(options)
    return time.perf_counter() - start


def main(paths: list[str]) -> None:
    from distributed import Client, LocalCluster

    files = tuple(discover(paths or [str(SAMPLES)]))
    base = BatchOptions(files=files, progress=False)
    print(f"{len(files)} files")
    rows = [("local, 1 job (reference)", _timed(replace(base, jobs=1)))]
    rows.append(("local, 2 jobs", _timed(replace(base, jobs=2))))
    with LocalCluster(
        n_workers=2, threads_per_worker=1, processes=True, dashboard_address=":0", silence_logs=logging.ERROR
    ) as cluster:
        with Client(cluster) as client:  # load Batten in the workers before the clock starts, as a standing one has
            client.run(lambda: __import__("app.review.batch"))
        rows.append(("LocalCluster, 2 workers", _timed(replace(base, cluster=cluster.scheduler_address))))
    with tempfile.TemporaryDirectory() as cache:
        _timed(replace(base, jobs=2, cache=cache))
        rows.append(("cache hits (2nd run)", _timed(replace(base, jobs=2, cache=cache))))
    reference = rows[0][1]
    print(f"{'run':28s} {'seconds':>9s} {'files/min':>10s} {'x reference':>12s}")
    for name, seconds in rows:
        print(f"{name:28s} {seconds:9.1f} {60 * len(files) / seconds:10.1f} {reference / seconds:12.2f}")


if __name__ == "__main__":
    main(sys.argv[1:])
