"""Python's cyclic garbage collector, run on the GUI thread while a window is open.

A collection runs in whichever thread happens to allocate when a generation's
threshold is crossed. Reference cycles hold Qt and VTK wrappers (a scene's
actors, a replaced model's widgets, slots' closures); destroying those from a
worker thread (a seam or comparison job) crashed the process under Xvfb, with
"Garbage-collecting" in that thread's trace. So while any window is open the
automatic collection is off, and a timer on the GUI thread collects the
generations whose thresholds have been crossed, as the interpreter would have.
"""

from __future__ import annotations

import gc

from PySide6.QtCore import QTimer
from PySide6.QtWidgets import QApplication

# How often the GUI thread looks at the allocation counts (ms): well under a second, so garbage
# never piles up for long, and each look costs microseconds when nothing is due.
CHECK_EVERY_MS = 250

_holders = 0
_timer: QTimer | None = None


def _collect_due() -> None:
    """Collect the oldest generation whose allocation count has passed its threshold (gc's own rule)."""
    counts, thresholds = gc.get_count(), gc.get_threshold()
    due = [g for g in range(3) if thresholds[g] and counts[g] > thresholds[g]]
    if due:
        gc.collect(max(due))


def hold() -> None:
    """A window opened: collect on the GUI thread only, from now until every window has let go."""
    global _holders, _timer
    if _holders == 0:
        gc.disable()
        _timer = QTimer(QApplication.instance())
        _timer.timeout.connect(_collect_due)
        _timer.start(CHECK_EVERY_MS)
    _holders += 1


def release() -> None:
    """A window closed (its jobs ended): collect its garbage here, and hand collection back when none is left."""
    global _holders, _timer
    _holders = max(_holders - 1, 0)
    gc.collect()
    if _holders == 0 and _timer is not None:
        _timer.stop()
        _timer.deleteLater()
        _timer = None
        gc.enable()
