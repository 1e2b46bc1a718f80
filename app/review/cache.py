"""Results of earlier checks, kept by what decides them, so unchanged files are not checked again.

A result is found under a key made of the file's content hash, the tolerance
profile's values, the run's other settings (section SPEC and whatever
:class:`ReviewSettings` gains), any extra inputs a caller names (a review
file's hash, for instance) and the Batten version and JSON schema version. A
change to any of them misses the cache; renaming or moving a file does not.

Entries are pickles written by this user into this user's cache folder; a
folder shared with people you do not trust should not be given as ``--cache``.
Only checked files are stored: a file that could not be read is tried again.
"""

from __future__ import annotations

import hashlib
import json
import os
import pickle
from collections.abc import Callable, Mapping
from dataclasses import asdict, dataclass, replace
from pathlib import Path

from geometry import __version__
from geometry.errors import BattenError

from .result import SCHEMA_VERSION, FileReview
from .runner import ReviewSettings

Writer = Callable[[Path, bytes], object]


def default_cache_dir() -> Path:
    """The user's cache folder for Batten (``$XDG_CACHE_HOME/batten/checks`` on Linux)."""
    from platformdirs import user_cache_dir

    return Path(user_cache_dir("batten", appauthor=False)) / "checks"


def cache_key(
    content_sha256: str,
    settings: ReviewSettings,
    profile_values: Mapping,
    extra: Mapping[str, str] | None = None,
) -> str:
    """Hex key of one file's result.

    Parameters
    ----------
    content_sha256 : str
        Hash of the file's bytes.
    settings : ReviewSettings
        Every field enters the key, so a new setting cannot be forgotten here.
    profile_values : mapping
        The profile in force, resolved (a user TOML that changes changes the key).
    extra : mapping of str to str, optional
        Other inputs that decide the result, e.g. ``{"review_file": sha256}``.
    """
    record = {
        "content": content_sha256,
        "settings": asdict(settings),
        "profile": profile_values,
        "extra": dict(sorted((extra or {}).items())),
        "batten": __version__,
        "schema": SCHEMA_VERSION,
    }
    text = json.dumps(record, sort_keys=True, default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


@dataclass(frozen=True)
class CachedResult:
    review: FileReview
    figures: tuple


class ResultCache:
    """Results by key in a folder (two-level, ``ab/abcdef....pickle``).

    Parameters
    ----------
    folder : path-like
        Created on first store.
    write : callable
        ``write(path, data)`` that writes bytes atomically (no half-written entry
        is ever read back).
    """

    def __init__(self, folder: str | os.PathLike, write: Writer):
        self.folder = Path(folder)
        self._write = write

    def _path(self, key: str) -> Path:
        return self.folder / key[:2] / f"{key}.pickle"

    def load(self, key: str, source: str, need_figures: bool) -> CachedResult | None:
        """The stored result under ``key`` with ``source`` set to the path checked now, or None."""
        try:
            with open(self._path(key), "rb") as fh:
                entry = pickle.load(fh)
        except (OSError, pickle.UnpicklingError, EOFError, AttributeError, ImportError, TypeError, ValueError):
            return None  # absent, or written by an incompatible build: check again
        if not isinstance(entry, CachedResult) or (need_figures and not entry.figures):
            return None
        # a fresh read names the model by its absolute path (geometry.io.read_model); so does a cached one
        return replace(entry, review=replace(entry.review, source=os.path.abspath(source)))

    def store(self, key: str, review: FileReview, figures: tuple) -> None:
        """Keep a checked file's result; a folder that cannot be written only loses the cache."""
        if review.status != "checked":
            return
        path = self._path(key)
        try:
            path.parent.mkdir(parents=True, exist_ok=True)
            self._write(path, pickle.dumps(CachedResult(review, tuple(figures)), protocol=pickle.HIGHEST_PROTOCOL))
        except (OSError, BattenError):
            pass
