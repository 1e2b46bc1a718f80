"""Write a file so that it is either complete or not there at all.

The bytes go to a temporary file in the destination's folder (same file
system, so the final rename is atomic), are flushed to disk, and only then
replace the destination with :func:`os.replace`. When anything fails on the way
the temporary file is removed and the destination is left as it was.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path

from geometry.errors import BattenError


class WriteError(BattenError):
    """An output file could not be written; nothing partial was left behind."""


def write_atomically(path: str | os.PathLike, produce: bytes | str | Callable[[str], None]) -> Path:
    """Write ``produce`` to ``path`` atomically.

    Parameters
    ----------
    path : path-like
        The destination. Its folder must exist.
    produce : bytes, str or callable
        The content (``str`` is written as UTF-8), or a function that writes
        the whole file at the temporary path it is given (for writers such as
        Qt's that want a file name, not a stream).

    Returns
    -------
    Path
        The destination.

    Raises
    ------
    WriteError
        When the folder is missing or not writable, or ``produce`` fails; the
        message names the file. The destination is unchanged then.
    """
    dest = Path(path)
    folder = dest.parent if str(dest.parent) else Path(".")
    if not folder.is_dir():
        raise WriteError(f"{dest}: folder {folder} does not exist")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".part", dir=folder)
    except OSError as exc:
        raise WriteError(f"{dest}: cannot write in {folder} ({exc.strerror or exc})") from exc
    try:
        if callable(produce):
            os.close(fd)
            fd = -1
            produce(tmp)
            with open(tmp, "rb+") as fh:
                os.fsync(fh.fileno())
        else:
            data = produce.encode("utf-8") if isinstance(produce, str) else bytes(produce)
            with os.fdopen(fd, "wb") as fh:
                fd = -1
                fh.write(data)
                fh.flush()
                os.fsync(fh.fileno())
        # mkstemp makes the file private (0600); give it the permissions a plain open() would.
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, dest)
    except BaseException as exc:
        if fd >= 0:
            os.close(fd)
        Path(tmp).unlink(missing_ok=True)
        if isinstance(exc, BattenError | KeyboardInterrupt | SystemExit):
            raise
        if isinstance(exc, OSError):
            raise WriteError(f"{dest}: cannot write ({exc.strerror or exc})") from exc
        raise
    return dest
