"""How Batten opens and writes files: regular files only, bounded reads, atomic writes.

Reading: models and profiles are read only from regular files (a FIFO would
block for ever, ``/dev/zero`` never ends), opened without blocking and checked
on the open descriptor, so a symlink to a device is refused too, and never
more than a stated number of bytes.

Writing: every output (JSON, reports, images, the recent-files list) goes
through :func:`write_atomically`. The bytes go to a temporary file in the
destination's folder (same file system, so the final rename is atomic), are
verified complete (size, and a caller's check such as a PDF trailer), flushed
to disk and only then replace the destination with :func:`os.replace`. On any
failure, including SIGINT and SIGTERM during the write, the temporary file is
removed and the destination is left as it was. :func:`check_writable` is the
same pre-flight the writer does, for callers that want to fail before a long
computation.
"""

from __future__ import annotations

import contextlib
import os
import signal
import stat
import tempfile
import threading
from collections.abc import Callable, Iterable
from pathlib import Path

from ..errors import ReadError, WriteError

_KINDS = (
    (stat.S_ISFIFO, "a pipe (FIFO)"),
    (stat.S_ISCHR, "a character device"),
    (stat.S_ISBLK, "a block device"),
    (stat.S_ISSOCK, "a socket"),
    (stat.S_ISDIR, "a folder"),
)


def _kind(mode: int) -> str:
    return next((name for test, name in _KINDS if test(mode)), "not a regular file")


def read_regular(path: str, limit_bytes: int, what: str = "file") -> bytes:
    """The bytes of a regular file of at most ``limit_bytes``.

    Parameters
    ----------
    path : str
    limit_bytes : int
        Larger files are refused before they are read.
    what : str
        What the file is meant to be ("model", "profile"), for messages.

    Returns
    -------
    bytes

    Raises
    ------
    ReadError
        Missing, not a regular file (pipe, device, socket, folder, or a link
        to one), larger than the limit, or unreadable.
    """
    try:
        # O_NONBLOCK: opening a FIFO must not wait for a writer; checked on the descriptor, so no race.
        fd = os.open(path, os.O_RDONLY | os.O_NONBLOCK | getattr(os, "O_CLOEXEC", 0))
    except FileNotFoundError:
        raise ReadError(path, "no such file") from None
    except IsADirectoryError:
        raise ReadError(path, f"is a folder, not a {what} file") from None
    except OSError as exc:
        raise ReadError(path, f"cannot be read ({exc.strerror or exc})") from None
    info = os.fstat(fd)
    if not stat.S_ISREG(info.st_mode):
        os.close(fd)
        if stat.S_ISDIR(info.st_mode):
            raise ReadError(path, f"is a folder, not a {what} file")
        raise ReadError(path, f"is {_kind(info.st_mode)}, not a {what} file (only regular files are read)")
    with os.fdopen(fd, "rb") as handle:
        if info.st_size > limit_bytes:
            raise ReadError(path, f"is {_size(info.st_size)}, larger than the {_size(limit_bytes)} a {what} may have")
        try:
            data = handle.read(limit_bytes + 1)
        except OSError as exc:
            raise ReadError(path, f"cannot be read ({exc.strerror or exc})") from None
    if len(data) > limit_bytes:  # grew while being read
        raise ReadError(path, f"is larger than the {_size(limit_bytes)} a {what} may have")
    return data


def _size(n: int) -> str:
    for unit, scale in (("GB", 1e9), ("MB", 1e6), ("kB", 1e3)):
        if n >= scale:
            return f"{n / scale:.3g} {unit}"
    return f"{n} bytes"


def _same_file(a: Path, b: str | os.PathLike) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return os.path.abspath(a) == os.path.abspath(b)


def check_writable(path: str | os.PathLike, inputs: Iterable[str | os.PathLike] = ()) -> Path:
    """Check, before any work, that ``path`` can be written and is none of ``inputs``.

    Creates and removes a temporary file in the destination's folder, which is
    what :func:`write_atomically` will do.

    Raises
    ------
    WriteError
        The folder is missing or not writable, the destination is a folder or
        not a regular file, or it is one of the inputs.
    """
    dest = Path(path)
    folder = dest.parent if str(dest.parent) else Path(".")
    if not folder.is_dir():
        raise WriteError(f"{dest}: folder {folder} does not exist")
    for source in inputs:
        if dest.exists() and _same_file(dest, source) or os.path.abspath(dest) == os.path.abspath(source):
            raise WriteError(f"{dest}: is an input of this run; Batten never overwrites an input")
    if dest.exists() and not dest.is_file():
        raise WriteError(f"{dest}: is {_kind(os.stat(dest).st_mode)}, not a file Batten may replace")
    try:
        fd, probe = tempfile.mkstemp(prefix=f".{dest.stem}.", suffix=f".part{dest.suffix}", dir=folder)
    except OSError as exc:
        raise WriteError(f"{dest}: cannot write in {folder} ({exc.strerror or exc})") from None
    os.close(fd)
    os.unlink(probe)
    return dest


