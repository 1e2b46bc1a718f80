"""The project's own error types.

Everything the numerical core or a reader raises on bad input is a
:class:`BattenError`, so callers (the command line, the window) can catch one
type and show its message without a traceback.
"""

from __future__ import annotations


class BattenError(Exception):
    """Base of every error Batten raises on purpose."""


class SurfaceError(BattenError, ValueError):
    """A surface definition is not a valid NURBS surface (knots, poles, weights)."""


class ReadError(BattenError):
    """A model file cannot be read, or only partly.

    Parameters
    ----------
    path : str
        The file, as the user named it.
    reason : str
        What is wrong, in words a user understands.
    """

    def __init__(self, path: str, reason: str):
        self.path = str(path)
        self.reason = reason
        super().__init__(f"{self.path}: {reason}")


class WriteError(BattenError):
    """An output file could not be written; the previous file is kept and nothing partial is left."""
