"""Which files a check covers: named files, folders searched recursively, and glob patterns.

A file named on the command line is checked whatever it is (a missing or
foreign file is reported unreadable, like any bad input); folders and patterns
contribute only STEP and IGES files, so a vault with drawings and notes in it
can be gated as it stands.
"""

from __future__ import annotations

import fnmatch
import glob
import os
from pathlib import PurePath

from geometry.errors import BattenError

EXCHANGE_SUFFIXES = (".stp", ".step", ".igs", ".iges")


def is_exchange_file(path: str) -> bool:
    """True for a STEP or IGES file name (by suffix, any case)."""
    return path.lower().endswith(EXCHANGE_SUFFIXES)


def excluded(path: str, patterns: tuple[str, ...]) -> bool:
    """True when ``path``, its file name or one of its folders matches a pattern (``fnmatch`` rules)."""
    parts = PurePath(path).parts
    return any(fnmatch.fnmatch(path, p) or any(fnmatch.fnmatch(part, p) for part in parts) for p in patterns)


def _in_folder(folder: str) -> list[str]:
    found = []
    for root, dirs, names in os.walk(folder):  # symlinked folders are not followed: no loops
        dirs.sort()
        found.extend(os.path.join(root, n) for n in sorted(names) if is_exchange_file(n))
    return found


def _matching(pattern: str) -> list[str]:
    hits = sorted(glob.glob(pattern, recursive=True))
    files = [h for h in hits if os.path.isfile(h) and is_exchange_file(h)]
    for folder in (h for h in hits if os.path.isdir(h)):
        files.extend(_in_folder(folder))
    return files


def discover(inputs: list[str] | tuple[str, ...], exclude: tuple[str, ...] = ()) -> list[str]:
    """The files to check, in the order given; folders and patterns expand in sorted order.

    Parameters
    ----------
    inputs : sequence of str
        Files, folders and glob patterns (``*``, ``?``, ``[...]``; ``**`` spans folders).
    exclude : tuple of str
        ``fnmatch`` patterns; a file is left out when its path, its name or one of
        its folders matches one.

    Returns
    -------
    list of str
        Each file once (the first time it is reached).

    Raises
    ------
    BattenError
        When a folder or pattern yields no STEP or IGES file, or nothing is left to check.
    """
    files: list[str] = []
    seen: set[str] = set()
    for item in inputs:
        if glob.has_magic(item):
            found, what = _matching(item), "no STEP or IGES file matches"
        elif os.path.isdir(item):
            found, what = _in_folder(item), "the folder holds no STEP or IGES file"
        else:
            found, what = [item], ""
        if not found:
            raise BattenError(f"{item}: {what}")
        for path in found:
            key = os.path.normpath(os.path.abspath(path))
            if key not in seen and not excluded(path, exclude):
                seen.add(key)
                files.append(path)
    if not files:
        raise BattenError("nothing to check: --exclude leaves out every file")
    return files
