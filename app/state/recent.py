"""The list of recently opened files, kept in a small JSON file in the user's config folder."""

from __future__ import annotations

import json
import os
from pathlib import Path

from geometry.errors import WriteError
from geometry.io.files import write_atomically

KEEP = 10


def default_store() -> Path:
    base = os.environ.get("XDG_CONFIG_HOME") or os.path.join(os.path.expanduser("~"), ".config")
    return Path(base) / "batten" / "recent.json"


class RecentFiles:
    """Most recent first, at most :data:`KEEP`, unique by absolute path.

    Parameters
    ----------
    store : path, optional
        The JSON file; ``None`` keeps the list in memory only.
    """

    def __init__(self, store: Path | str | None = None):
        self.store = Path(store) if store is not None else None
        self.paths: list[str] = self._load()

    def _load(self) -> list[str]:
        if self.store is None or not self.store.is_file():
            return []
        try:
            data = json.loads(self.store.read_text(encoding="utf-8"))
        except (OSError, ValueError):
            return []  # a damaged list is not worth an error: start a new one
        return [str(p) for p in data if isinstance(p, str)][:KEEP] if isinstance(data, list) else []

    def add(self, path: str) -> None:
        path = os.path.abspath(path)
        self.paths = [path] + [p for p in self.paths if p != path][: KEEP - 1]
        self._save()

    def remove(self, path: str) -> None:
        path = os.path.abspath(path)
        self.paths = [p for p in self.paths if p != path]
        self._save()

    def clear(self) -> None:
        self.paths = []
        self._save()

    def _save(self) -> None:
        if self.store is None:
            return
        try:
            self.store.parent.mkdir(parents=True, exist_ok=True)
            write_atomically(self.store, json.dumps(self.paths, indent=1))
        except (OSError, WriteError):
            pass  # a read-only home must not stop anyone opening files
