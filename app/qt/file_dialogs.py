"""File dialogs that start in the folder the user last chose a file in, with names from the model."""

from __future__ import annotations

import os

from PySide6.QtWidgets import QFileDialog, QWidget

from .settings_store import WindowMemory


def model_stem(model_path: str | None) -> str:
    """The model file's name without its extension ("model" without one)."""
    stem = os.path.splitext(os.path.basename(model_path or ""))[0]
    return stem or "model"


def report_name(model_path: str | None, suffix: str = ".pdf") -> str:
    """Default report file name: ``<model>-fairness-report.pdf``."""
    return f"{model_stem(model_path)}-fairness-report{suffix}"


def image_name(model_path: str | None, mode: str) -> str:
    """Default image file name: ``<model>-<display mode>.png``."""
    return f"{model_stem(model_path)}-{mode.replace(' ', '-')}.png"


def ask_open(parent: QWidget, memory: WindowMemory, title: str, filters: str, near: str | None = None) -> str:
    """A file to read, chosen in a dialog that starts in the last folder; "" when cancelled."""
    path, _ = QFileDialog.getOpenFileName(parent, title, memory.folder(near), filters)
    memory.remember_folder(path)
    return path


def ask_save(
    parent: QWidget, memory: WindowMemory, title: str, name: str, filters: str, near: str | None = None
) -> str:
    """A file to write, proposed as ``name`` in the last folder; "" when cancelled."""
    path, _ = QFileDialog.getSaveFileName(parent, title, os.path.join(memory.folder(near), name), filters)
    memory.remember_folder(path)
    return path
