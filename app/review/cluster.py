"""Per-file checks on a Dask distributed cluster (``batten check --cluster ADDRESS``).

Workers need Batten installed and read access to the files under the same
paths; each returns the plain result of one file and the client writes every
output. When a worker dies the scheduler hands its file to another worker; for
the length of the run the scheduler is told to give up on a file after it took
down :data:`ATTEMPTS` workers, and such a file is reported unreadable.
"""

from __future__ import annotations

import uuid
from collections.abc import Callable, Iterator

from geometry.errors import BattenError

ATTEMPTS = 2
CONNECT_SECONDS = 20

Result = tuple
Task = Callable[[str], Result]


def _allowed_failures(value: int | None = None, dask_scheduler=None) -> int:
    """Set the scheduler's tolerance for worker deaths per task; returns the previous one (runs on the scheduler)."""
    before = dask_scheduler.allowed_failures
    if value is not None:
        dask_scheduler.allowed_failures = value
    return before


class WorkersKilled(Exception):
    """The file took down :data:`ATTEMPTS` workers."""


def run_on_cluster(address: str, work: list[tuple[int, str]], task: Task) -> Iterator[tuple[int, Result | Exception]]:
    """Check ``work`` on the cluster at ``address``, yielding ``(index, outcome)`` as files finish.

    Parameters
    ----------
    address : str
        The scheduler's address (``tcp://host:8786``).
    work : list of (int, str)
        Index in the run and path of each file.
    task : callable
        ``task(path) -> result``, picklable (it is sent to the workers).

    Yields
    ------
    index : int
    outcome : result or Exception
        The task's result; :class:`WorkersKilled` for a file that took down
        :data:`ATTEMPTS` workers; another exception when the cluster itself
        failed on the file (a worker without Batten, lost data).

    Raises
    ------
    BattenError
        When Dask is not installed or the scheduler cannot be reached.
    """
    try:
        from distributed import Client, as_completed
        from distributed.scheduler import KilledWorker
    except ImportError as exc:
        raise BattenError("--cluster needs Dask distributed: pip install 'batten[cluster]'") from exc
    try:
        client = Client(address, timeout=CONNECT_SECONDS, set_as_default=False)
    except (OSError, TimeoutError, ValueError) as exc:
        raise BattenError(f"cannot reach the Dask scheduler at {address} ({exc})") from exc
    run = uuid.uuid4().hex[:8]
    with client:
        before = client.run_on_scheduler(_allowed_failures, ATTEMPTS - 1)
        try:
            futures = {client.submit(task, path, key=f"batten-check-{run}-{i}", pure=False): i for i, path in work}
            for future in as_completed(futures, loop=client.loop):
                try:
                    outcome = future.result()
                except KilledWorker:
                    outcome = WorkersKilled()
                except Exception as exc:
                    outcome = exc
                yield futures[future], outcome
        finally:
            try:
                client.run_on_scheduler(_allowed_failures, before)
            except Exception:  # the scheduler went away: nothing left to restore
                pass
