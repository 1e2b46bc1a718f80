"""Run the CAD kernel's readers in a helper process, so a crash cannot take Batten down.

The kernel is robust on well-formed files but can crash (segmentation fault)
or hang on some damaged ones, which no exception handler in Python can catch.
Readers therefore run in one long-lived helper process
(:mod:`geometry.kernel.worker`, started on first use, reused for later files,
restarted after a crash); a crash or a time-out becomes a
:class:`geometry.errors.ReadError` and nothing already loaded is lost.

Each read runs under a :class:`ReadBudget`: a processor-time limit (default
scaled to the file's size) the helper sets on itself with ``setrlimit(RLIMIT_CPU)``,
a wall-clock limit several times longer for a kernel that hangs without
working, and an address-space limit set with ``setrlimit(RLIMIT_AS)``. Past a
time limit the helper is killed and the next read starts a new one; past the memory limit the kernel's allocation fails
inside the helper, which reports it (or dies, and is restarted). The
helper is a plain ``python -m`` process, not a multiprocessing child, so scripts
that call :func:`geometry.io.read_model` need no ``if __name__ == "__main__"``
guard.

The helper is stopped when the process that started it exits, whichever way it
exits: ``atexit`` for a plain interpreter, and a multiprocessing finaliser for a
pool or ``Process`` worker (a fork-started worker leaves through ``os._exit``,
which skips ``atexit``; the finaliser runs on both start methods). Stopping
closes the helper's input, so its read loop ends by itself, and kills it only if
it does not leave within :data:`STOP_TIMEOUT_S`. A forked child forgets its
parent's helper (the pipes are the parent's) and starts its own when it reads.

Set ``BATTEN_READ_IN_PROCESS=1`` to read in the calling process instead (for
debugging the readers).
"""

from __future__ import annotations

import atexit
import contextlib
import multiprocessing.util
import os
import pickle
import select
import signal
import subprocess
import sys
import tempfile
import threading

from ..errors import BattenError, ReadError
from .budget import ReadBudget
from .numbers import check_numbers
from .shape import KernelShape
from .worker import HEADER_BYTES

# Seconds an idle helper gets to leave after its input closes, before it is killed.
STOP_TIMEOUT_S = 10.0
# Runs before multiprocessing joins a worker's own children and before lower priorities (default 0).
_FINALIZE_PRIORITY = 10

_LOCK = threading.Lock()
_WORKER: subprocess.Popen | None = None
_FINALIZED_PID: int | None = None  # the process whose exit already stops the helper
_PENDING: bytes | None = None  # a request sent ahead (:func:`prefetch`) whose answer nobody has read yet
# Files larger than this are not read ahead (their bytes are read twice: the screen here, the owner's hash).
PREFETCH_MAX_BYTES = 200_000_000


def _read(fmt: str, path: str) -> tuple[KernelShape, str]:
    if fmt == "step":
        from .step import read_step

        return read_step(path)
    from .iges import read_iges

    return read_iges(path)


def read_in_worker(fmt: str, path: str, memory_bytes: int | None = None):
    """The reader's result, or ``("error", reason)``: exceptions do not all survive pickling."""
    try:
        return _read(fmt, path)
    except ReadError as exc:
        return ("error", exc.reason)
    except BattenError as exc:
        return ("error", str(exc))
    except MemoryError:
        return ("error", _memory_reason(memory_bytes))
    except Exception as exc:  # the kernel's own exceptions
        if "OutOfMemory" in type(exc).__name__ or "OutOfMemory" in str(exc):
            return ("error", _memory_reason(memory_bytes))
        return ("error", f"the {fmt.upper()} reader failed ({type(exc).__name__}: {exc})")


def _memory_reason(memory_bytes: int | None) -> str:
    limit = f"{memory_bytes / 1e9:.1f} GB" if memory_bytes else "the available"
    return f"the CAD kernel needed more than {limit} of memory on this file (read budget; --read-memory raises it)"


def _stop_at_exit() -> None:
    """Stop the helper when this process exits (once per process; the registry is per process)."""
    global _FINALIZED_PID
    if _FINALIZED_PID != os.getpid():
        _FINALIZED_PID = os.getpid()
        multiprocessing.util.Finalize(None, _stop_worker_at_exit, exitpriority=_FINALIZE_PRIORITY)


