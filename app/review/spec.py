"""The ``--sections`` language: which plane sections a check cuts.

A SPEC is one or more items separated by ``;``:

``x:5``
    five planes normal to the x axis, evenly spaced across the model's
    bounding box (at 1/6, 2/6, ... 5/6 of its extent; ``y`` and ``z`` likewise);
``y=-20,0,35.5``
    planes normal to y at these coordinates, in mm;
``plane:PX,PY,PZ,NX,NY,NZ``
    one plane through the point (PX, PY, PZ) with normal (NX, NY, NZ);
``none``
    no sections.

Example: ``--sections "x:5;plane:0,0,10,0,1,1"``.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from geometry.errors import BattenError

AXES = {"x": 0, "y": 1, "z": 2}
DEFAULT_SPEC = "x:5;y:5"
MAX_PLANES = 200  # more sections than this make a report nobody reads

_COUNT = re.compile(r"^([xyz]):(\d+)$")
_AT = re.compile(r"^([xyz])=(.+)$")
_PLANE = re.compile(r"^plane:(.+)$")


class SpecError(BattenError):
    """A ``--sections`` SPEC that does not parse."""


@dataclass(frozen=True)
class PlaneItem:
    """One item of a SPEC before it meets a model.

    ``kind`` is ``"count"`` (axis, count), ``"at"`` (axis, offsets) or
    ``"plane"`` (point and normal in ``values``).
    """

    kind: str
    axis: int = -1
    count: int = 0
    values: tuple[float, ...] = ()
    text: str = ""


@dataclass(frozen=True)
class SectionPlane:
    """A plane to cut, with the label used in tables and figures."""

    label: str
    family: str
    point: tuple[float, float, float]
    normal: tuple[float, float, float]


def _floats(text: str, item: str) -> tuple[float, ...]:
    try:
        values = tuple(float(t) for t in text.split(","))
    except ValueError:
        raise SpecError(f"sections: '{item}' holds a value that is not a number") from None
    if not all(np.isfinite(values)):
        raise SpecError(f"sections: '{item}' holds a value that is not finite")
    return values


def parse_spec(spec: str) -> tuple[PlaneItem, ...]:
    """Parse a SPEC (see the module docstring) into plane items.

    Raises
    ------
    SpecError
        With the offending item named.
    """
    items: list[PlaneItem] = []
    for raw in spec.replace(" ", "").lower().split(";"):
        if not raw or raw == "none":
            continue
        if m := _COUNT.match(raw):
            count = int(m.group(2))
            if not 1 <= count <= MAX_PLANES:
                raise SpecError(f"sections: '{raw}' asks for {count} planes; use 1 to {MAX_PLANES}")
            items.append(PlaneItem("count", AXES[m.group(1)], count, text=raw))
        elif m := _AT.match(raw):
            items.append(PlaneItem("at", AXES[m.group(1)], values=_floats(m.group(2), raw), text=raw))
        elif m := _PLANE.match(raw):
            values = _floats(m.group(1), raw)
            if len(values) != 6:
                raise SpecError(f"sections: '{raw}' needs six numbers: point x,y,z and normal x,y,z")
            if np.linalg.norm(values[3:]) == 0:
                raise SpecError(f"sections: '{raw}' has a zero normal")
            items.append(PlaneItem("plane", values=values, text=raw))
        else:
            raise SpecError(
                f"sections: cannot read '{raw}'; write e.g. 'x:5', 'y=0,25' or 'plane:0,0,0,0,0,1' (see --help)"
            )
    total = sum(1 if it.kind == "plane" else it.count or len(it.values) for it in items)
    if total > MAX_PLANES:
        raise SpecError(f"sections: {total} planes asked for; at most {MAX_PLANES}")
    return tuple(items)


def planes_for(items: tuple[PlaneItem, ...], bounds: np.ndarray) -> tuple[SectionPlane, ...]:
    """The planes of parsed items for a model with this bounding box.

    Parameters
    ----------
    items : tuple of PlaneItem
    bounds : ndarray of shape (2, 3)
        Minimum and maximum corner of the model (:attr:`geometry.model.Model.bounds`).

    Returns
    -------
    tuple of SectionPlane
    """
    lo, hi = np.asarray(bounds, float)
    centre = 0.5 * (lo + hi)
    planes: list[SectionPlane] = []
    for item in items:
        if item.kind == "plane":
            p, n = item.values[:3], np.asarray(item.values[3:]) / np.linalg.norm(item.values[3:])
            planes.append(SectionPlane(item.text, item.text, p, tuple(float(c) for c in n)))
            continue
        name = "xyz"[item.axis]
        if item.kind == "count":
            fractions = np.arange(1, item.count + 1) / (item.count + 1)
            offsets = lo[item.axis] + fractions * (hi[item.axis] - lo[item.axis])
        else:
            offsets = np.asarray(item.values)
        normal = tuple(float(i == item.axis) for i in range(3))
        for offset in offsets:
            point = centre.copy()
            point[item.axis] = offset
            planes.append(SectionPlane(f"{name} = {offset:.4g}", item.text, tuple(float(c) for c in point), normal))
    return tuple(planes)


def plane_items(planes) -> tuple[PlaneItem, ...]:
    """The window's planes as typed items, exactly (no round trip through text).

    Parameters
    ----------
    planes : iterable of (point, normal)
        Each a sequence of 3 floats.

    Returns
    -------
    tuple of PlaneItem
        ``"plane"`` items; each ``text`` is the SPEC item naming it (for the JSON and the report).

    Raises
    ------
    SpecError
        For a value that is not finite or a zero normal.
    """
    items = []
    for point, normal in planes:
        values = tuple(float(c) for c in (*point, *normal))
        text = "plane:" + ",".join(f"{c:.12g}" for c in values)
        if len(values) != 6 or not all(np.isfinite(values)):
            raise SpecError(f"sections: '{text}' needs six finite numbers: point x,y,z and normal x,y,z")
        if np.linalg.norm(values[3:]) == 0:
            raise SpecError(f"sections: '{text}' has a zero normal")
        items.append(PlaneItem("plane", values=values, text=text))
    return tuple(items)


def section_items(sections: str | tuple[PlaneItem, ...]) -> tuple[PlaneItem, ...]:
    """The items of a check's sections: a SPEC is parsed (command line); typed items pass as they are (window)."""
    return parse_spec(sections) if isinstance(sections, str) else tuple(sections)


def spec_text(sections: str | tuple[PlaneItem, ...]) -> str:
    """The SPEC that names a check's sections (the ``sections_spec`` of the JSON), ``"none"`` for no plane."""
    if isinstance(sections, str):
        return sections
    return ";".join(item.text for item in sections) or "none"


def plane_spec(planes) -> str:
    """``"plane:...;plane:..."`` naming the planes of :func:`plane_items`, ``"none"`` for none (scripts)."""
    return spec_text(plane_items(planes))
