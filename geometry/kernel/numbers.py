"""Refuse STEP and IGES files whose numbers no design model holds, before the kernel sees them.

A single coordinate of NaN or infinity sends the kernel's transfer into a loop
that does not end (found by mutating sample files); values near the largest
double make it crawl. Both are refused here from the file's text, which costs
one regular-expression pass, instead of waiting for the read time budget.
"""

from __future__ import annotations

import re

from ..errors import ReadError

# No length, parameter or weight of a design model comes near this, in any unit (common practice).
MAX_ABS_NUMBER = 1e100

# STEP strings ('...' with '' for a quote, ISO 10303-21 sec. 6.4.3) are names, not numbers: blanked out first.
_STEP_STRING = re.compile(rb"'(?:[^']|'')*'")
# A number-like token: digits with optional fraction and exponent (E or IGES's D), or the words
# a C library's strtod reads as NaN or infinity. Letters or digits right before it make it part of a name.
_TOKEN = re.compile(
    rb"(?<![A-Za-z0-9_.#$])[+-]?(?:(?:\d+\.?\d*|\.\d+)[EeDd][+-]?\d+|\d{90,}\.?\d*|nan|inf(?:inity)?)(?![A-Za-z0-9_.])",
    re.IGNORECASE,
)


def _bad_value(token: bytes) -> str | None:
    text = token.decode("ascii").upper().replace("D", "E")
    try:
        value = float(text)
    except ValueError:
        return None
    if value != value or value in (float("inf"), float("-inf")):
        return "not a finite number"
    if abs(value) > MAX_ABS_NUMBER:
        return f"beyond any design model (more than {MAX_ABS_NUMBER:.0e} in size)"
    return None


def _iges_parameters(data: bytes) -> bytes:
    """The parameter-data section of an IGES file: columns 1-64 of lines marked ``P`` (IGES 5.3, sec. 2.4)."""
    lines = data.splitlines()
    return b"\n".join(line[:64] for line in lines if line[72:73] == b"P")


def check_numbers(path: str, fmt: str, data: bytes) -> None:
    """Raise when the entities of a STEP or IGES file hold a non-finite or absurd number.

    Parameters
    ----------
    path : str
        For the message.
    fmt : str
        ``"step"`` or ``"iges"``; other formats are not scanned.
    data : bytes
        The whole file.

    Raises
    ------
    ReadError
        Naming the first offending number and its line.
    """
    if fmt == "step":
        text = _STEP_STRING.sub(lambda m: b"'" + b" " * (len(m.group()) - 2) + b"'", data)
    elif fmt == "iges":
        text = _iges_parameters(data)
    else:
        return
    for match in _TOKEN.finditer(text):
        why = _bad_value(match.group())
        if why is not None:
            line = text.count(b"\n", 0, match.start()) + 1
            where = f"line {line}" if fmt == "step" else "parameter data"
            shown = match.group().decode("ascii")
            raise ReadError(path, f"{where} holds the number {shown}, {why}; refused before conversion")