def _worker() -> subprocess.Popen:
    global _WORKER
    if _WORKER is None or _WORKER.poll() is not None:
        _stop_at_exit()
        root = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
        env = dict(os.environ, PYTHONPATH=os.pathsep.join(filter(None, [root, os.environ.get("PYTHONPATH")])))
        _WORKER = subprocess.Popen(
            [sys.executable, "-m", "geometry.kernel.worker"],
            stdin=subprocess.PIPE,
            stdout=subprocess.PIPE,
            stderr=subprocess.DEVNULL,  # the kernel's own chatter
            env=env,
        )
    return _WORKER


def start_helper() -> None:
    """Start the helper process now, if it is not running, without reading anything.

    A command that will read one STEP or IGES file calls this first, so the
    helper's start-up (the interpreter, the CAD kernel's libraries, the
    compiled kernels) runs alongside the command's own imports instead of
    after them. Does nothing when reading in-process.
    """
    if os.environ.get("BATTEN_READ_IN_PROCESS"):
        return
    with _LOCK:
        _worker()


def prefetch(fmt: str, path: str, budget: ReadBudget | None = None) -> None:
    """Send the read of ``path`` to the helper now, so it runs while the command imports the rest.

    The next :func:`read_isolated` of the same file, format and budget takes
    its answer instead of asking again; any other read first drops it (the
    helper is restarted). The file's numbers are screened first
    (:func:`.numbers.check_numbers`): a file that fails is not sent, and the
    owner's own read then reports why. Never raises; does nothing when reading
    in-process, and only starts the helper for a name the kernel cannot take
    as it is or a very large file.
    """
    global _PENDING
    if os.environ.get("BATTEN_READ_IN_PROCESS"):
        return
    try:
        path = os.path.abspath(path)
        path.encode("utf-8")  # a name the kernel takes as it is (else a link, made at the read)
        size = os.path.getsize(path)
        request = None
        if size <= PREFETCH_MAX_BYTES:
            with open(path, "rb") as handle:
                check_numbers(path, fmt, handle.read())
            budget = budget or ReadBudget()
            request = pickle.dumps((fmt, path, budget.memory_for(size), budget.timeout_for(size)))
    except (OSError, UnicodeEncodeError, BattenError):  # read as usual later, where the cause is reported
        request = None
    if request is None:
        start_helper()
        return
    with _LOCK:
        worker = _worker()
        if _PENDING is not None:
            return
        try:
            worker.stdin.write(len(request).to_bytes(HEADER_BYTES, "little") + request)
            worker.stdin.flush()
        except OSError:  # the helper is gone: the read itself starts a new one
            return
        _PENDING = request


def _close_pipes(worker: subprocess.Popen) -> None:
    for pipe in (worker.stdin, worker.stdout):
        try:
            pipe.close()
        except OSError:  # already broken: the helper is gone
            pass


def _stop_worker(graceful: bool = True) -> None:
    """Stop the helper: close its input and let it leave, or kill it (after a crash or time-out).

    A helper still reading a file nobody asked for after all (a prefetch) is killed: its answer is not wanted.
    """
    global _WORKER, _PENDING
    worker, _WORKER = _WORKER, None
    graceful, _PENDING = graceful and _PENDING is None, None
    if worker is None:
        return
    _close_pipes(worker)
    if graceful:
        try:
            worker.wait(STOP_TIMEOUT_S)
            return
        except subprocess.TimeoutExpired:
            pass
    if worker.poll() is None:
        worker.kill()
    worker.wait()


def _forget_parents_worker() -> None:
    """In a forked child: drop the parent's helper and lock without touching the helper itself."""
    global _WORKER, _LOCK, _FINALIZED_PID, _PENDING
    worker, _WORKER, _PENDING = _WORKER, None, None
    _LOCK = threading.Lock()  # another thread of the parent may have held it at the fork
    _FINALIZED_PID = None
    if worker is not None:
        _close_pipes(worker)  # the parent's helper then sees its input close when the parent exits
        worker.returncode = 0  # not our child: never wait for it


def _stop_worker_at_exit() -> None:
    """At exit, the helper is killed: it holds nothing to save, and leaving gracefully (the kernel's
    libraries torn down) would keep this process waiting a third of a second more."""
    _stop_worker(graceful=False)


