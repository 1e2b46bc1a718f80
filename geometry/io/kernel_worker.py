"""The helper process the STEP and IGES readers run in (``python -m geometry.io.kernel_worker``).

Protocol on stdin/stdout: each request is an 8-byte little-endian length and a
pickled ``(fmt, path)``; each answer is a length and a pickled reader result
(see :func:`geometry.io.isolation.read_in_worker`). The protocol keeps the
original stdout to itself; file descriptor 1 then points at the null device so
nothing the kernel prints can corrupt it.
"""

from __future__ import annotations

import os
import pickle
import sys

HEADER_BYTES = 8


def _read_exact(stream, n: int) -> bytes | None:
    data = stream.read(n)
    return data if data is not None and len(data) == n else None


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
        fmt, path = pickle.loads(body)
        data = pickle.dumps(read_in_worker(fmt, path), protocol=pickle.HIGHEST_PROTOCOL)
        answers.write(len(data).to_bytes(HEADER_BYTES, "little") + data)
        answers.flush()


def main() -> None:
    answers = os.fdopen(os.dup(1), "wb")
    devnull = os.open(os.devnull, os.O_WRONLY)
    os.dup2(devnull, 1)
    sys.stdout = open(os.devnull, "w")  # noqa: SIM115 - lives as long as the process
    serve(sys.stdin.buffer, answers)


if __name__ == "__main__":
    main()
