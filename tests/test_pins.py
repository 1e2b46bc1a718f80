"""Pinned GUI stack: PySide6 6.12.0 corrupts the reference count of None on Python 3.11 and aborts."""

from __future__ import annotations

import sys

import pytest

PYSIDE6_PIN = "6.11.3"


def test_pyside6_is_the_pinned_release():
    import PySide6

    assert PySide6.__version__ == PYSIDE6_PIN


@pytest.mark.gui
def test_event_processing_keeps_none_alive(qtbot):
    from PySide6.QtCore import QObject, QTimer, Signal
    from PySide6.QtWidgets import QApplication

    class Pinger(QObject):
        ping = Signal(object)

    pinger = Pinger()
    received = []
    pinger.ping.connect(received.append)
    before = sys.getrefcount(None)
    for _ in range(2000):  # each emit passes None through the binding and back
        pinger.ping.emit(None)
    fired = []
    QTimer.singleShot(0, lambda: fired.append(None))
    for _ in range(200):
        QApplication.processEvents()
    qtbot.waitUntil(lambda: bool(fired), timeout=2000)
    assert len(received) == 2000 and all(r is None for r in received)
    del received[:]
    # a broken binding leaks decrements of None's count (and aborts once it reaches zero)
    assert sys.getrefcount(None) >= before - 50
