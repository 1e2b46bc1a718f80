"""Check many files (in local processes or on a Dask cluster) and write one JSON, JUnit and report for all.

Models are read where they are checked (the kernel's objects do not pickle);
what comes back is the plain :class:`FileReview` and the PNG bytes of its
pictures. Results of unchanged files come from the cache (:mod:`.cache`).
Progress goes to stderr (:mod:`.progress`); the final table to stdout.

This layer sits below the report (DEVELOPERS.md, Layers): the command that runs
a check hands in how pictures are drawn and the report is written
(:class:`ReportHooks`).
"""

from __future__ import annotations

import json
import math
import multiprocessing
import os
import signal
import time
import warnings
from collections.abc import Callable, Iterable
from concurrent.futures import ProcessPoolExecutor, as_completed
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, replace
from datetime import UTC, datetime
from functools import partial
from pathlib import Path

from geometry import __version__
from geometry.errors import BattenError
from geometry.io.files import check_writable

from .cache import ResultCache, cache_key
from .discover import discover
from .junit import SuiteRun, junit_text
from .progress import Progress, say, silent
from .result import ERROR, UNREADABLE, FileReview, check_document, now_stamp
from .runner import ReviewSettings, file_sha256, review_file
from .table import verdict_table

OUTPUT_SUFFIXES = {"report": (".pdf", ".html", ".htm"), "json": (".json",), "junit": (".xml",)}


@dataclass(frozen=True)
class ReportHooks:
    """How a check draws its pictures and writes its report, given by the command layer.

    Attributes
    ----------
    render : callable
        ``render(model, review) -> tuple of Figure``; a module-level function, so that it
        reaches worker processes and cluster workers by name.
    write : callable
        ``write(path, reviews, figures, created, inputs=...)``, figures one tuple per review.
    """

    render: Callable
    write: Callable


@dataclass(frozen=True)
class BatchOptions:
    """A check run. ``files`` are files, folders or glob patterns (see :func:`.discover.discover`);
    ``cache`` is the cache folder, None for no cache; ``cluster`` a Dask scheduler address."""

    files: tuple[str, ...]
    settings: ReviewSettings = ReviewSettings()
    report: str | None = None
    json: str | None = None
    junit: str | None = None
    jobs: int = 0
    progress: bool = True
    exclude: tuple[str, ...] = ()
    cache: str | None = None
    cluster: str | None = None
    report_hooks: ReportHooks | None = None


Outcome = tuple[FileReview, tuple, float]  # review, figures, seconds spent


def check_one(path: str, settings: ReviewSettings, pictures: Callable | None, progress: bool):
    """Review one file and render its pictures with ``pictures(model, review)`` (runs in a worker process).

    Returns
    -------
    review : FileReview
    figures : tuple of Figure
    """
    say_stage = say if progress else silent
    try:
        review, model = review_file(path, settings, say_stage)
    except BattenError as exc:  # settings were checked before the run: this is about the file's content
        return FileReview(source=path, status=UNREADABLE, error=str(exc), sha256=file_sha256(path)), ()
    except Exception as exc:  # a bug of ours on this file: report it, keep the others
        return FileReview(source=path, status=ERROR, error=f"internal error ({type(exc).__name__}: {exc})"), ()
    figures = ()
    if pictures and model is not None:
        say_stage(f"{Path(path).name}: pictures")
        try:
            figures = pictures(model, review)
        except Exception as exc:  # the numbers stand without pictures; say why they are missing
            note = f"pictures not rendered ({type(exc).__name__}: {exc})"
            review = replace(review, warnings=(*review.warnings, note))
    return review, figures


def timed_check(path: str, settings: ReviewSettings, pictures: Callable | None, progress: bool) -> Outcome:
    """:func:`check_one` and the seconds it took (runs in a worker process or on a cluster worker)."""
    start = time.perf_counter()
    review, figures = check_one(path, settings, pictures, progress)
    return review, figures, time.perf_counter() - start


def _inputs(options: BatchOptions) -> tuple[str, ...]:
    """Every file the run reads: the models and a profile file; no output may replace one."""
    profile = options.settings.profile
    return (*options.files, *([profile] if profile and os.path.exists(profile) else []))


def _check_outputs(options: BatchOptions) -> None:
    for kind in OUTPUT_SUFFIXES:
        target = getattr(options, kind)
        if target is None:
            continue
        if Path(target).suffix.lower() not in OUTPUT_SUFFIXES[kind]:
            raise BattenError(f"{target}: --{kind} must end in {' or '.join(OUTPUT_SUFFIXES[kind])}")
        check_writable(target, inputs=_inputs(options))
    if options.report and options.report_hooks is None:
        raise BattenError(f"{options.report}: this check was started without a report writer")
    if options.report and options.json and os.path.abspath(options.report) == os.path.abspath(options.json):
        raise BattenError(f"{options.json}: --json and --report name the same file")


def _crashed(path: str, reason: str) -> Outcome:
    return FileReview(source=path, status=UNREADABLE, error=reason, sha256=file_sha256(path)), (), 0.0


CRASHED = "the process checking this file stopped abruptly (damaged content, or a failure in a native library)"


def _pool_run(work: list[tuple[int, str]], task: Callable[[str], Outcome], workers: int) -> Iterable:
    """Yield ``(index, outcome)`` as files finish; files whose worker died are left out."""
    # spawn: a clean interpreter per worker, no inherited threads or GUI state. Each worker reads through its
    # own kernel helper process (geometry.kernel.isolation), so a kernel crash marks only that file unreadable;
    # the helper stops when its worker exits.
    context = multiprocessing.get_context("spawn")
    pool = ProcessPoolExecutor(workers, mp_context=context, initializer=_ignore_interrupts)
    try:
        futures = {pool.submit(task, path): index for index, path in work}
        for future in as_completed(futures):
            try:
                yield futures[future], future.result()
            except BrokenProcessPool:
                continue
    except BaseException:  # interrupted: stop the workers now rather than wait for their files
        for process in list((getattr(pool, "_processes", None) or {}).values()):
            process.terminate()
        pool.shutdown(wait=False, cancel_futures=True)
        raise
    pool.shutdown()


