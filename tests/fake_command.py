"""A sub-command for tests of app.cli's error handling."""

from geometry import ReadError


def add_arguments(parser):
    parser.add_argument("file")


def run(args):
    raise ReadError(args.file, "not a STEP or IGES file")
