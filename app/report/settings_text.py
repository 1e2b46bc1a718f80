"""The check's settings as sentences: the tolerance profile in force and the sections cut.

A profile value reads as the requirement it sets, with its value and unit,
never as its key in the profile file. A setting added to profiles later gets
its sentence in :data:`SETTINGS`; until then :func:`setting_sentence` words it
from the key's parts, so no raw key reaches the page.
"""

from __future__ import annotations

from pathlib import Path

from app.review.spec import SpecError, parse_spec

from .wording import number, plural, point, quantity

CONTINUITY = {
    "G0": "G0 (in position)",
    "G1": "G1 (in tangent)",
    "G2": "G2 (in curvature)",
    "G3": "G3 (in curvature and its rate of change)",
}
# Profile entries that describe the profile rather than set a value.
ABOUT_KEYS = ("name", "title", "path", "source", "basis", "base")


def _inflections(value) -> str:
    if value is None:
        return "Inflections of the section curves are listed and marked, not judged: this profile sets no limit."
    if int(value) == 0:
        return "A section curve may have no inflection (a change of the side its curvature bends to)."
    return f"A section curve may have at most {plural(int(value), 'inflection')}."


def _flat(value) -> str:
    radius = 1.0 / float(value) if value else None
    beyond = ""
    if radius and radius >= 1e6:
        beyond = f" (a radius above {quantity(radius / 1e6, 'km')})"
    elif radius and radius >= 1e3:
        beyond = f" (a radius above {quantity(radius / 1e3, 'm')})"
    return f"A curvature below {quantity(value, '1/mm')}{beyond} counts as flat."


# profile key -> sentence of its value (None: no limit).
SETTINGS = {
    "required": lambda v: (
        f"Every seam must be continuous to {CONTINUITY.get(str(v), v)}, unless it is a designed crease."
    ),
    "position_mm": lambda v: f"Faces meet in position (G0) where the gap between them is at most {quantity(v, 'mm')}.",
    "tangent_deg": lambda v: (
        f"Faces meet in tangent (G1) where the angle between their normals is at most {quantity(v, '°')}."
    ),
    "curvature_relative": lambda v: (
        "Faces meet in curvature (G2) where the curvature across the seam jumps by at "
        f"most {quantity(100.0 * float(v), '%')} of the larger of the two curvatures."
    ),
    "flat_curvature_per_mm": _flat,
    "crease_deg": lambda v: (
        f"A seam kinked by at least {quantity(v, '°')} along its whole length is a designed "
        "sharp edge: it only has to meet in position."
    ),
    "section_inflections_max": _inflections,
}
# Units that profile keys end with, for settings without a sentence of their own.
_KEY_UNITS = {"mm": "mm", "deg": "°", "per_mm": "1/mm", "percent": "%", "relative": ""}


def setting_sentence(key: str, value) -> str:
    """One profile value as a sentence a reviewer reads (see :data:`SETTINGS`)."""
    if key in SETTINGS:
        return SETTINGS[key](value)
    words, unit = key.split("_"), ""
    for suffix, name in sorted(_KEY_UNITS.items(), key=lambda kv: -len(kv[0])):
        tail = suffix.split("_")
        if words[-len(tail) :] == tail:
            words, unit = words[: -len(tail)], name
            break
    label = " ".join(words).capitalize()
    if value is None:
        return f"{label}: no limit."
    if isinstance(value, bool):
        return f"{label}: {'yes' if value else 'no'}."
    if isinstance(value, str):
        return f"{label}: {value}."
    return f"{label}: {quantity(value, unit) if unit else number(value)}."


def profile_rows(profile: dict) -> list[tuple[str, str]]:
    """(sentence, basis) for every value of the profile, the required continuity first."""
    basis = profile.get("basis") or {}
    keys = sorted((k for k in profile if k not in ABOUT_KEYS), key=lambda k: k != "required")
    return [(setting_sentence(k, profile[k]), str(basis.get(k) or "not stated")) for k in keys]


def profile_origin(profile: dict) -> str:
    """``Class-A review (visible surfaces), shipped with Batten`` or ``..., read from /path/mine.toml``."""
    from app.profiles import shipped_names, shipped_path

    title = profile.get("title") or profile.get("name") or "unnamed profile"
    path = profile.get("path") or profile.get("source")
    name = profile.get("name")
    if name in shipped_names() and path and Path(path) == shipped_path(name):
        return f"{title}, the profile of that name shipped with Batten"
    return f"{title}, read from {path}" if path else str(title)


def _item_words(item, plane_number: int = 0) -> str:
    axis = "xyz"[item.axis] if item.axis >= 0 else ""
    if item.kind == "count":
        return f"{plural(item.count, 'plane')} normal to the {axis} axis, spread evenly across the model"
    if item.kind == "at":
        values = [number(v) for v in item.values]
        at = values[0] if len(values) == 1 else ", ".join(values[:-1]) + " and " + values[-1]
        return f"{'a plane' if len(item.values) == 1 else 'planes'} normal to the {axis} axis at {axis} = {at} mm"
    p, n = item.values[:3], item.values[3:]
    name = f"plane {plane_number}" if plane_number else "a plane"
    return f"{name} through {point(p)} mm with normal {point(n)}"


def sections_sentence(spec: str) -> str:
    """The sections of a check in words (``--sections`` SPEC, see :mod:`app.review.spec`)."""
    try:
        items = parse_spec(spec or "none")
    except SpecError:
        return f"Sections as given: {spec}."
    if not items:
        return "No sections were cut."
    numbers = iter(range(1, len(items) + 1))
    parts = [_item_words(it, next(numbers) if it.kind == "plane" else 0) for it in items]
    joined = "; ".join(parts)
    return f"Sections cut: {joined}."


def family_words(family: str) -> str:
    """One item of a SPEC (a section family) in words: ``planes normal to the x axis (5, spread evenly)``."""
    try:
        items = parse_spec(family)
    except SpecError:
        return family
    return _item_words(items[0]) if len(items) == 1 else family
