"""The helper process the STEP and IGES readers run in (``python -m geometry.kernel.worker``).

Protocol on stdin/stdout: each request is an 8-byte little-endian length and a
pickled ``(fmt, path, memory_bytes, cpu_seconds)``; each answer is a length and a pickled reader result
(see :func:`geometry.kernel.isolation.read_in_worker`). The protocol keeps the
original stdout to itself; file descriptor 1 then points at the null device so
nothing the kernel prints can corrupt it.

Each read runs with the process's address space limited to ``memory_bytes``
(``RLIMIT_AS``), so a file that makes the kernel allocate without end fails
that allocation here instead of exhausting the machine, and with its processor
time limited to ``cpu_seconds`` more than it has used (``RLIMIT_CPU``): a kernel
that loops gets ``SIGXCPU`` and dies, which the owner reports as a read over its
time budget. Processor time, unlike the wall clock, does not run out because
the machine is busy with other work. The helper ignores
SIGINT: an interrupt at the terminal reaches the whole process group, and the
owner, not the helper, decides what happens then.
"""

from __future__ import annotations

import contextlib
import os
import pickle
import signal
import sys

try:
    import resource
except ImportError:  # not on Windows: no address-space limit there
    resource = None

HEADER_BYTES = 8


def _read_exact(stream, n: int) -> bytes | None:
    data = stream.read(n)
    return data if data is not None and len(data) == n else None


@contextlib.contextmanager
def address_space(limit: int | None):
    """Limit this process's address space to ``limit`` bytes for the block (no limit for None)."""
    if resource is None or not limit:
        yield
        return
    soft, hard = resource.getrlimit(resource.RLIMIT_AS)
    wanted = limit if hard == resource.RLIM_INFINITY else min(limit, hard)
    resource.setrlimit(resource.RLIMIT_AS, (wanted, hard))
    try:
        yield
    finally:
        resource.setrlimit(resource.RLIMIT_AS, (soft, hard))


@contextlib.contextmanager
def processor_time(seconds: float | None):
    """Let this process use at most ``seconds`` more processor time in the block (no limit for None).

    Only the soft limit moves: a process may lower its hard limit but not raise it again.
    """
    if resource is None or not seconds:
        yield
        return
    used = resource.getrusage(resource.RUSAGE_SELF)
    soft, hard = resource.getrlimit(resource.RLIMIT_CPU)
    limit = int(used.ru_utime + used.ru_stime + seconds) + 1
    if hard != resource.RLIM_INFINITY:
        limit = min(limit, hard)
    resource.setrlimit(resource.RLIMIT_CPU, (limit, hard))
    try:
        yield
    finally:
        resource.setrlimit(resource.RLIMIT_CPU, (soft, hard))


def serve(requests, answers) -> None:
    """Answer read requests until the input closes."""
    from .isolation import read_in_worker

    while True:
        header = _read_exact(requests, HEADER_BYTES)
        if header is None:
            return
        body = _read_exact(requests, int.from_bytes(header, "little"))
        if body is None:
            return
        fmt, path, memory_bytes, cpu_seconds = pickle.loads(body)
        with address_space(memory_bytes), processor_time(cpu_seconds):
            try:
                data = pickle.dumps(read_in_worker(fmt, path, memory_bytes), protocol=pickle.HIGHEST_PROTOCOL)
            except MemoryError:  # the answer itself did not fit
                data = None
        if data is None:
            data = pickle.dumps(("error", f"the model needs more than {memory_bytes / 1e9:.1f} GB of memory"))
        answers.write(len(data).to_bytes(HEADER_BYTES, "little") + data)
        answers.flush()


def _die_with_owner() -> None:
    """Linux: be killed when the owner dies, even in the middle of a read that would never end."""
    try:
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, signal.SIGKILL)  # PR_SET_PDEATHSIG
    except (OSError, AttributeError):  # not Linux: the owner's exit handlers stop the helper
        pass
    if os.getppid() == 1:  # the owner is already gone
        os._exit(0)


def main() -> None:
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if resource is not None:  # a helper that dies of its time limit leaves no core file behind
        resource.setrlimit(resource.RLIMIT_CORE, (0, 0))
    _die_with_owner()
    # Load the kernel before any read, so the address-space limit bounds the work, not the libraries.
    # The compiled kernels are never started here: the owner carries the trims onto the NURBS (.carry).
    import OCP.IGESControl  # noqa: F401
    import OCP.STEPControl  # noqa: F401

    from . import iges, step  # noqa: F401

    answers = os.fdopen(os.dup(1), "wb")
    devnull = os.open(os.devnull, os.O_WRONLY)
    os.dup2(devnull, 1)
    sys.stdout = open(os.devnull, "w")  # noqa: SIM115 - lives as long as the process
    serve(sys.stdin.buffer, answers)


if __name__ == "__main__":
    main()
