"""How the report says things: numbers with units, counts that name what they count, places, names.

One place for the report's wording, so the tables, the settings and the
captions of the PDF and the HTML read alike. Nothing here knows about HTML
except :class:`Markup` (text already safe to place in the page).
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from html import escape

# Measured values below this are rounding noise of exact joins; tables say so instead of printing 12 digits.
ROUNDING_LEVEL = 1e-9
DIGITS = 4
# Values this small or large print as a power of ten instead of a run of zeros.
SMALL, LARGE = 1e-4, 1e7
_SUPERSCRIPT = str.maketrans("-0123456789", "\u207b\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076\u2077\u2078\u2079")
_AXIS_LABEL = re.compile(r"^([xyz]) = (\S+)$")
# Plural forms that do not just add "s".
_PLURALS = {"inflection": "inflections", "extremum": "extrema", "vertex": "vertices", "axis": "axes"}


class Markup(str):
    """Text that is already HTML (a cell with a superscript, a bold word): placed as it is."""


def html(text) -> str:
    """``text`` escaped for the page, unless it is :class:`Markup` already."""
    return str(text) if isinstance(text, Markup) else escape(str(text))


def number(value, digits: int = DIGITS) -> str:
    """A number for the page: ``digits`` significant digits, never ``-0``, ``-`` when missing.

    Very small or large values read as ``1.38×10⁻⁵`` rather than ``1.38e-05``.
    """
    if value is None:
        return "-"
    try:
        value = float(value)
    except (TypeError, ValueError):
        return str(value)
    if not math.isfinite(value):
        return "-"
    if 0 < abs(value) < ROUNDING_LEVEL:
        return "< 10\u207b\u2079" if value > 0 else "> -10\u207b\u2079"
    if SMALL <= abs(value) < LARGE:
        # plain decimals to ``digits`` significant digits: an area reads 12000 mm², not 1.2×10⁴ mm²
        decimals = digits - 1 - math.floor(math.log10(abs(value)))
        text = f"{round(value, decimals):.{max(decimals, 0)}f}"
        text = text.rstrip("0").rstrip(".") if "." in text else text
    else:
        text = f"{value:.{digits}g}"
    if float(text) == 0.0:
        return "0"  # a rounded -0.0 is zero: no sign
    if "e" in text:
        mantissa, exponent = text.split("e")
        return f"{mantissa}\u00d710{str(int(exponent)).translate(_SUPERSCRIPT)}"
    return text


def quantity(value, unit: str, digits: int = DIGITS) -> str:
    """``0.02 mm``, ``0.1°``, ``5 %``: a number with its unit, as a reader writes it."""
    text = number(value, digits)
    if text == "-":
        return text
    return f"{text}{unit}" if unit in ("°", "%") else f"{text} {unit}"


def plural(count: int, noun: str, many: str | None = None) -> str:
    """``1 face``, ``2 faces``, ``0 inflections``, ``3 extrema``."""
    word = noun if count == 1 else (many or _PLURALS.get(noun) or noun + "s")
    return f"{count} {word}"


def count_words(count: int, noun: str, many: str | None = None) -> str:
    """Like :func:`plural` but ``none`` for zero: ``no inflections`` reads as a sentence."""
    return f"no {many or _PLURALS.get(noun) or noun + 's'}" if count == 0 else plural(count, noun, many)


def point(xyz) -> str:
    """``(12.5, 0, -3.25)``: a position in mm, two decimals at most, no ``-0``."""
    if xyz is None:
        return "-"
    return "(" + ", ".join(_short(c) for c in xyz) + ")"


def direction(vector) -> str:
    return "(" + ", ".join(_short(c, 3) for c in vector) + ")"


def _short(value, decimals: int = 2) -> str:
    text = f"{float(value):.{decimals}f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def face_name(index, names) -> str:
    """The face's name from the file, or ``face N`` (counting from 0, as ``--face N``) when it has none."""
    try:
        name = names[int(index)]
    except (TypeError, ValueError, IndexError):
        return f"face {index}"
    return name or f"face {index}"


def section_name(section: dict, planes: Sequence[str] = ()) -> str:
    """A section plane for people: ``x = 80 mm``, or ``plane 2`` for the second plane given by point and normal.

    ``planes`` are the labels of the check's planes given by point and normal, in
    order (:func:`free_planes`); the settings list them with their point and normal.
    """
    label = str(section.get("label", ""))
    if m := _AXIS_LABEL.match(label):
        return f"{m.group(1)} = {m.group(2)} mm"
    if label in planes:
        return f"plane {list(planes).index(label) + 1}"
    plane = section.get("plane") or {}
    if "point" in plane and "normal" in plane:
        return f"plane through {point(plane['point'])} mm, normal {direction(plane['normal'])}"
    return label.replace(":", " ").replace(",", ", ") or "section"


def free_planes(sections: Sequence[dict]) -> list[str]:
    """Labels of the sections that are not normal to an axis, in order of first appearance."""
    labels = [str(s.get("label", "")) for s in sections]
    return list(dict.fromkeys(label for label in labels if not _AXIS_LABEL.match(label)))


def curve_name(section: dict, curve_index: int, curves_in_section: int, planes: Sequence[str] = ()) -> str:
    """``x = 80 mm`` when the plane cuts one curve, ``x = 80 mm, curve 2`` when it cuts several."""
    name = section_name(section, planes)
    return name if curves_in_section == 1 else f"{name}, curve {curve_index + 1}"
