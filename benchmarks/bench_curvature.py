"""Curvature-field throughput against geomdl, in one run.

Computes the full field (point, normal, K, H, k1, k2, both directions) of a
bicubic rational surface on a 20 x 20 net at 100^2 ... 2000^2 samples and
prints points per second (best of ``REPEATS``, warm), the ratio against geomdl
(derivatives per point by geomdl, curvature from them per point) and the peak
memory against the size of the outputs. It first prints the cold cost of the
compiled kernel in fresh processes: compiling it (an empty numba cache) and
loading it from the cache (every later start). The machine may be shared: read
the figures as best-of-N. Run: ``.venv/bin/python benchmarks/bench_curvature.py``.
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

import numpy as np
from geomdl import NURBS

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import geometry.nurbs  # noqa: E402

GRIDS = (100, 500, 1000, 2000)
GEOMDL_GRID = 30
REPEATS = 3


def bicubic_rational(n: int = 20):
    """A wavy 200 x 200 mm bicubic rational patch (seeded) as geomdl and Batten surfaces."""
    rng = np.random.default_rng(2026)
    x, y = np.meshgrid(np.linspace(0, 200, n), np.linspace(0, 200, n), indexing="ij")
    z = 15 * np.sin(x / 40) * np.cos(y / 55) + rng.normal(scale=0.3, size=x.shape)
    poles = np.stack([x, y, z], axis=-1)
    weights = rng.uniform(0.8, 1.25, size=(n, n))
    knots = [0.0] * 4 + list(np.linspace(0, 1, n - 2)[1:-1]) + [1.0] * 4
    geo = NURBS.Surface()
    geo.degree_u = geo.degree_v = 3
    geo.ctrlpts_size_u = geo.ctrlpts_size_v = n
    geo.ctrlpts = poles.reshape(-1, 3).tolist()
    geo.weights = weights.ravel().tolist()
    geo.knotvector_u = knots
    geo.knotvector_v = knots
    return geo, geometry.nurbs.from_geomdl(geo)


def geomdl_per_point(geo, n: int) -> float:
    """Seconds per point: geomdl derivatives, then the same formulas per point."""
    params = np.linspace(0, 1, n)
    start = time.perf_counter()
    for u in params:
        for v in params:
            d = geo.derivatives(float(u), float(v), 2)
            su, sv = np.array(d[1][0]), np.array(d[0][1])
            suu, suv, svv = np.array(d[2][0]), np.array(d[1][1]), np.array(d[0][2])
            normal = np.cross(su, sv)
            normal /= np.linalg.norm(normal)
            first = np.array([[su @ su, su @ sv], [su @ sv, sv @ sv]])
            second = np.array([[suu @ normal, suv @ normal], [suv @ normal, svv @ normal]])
            np.linalg.eig(np.linalg.solve(first, second))
    return (time.perf_counter() - start) / (n * n)


def ours(surface, n: int) -> tuple[float, int, int]:
    """Best-of seconds for an n x n field, peak traced bytes, output bytes."""
    params = np.linspace(0, 1, n)
    best = np.inf
    for _ in range(REPEATS):
        start = time.perf_counter()
        field = geometry.nurbs.curvature_on_grid(surface, params, params)
        best = min(best, time.perf_counter() - start)
        del field
    tracemalloc.start()
    field = geometry.nurbs.curvature_on_grid(surface, params, params)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    out_bytes = sum(
        getattr(field, name).base.nbytes if getattr(field, name).base is not None else getattr(field, name).nbytes
        for name in ("points", "normals", "dir1", "dir2", "gaussian", "mean", "k1", "k2", "valid", "umbilic")
    )
    return best, peak, out_bytes


COLD_SCRIPT = """
import time, numpy as np
t0 = time.perf_counter()
import geometry.nurbs
from geometry.nurbs.primitives import torus
t1 = time.perf_counter()
geometry.nurbs.curvature_on_grid(torus(50.0, 10.0), np.linspace(0, 1, 10), np.linspace(0, 1, 10))
t2 = time.perf_counter()
print(t1 - t0, t2 - t1)
"""


def cold_start() -> tuple[float, float, float]:
    """Import seconds, first call with an empty cache (compiling), first call with it filled (loading)."""
    root = str(Path(__file__).resolve().parents[1])
    with tempfile.TemporaryDirectory() as cache:
        env = dict(os.environ, NUMBA_CACHE_DIR=cache, PYTHONPATH=root)
        runs = []
        for _ in range(2):
            out = subprocess.run([sys.executable, "-c", COLD_SCRIPT], env=env, capture_output=True, text=True)
            runs.append([float(x) for x in out.stdout.split()])
    return runs[1][0], runs[0][1], runs[1][1]


def main() -> None:
    geo, surface = bicubic_rational()
    print(f"cores: {os.cpu_count()}   surface: bicubic rational, 20 x 20 poles")
    imported, compiling, loading = cold_start()
    print(f"cold: import {imported:.2f} s, first field compiling {compiling:.2f} s, from the cache {loading:.2f} s")
    reference = geomdl_per_point(geo, GEOMDL_GRID)
    print(f"geomdl reference: {1 / reference:,.0f} points/s ({GEOMDL_GRID}^2 samples, per point)")
    print(f"{'grid':>8} {'seconds':>9} {'points/s':>14} {'x geomdl':>10} {'peak MB':>9} {'outputs MB':>11}")
    for n in GRIDS:
        seconds, peak, out_bytes = ours(surface, n)
        rate = n * n / seconds
        print(
            f"{n:>6}^2 {seconds:>9.4f} {rate:>14,.0f} {rate * reference:>10,.0f} "
            f"{peak / 1e6:>9.1f} {out_bytes / 1e6:>11.1f}"
        )


if __name__ == "__main__":
    main()
