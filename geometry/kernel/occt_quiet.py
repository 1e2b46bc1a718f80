"""Keep the CAD kernel quiet while it reads a file.

OCP reports progress and parse problems through its default messenger (to
stdout, in colour) and, in a few places, straight to the C streams. A reader
must not flood the user's terminal or a pipeline's JSON output, so the
messenger's printers are removed once and, while a file is read, the process's
stdout file descriptor points at the null device. What the kernel says about the
file is not lost: the readers ask its check lists for failures and turn them into
:class:`geometry.errors.ReadError` reasons or model warnings.
"""

from __future__ import annotations

import contextlib
import os
import sys
import threading

_LOCK = threading.Lock()
_PRINTERS_REMOVED = False


def _remove_printers() -> None:
    global _PRINTERS_REMOVED
    if _PRINTERS_REMOVED:
        return
    from OCP.Message import Message

    Message.DefaultMessenger_s().ChangePrinters().Clear()
    _PRINTERS_REMOVED = True


@contextlib.contextmanager
def quiet_kernel():
    """Context in which OCP prints nothing to stdout.

    Notes
    -----
    Redirecting file descriptor 1 is process-wide, so the body runs under a
    lock (one kernel read at a time) and Python's own stdout is flushed first so
    nothing already written is lost.
    """
    with _LOCK:
        _remove_printers()
        with contextlib.suppress(Exception):
            sys.stdout.flush()
        try:
            saved = os.dup(1)
        except OSError:  # no fd 1 (a detached GUI process): nothing to protect
            yield
            return
        devnull = os.open(os.devnull, os.O_WRONLY)
        try:
            os.dup2(devnull, 1)
            yield
        finally:
            os.dup2(saved, 1)
            os.close(saved)
            os.close(devnull)
