"""Window responsiveness on the largest bundled sample, off-screen (no display needed).

Three figures, each beside a reference measured in the same run, with the ratio:

- open to first coloured frame (read + sample + curvature + section engine +
  mesh + curvature colours + one frame; the seams are measured after, as in the
  window) against reading the file alone;
- one section-drag step (fast family of sections, combs, scene line sets; the
  frame is timed apart) against the core's plane section alone;
- stripe recompute after a camera move (reflection-line parameter on every
  sample, colour-table update) against the same for isophotes, the simplest
  light field.

The interactive target (issue 6) is <= 50 ms per step, the GPU's frame excluded.
Run: ``.venv/bin/python benchmarks/bench_window.py [FILE]``.
"""

from __future__ import annotations

import json
import statistics
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
TARGET_MS = 50.0
STEPS = 15


def largest_sample() -> Path:
    manifest = json.loads((ROOT / "sample_surfaces" / "manifest.json").read_text())
    entries = sorted(manifest["samples"], key=lambda e: -e["face_count"])
    return ROOT / "sample_surfaces" / entries[0]["files"]["step"]


def timed(fn, repeat: int = 1) -> tuple[float, object]:
    times, out = [], None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return 1000 * statistics.median(times), out


def line(name: str, ms: float, ref_name: str, ref_ms: float) -> None:
    print(f"{name:<44} {ms:9.1f} ms   {ref_name:<34} {ref_ms:9.1f} ms   ratio {ms / ref_ms:6.2f}")


def main(argv: list[str]) -> int:
    import pyvista as pv

    from app.render.scene import Scene
    from app.state import Camera, Measure, Mode, Session
    from app.state.loading import prepare, with_seams_judged
    from geometry.io import read_model

    path = Path(argv[0]) if argv else largest_sample()
    print(f"sample: {path.name}")
    read_ms, model = timed(lambda: read_model(str(path)))

    session = Session()
    plotter = pv.Plotter(off_screen=True, window_size=(1280, 800))
    scene = Scene(plotter, session, auto_render=False)

    def open_to_frame():  # as the window does: show first, measure seams after
        session.adopt(prepare(str(path), seams=False), str(path))
        session.set_display(mode=Mode.CURVATURE, measure=Measure.MEAN)
        scene.rebuild()
        plotter.view_isometric()
        plotter.show(auto_close=False)  # the first frame (later frames: plotter.render())

    open_ms, _ = timed(open_to_frame)
    samples = sum(int(s.inside.sum()) for s in session.samples)
    print(f"{len(model.faces)} faces, {samples} samples on faces")
    line("open to first coloured frame", open_ms, "reading the file alone", read_ms)
    seams_ms, measured = timed(lambda: with_seams_judged(session.loaded))
    session.adopt_seams(measured)
    print(f"{'   then seams measured (window stays usable)':<44} {seams_ms:9.1f} ms")

    lo, hi = model.bounds
    session.set_section(enabled=True, normal=(1.0, 0.0, 0.0), count=3, spacing=model.size / 20)
    xs = np.linspace(lo[0] + 0.1 * (hi[0] - lo[0]), hi[0] - 0.1 * (hi[0] - lo[0]), STEPS)
    origin = np.array(session.section.origin)
    engine = session.loaded.engine
    step_times, frame_times, core_times, points = [], [], [], 0
    for x in xs:
        at = (float(x), origin[1], origin[2])
        t0 = time.perf_counter()
        session.set_section(exact=False, origin=at)
        scene.update_sections()
        t1 = time.perf_counter()
        plotter.render()
        t2 = time.perf_counter()
        core_times.append(timed(lambda a=at: engine.plane(a, (1.0, 0.0, 0.0), exact=False))[0] * 3)
        step_times.append(1000 * (t1 - t0))
        frame_times.append(1000 * (t2 - t1))
        points += sum(c.points.shape[0] for c in session.sections)
    step_ms, core_ms = statistics.median(step_times), statistics.median(core_times)
    print(f"section drag: {STEPS} steps, 3 planes, {points // STEPS} curve points per step")
    line("section drag step (geometry + scene)", step_ms, "core sections alone (3 planes)", core_ms)
    print(f"{'   frame after the step (GPU, not counted)':<44} {statistics.median(frame_times):9.1f} ms")

    session.set_display(mode=Mode.ISOPHOTE)
    scene.update_surface()
    isophote_ms, _ = timed(lambda: scene.update_stripes(render=False), repeat=5)
    session.set_display(mode=Mode.REFLECTION)
    scene.update_surface()
    cam = plotter.camera
    stripe_times = []
    for _ in range(STEPS):
        cam.azimuth = cam.azimuth + 3.0
        t0 = time.perf_counter()
        session.camera = Camera(tuple(cam.position), tuple(np.subtract(cam.focal_point, cam.position)))
        scene.update_stripes(render=False)
        stripe_times.append(1000 * (time.perf_counter() - t0))
        plotter.render()
    stripe_ms = statistics.median(stripe_times)
    line("reflection stripes after a camera move", stripe_ms, "isophotes (view-independent) recompute", isophote_ms)
    worst = max(step_ms, stripe_ms)
    verdict = "within" if worst <= TARGET_MS else "over"
    print(f"interactive target {TARGET_MS:.0f} ms per step: {verdict} (worst step {worst:.1f} ms)")
    plotter.close()
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