def _ignore_interrupts() -> None:
    """In a worker: Ctrl-C reaches the whole process group; the parent decides and stops the workers."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if not os.environ.get("BATTEN_DEBUG"):  # as the command line does (app.cli.quiet_numerics)
        warnings.simplefilter("ignore", RuntimeWarning)


def _local_run(work: list[tuple[int, str]], task: Callable[[str], Outcome], jobs: int) -> Iterable:
    workers = max(1, min(jobs if jobs > 0 else (os.cpu_count() or 1), len(work)))
    if workers == 1:
        yield from ((index, task(path)) for index, path in work)
        return
    finished = set()
    for index, outcome in _pool_run(work, task, workers):
        finished.add(index)
        yield index, outcome
    # A worker that dies takes the pool with it: check the files it left one by one, so only the culprit is lost.
    for index, path in [(i, p) for i, p in work if i not in finished]:
        again = dict(_pool_run([(index, path)], task, 1))
        yield index, again.get(index) or _crashed(path, CRASHED)


def _cluster_run(address: str, work: list[tuple[int, str]], task: Callable[[str], Outcome]) -> Iterable:
    from .cluster import WorkersKilled, run_on_cluster

    paths = dict(work)
    for index, outcome in run_on_cluster(address, work, task):
        if isinstance(outcome, WorkersKilled):
            outcome = _crashed(paths[index], f"{CRASHED}; it took down the cluster worker checking it twice")
        elif isinstance(outcome, Exception):
            error = f"the cluster could not check it ({type(outcome).__name__}: {outcome})"
            outcome = FileReview(source=paths[index], status=ERROR, error=error), (), 0.0
        yield index, outcome


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


def _cache_keys(files: list[str], options: BatchOptions, profile_values: dict) -> list[tuple[str, str] | None]:
    """``(content hash, cache key)`` of each file, None for a file that cannot be opened."""
    keys = []
    for path in files:
        digest = file_sha256(path) if os.path.isfile(path) else None
        keys.append(None if digest is None else (digest, cache_key(digest, options.settings, profile_values)))
    return keys


def _check_all(files: list[str], options: BatchOptions, profile_values: dict, write) -> tuple[list, list[SuiteRun]]:
    pictures = options.report_hooks.render if options.report else None
    outcomes: list = [None] * len(files)
    runs = [SuiteRun()] * len(files)
    progress = Progress(len(files), options.progress)
    cache = ResultCache(options.cache, write) if options.cache else None
    keys = _cache_keys(files, options, profile_values) if cache else [None] * len(files)
    try:
        for index, key in enumerate(keys):
            hit = cache.load(key[1], files[index], pictures is not None) if key else None
            if hit is not None:
                outcomes[index] = (hit.review, hit.figures)
                runs[index] = SuiteRun(0.0, cached=True)
                progress.file_done(files[index], hit.review.verdict, cached=True)
        work = [(i, f) for i, f in enumerate(files) if outcomes[i] is None]
        # On a cluster the stage lines would land in the workers' logs; under a bar they would break it.
        task = partial(timed_check, settings=options.settings, pictures=pictures, progress=progress.stage_lines)
        if not work:
            done = []
        elif options.cluster:
            done = _cluster_run(options.cluster, work, partial(task, progress=False))
        else:
            done = _local_run(work, task, options.jobs)
        for index, (review, figures, seconds) in done:
            outcomes[index] = (review, figures)
            runs[index] = SuiteRun(seconds)
            if keys[index] and review.sha256 == keys[index][0]:  # not a file rewritten while it was checked
                cache.store(keys[index][1], review, figures)
            progress.file_done(files[index], review.verdict)
    finally:
        progress.close()
    return outcomes, runs


def run_batch(options: BatchOptions) -> list[str]:
    """Check every file, print a table of files by verdict on stdout, write the outputs.

    Returns
    -------
    list of str
        The verdict of each file, in the order found.

    Raises
    ------
    BattenError
        Settings, inputs or output paths that are wrong for every file alike
        (checked before any work starts).
    """
    from app.profiles import get_profile
    from geometry.io.files import write_atomically

    from .spec import section_items

    _check_outputs(options)
    section_items(options.settings.sections)
    profile = get_profile(options.settings.profile)
    options.settings.review()  # a bad review file stops the run before any work, naming its line
    files = discover(options.files, options.exclude)
    started = datetime.now(UTC)
    outcomes, runs = _check_all(files, options, json_ready(profile.values), write_atomically)
    reviews = [r for r, _ in outcomes]
    created = now_stamp()
    say_done = say if options.progress else silent
    inputs = _inputs(options)
    if options.json:
        write_atomically(options.json, json_text(reviews, created), inputs=inputs)
        say_done(f"wrote {options.json}")
    if options.junit:
        write_atomically(options.junit, junit_text(reviews, runs, started, __version__), inputs=inputs)
        say_done(f"wrote {options.junit}")
    if options.report:
        say_done(f"writing {options.report}")
        options.report_hooks.write(options.report, reviews, [f for _, f in outcomes], created, inputs=inputs)
        say_done(f"wrote {options.report}")
    print(verdict_table(reviews, [r.cached for r in runs]), end="")
    return [r.verdict for r in reviews]
