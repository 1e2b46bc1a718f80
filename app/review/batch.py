"""Check several files, in parallel processes, and write one JSON and one report for all.

Models are read inside the worker processes (the kernel's objects do not
pickle); what comes back is the plain :class:`FileReview` and the PNG bytes of
its pictures. Progress goes to stderr, one line per stage.
"""

from __future__ import annotations

import json
import math
import multiprocessing
import os
import signal
import sys
import warnings
from concurrent.futures import ProcessPoolExecutor, as_completed
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, replace
from pathlib import Path

from geometry import __version__
from geometry.errors import BattenError
from geometry.io.files import check_writable

from .result import ACCEPTED, ERROR, FAIL, PASS, UNREADABLE, FileReview, check_document, face_account_line
from .runner import ReviewSettings, file_sha256, review_file

OUTPUT_SUFFIXES = {"report": (".pdf", ".html", ".htm"), "json": (".json",)}


@dataclass(frozen=True)
class BatchOptions:
    files: tuple[str, ...]
    settings: ReviewSettings = ReviewSettings()
    report: str | None = None
    json: str | None = None
    jobs: int = 0
    progress: bool = True


def _say(line: str) -> None:
    print(f"batten check: {line}", file=sys.stderr, flush=True)


def _silent(_: str) -> None:
    pass


def check_one(path: str, settings: ReviewSettings, pictures: bool, progress: bool):
    """Review one file and render its pictures (runs in a worker process).

    Returns
    -------
    review : FileReview
    figures : tuple of Figure
    """
    say = _say if progress else _silent
    try:
        review, model = review_file(path, settings, say)
    except BattenError as exc:  # settings were checked before the run: this is about the file's content
        return FileReview(source=path, status=UNREADABLE, error=str(exc), sha256=file_sha256(path)), ()
    except Exception as exc:  # a bug of ours on this file: report it, keep the others
        return FileReview(source=path, status=ERROR, error=f"internal error ({type(exc).__name__}: {exc})"), ()
    figures = ()
    if pictures and model is not None:
        say(f"{Path(path).name}: pictures")
        try:
            from app.report.figures import render_figures

            figures = render_figures(model, review)
        except Exception as exc:  # the numbers stand without pictures; say why they are missing
            note = f"pictures not rendered ({type(exc).__name__}: {exc})"
            review = replace(review, warnings=(*review.warnings, note))
    return review, figures


def _inputs(options: BatchOptions) -> tuple[str, ...]:
    """Every file the run reads: the models and a profile file; no output may replace one."""
    profile = options.settings.profile
    return (*options.files, *([profile] if profile and os.path.exists(profile) else []))


def _check_outputs(options: BatchOptions) -> None:
    for kind in ("report", "json"):
        target = getattr(options, kind)
        if target is None:
            continue
        if Path(target).suffix.lower() not in OUTPUT_SUFFIXES[kind]:
            raise BattenError(f"{target}: --{kind} must end in {' or '.join(OUTPUT_SUFFIXES[kind])}")
        check_writable(target, inputs=_inputs(options))
    if options.report and options.json and os.path.abspath(options.report) == os.path.abspath(options.json):
        raise BattenError(f"{options.json}: --json and --report name the same file")


def _workers(options: BatchOptions) -> int:
    wanted = options.jobs if options.jobs > 0 else (os.cpu_count() or 1)
    return max(1, min(wanted, len(options.files)))


def _crashed(path: str) -> FileReview:
    reason = "the process checking this file stopped abruptly (damaged content, or a failure in a native library)"
    return FileReview(source=path, status=UNREADABLE, error=reason, sha256=file_sha256(path))


