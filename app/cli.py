"""The ``batten`` command line: one entry point, one module per sub-command.

Every sub-command lives in ``app/commands/<name>.py`` and provides
``add_arguments(parser)`` and ``run(args) -> int``. Errors Batten raises on
purpose (:class:`geometry.BattenError`) print one clear line and exit with
status 2; nothing the user did wrong ends in a traceback.
"""

from __future__ import annotations

import argparse
import atexit
import importlib
import os
import re
import signal
import sys
import threading
import warnings

from geometry import BattenError, __version__
from geometry.kernel.isolation import prefetch, start_helper

from .commands.reading import add_read_options, read_budget

# name -> (module, one-line help). Modules load only when their command runs.
COMMANDS: dict[str, tuple[str, str]] = {
    "open": ("app.commands.open", "open a model in the inspection window (the default)"),
    "summary": ("app.commands.summary", "print the curvature summary of each face"),
    "probe": ("app.commands.probe", "curvature and normal at a point of a model, as JSON"),
    "section": ("app.commands.section", "plane sections with curvature combs and inflections, as JSON"),
    "check": ("app.commands.check", "run every fairness check; exit 1 when any finding is over tolerance"),
    "compare": ("app.commands.compare", "compare two revisions: deviation, faces, findings, fairness trend"),
}
DEFAULT_COMMAND = "open"

EXIT_OK, EXIT_FINDINGS, EXIT_BAD_INPUT, EXIT_INTERNAL = 0, 1, 2, 3
# A negative number as a value, scientific notation included (argparse's own pattern knows no exponent).
NUMBER = re.compile(r"^-(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$|^-(inf|nan)$", re.IGNORECASE)
# Names of the threads that run compiled blocks (idle once a command is done).
COMPUTE_THREADS = "batten-"


def _parser(command: str | None = None) -> argparse.ArgumentParser:
    """The command line's parser; only ``command``'s module is imported and given its options.

    A command's options pull in what it runs (the review's modules for
    ``check``), so building every command's would cost each run the imports of
    all; the others are listed with their one-line help.
    """
    parser = argparse.ArgumentParser(
        prog="batten",
        description="Inspect the fairness of NURBS surfaces: curvature, reflections, seams, reports. "
        "'batten FILE' opens FILE in the window.",
    )
    parser.add_argument("--version", action="version", version=f"batten {__version__}")
    subs = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, (module_name, help_text) in COMMANDS.items():
        sub = subs.add_parser(name, help=help_text, description=help_text)
        # argparse takes "-1e-08" for an option (it knows "-1" and "-0.5" only): coordinates are numbers
        sub._negative_number_matcher = NUMBER
        if name != command:
            continue
        try:
            module = importlib.import_module(module_name)
        except ModuleNotFoundError as exc:
            if exc.name != module_name:
                raise
            sub.set_defaults(_missing=name)
            continue
        module.add_arguments(sub)
        sub.set_defaults(_run=module.run)
    return parser


def quiet_numerics() -> None:
    """No numpy RuntimeWarning on the user's terminal: invalid samples are marked and reported, not warned about.

    ``BATTEN_DEBUG=1`` shows them.
    """
    if not os.environ.get("BATTEN_DEBUG"):
        warnings.simplefilter("ignore", RuntimeWarning)


def _terminate(signum, _frame) -> None:
    raise SystemExit(128 + signum)


def _as_a_program(argv: list[str]) -> None:
    """Signals and streams for a run from the shell (not for a caller that passes ``argv``).

    In headless commands SIGTERM unwinds like SIGINT does, so every
    ``finally`` (temporary files, helper processes) runs; the window keeps Qt's
    own handling. File names that are not valid UTF-8 print as the bytes they
    are, not as an encoding error.
    """
    if argv and argv[0] in COMMANDS and argv[0] != DEFAULT_COMMAND:
        signal.signal(signal.SIGTERM, _terminate)
    for stream in (sys.stdout, sys.stderr):
        if hasattr(stream, "reconfigure"):
            stream.reconfigure(errors="surrogateescape")


