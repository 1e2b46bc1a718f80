"""Change notification for the session: plain callbacks per topic, no Qt."""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Callable

# Topics a session announces. Widgets subscribe to the ones they show.
TOPICS = (
    "model",
    "display",
    "section",
    "sections",
    "seams",
    "findings",
    "selection",
    "recent",
    "camera",
    "profile",
    "curve",
    "tooling",
    "review",
    "loading",
)


class Notifier:
    """Calls every callback subscribed to a topic when the topic changes.

    Callbacks receive the topic name. A callback that raises does not stop
    the others; its exception is re-raised after all have run, so a bug in one
    widget is not hidden.
    """

    def __init__(self):
        self._callbacks: dict[str, list[Callable[[str], None]]] = defaultdict(list)

    def subscribe(self, topic: str, callback: Callable[[str], None]) -> Callable[[], None]:
        """Register ``callback`` for ``topic``; returns a function that unsubscribes it."""
        if topic not in TOPICS:
            raise ValueError(f"unknown topic {topic!r}; known: {', '.join(TOPICS)}")
        self._callbacks[topic].append(callback)
        return lambda: self._callbacks[topic].remove(callback)

    def emit(self, *topics: str) -> None:
        first_error = None
        for topic in topics:
            for callback in list(self._callbacks[topic]):
                try:
                    callback(topic)
                except Exception as exc:  # keep notifying; re-raise the first afterwards
                    first_error = first_error or exc
        if first_error is not None:
            raise first_error