def _pool_run(files: list[str], options: BatchOptions, workers: int, pictures: bool, done: list[int]) -> dict:
    """Results by file index; files whose worker died are left out."""
    out: dict[int, tuple] = {}
    # spawn: a clean interpreter per worker, no inherited threads or GUI state. Each worker reads through its
    # own kernel helper process (geometry.io.isolation), so a kernel crash marks only that file unreadable;
    # the helper stops when its worker exits.
    context = multiprocessing.get_context("spawn")
    pool = ProcessPoolExecutor(workers, mp_context=context, initializer=_ignore_interrupts)
    try:
        futures = {
            pool.submit(check_one, f, options.settings, pictures, options.progress): i for i, f in enumerate(files)
        }
        for future in as_completed(futures):
            index = futures[future]
            try:
                out[index] = future.result()
            except BrokenProcessPool:
                continue
            done[0] += 1
            if options.progress:
                _say(f"[{done[0]}/{done[1]}] {Path(files[index]).name}: {out[index][0].verdict}")
    except BaseException:  # interrupted: stop the workers now rather than wait for their files
        for process in list((getattr(pool, "_processes", None) or {}).values()):
            process.terminate()
        pool.shutdown(wait=False, cancel_futures=True)
        raise
    pool.shutdown()
    return out


def _ignore_interrupts() -> None:
    """In a worker: Ctrl-C reaches the whole process group; the parent decides and stops the workers."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if not os.environ.get("BATTEN_DEBUG"):  # as the command line does (app.cli.quiet_numerics)
        warnings.simplefilter("ignore", RuntimeWarning)


def _run_all(options: BatchOptions) -> list[tuple[FileReview, tuple]]:
    pictures = options.report is not None
    files = list(options.files)
    workers = _workers(options)
    if workers == 1:
        return [check_one(f, options.settings, pictures, options.progress) for f in files]
    done = [0, len(files)]
    results = _pool_run(files, options, workers, pictures, done)
    # A worker that dies takes the pool with it: check the files it left one by one, so only the culprit is lost.
    for index in [i for i in range(len(files)) if i not in results]:
        again = _pool_run([files[index]], options, 1, pictures, done)
        results[index] = again.get(0) or (_crashed(files[index]), ())
    return [results[i] for i in range(len(files))]


def json_ready(value):
    """Plain JSON values: numpy scalars to Python, NaN and infinities to null."""
    if isinstance(value, dict):
        return {str(k): json_ready(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [json_ready(v) for v in value]
    if hasattr(value, "tolist"):
        return json_ready(value.tolist())
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def json_text(reviews: list[FileReview], created: str) -> str:
    return json.dumps(json_ready(check_document(reviews, created, __version__)), indent=1, allow_nan=False) + "\n"


def _print_summary(reviews: list[FileReview]) -> None:
    for r in reviews:
        if r.verdict in (PASS, FAIL):
            detail = (
                f"{len(r.failures)} over tolerance, {len(r.findings)} measured; {face_account_line(r.face_account)}"
            )
            accepted = sum(f.verdict == ACCEPTED for f in r.findings)
            detail += f", {accepted} accepted by reviewers" if r.review_file is not None else ""
        else:
            detail = r.error or ""
        print(f"{r.verdict.upper():10s} {r.source}  ({detail})")
        for outcome in r.dispositions:
            if outcome.status != "applied":
                d = outcome.disposition
                print(f"  {outcome.status}: {d.key.label} ({d.decision} by {d.reviewer}, {d.date}): {outcome.note}")


def run_batch(options: BatchOptions) -> list[str]:
    """Check every file, print one line per file on stdout, write the outputs.

    Returns
    -------
    list of str
        The verdict of each file, in the order given.

    Raises
    ------
    BattenError
        Settings or output paths that are wrong for every file alike (checked
        before any work starts).
    """
    from app.profiles import get_profile
    from app.report.writers import now_stamp
    from geometry.io.files import write_atomically

    from .spec import parse_spec

    _check_outputs(options)
    parse_spec(options.settings.sections)
    get_profile(options.settings.profile)
    options.settings.review()
    results = _run_all(options)
    reviews = [r for r, _ in results]
    created = now_stamp()
    if options.json:
        write_atomically(options.json, json_text(reviews, created), inputs=_inputs(options))
        if options.progress:
            _say(f"wrote {options.json}")
    if options.report:
        from app.report.writers import write_report

        if options.progress:
            _say(f"writing {options.report}")
        write_report(options.report, reviews, [f for _, f in results], created, inputs=_inputs(options))
        if options.progress:
            _say(f"wrote {options.report}")
    _print_summary(reviews)
    return [r.verdict for r in reviews]