def _leaving() -> None:
    """Once the answer is known, further interrupts must not print a trace from the clean-up at exit."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_IGN)


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the process exit status."""
    if argv is not None:
        return _main(list(argv))
    _as_a_program(sys.argv[1:])
    try:
        status = _main(sys.argv[1:])
    except KeyboardInterrupt:
        status = 130
    finally:
        _leaving()
    _leave_now(sys.argv[1:], status)
    return status


def _leave_now(argv: list[str], status: int) -> None:
    """End a headless command here: exit handlers run, the interpreter's modules are not torn down.

    Everything the command writes is written and closed by now (atomically,
    see :func:`geometry.io.files.write_atomically`), so tearing down numba,
    scipy and the rest would only keep the user waiting (a third of a second).
    The window keeps the interpreter's own exit (Qt saves its settings as it
    is torn down), and so does a process with other work still running (a
    thread that is not one of the idle compute threads).
    """
    if not argv or argv[0] not in COMMANDS or argv[0] == DEFAULT_COMMAND:
        return
    others = [t for t in threading.enumerate() if t is not threading.current_thread() and t.is_alive()]
    if any(not t.daemon and not t.name.startswith(COMPUTE_THREADS) for t in others):
        return
    for stream in (sys.stdout, sys.stderr):
        try:
            stream.flush()
        except (OSError, ValueError, AttributeError):  # closed, or gone (a broken pipe)
            pass
    atexit._run_exitfuncs()  # the helper stopped, temporary files removed, finalisers run
    os._exit(status)


# Commands that read their one model file as their first work.
READING_COMMANDS = ("open", "check", "probe", "summary", "section")
KERNEL_SUFFIXES = (".stp", ".step", ".igs", ".iges")


def _start_reader_early(argv: list[str]) -> None:
    """A command about to read one STEP or IGES file sends the read to the reader's helper process now.

    The helper's start-up (the interpreter, the CAD kernel's libraries) and
    the read itself then run beside this process's own imports instead of
    after them (:func:`geometry.kernel.isolation.prefetch`, with the read
    budget the options ask for). Only for one local file: several files are
    read in worker processes of their own.
    """
    if not argv or argv[0] not in READING_COMMANDS or "--cluster" in argv:
        return
    files = [a for a in argv[1:] if a.lower().endswith(KERNEL_SUFFIXES)]
    if len(files) != 1 or not os.path.isfile(files[0]):
        return
    options = argparse.ArgumentParser(add_help=False, exit_on_error=False)
    add_read_options(options)
    try:
        budget = read_budget(options.parse_known_args(argv[1:])[0])
    except (argparse.ArgumentError, BattenError):  # the command's own parser reports it
        start_helper()
        return
    prefetch("iges" if files[0].lower().endswith((".igs", ".iges")) else "step", files[0], budget)


def _main(argv: list[str]) -> int:
    if argv and not argv[0].startswith("-") and argv[0] not in COMMANDS:
        argv.insert(0, DEFAULT_COMMAND)
    _start_reader_early(argv)
    parser = _parser(argv[0] if argv else None)
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return EXIT_OK
    if getattr(args, "_missing", None):
        print(f"batten: the '{args._missing}' command is not available in this build", file=sys.stderr)
        return EXIT_INTERNAL
    try:
        with warnings.catch_warnings():
            quiet_numerics()
            return int(args._run(args) or 0)
    except BattenError as exc:
        print(f"batten: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:  # output piped into head or similar: stop quietly
        sys.stdout = None
        return EXIT_OK
    except Exception as exc:  # a bug of ours: say so in one line, trace only on request
        if os.environ.get("BATTEN_DEBUG"):
            raise
        print(f"batten: internal error ({type(exc).__name__}: {exc}); set BATTEN_DEBUG=1 for details", file=sys.stderr)
        return EXIT_INTERNAL


if __name__ == "__main__":
    sys.exit(main())
