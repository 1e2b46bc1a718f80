"""What the window remembers between sessions: its geometry, the display settings, the last folder.

Kept with QSettings in an INI file in the user's config folder
(``$XDG_CONFIG_HOME/batten/window.ini``, next to the recent-files list), so a
test that points ``XDG_CONFIG_HOME`` at a temporary folder never touches the
user's file.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

from PySide6.QtCore import QByteArray, QSettings

from app.state.recent import default_store
from app.state.remembered import record, restored_display
from app.state.settings import DisplaySettings


def default_settings_file() -> Path:
    return default_store().with_name("window.ini")


class WindowMemory:
    """The window's remembered settings.

    Parameters
    ----------
    path : path-like, optional
        The INI file (default: :func:`default_settings_file`).
    """

    def __init__(self, path: str | os.PathLike | None = None):
        self.path = Path(path) if path is not None else default_settings_file()
        self._qs = QSettings(str(self.path), QSettings.Format.IniFormat)

    def sync(self) -> None:
        """Write what changed to the file now (Qt also does it on its own)."""
        self._qs.sync()

    # -- window layout ---------------------------------------------------
    def save_layout(self, geometry: QByteArray, state: QByteArray) -> None:
        self._qs.setValue("window/geometry", geometry)
        self._qs.setValue("window/state", state)

    def layout(self) -> tuple[QByteArray | None, QByteArray | None]:
        """(geometry, dock and toolbar state) as saved by Qt, or None each when there is none."""
        return self._bytes("window/geometry"), self._bytes("window/state")

    def _bytes(self, key: str) -> QByteArray | None:
        value = self._qs.value(key)
        return value if isinstance(value, QByteArray) and not value.isEmpty() else None

    # -- display ---------------------------------------------------------
    def save_display(self, display: DisplaySettings) -> None:
        self._qs.setValue("display/settings", json.dumps(record(display)))

    def display(self) -> DisplaySettings | None:
        """The last display settings, or None when none were saved (or they cannot be read)."""
        text = self._qs.value("display/settings")
        if not isinstance(text, str):
            return None
        try:
            return restored_display(json.loads(text))
        except ValueError:
            return None

    def save_parallel(self, parallel: bool) -> None:
        self._qs.setValue("view/parallel", "true" if parallel else "false")

    def parallel(self) -> bool:
        return str(self._qs.value("view/parallel", "false")).lower() == "true"

    # -- folders ---------------------------------------------------------
    def remember_folder(self, chosen: str) -> None:
        """Keep the folder of a file the user just chose."""
        if chosen:
            self._qs.setValue("files/last_folder", os.path.dirname(os.path.abspath(chosen)))

    def folder(self, fallback: str | None = None) -> str:
        """The folder the last file dialog ended in, if it still exists; else ``fallback``'s or home."""
        last = self._qs.value("files/last_folder")
        if isinstance(last, str) and os.path.isdir(last):
            return last
        if fallback and os.path.isdir(os.path.dirname(os.path.abspath(fallback))):
            return os.path.dirname(os.path.abspath(fallback))
        return os.path.expanduser("~")
