"""The sub-commands of ``batten``: one module each, with ``add_arguments(parser)`` and ``run(args)``."""

import argparse


def add_pull_argument(parser: argparse.ArgumentParser, help_text: str) -> None:
    """``--pull DX DY DZ``: a pull direction for the tooling checks (check and probe say the same)."""
    parser.add_argument("--pull", nargs=3, type=float, metavar=("DX", "DY", "DZ"), help=help_text)
