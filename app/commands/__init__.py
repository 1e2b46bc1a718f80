"""The sub-commands of ``batten``: one module each, with ``add_arguments(parser)`` and ``run(args)``."""

import argparse
import signal
from collections.abc import Iterator
from contextlib import contextmanager

HELD = (signal.SIGINT, signal.SIGTERM)


def add_pull_argument(parser: argparse.ArgumentParser, help_text: str) -> None:
    """``--pull DX DY DZ``: a pull direction for the tooling checks (check and probe say the same)."""
    parser.add_argument("--pull", nargs=3, type=float, metavar=("DX", "DY", "DZ"), help=help_text)


@contextmanager
def signals_held() -> Iterator[None]:
    """Hold SIGINT and SIGTERM until the block ends, then act on the first that came (none is lost).

    For imports of the rendering stack: an interrupt raised inside VTK's extension
    set-up ended the process with a segmentation fault instead of a clean exit.
    The hold is in Python's handlers, not the thread's signal mask, because any
    thread of the process may receive the signal. Call from the main thread.
    """
    came: list[int] = []
    previous = {signum: signal.signal(signum, lambda got, _frame: came.append(got)) for signum in HELD}
    try:
        yield
    finally:
        for signum, handler in previous.items():
            signal.signal(signum, handler)
        if came:
            signum, handler = came[0], previous[came[0]]
            if callable(handler):
                handler(signum, None)
            elif handler == signal.SIG_DFL:
                signal.raise_signal(signum)
