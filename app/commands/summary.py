"""``batten summary FILE``: the model at a glance, with each face's curvature ranges.

Curvature is sampled on each face's trim-aware grid (``geometry.model.sampling``)
with the exact surface derivatives; ranges are over the samples inside the
trim, so they are a review aid, not a bound.
"""

from __future__ import annotations

import argparse
import json
import sys

from .reading import add_read_options, read_budget

# Most samples: about 500 bytes of curvature field each, so 2 M samples stay near 1 GB of memory.
MAX_SUMMARY_SAMPLES = 2_000_000


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="STEP, IGES or JSON surface model")
    parser.add_argument("--json", action="store_true", help="print JSON instead of a table")
    parser.add_argument(
        "--samples",
        type=int,
        default=None,
        metavar="N",
        help="total samples (default: as many as batten check and the window use)",
    )
    add_read_options(parser)


def face_rows(model, budget: int | None = None) -> list[dict]:
    """Per-face description and curvature ranges (1/mm) over the samples inside the trim.

    The ranges are :func:`app.review.faces.summarise_faces`', the same as ``batten check``'s.
    """
    from app.review.faces import SAMPLE_BUDGET, summarise_faces

    rows = []
    for face in summarise_faces(model, budget or SAMPLE_BUDGET):
        ranges = face.curvature
        row = {
            "face": face.id,
            "name": face.name,
            "body": face.body,
            "degree": list(face.degrees),
            "poles": list(face.poles),
            "rational": face.rational,
            "reversed": face.reversed,
            "loops": face.loops,
            "samples": 0 if ranges is None else ranges.samples,
        }
        for key in ("k1", "k2", "gaussian", "mean"):
            row[key] = None if ranges is None else list(getattr(ranges, key))
        row["min_radius_mm"] = None if ranges is None else ranges.min_radius
        if ranges is None:
            row["problem"] = f"face {face.id} cannot be evaluated: {face.problem}"
        rows.append(row)
    return rows


def _pair(values) -> str:
    return f"{values[0]}x{values[1]}"


def _table(model, rows) -> str:
    from geometry.conventions import CURVATURE_SIGN

    lines = [
        f"file     {model.source}",
        f"sha256   {model.sha256}",
        f"units    mm (file: {model.source_units})",
        f"faces    {len(model.faces)}   edges {len(model.edges)}   size {model.size:.4g} mm",
        "",
        f"{'face':>4}  {'name':<16} {'body':<12} {'deg':>5} {'poles':>7} {'trim':>4} "
        f"{'k1 min':>11} {'k1 max':>11} {'k2 min':>11} {'k2 max':>11} {'min R mm':>10}",
    ]
    for r in rows:
        k1, k2 = r["k1"] or [float("nan")] * 2, r["k2"] or [float("nan")] * 2
        radius = f"{r['min_radius_mm']:.4g}" if r["min_radius_mm"] else "flat"
        lines.append(
            f"{r['face']:>4}  {r['name'][:16]:<16} {r['body'][:12]:<12} {_pair(r['degree']):>5} "
            f"{_pair(r['poles']):>7} {r['loops']:>4} "
            f"{k1[0]:>11.4g} {k1[1]:>11.4g} {k2[0]:>11.4g} {k2[1]:>11.4g} {radius:>10}"
        )
    lines += ["", f"Curvatures in 1/mm; {CURVATURE_SIGN}. Ranges over samples, a review aid."]
    lines += [f"warning: {r['problem']}" for r in rows if r.get("problem")]
    lines += [f"warning: {w}" for w in model.warnings]
    return "\n".join(lines)


def run(args: argparse.Namespace) -> int:
    from geometry.errors import BattenError
    from geometry.io import read_model

    if args.samples is not None and not 1000 <= args.samples <= MAX_SUMMARY_SAMPLES:
        raise BattenError(
            f"--samples must be 1000 to {MAX_SUMMARY_SAMPLES} (the most that fit the memory budget), got {args.samples}"
        )
    model = read_model(args.file, read_budget(args))
    rows = face_rows(model, args.samples)
    if args.json:
        doc = {
            "file": model.source,
            "sha256": model.sha256,
            "units": "mm",
            "source_units": model.source_units,
            "faces": rows,
            "edges": len(model.edges),
            "warnings": list(model.warnings),
        }
        json.dump(doc, sys.stdout, indent=2)
        sys.stdout.write("\n")
    else:
        print(_table(model, rows))
    return 0
