"""``batten section FILE --plane PX PY PZ NX NY NZ``: plane sections as JSON.

Cuts the model by the plane through (PX, PY, PZ) with normal (NX, NY, NZ), or
by ``--count`` parallel planes ``--spacing`` mm apart (the first through the
point, the others stepping along the normal), and prints, or writes to
``--json OUT``, ``{"curves": [...]}``: per curve its points, the arc length and
the signed curvature at each point, its inflections and curvature extrema
(each with ``point`` and ``s``; extrema also ``curvature``) and its fairness
figures. Lengths in mm, curvature in 1/mm; the sign convention is in
:mod:`geometry.sections.curve_geometry`.
"""

from __future__ import annotations

import argparse
import json
import math
import sys

from .reading import add_read_options, read_budget

# Most parallel planes, and most curve points (model size / spacing, summed over the planes): each
# point carries its curvature, comb and arc length, so two million stay within a few hundred MB.
MAX_PLANES = 200
MAX_CURVE_POINTS = 2_000_000


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="STEP, IGES or JSON surface model")
    parser.add_argument(
        "--plane",
        nargs=6,
        type=float,
        required=True,
        metavar=("PX", "PY", "PZ", "NX", "NY", "NZ"),
        help="a point on the plane and its normal (mm)",
    )
    parser.add_argument("--count", type=int, default=1, metavar="N", help="number of parallel planes (default 1)")
    parser.add_argument(
        "--spacing", type=float, metavar="D", help="mm between parallel planes (needed with --count > 1)"
    )
    parser.add_argument(
        "--point-spacing", type=float, metavar="MM", help="mm between curve points (default: model size / 400)"
    )
    parser.add_argument("--json", metavar="OUT", help="write the JSON to OUT instead of printing it")
    add_read_options(parser)


def _check(args: argparse.Namespace) -> None:
    from geometry.errors import BattenError

    if not all(math.isfinite(x) for x in args.plane):
        raise BattenError("--plane needs six finite numbers")
    if not math.isfinite(math.hypot(*args.plane[3:])) or not any(args.plane[3:]):
        raise BattenError("--plane: the normal (NX NY NZ) must be a finite, non-zero vector")
    if not 1 <= args.count <= MAX_PLANES:
        raise BattenError(f"--count must be 1 to {MAX_PLANES}, got {args.count}")
    if args.count > 1 and (args.spacing is None or not math.isfinite(args.spacing) or args.spacing == 0):
        raise BattenError("--count above 1 needs a non-zero --spacing D (mm between the planes)")
    if args.point_spacing is not None and not (math.isfinite(args.point_spacing) and args.point_spacing > 0):
        raise BattenError("--point-spacing must be a positive number of mm")


def _check_points(args: argparse.Namespace, size: float) -> None:
    """Bound the curve points all planes may produce: about model size / spacing each."""
    from geometry.errors import BattenError

    if args.point_spacing is None:
        return
    smallest = args.count * max(size, 1e-9) / MAX_CURVE_POINTS
    if args.point_spacing < smallest:
        raise BattenError(
            f"--point-spacing {args.point_spacing:g} mm gives more than {MAX_CURVE_POINTS} curve points on "
            f"{args.count} plane(s) of this model (memory budget); the smallest that fits is {smallest:.3g} mm"
        )


def run(args: argparse.Namespace) -> int:
    from geometry.conventions import CURVATURE_SIGN
    from geometry.io import read_model
    from geometry.io.files import check_writable, write_atomically
    from geometry.sections import SectionEngine

    _check(args)
    if args.json:
        check_writable(args.json, inputs=[args.file])
    model = read_model(args.file, read_budget(args))
    _check_points(args, model.size)
    engine = SectionEngine(model, point_spacing=args.point_spacing)
    point, normal = args.plane[:3], args.plane[3:]
    family = engine.family(point, normal, args.count, args.spacing or 0.0)
    curves = []
    for index, section in enumerate(family):
        for curve in section.curves:
            curves.append({"section": index, **curve.to_json()})
    out = {
        "file": model.source or args.file,
        "units": {"length": "mm", "curvature": "1/mm"},
        "sign_convention": CURVATURE_SIGN,
        "planes": [{"point": s.origin.tolist(), "normal": s.normal.tolist()} for s in family],
        "curves": curves,
    }
    if model.warnings:
        out["warnings"] = list(model.warnings)
    text = json.dumps(out, indent=1) + "\n"
    if args.json:
        write_atomically(args.json, text, inputs=[args.file])
        print(f"{len(curves)} curves on {len(family)} planes written to {args.json}", file=sys.stderr)
    else:
        sys.stdout.write(text)
    return 0