atexit.register(_stop_worker_at_exit)
os.register_at_fork(after_in_child=_forget_parents_worker)


def _receive(worker: subprocess.Popen, timeout: float) -> bytes | str:
    """The next answer, or ``"crashed"`` / ``"timeout"``."""
    ready, _, _ = select.select([worker.stdout], [], [], timeout)
    if not ready:
        return "timeout"
    header = worker.stdout.read(HEADER_BYTES)
    size = int.from_bytes(header, "little") if len(header) == HEADER_BYTES else -1
    body = worker.stdout.read(size) if size >= 0 else b""
    return body if size >= 0 and len(body) == size else "crashed"


def _over_processor_time(worker: subprocess.Popen) -> bool:
    """Whether the helper died of its processor-time limit (SIGXCPU)."""
    try:
        code = worker.wait(STOP_TIMEOUT_S)
    except subprocess.TimeoutExpired:
        return False
    return code == -signal.SIGXCPU


@contextlib.contextmanager
def _kernel_path(path: str):
    """A name the kernel can open: the file's own, or a link with a plain name when it is not valid UTF-8.

    The kernel's bindings take text; a file name of undecodable bytes (held by
    Python as lone surrogates) cannot cross them.
    """
    path = os.path.abspath(path)
    try:
        path.encode("utf-8")
    except UnicodeEncodeError:
        with tempfile.TemporaryDirectory(prefix="batten-read-") as folder:
            link = os.path.join(folder, "model" + os.path.splitext(path)[1].encode("ascii", "replace").decode())
            os.symlink(path, link)
            yield link
        return
    yield path


def _clear_pending() -> None:
    global _PENDING
    _PENDING = None


def read_isolated(fmt: str, path: str, budget: ReadBudget | None = None) -> tuple[KernelShape, str]:
    """Run the ``fmt`` reader ("step" or "iges") on ``path`` in the helper process.

    Parameters
    ----------
    fmt : str
    path : str
    budget : ReadBudget, optional
        Time and memory limits; default scaled to the file's size.

    Returns
    -------
    contents : KernelShape
        Trims still on the input faces (:func:`geometry.io.carry.on_nurbs`).
    source_units : str

    Raises
    ------
    ReadError
        The reader's own errors, a crash of the kernel, or a read over budget.
    """
    if os.environ.get("BATTEN_READ_IN_PROCESS"):
        with _kernel_path(path) as kernel_path:
            try:
                return _read(fmt, kernel_path)
            except ReadError as exc:
                raise ReadError(path, exc.reason) from None
    budget = budget or ReadBudget()
    size = os.path.getsize(path)
    timeout, wall, memory = budget.timeout_for(size), budget.wall_clock_for(size), budget.memory_for(size)
    with _kernel_path(path) as kernel_path:
        request = pickle.dumps((fmt, kernel_path, memory, timeout))
        with _LOCK:
            if _PENDING is not None and _PENDING != request:
                _stop_worker(graceful=False)  # busy on a read ahead of another file or budget
            worker, asked = _worker(), _PENDING == request
            try:
                if not asked:
                    worker.stdin.write(len(request).to_bytes(HEADER_BYTES, "little") + request)
                    worker.stdin.flush()
                answer = _receive(worker, wall)
            except OSError:  # the pipe broke: the worker is gone
                answer = "crashed"
            _clear_pending()
            if isinstance(answer, str):
                if answer == "crashed" and _over_processor_time(worker):
                    answer = "processor"
                _stop_worker(graceful=False)
                if answer == "processor":
                    raise ReadError(
                        path,
                        f"the CAD kernel spent more than {timeout:.0f} s of processor time on this file "
                        "(--read-timeout raises it)",
                    )
                if answer == "crashed":
                    raise ReadError(
                        path,
                        f"the CAD kernel crashed reading the {fmt.upper()} file (damaged content, or more memory "
                        f"than the {memory / 1e9:.1f} GB read budget; --read-memory raises it)",
                    )
                raise ReadError(
                    path,
                    f"the CAD kernel gave no answer within {wall:.0f} s on this file (--read-timeout raises it)",
                )
    result = pickle.loads(answer)
    if result[0] == "error":
        raise ReadError(path, result[1])
    return result
