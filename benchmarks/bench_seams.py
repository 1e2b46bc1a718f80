"""Every seam of a model at once against one seam at a time, in the same run.

Batten measures the seams of a file's shared edges in batches
(:mod:`geometry.seams.batch`, :mod:`geometry.seams.edges`): every stage is one
call per face over all that face's points, whichever seam they belong to. The
reference is the straightforward loop, one seam at a time
(:func:`geometry.seams.check.measure_seam` on each seam's edge, as the check measured
seams before), on the same model and adjacency. Both are timed warm (a first
call on the smallest seams compiles and caches whatever the core compiles).

Run: ``.venv/bin/python benchmarks/bench_seams.py [FILE ...]``. Without files it
takes ``../shared/corpus/k1-inch-52bspline.stp`` when present (the issue's
target: >= 50 times the seam speed before batching), else a bundled sample.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

from geometry.io import read_model
from geometry.seams import SeamTolerance, find_seams
from geometry.seams.check import measure_seam, measure_seams

ROOT = Path(__file__).resolve().parents[1]
CORPUS_FILE = ROOT / ".." / "shared" / "corpus" / "k1-inch-52bspline.stp"
SAMPLE = ROOT / "sample_surfaces" / "steamer_body.stp"


def _timed(work) -> tuple[float, object]:
    start = time.perf_counter()
    out = work()
    return time.perf_counter() - start, out


def bench(path: Path) -> None:
    model = read_model(path)
    tolerance = SeamTolerance()
    adjacency = find_seams(model)
    seams = len(adjacency.seams)
    warm_up = type(adjacency)(adjacency.seams[:2], adjacency.free_edges, adjacency.search_distance)
    cold, _ = _timed(lambda: measure_seams(model, warm_up, tolerance))
    batched, report = _timed(lambda: measure_seams(model, adjacency, tolerance))
    one_by_one, _ = _timed(lambda: [measure_seam(model, pair, tolerance) for pair in adjacency.seams])
    print(f"{path.name}: {len(model.faces)} faces, {seams} seams, {len(report.failing)} failing")
    print(f"  first call (2 seams, compiling)  {cold:8.2f} s")
    print(f"  batched, all seams               {batched:8.2f} s")
    print(f"  one seam at a time (reference)   {one_by_one:8.2f} s")
    print(f"  ratio                            {one_by_one / batched:8.1f} x")


def main(argv: list[str]) -> None:
    paths = [Path(a) for a in argv] or [CORPUS_FILE if CORPUS_FILE.exists() else SAMPLE]
    for path in paths:
        bench(path)


if __name__ == "__main__":
    main(sys.argv[1:])
