"""Whole models: OCP's own read + transfer + NURBS conversion against Batten, in one run.

For every model (the large sample product, and every file of ``../shared/corpus``
when that folder is present) this prints, best of ``--repeats`` runs:

- ``ocp``: what a user would script instead, in a fresh process: import the
  kernel, read, transfer, and convert every face to a B-spline surface
  (``BRepBuilderAPI_NurbsConvert``, poles and knots pulled out); the import is
  shown apart;
- ``read cold``: ``read_model`` in a fresh process, the read sent to the helper
  process before the imports as Batten's commands do
  (:func:`geometry.kernel.isolation.prefetch`; compiled kernels loaded from
  their cache);
  ``read warm``: a second ``read_model`` of the file in that process;
- ``seams``: ``check_seams`` on the loaded model (warm);
- ``check``: ``batten check FILE`` as a user runs it (a fresh process, no sections);
- ``probe``: ``batten probe FILE --at X Y Z`` (a fresh process) at a point near the model;

and the ratios the targets are stated in: check / ocp and read / ocp (cold against
cold: both include importing the kernel), and probe - ocp in seconds.
The machine is shared: read the figures as best-of-N.

Run: ``.venv/bin/python benchmarks/bench_models.py [FILE ...] [--repeats N]``.
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
CORPUS = ROOT.parent / "shared" / "corpus"
LARGE_SAMPLE = ROOT / "sample_surfaces" / "appliance_range.stp"

OCP_SCRIPT = r"""
import json, sys, time
t0 = time.perf_counter()
from OCP.BRep import BRep_Tool
from OCP.BRepBuilderAPI import BRepBuilderAPI_NurbsConvert
from OCP.IFSelect import IFSelect_RetDone
from OCP.IGESControl import IGESControl_Reader
from OCP.STEPControl import STEPControl_Reader
from OCP.TopAbs import TopAbs_FACE
from OCP.TopExp import TopExp_Explorer
from OCP.TopoDS import TopoDS
t1 = time.perf_counter()
path = sys.argv[1]
reader = IGESControl_Reader() if path.lower().endswith((".igs", ".iges")) else STEPControl_Reader()
assert reader.ReadFile(path) == IFSelect_RetDone
reader.TransferRoots()
shape = reader.OneShape()
faces = 0
explorer = TopExp_Explorer(shape, TopAbs_FACE)
while explorer.More():
    converter = BRepBuilderAPI_NurbsConvert(explorer.Current(), True)
    surface = BRep_Tool.Surface_s(TopoDS.Face(converter.Shape()))
    poles = [surface.Pole(i, j).Coord() for i in range(1, surface.NbUPoles() + 1)
             for j in range(1, surface.NbVPoles() + 1)]
    knots = [surface.UKnot(i) for i in range(1, surface.NbUKnots() + 1)]
    faces += 1
    explorer.Next()
t2 = time.perf_counter()
print(json.dumps({"import": t1 - t0, "work": t2 - t1, "faces": faces}))
"""

BATTEN_SCRIPT = r"""
import json, sys, time
t0 = time.perf_counter()
from geometry.kernel.isolation import prefetch
# as every Batten command that reads one file does: the read is sent to the helper before the imports
prefetch("iges" if sys.argv[1].lower().endswith((".igs", ".iges")) else "step", sys.argv[1])
from geometry.io import read_model
model = read_model(sys.argv[1])
t1 = time.perf_counter()
from geometry.seams import check_seams
from app.profiles import get_profile
model = read_model(sys.argv[1])
t2 = time.perf_counter()
report = check_seams(model, get_profile("class-a"))
t3 = time.perf_counter()
centre = model.bounds.mean(axis=0)
print(json.dumps({"read_cold": t1 - t0, "read_warm": t2 - t1, "seams": t3 - t2, "faces": len(model.faces),
                  "seams_n": len(report.seams), "probe_at": [float(x) for x in centre]}))
"""


def _python_json(script: str, *args: str) -> dict:
    out = subprocess.run([sys.executable, "-c", script, *args], capture_output=True, text=True, cwd=ROOT, check=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def _wall(cmd: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(cmd, capture_output=True, cwd=ROOT, check=False)
    return time.perf_counter() - start


def measure(path: Path, repeats: int) -> dict:
    """Best-of-``repeats`` figures for one model file."""
    best: dict[str, float] = {}

    def keep(key, value):
        best[key] = min(best.get(key, float("inf")), value)

    batten = [sys.executable, "-m", "app"]
    info = {}
    for _ in range(repeats):
        ocp = _python_json(OCP_SCRIPT, str(path))
        keep("ocp_import", ocp["import"])
        keep("ocp", ocp["import"] + ocp["work"])
        keep("ocp_work", ocp["work"])
        ours = _python_json(BATTEN_SCRIPT, str(path))
        info = ours
        for key in ("read_cold", "read_warm", "seams"):
            keep(key, ours[key])
        keep("check", _wall([*batten, "check", str(path), "--sections", "none", "--quiet", "--no-cache"]))
        keep("probe", _wall([*batten, "probe", str(path), "--at", *map(str, ours["probe_at"])]))
    best["faces"] = info.get("faces", 0)
    best["seams_n"] = info.get("seams_n", 0)
    return best


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("files", nargs="*", type=Path)
    parser.add_argument("--repeats", type=int, default=2)
    args = parser.parse_args()
    files = args.files or [LARGE_SAMPLE, *sorted(CORPUS.glob("*.*p*"))] + sorted(CORPUS.glob("*.ig*s"))
    files = [f for f in files if f.exists() and f.suffix.lower() in (".stp", ".step", ".igs", ".iges")]
    print(f"best of {args.repeats}; seconds; the machine may be shared")
    head = (
        f"{'file':<28} {'faces':>5} {'seams':>5} {'ocp':>6} {'(imp)':>6} {'read c':>7} {'read w':>7} "
        f"{'seams':>6} {'check':>6} {'probe':>6} {'chk/ocp':>7} {'rd/ocp':>6} {'prb-ocp':>7}"
    )
    print(head)
    for path in files:
        m = measure(path, args.repeats)
        print(
            f"{path.name[:28]:<28} {m['faces']:>5} {m['seams_n']:>5} {m['ocp']:>6.2f} {m['ocp_import']:>6.2f} "
            f"{m['read_cold']:>7.2f} {m['read_warm']:>7.2f} {m['seams']:>6.2f} {m['check']:>6.2f} "
            f"{m['probe']:>6.2f} {m['check'] / m['ocp']:>7.2f} {m['read_cold'] / m['ocp']:>6.2f} "
            f"{m['probe'] - m['ocp']:>7.2f}",
            flush=True,
        )


if __name__ == "__main__":
    main()
