"""Draft map against curvature map on the same surface and grid, in one run.

The issue asks that a draft map (point, outward normal, draft angle, area weight)
on a 1000^2 grid cost no more than the curvature map of the same grid. Both run on
the bicubic rational patch of ``bench_curvature.py``; the ratio printed is
curvature time / draft time (above 1: the draft map is cheaper). Run:
``.venv/bin/python benchmarks/bench_draft.py``.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_curvature import bicubic_rational  # noqa: E402

import geometry.nurbs  # noqa: E402
from geometry.tooling import draft_on_grid  # noqa: E402

GRIDS = (500, 1000)
REPEATS = 3


def best(fn) -> float:
    times = []
    for _ in range(REPEATS):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return min(times)


def main() -> None:
    _, surface = bicubic_rational()
    print(f"{'grid':>6} {'curvature s':>12} {'draft s':>9} {'curvature / draft':>18}")
    for n in GRIDS:
        u = v = np.linspace(0.0, 1.0, n)
        t_curv = best(lambda u=u, v=v: geometry.nurbs.curvature_on_grid(surface, u, v))
        t_draft = best(lambda u=u, v=v: draft_on_grid(surface, u, v, (0.2, 0.1, 1.0)))
        print(f"{n:>5}^2 {t_curv:>12.3f} {t_draft:>9.3f} {t_curv / t_draft:>18.2f}")


if __name__ == "__main__":
    main()
