"""Moving a section plane across a 20-face model: time per step of sections and combs.

The cached path (what the window does while a plane is dragged) keeps one
:class:`geometry.sections.engine.SectionEngine`, so a step re-marches the cached
grids, refines and evaluates the curve points, and builds the combs. The
reference in the same run builds the engine afresh at every step (sampling
every face again), which is what a step would cost without the cache. A third
line times the exact step (inflections and extrema by root finding), which
runs once the plane comes to rest.

Run: ``.venv/bin/python benchmarks/bench_sections.py``. Target (issue 4): at
most 20 ms per cached step.
"""

from __future__ import annotations

import time

import numpy as np

from geometry.model import Face, Model
from geometry.nurbs import NurbsSurface
from geometry.sections import SectionEngine, curvature_comb, scale_for_longest_tooth

TARGET_MS = 20.0
STEPS = 40
STEP_MM = 4.0
# the invented demo panel: 5 x 4 bicubic faces of 100 mm, sharing their boundary poles
COLUMNS, ROWS, FACE_MM, POLES = 5, 4, 100.0, 6


def _height(x, y):
    return 30.0 * np.sin(x / 140.0) * np.cos(y / 110.0) + 8.0 * np.sin(x / 37.0 + y / 53.0)


def demo_model() -> Model:
    """20 G0-joined bicubic faces (simple interior knots at 1/3 and 2/3) over a wavy panel."""
    knots = [0, 0, 0, 0, 1 / 3, 2 / 3, 1, 1, 1, 1]
    t = np.linspace(0.0, 1.0, POLES)
    faces = []
    for i in range(COLUMNS):
        for j in range(ROWS):
            x = (i + t)[:, None] * FACE_MM + 0.0 * t[None, :]
            y = 0.0 * t[:, None] + (j + t)[None, :] * FACE_MM
            poles = np.stack([x, y, _height(x, y)], axis=-1)
            faces.append(Face(NurbsSurface(3, 3, knots, knots, poles), name=f"panel_{i}_{j}"))
    return Model(tuple(faces), source="demo panel")


def _steps(model: Model) -> list[np.ndarray]:
    normal = np.array([1.0, 0.35, 0.1])
    normal /= np.linalg.norm(normal)
    start = model.bounds[0] + 0.3 * (model.bounds[1] - model.bounds[0])
    return [start + k * STEP_MM * normal for k in range(STEPS)], normal


def _cached(engine: SectionEngine, origins, normal, exact: bool) -> tuple[float, int]:
    points = 0
    t0 = time.perf_counter()
    for origin in origins:
        section = engine.plane(origin, normal, exact=exact)
        scale = scale_for_longest_tooth(section.curves, 20.0)
        combs = [curvature_comb(c, -scale) for c in section.curves]
        points += sum(c.roots.shape[0] for c in combs)
    return (time.perf_counter() - t0) * 1e3 / len(origins), points // len(origins)


def _uncached(model: Model, origins, normal) -> float:
    t0 = time.perf_counter()
    for origin in origins:
        section = SectionEngine(model).plane(origin, normal, exact=False)
        scale = scale_for_longest_tooth(section.curves, 20.0)
        [curvature_comb(c, -scale) for c in section.curves]
    return (time.perf_counter() - t0) * 1e3 / len(origins)


def main() -> None:
    model = demo_model()
    origins, normal = _steps(model)
    t0 = time.perf_counter()
    engine = SectionEngine(model)
    build_ms = (time.perf_counter() - t0) * 1e3
    _cached(engine, origins[:3], normal, False)  # warm up
    fast_ms, points = _cached(engine, origins, normal, False)
    exact_ms, _ = _cached(engine, origins, normal, True)
    ref_ms = _uncached(model, origins[: STEPS // 4], normal)
    print(f"model: {len(model.faces)} faces, plane step {STEP_MM} mm, {STEPS} steps")
    print(f"engine build (grids, evaluator): {build_ms:.1f} ms once")
    print(
        f"cached step, sections + combs:   {fast_ms:.2f} ms per step, {points} curve points "
        f"(target <= {TARGET_MS:.0f} ms: {'met' if fast_ms <= TARGET_MS else 'NOT met'})"
    )
    print(f"reference, engine rebuilt per step: {ref_ms:.2f} ms per step; ratio {ref_ms / fast_ms:.1f}x")
    print(
        f"exact step (root finding for inflections and extrema): {exact_ms:.2f} ms per step, "
        f"{exact_ms / fast_ms:.1f}x the cached step"
    )


if __name__ == "__main__":
    main()
