"""``batten probe FILE``: normal and curvature at one point of a model, as JSON.

``--at X Y Z`` finds the nearest point of the model (inside the faces' trims);
``--face N --uv U V`` evaluates face N (0-based, as ``batten summary`` lists
them) at parameters (U, V). Lengths in mm, curvatures in 1/mm; the normal
follows the face's orientation. ``--pull DX DY DZ`` adds ``draft_deg``, the
signed draft ``asin(n . d)`` against that pull direction.
"""

from __future__ import annotations

import argparse
import json
import sys

from app.commands import add_pull_argument

from .reading import add_read_options, read_budget


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="STEP, IGES or JSON surface model")
    where = parser.add_mutually_exclusive_group(required=True)
    where.add_argument("--at", nargs=3, type=float, metavar=("X", "Y", "Z"), help="nearest point to X Y Z (mm)")
    where.add_argument("--face", type=int, metavar="N", help="face index (0-based); needs --uv")
    parser.add_argument("--uv", nargs=2, type=float, metavar=("U", "V"), help="parameters on --face")
    add_pull_argument(
        parser,
        "pull direction: adds draft_deg, asin(normal . pull) in degrees (positive: released along +pull)",
    )
    add_read_options(parser)


def run(args: argparse.Namespace) -> int:
    import numpy as np

    from geometry.errors import BattenError
    from geometry.io import read_model
    from geometry.model import probe_point, probe_uv
    from geometry.tooling import draft_angles, unit_pull

    if args.face is not None and args.uv is None:
        raise BattenError("--face needs --uv U V")
    if args.at is not None and args.uv is not None:
        raise BattenError("--uv goes with --face, not with --at")
    pull = None if args.pull is None else unit_pull(args.pull)
    model = read_model(args.file, read_budget(args))
    if args.at is not None:
        result = probe_point(model, np.array(args.at))
    else:
        result = probe_uv(model, args.face, args.uv[0], args.uv[1])
    out = {"file": model.source, **result.as_dict(), "units": {"length": "mm", "curvature": "1/mm"}}
    if pull is not None:
        out["pull"] = pull.tolist()
        out["draft_deg"] = float(draft_angles(np.array(result.normal), pull))
        out["units"]["angle"] = "deg"
    if model.warnings:
        out["warnings"] = list(model.warnings)
    json.dump(out, sys.stdout, indent=2)
    sys.stdout.write("\n")
    return 0
