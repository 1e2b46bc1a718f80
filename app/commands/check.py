"""``batten check``: every fairness check on files, folders or patterns, for release pipelines.

Exit status: 0 when every file passes, 1 when any finding is over tolerance,
2 when an input cannot be read (the other files are still checked and
reported), 3 for an internal error. ``--json``, ``--junit`` and ``--report``
each write ONE document that covers every file, in the order found. Results of
unchanged files come from a cache; ``--cluster`` spreads the files over a Dask
scheduler's workers.
"""

from __future__ import annotations

import argparse

from app.commands import add_pull_argument, signals_held

from .reading import add_read_options, read_budget

EXIT_OK, EXIT_FINDINGS, EXIT_BAD_INPUT, EXIT_INTERNAL = 0, 1, 2, 3

SPEC_HELP = (
    "which plane sections to cut, items joined by ';': 'x:5' five planes normal to x spread evenly across the "
    "model (y, z likewise); 'y=-20,0,35' planes normal to y at these mm; 'plane:PX,PY,PZ,NX,NY,NZ' one plane "
    "through a point with a normal; 'none'. Default: %(default)s"
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    from app.review.spec import DEFAULT_SPEC

    parser.epilog = (
        "Exit status: 0 every file passes; 1 a finding is over tolerance; 2 an input cannot be read (the other "
        "files are still checked and reported; on a cluster, also a file that took down two workers) or an "
        "option is wrong; 3 internal error. --json, --junit and --report each write one document covering "
        "every file, in the order found. The report is "
        "a review aid: your organisation's surface quality standard and tolerances decide."
    )
    parser.add_argument(
        "files",
        nargs="+",
        metavar="PATH",
        help="models (STEP, IGES or JSON surface files), folders (searched recursively for STEP and IGES files) or "
        "glob patterns ('vault/**/*.stp'; quote them)",
    )
    parser.add_argument(
        "--exclude",
        action="append",
        default=[],
        metavar="PATTERN",
        help="leave out files whose path, name or one of whose folders matches PATTERN (repeatable)",
    )
    parser.add_argument(
        "--profile",
        metavar="NAME|PATH",
        help="tolerance profile: a shipped name or a TOML file (default: the class-A profile)",
    )
    parser.add_argument("--sections", metavar="SPEC", default=DEFAULT_SPEC, help=SPEC_HELP)
    parser.add_argument(
        "--report",
        metavar="OUT.pdf|OUT.html",
        help="write one review report (PDF or self-contained HTML) covering every file",
    )
    parser.add_argument("--json", metavar="OUT.json", help="write the results of every file as one JSON document")
    parser.add_argument(
        "--junit",
        metavar="OUT.xml",
        help="write JUnit XML for CI servers: a test suite per file, a test case per check",
    )
    cache = parser.add_mutually_exclusive_group()
    cache.add_argument(
        "--cache",
        metavar="DIR",
        help="folder of cached results: unchanged files with unchanged settings are not checked again "
        "(default: Batten's folder in your user cache directory)",
    )
    cache.add_argument("--no-cache", action="store_true", help="check every file, read and write no cached result")
    parser.add_argument(
        "--cluster",
        metavar="ADDRESS",
        help="check the files on a Dask distributed scheduler's workers (tcp://host:8786); needs "
        "'pip install batten[cluster]' and workers that can read the files under the same paths",
    )
    parser.add_argument(
        "--jobs",
        type=int,
        default=0,
        metavar="N",
        help="files checked at once in separate processes (default: one per core)",
    )
    add_pull_argument(
        parser,
        "pull direction of the mould for the draft and undercut checks, overriding the profile's 'pull'",
    )
    parser.add_argument(
        "--review",
        metavar="FILE",
        help="a Batten review file of dispositions: findings accepted there are listed as accepted and do not fail "
        "the check; dispositions whose finding moved or changed are flagged for re-review, those whose finding is "
        "gone are reported as stale",
    )
    parser.add_argument("--quiet", action="store_true", help="no progress lines on stderr")
    add_read_options(parser)


def run(args: argparse.Namespace) -> int:
    from app.review.batch import BatchOptions, ReportHooks, run_batch
    from app.review.cache import default_cache_dir
    from app.review.runner import ReviewSettings
    from geometry.tooling import unit_pull

    review_text = ""
    if args.review:
        from app.review.review_file import read_review_text

        review_text = read_review_text(args.review)  # a bad file stops the check here, naming file and line
    hooks = None
    if args.report:  # pyvista loads only for a run that draws
        with signals_held():  # an interrupt inside VTK's set-up crashed the process (exit 139)
            from app.report.figures import render_figures
            from app.report.writers import write_report

        hooks = ReportHooks(render=render_figures, write=write_report)
    options = BatchOptions(
        files=tuple(args.files),
        settings=ReviewSettings(
            profile=args.profile,
            sections=args.sections,
            pull=None if args.pull is None else tuple(unit_pull(args.pull).tolist()),
            review_text=review_text,
            review_source=args.review or "",
            read_budget=read_budget(args),
        ),
        report=args.report,
        json=args.json,
        junit=args.junit,
        jobs=args.jobs,
        progress=not args.quiet,
        exclude=tuple(args.exclude),
        cache=None if args.no_cache else str(args.cache or default_cache_dir()),
        cluster=args.cluster,
        report_hooks=hooks,
    )
    return exit_status(run_batch(options))


def exit_status(verdicts) -> int:
    """The exit status of a check from the files' verdicts."""
    from app.review.result import ERROR, FAIL, UNREADABLE

    verdicts = set(verdicts)
    if UNREADABLE in verdicts:
        return EXIT_BAD_INPUT
    if ERROR in verdicts:
        return EXIT_INTERNAL
    return EXIT_FINDINGS if FAIL in verdicts else EXIT_OK
