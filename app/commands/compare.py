"""``batten compare OLD NEW``: what changed between two revisions of a model.

Prints the faces added, removed and changed, the deviation of NEW from OLD
(exact closest points, signed along OLD's normal), the findings that are new,
fixed, changed or unchanged and the fairness figures side by side. Exit
status: 0 compared, 2 an input cannot be read or an option is wrong, 3
internal error.
"""

from __future__ import annotations

import argparse
import sys

from app.commands import signals_held


def add_arguments(parser: argparse.ArgumentParser) -> None:
    from app.commands.check import SPEC_HELP
    from app.review.spec import DEFAULT_SPEC

    parser.epilog = (
        "Deviation is positive where NEW lies on the side OLD's surface normal points to. The report is a review "
        "aid: your organisation's surface quality standard and tolerances decide."
    )
    parser.add_argument("old", metavar="OLD", help="the earlier revision (STEP, IGES or geomdl JSON)")
    parser.add_argument("new", metavar="NEW", help="the later revision")
    parser.add_argument("--profile", metavar="NAME|PATH", help="tolerance profile for both checks (default: class-A)")
    parser.add_argument("--sections", metavar="SPEC", default=DEFAULT_SPEC, help=SPEC_HELP)
    parser.add_argument("--review", metavar="FILE", help="a Batten review file whose dispositions apply to NEW")
    parser.add_argument("--json", metavar="OUT.json", help="write the comparison as JSON")
    parser.add_argument(
        "--report", metavar="OUT.pdf|OUT.html", help="write the review report of NEW with the comparison"
    )
    parser.add_argument("--quiet", action="store_true", help="no progress lines on stderr")


def _say(line: str) -> None:
    print(f"batten compare: {line}", file=sys.stderr, flush=True)


def run(args: argparse.Namespace) -> int:
    from dataclasses import replace

    from app.profiles import get_profile
    from app.review.batch import OUTPUT_SUFFIXES, json_ready
    from app.review.comparison import compare_models
    from app.review.dispositions import apply_review
    from app.review.review_file import read_review_file
    from app.review.runner import ReviewSettings, load_for_review
    from app.review.spec import parse_spec
    from geometry.errors import BattenError

    for kind in ("json", "report"):
        target = getattr(args, kind)
        if target and not target.lower().endswith(OUTPUT_SUFFIXES[kind]):
            raise BattenError(f"{target}: --{kind} must end in {' or '.join(OUTPUT_SUFFIXES[kind])}")
    parse_spec(args.sections)
    get_profile(args.profile)
    file = read_review_file(args.review) if args.review else None
    say = (lambda _: None) if args.quiet else _say
    settings = ReviewSettings(profile=args.profile, sections=args.sections)
    old_model = load_for_review(args.old)
    new_model = load_for_review(args.new)
    comparison = compare_models(old_model, new_model, settings, say)
    if file is not None:
        comparison = replace(comparison, new=apply_review(comparison.new, file))
    created = _created()
    if args.json:
        import json

        from app.review.comparison import SCHEMA_ID, SCHEMA_VERSION
        from geometry import __version__
        from geometry.io.files import write_atomically

        doc = {"schema": SCHEMA_ID, "schema_version": SCHEMA_VERSION, "batten_version": __version__}
        doc |= {"created": created, **comparison.to_dict()}
        write_atomically(args.json, json.dumps(json_ready(doc), indent=1, allow_nan=False) + "\n")
        say(f"wrote {args.json}")
    if args.report:
        with signals_held():  # as in check: an interrupt inside VTK's set-up must not crash the process
            from app.report.figures import render_figures
            from app.report.writers import write_report

        say(f"writing {args.report}")
        figures = render_figures(new_model, comparison.new)
        write_report(args.report, [comparison.new], [figures], created, comparison=comparison)
        say(f"wrote {args.report}")
    print(summary_text(comparison))
    return 0


def _created() -> str:
    from app.review.result import now_stamp

    return now_stamp()


def summary_text(comparison) -> str:
    """The comparison in a few lines for the terminal."""
    from app.review.finding_diff import STATUS_ORDER, count

    d = comparison.deviation
    p = comparison.pairing
    lines = [
        f"OLD {comparison.old.source}  ->  NEW {comparison.new.source}",
        f"faces: {len(p.pairs)} paired, {len(comparison.changed_faces)} changed, {len(p.added)} added, "
        f"{len(p.removed)} removed",
        f"deviation of NEW from OLD: max {d.max_mm:.4g} mm, mean {d.mean_mm:.4g} mm",
    ]
    for f in sorted(d.faces, key=lambda f: -f.max_mm):
        at = "({:.2f}, {:.2f}, {:.2f})".format(*f.max_at)
        lines.append(
            f"  {comparison.face_name(f.face)}: max {f.max_signed_mm:+.4g} mm at {at}, mean {f.mean_mm:.4g} mm"
        )
    counts = count(comparison.findings)
    lines.append("findings over tolerance: " + ", ".join(f"{counts[s]} {s}" for s in STATUS_ORDER))
    for c in comparison.findings:
        if c.status == "unchanged":
            continue
        before = "-" if c.before is None else f"{c.before.measure} {c.before.value:.4g}"
        after = "-" if c.after is None else f"{c.after.measure} {c.after.value:.4g} ({c.after.verdict})"
        if c.before is not None and c.after is not None and c.after.measure != c.before.measure:
            after = (
                f"{c.before.measure} {c.after_value:.4g}, decided by {after}" if c.after_value is not None else after
            )
        lines.append(f"  {c.status}: {c.key.label}: {before} -> {after}")
    return "\n".join(lines)
