"""Progress of a check run on stderr: a bar on a terminal, plain lines anywhere else.

CI logs and pipes get one line per finished file (and the stage lines of the
files checked in this process); a person at a terminal gets a bar that counts
files and names the last one done.
"""

from __future__ import annotations

import shutil
import sys
from pathlib import Path


def say(line: str) -> None:
    print(f"batten check: {line}", file=sys.stderr, flush=True)


def silent(_: str) -> None:
    pass


class Progress:
    """Counts finished files.

    Parameters
    ----------
    total : int
        Files in the run.
    enabled : bool
        False for ``--quiet``: nothing is written.
    """

    def __init__(self, total: int, enabled: bool = True):
        self.total = total
        self.done = 0
        self.enabled = enabled
        self._bar = None
        if enabled and sys.stderr.isatty():
            from tqdm import tqdm

            # a terminal that reports no size (some pseudo-terminals say 0 columns) still gets a bar
            size = shutil.get_terminal_size((80, 24))
            self._bar = tqdm(
                total=total,
                unit="file",
                desc="batten check",
                file=sys.stderr,
                ncols=size.columns or 80,
                nrows=size.lines or 24,
            )

    @property
    def stage_lines(self) -> bool:
        """Whether workers should print their stage lines (not under a bar, which they would break)."""
        return self.enabled and self._bar is None

    def line(self, text: str) -> None:
        if self._bar is not None:
            self._bar.write(f"batten check: {text}", file=sys.stderr)
        elif self.enabled:
            say(text)

    def file_done(self, path: str, verdict: str, cached: bool = False) -> None:
        self.done += 1
        note = " (cached)" if cached else ""
        if self._bar is not None:
            self._bar.set_postfix_str(f"{Path(path).name}: {verdict}{note}", refresh=False)
            self._bar.update(1)
        elif self.enabled:
            say(f"[{self.done}/{self.total}] {Path(path).name}: {verdict}{note}")

    def close(self) -> None:
        if self._bar is not None:
            self._bar.close()
            self._bar = None
