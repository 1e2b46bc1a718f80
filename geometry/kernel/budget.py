"""The limits one read by the CAD kernel runs under (see :mod:`geometry.kernel.isolation`)."""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import BattenError

# Default read budget, scaled to the file (common practice: a sound 10 MB STEP file reads in well under a
# minute on a laptop; the budget is generous so only a kernel that loops or crawls meets it). The time is
# processor time, so a machine busy with other work (a CI runner, a loaded cluster node) slows a read
# without failing it; the wall clock gets WALL_CLOCK_FACTOR times as much, for a kernel that hangs idle.
READ_TIMEOUT_BASE_S = 120.0
READ_TIMEOUT_PER_MB_S = 30.0
READ_MEMORY_BASE_BYTES = 4_000_000_000  # address space, including the ~0.7 GB the kernel's libraries map
READ_MEMORY_PER_FILE_BYTE = 50
# What a budget given by hand may be: from a second to about eleven days; from 1 GB (the kernel's
# libraries alone map 0.7 GB) to 1 TB.
TIMEOUT_RANGE_S = (1.0, 1e6)
MEMORY_RANGE_BYTES = (1_000_000_000, 1_000_000_000_000)
WALL_CLOCK_FACTOR = 10.0


@dataclass(frozen=True)
class ReadBudget:
    """Limits on one read by the CAD kernel.

    Attributes
    ----------
    timeout_s : float or None
        Processor seconds the kernel may spend on the file; None:
        :data:`READ_TIMEOUT_BASE_S` plus :data:`READ_TIMEOUT_PER_MB_S` per MB
        of file. The wall clock allows :data:`WALL_CLOCK_FACTOR` times as much.
    memory_bytes : int or None
        Address space of the helper process; None: :data:`READ_MEMORY_BASE_BYTES`
        plus :data:`READ_MEMORY_PER_FILE_BYTE` per byte of file.
    """

    timeout_s: float | None = None
    memory_bytes: int | None = None

    def __post_init__(self):
        low, high = TIMEOUT_RANGE_S
        timeout, memory = self.timeout_s, self.memory_bytes
        if timeout is not None and not (math.isfinite(timeout) and low <= timeout <= high):
            raise BattenError(f"read time limit (--read-timeout) must be {low:g} to {high:g} s, got {timeout!r}")
        low, high = MEMORY_RANGE_BYTES
        if memory is not None and not (math.isfinite(memory) and low <= memory <= high):
            raise BattenError(
                f"read memory limit (--read-memory) must be {low / 1e9:g} to {high / 1e9:g} GB, got {memory / 1e9:g} GB"
            )

    def timeout_for(self, size: int) -> float:
        if self.timeout_s is not None:
            return float(self.timeout_s)
        return READ_TIMEOUT_BASE_S + READ_TIMEOUT_PER_MB_S * size / 1e6

    def wall_clock_for(self, size: int) -> float:
        """Seconds of waiting after which a read that uses no processor time is given up (a kernel hung idle)."""
        return WALL_CLOCK_FACTOR * self.timeout_for(size)

    def memory_for(self, size: int) -> int:
        if self.memory_bytes is not None:
            return int(self.memory_bytes)
        return READ_MEMORY_BASE_BYTES + READ_MEMORY_PER_FILE_BYTE * size