class _Interrupted(Exception):
    """SIGINT or SIGTERM arrived while a file was being written."""

    def __init__(self, signum: int):
        self.signum = signum


@contextlib.contextmanager
def _signals_deferred():
    """Hold SIGINT and SIGTERM until the block ends, then act on them.

    Python runs signal handlers between byte codes; one that raised inside a
    native writer (Qt's PDF engine) could abort the process. The handlers here
    only take note; the writer then discards its temporary file and the signal
    takes its usual course (KeyboardInterrupt, or exit 128 + 15 for SIGTERM).
    """
    if threading.current_thread() is not threading.main_thread():
        yield lambda: None
        return
    seen: list[int] = []
    wanted = [s for s in (signal.SIGINT, signal.SIGTERM) if signal.getsignal(s) is not signal.SIG_IGN]
    previous = {s: signal.signal(s, lambda signum, _frame: seen.append(signum)) for s in wanted}

    def check() -> None:
        if seen:
            raise _Interrupted(seen[0])

    try:
        yield check
    finally:
        for s, handler in previous.items():
            signal.signal(s, handler)
    if seen:
        _deliver(seen[0])


def _deliver(signum: int) -> None:
    if signum == signal.SIGINT:
        raise KeyboardInterrupt
    raise SystemExit(128 + signum)


def pdf_complete(path: str) -> None:
    """Raise unless ``path`` ends with a PDF trailer (``%%EOF``, ISO 32000-1, sec. 7.5.5)."""
    with open(path, "rb") as fh:
        fh.seek(0, os.SEEK_END)
        size = fh.tell()
        fh.seek(max(0, size - 1024))
        tail = fh.read()
    if not size or b"%%EOF" not in tail:
        raise OSError(f"the PDF is incomplete ({size} bytes, no %%EOF trailer)")


def write_atomically(
    path: str | os.PathLike,
    produce: bytes | str | Callable[[str], None],
    *,
    inputs: Iterable[str | os.PathLike] = (),
    verify: Callable[[str], None] | None = None,
) -> Path:
    """Write ``produce`` to ``path`` whole, or leave ``path`` as it was.

    Parameters
    ----------
    path : path-like
        The destination. Its folder must exist.
    produce : bytes, str or callable
        The content (``str`` is written as UTF-8), or a function that writes
        the whole file at the temporary path it is given (for writers such as
        Qt's that want a file name, not a stream).
    inputs : iterable of path-like
        Files this run reads; the destination must be none of them.
    verify : callable, optional
        Called with the temporary path once written; raises ``OSError`` when
        the file is incomplete (e.g. :func:`pdf_complete`).

    Returns
    -------
    Path
        The destination. It gets the permissions a plain ``open()`` would give
        (0666 less the umask).

    Raises
    ------
    WriteError
        Missing or unwritable folder, an input as destination, a full disk, a
        failed verification; the message names the file. The destination is
        unchanged and no temporary file is left.
    """
    dest = check_writable(path, inputs)
    with _signals_deferred() as interrupted:
        fd, tmp = tempfile.mkstemp(prefix=f".{dest.stem}.", suffix=f".part{dest.suffix}", dir=dest.parent)
        try:
            if callable(produce):
                os.close(fd)
                fd = -1
                produce(tmp)
                interrupted()
            else:
                data = produce.encode("utf-8") if isinstance(produce, str) else bytes(produce)
                with os.fdopen(fd, "wb") as fh:
                    fd = -1
                    fh.write(data)
                    fh.flush()
                if os.path.getsize(tmp) != len(data):
                    raise OSError(f"only {os.path.getsize(tmp)} of {len(data)} bytes were written")
            if verify is not None:
                verify(tmp)
            with open(tmp, "rb+") as fh:
                os.fsync(fh.fileno())
            interrupted()
            # mkstemp makes the file private (0600); give it the permissions a plain open() would.
            umask = os.umask(0)
            os.umask(umask)
            os.chmod(tmp, 0o666 & ~umask)
            os.replace(tmp, dest)
        except BaseException as exc:
            if fd >= 0:
                os.close(fd)
            Path(tmp).unlink(missing_ok=True)
            if isinstance(exc, _Interrupted):
                return dest  # the context manager delivers the signal on the way out
            if isinstance(exc, OSError):
                raise WriteError(f"{dest}: cannot write ({exc.strerror or exc}); the previous file is kept") from None
            raise
    return dest
