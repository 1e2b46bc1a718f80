"""The display settings as a plain record, to remember them from one window to the next.

The window keeps the record (JSON) in its settings file; this module only turns
settings into plain values and back. A record from an older or newer Batten,
or a damaged one, never stops the window: fields it does not know are ignored,
values that do not fit are left at the default.
"""

from __future__ import annotations

import dataclasses
from enum import Enum
from typing import Any

from .settings import DisplaySettings, Mode

# Modes that need more than a model to show: started again in the plain shaded view.
NOT_RESTORED = (Mode.DEVIATION,)


def record(settings) -> dict[str, Any]:
    """Plain (JSON-ready) values of a settings dataclass, nested dataclasses included."""
    out: dict[str, Any] = {}
    for f in dataclasses.fields(settings):
        value = getattr(settings, f.name)
        if dataclasses.is_dataclass(value):
            value = record(value)
        elif isinstance(value, Enum):
            value = value.value
        elif isinstance(value, tuple):
            value = list(value)
        out[f.name] = value
    return out


def restored(default, data: Any):
    """``default`` with every field of ``data`` that fits it.

    Parameters
    ----------
    default : dataclass instance
        The settings to start from (its types decide what fits).
    data : Any
        A record from :func:`record`, possibly from another version or damaged.

    Returns
    -------
    The same dataclass type.
    """
    if not isinstance(data, dict):
        return default
    result = default
    for f in dataclasses.fields(default):
        if f.name not in data:
            continue
        current, value = getattr(default, f.name), data[f.name]
        if dataclasses.is_dataclass(current):
            value = restored(current, value)
        elif isinstance(current, tuple) and isinstance(value, list):
            value = tuple(value)
        elif isinstance(current, bool) != isinstance(value, bool):
            continue
        elif isinstance(current, int | float) and not isinstance(value, int | float):
            continue
        try:
            result = dataclasses.replace(result, **{f.name: value})
        except (TypeError, ValueError):
            continue  # the default stays for a value that does not fit
    return result


def restored_display(data: Any, default: DisplaySettings | None = None) -> DisplaySettings:
    """The display settings a record describes (see :func:`restored`); a comparison view starts shaded."""
    display = restored(default or DisplaySettings(), data)
    if display.mode in NOT_RESTORED:
        display = dataclasses.replace(display, mode=Mode.SHADED)
    colours = display.colour_range
    if not colours.auto and not colours.low < colours.high:
        display = dataclasses.replace(display, colour_range=dataclasses.replace(colours, auto=True))
    return display
