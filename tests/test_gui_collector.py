"""Garbage collection stays on the GUI thread while a window works (a worker thread destroying Qt objects crashes)."""

from __future__ import annotations

import gc
import threading

import pytest

pytest.importorskip("pyvistaqt")

from tests.gui_support import show_window  # noqa: E402
from tests.test_gui_window import LOAD_MS, sample_files  # noqa: E402

pytestmark = pytest.mark.gui


class _Garbage:
    """A reference cycle: only the cyclic collector frees it."""

    def __init__(self):
        self.me = self


def test_collections_run_on_the_gui_thread_only_while_a_window_is_open(qtbot):
    threads = []

    def seen(phase, _info):
        if phase == "start":
            threads.append(threading.current_thread() is threading.main_thread())

    window = show_window(qtbot, (900, 600))
    assert not gc.isenabled()
    gc.callbacks.append(seen)
    try:
        # a model read and its seams measured in worker threads, with garbage enough to cross thresholds
        paths = sample_files("step")[:2]
        for path in paths:
            with qtbot.waitSignals([window.model_shown, window.seams_measured], timeout=LOAD_MS):
                window.open_file(str(path))
            for _ in range(3 * gc.get_threshold()[0]):
                _Garbage()
        qtbot.wait(600)  # the GUI thread's collector looks every CHECK_EVERY_MS
        assert threads and all(threads)
    finally:
        gc.callbacks.remove(seen)
        window.close()
    assert gc.isenabled()  # the last window closed: collection is the interpreter's again
