"""The read-budget options every command that reads a model shares."""

from __future__ import annotations

import argparse


def add_read_options(parser: argparse.ArgumentParser) -> None:
    """``--read-timeout S`` and ``--read-memory GB`` (limits of the CAD kernel on one file)."""
    parser.add_argument(
        "--read-timeout",
        type=float,
        metavar="S",
        help="processor seconds the CAD kernel may spend reading one STEP or IGES file (1 to 1e6; default "
        "120 s plus 30 s per MB of file; a read that waits ten times as long without an answer is also stopped)",
    )
    parser.add_argument(
        "--read-memory",
        type=float,
        metavar="GB",
        help="memory (address space) the CAD kernel may use reading one file (1 to 1000; default 4 GB plus "
        "50 bytes per byte of file)",
    )


def read_budget(args: argparse.Namespace):
    """The :class:`geometry.io.ReadBudget` the options ask for (checked: a BattenError when out of range)."""
    import math

    from geometry.kernel.budget import ReadBudget

    memory = args.read_memory
    if memory is not None and math.isfinite(memory):
        memory = round(memory * 1e9)
    return ReadBudget(timeout_s=args.read_timeout, memory_bytes=memory)
