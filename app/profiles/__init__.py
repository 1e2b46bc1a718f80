"""Tolerance profiles: named TOML files, shipped ones (in this folder) and the user's own.

A profile file holds ``name``, ``title``, ``required`` (G0, G1 or G2), an
optional ``base`` (the name of a shipped profile to start from), a
``[tolerance]`` table and a ``[basis]`` table saying where each value comes
from. The shipped profiles live in ``app/profiles/``; every value in them is
common practice, not a published standard. The geometry layer never sees the
file: :attr:`Profile.tolerance` is the plain :class:`SeamTolerance` it takes.
:class:`Profile` is the one profile type: the review judges with it, the
window shows it and every result echoes :attr:`Profile.values`.

Besides the seam values, ``[tolerance]`` may limit the inflections of each
section curve: ``section_inflections_max`` (a whole number, 0 or more, or
``"none"`` for no limit, the default). The review judges each section curve
against it (:mod:`app.review.findings`); without a limit inflections are
listed and marked, not judged.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, field, fields
from importlib import resources
from pathlib import Path
from types import MappingProxyType

from geometry.errors import ReadError
from geometry.io.files import read_regular
from geometry.seams.tolerance import CLASSES, SeamTolerance

DEFAULT_PROFILE = "class-a"
_SHIPPED = {"class-a": "class_a.toml", "technical": "technical.toml"}
_TOP_KEYS = {"name", "title", "required", "base", "tolerance", "basis", "tooling"}
_NUMBERS = ("position_mm", "tangent_deg", "curvature_relative", "flat_curvature_per_mm", "crease_deg")
# Inflections allowed per section curve (the key app.review.findings reads); "none": no limit.
INFLECTIONS_KEY = "section_inflections_max"
_NO_LIMIT = "none"
_KEYS = (*_NUMBERS, INFLECTIONS_KEY)
# [tooling]: the release checks (geometry.tooling); "none" skips one.
PULL_KEY, DRAFT_KEY, CUTTER_KEY = "pull", "draft_min_deg", "cutter_radius_mm"
TOOLING_KEYS = (PULL_KEY, DRAFT_KEY, CUTTER_KEY)
# Without a [tooling] table: no pull (no draft or undercut check: the pull belongs to each part),
# 1 degree of draft and a 1 mm ball-end cutter, the conservative ends of common practice.
TOOLING_DEFAULTS = MappingProxyType({PULL_KEY: None, DRAFT_KEY: 1.0, CUTTER_KEY: 1.0})
# Open-closed ranges (low, high] of the numbers: finite, and wide enough for any organisation's standard
# (common practice; a 100 mm gap or a 90 degree kink is no longer a tolerance but a different model).
VALUE_RANGES = {
    "position_mm": (0.0, 100.0),
    "tangent_deg": (0.0, 90.0),
    "curvature_relative": (0.0, 100.0),
    "flat_curvature_per_mm": (0.0, 1.0),
    "crease_deg": (0.0, 180.0),
}
# A profile is a few hundred bytes; anything much larger is not one.
MAX_PROFILE_BYTES = 1_000_000


class ProfileError(ReadError):
    """A profile file is missing, not TOML, or holds a value Batten cannot use.

    Same parameters as :class:`ReadError`: the file as the user named it, and the cause.
    """


@dataclass(frozen=True)
class Profile:
    """A named set of seam tolerances.

    Attributes
    ----------
    name, title : str
    path : str
        The file it was read from.
    tolerance : SeamTolerance
        What the seam analysis takes.
    basis : mapping of str to str
        Where each value comes from (e.g. "common practice, no published source").
    section_inflections_max : int or None
        Most inflections a section curve may have; None: no limit (listed, not judged).
    tooling : mapping
        ``pull`` (three floats or None: no draft or undercut check), ``draft_min_deg``
        and ``cutter_radius_mm`` (None: that check is skipped).
    """

    name: str
    title: str
    path: str
    tolerance: SeamTolerance
    basis: MappingProxyType = field(default_factory=lambda: MappingProxyType({}))
    section_inflections_max: int | None = None
    tooling: MappingProxyType = field(default_factory=lambda: TOOLING_DEFAULTS)

    @property
    def values(self) -> dict:
        """Every value, JSON-ready (see :meth:`as_dict`)."""
        return self.as_dict()

    def limit(self, key: str, default: float | None = None) -> float | None:
        """A tolerance by its key in :attr:`values` (None: no limit)."""
        value = self.values.get(key, default)
        return None if value is None else float(value)

    def as_dict(self) -> dict:
        """Plain data, echoed in every report and ``batten check`` result."""
        return {
            "name": self.name,
            "title": self.title,
            "path": self.path,
            **self.tolerance.as_dict(),
            INFLECTIONS_KEY: self.section_inflections_max,
            **{k: (list(v) if isinstance(v, tuple) else v) for k, v in self.tooling.items()},
            "basis": dict(self.basis),
        }


def shipped_names() -> tuple[str, ...]:
    """Names of the profiles that ship with Batten."""
    return tuple(_SHIPPED)


def shipped_path(name: str) -> Path:
    """Path of a shipped profile file."""
    return Path(str(resources.files("app").joinpath("profiles", _SHIPPED[name])))


def _read_toml(path: Path) -> dict:
    try:
        text = read_regular(str(path), MAX_PROFILE_BYTES, "profile").decode("utf-8")
        return tomllib.loads(text)
    except ReadError as exc:
        raise ProfileError(exc.path, "no such profile file" if exc.reason == "no such file" else exc.reason) from None
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as exc:
        raise ProfileError(str(path), f"is not valid TOML ({exc})") from None


def _number(path: Path, key: str, value, allow_none: bool = False):
    if allow_none and value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise ProfileError(str(path), f"[tolerance] {key} must be a number, got {value!r}")
    low, high = VALUE_RANGES[key]
    if not (math.isfinite(value) and low < value <= high):
        raise ProfileError(str(path), f"[tolerance] {key} must be above {low:g} and at most {high:g}, got {value!r}")
    return float(value)


def _count_limit(path: Path, key: str, value) -> int | None:
    """A whole number of 0 or more, or "none" (no limit)."""
    if isinstance(value, str) and value.strip().lower() == _NO_LIMIT:
        return None
    if isinstance(value, bool) or not isinstance(value, int) or value < 0:
        raise ProfileError(str(path), f'[tolerance] {key} must be a whole number >= 0 or "none", got {value!r}')
    return value


def _tooling_value(path: Path, key: str, value):
    """One [tooling] value: "none", a positive number, or for ``pull`` three numbers, not all zero."""
    if isinstance(value, str) and value.strip().lower() == _NO_LIMIT:
        return None
    if key == PULL_KEY:
        ok = isinstance(value, list) and len(value) == 3
        ok = ok and all(isinstance(c, int | float) and not isinstance(c, bool) for c in value)
        if not ok or not all(math.isfinite(c) for c in value) or not any(value):
            raise ProfileError(
                str(path), f'[tooling] pull must be three numbers, not all zero, or "none", got {value!r}'
            )
        return tuple(float(c) for c in value)
    if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(value) or value <= 0:
        raise ProfileError(str(path), f'[tooling] {key} must be a positive number or "none", got {value!r}')
    if key == DRAFT_KEY and value >= 90:
        raise ProfileError(str(path), f"[tooling] {key} must be below 90 degrees, got {value!r}")
    return float(value)


def _tooling(path: Path, table, base, basis: dict) -> MappingProxyType:
    if not isinstance(table, dict):
        raise ProfileError(str(path), "[tooling] must be a table")
    unknown = sorted(set(table) - set(TOOLING_KEYS))
    if unknown:
        expected = ", ".join(TOOLING_KEYS)
        raise ProfileError(str(path), f"unknown [tooling] key(s) {', '.join(unknown)}; expected {expected}")
    values = dict(base)
    for key, value in table.items():
        values[key] = _tooling_value(path, key, value)
        basis.setdefault(key, f"set in {path.name}")
    return MappingProxyType(values)


def read_profile(path: str | Path, _depth: int = 0) -> Profile:
    """Read and check one profile file.

    Parameters
    ----------
    path : str or Path

    Returns
    -------
    Profile

    Raises
    ------
    ProfileError
        Naming the file and what is wrong: unreadable, not TOML, an unknown
        key, a missing value, a value of the wrong type or range.
    """
    path = Path(path)
    data = _read_toml(path)
    unknown = sorted(set(data) - _TOP_KEYS)
    if unknown:
        raise ProfileError(str(path), f"unknown key(s) {', '.join(unknown)}; expected {', '.join(sorted(_TOP_KEYS))}")
    tol_table = data.get("tolerance", {})
    basis_table = data.get("basis", {})
    for table_name, table in (("tolerance", tol_table), ("basis", basis_table)):
        if not isinstance(table, dict):
            raise ProfileError(str(path), f"[{table_name}] must be a table")
    unknown = sorted(set(tol_table) - set(_KEYS))
    if unknown:
        raise ProfileError(str(path), f"unknown [tolerance] key(s) {', '.join(unknown)}; expected {', '.join(_KEYS)}")
    values: dict = {}
    basis: dict = {}
    tooling_base = TOOLING_DEFAULTS
    base_name = data.get("base")
    if base_name is not None:
        if base_name not in _SHIPPED or _depth > 0:
            raise ProfileError(
                str(path), f"base must name a shipped profile ({', '.join(_SHIPPED)}), got {base_name!r}"
            )
        base = read_profile(shipped_path(base_name), _depth + 1)
        values = {f.name: getattr(base.tolerance, f.name) for f in fields(SeamTolerance)}
        values[INFLECTIONS_KEY] = base.section_inflections_max
        basis = dict(base.basis)
        tooling_base = base.tooling
    for key in _NUMBERS:
        if key in tol_table:
            values[key] = _number(path, key, tol_table[key], allow_none=key == "crease_deg")
            basis[key] = str(basis_table.get(key, f"set in {path.name}"))
    if INFLECTIONS_KEY in tol_table:
        values[INFLECTIONS_KEY] = _count_limit(path, INFLECTIONS_KEY, tol_table[INFLECTIONS_KEY])
        basis[INFLECTIONS_KEY] = str(basis_table.get(INFLECTIONS_KEY, f"set in {path.name}"))
    missing = [k for k in _NUMBERS if k not in values and k != "crease_deg"]
    if missing:
        raise ProfileError(str(path), f'[tolerance] is missing {", ".join(missing)} (or give base = "class-a")')
    name = data.get("name", path.stem)
    title = data.get("title", name)
    required = data.get("required", values.get("required"))
    if required not in CLASSES[1:]:
        raise ProfileError(str(path), f"required must be one of G0, G1, G2, got {required!r}")
    for key, value in (("name", name), ("title", title)):
        if not isinstance(value, str) or not value:
            raise ProfileError(str(path), f"{key} must be a non-empty string, got {value!r}")
    if "required" in data:
        basis["required"] = str(basis_table.get("required", f"set in {path.name}"))
    for key, text in basis_table.items():
        basis.setdefault(key, str(text))
    tooling = _tooling(path, data.get("tooling", {}), tooling_base, basis)
    crease = values.get("crease_deg")
    if crease is not None and crease > 180:
        raise ProfileError(str(path), f"[tolerance] crease_deg must be at most 180, got {crease!r}")
    tolerance = SeamTolerance(
        name=name,
        position_mm=values["position_mm"],
        tangent_deg=values["tangent_deg"],
        curvature_relative=values["curvature_relative"],
        flat_curvature_per_mm=values["flat_curvature_per_mm"],
        required=required,
        crease_deg=crease,
        source=str(path),
    )
    return Profile(name, title, str(path), tolerance, MappingProxyType(basis), values.get(INFLECTIONS_KEY), tooling)


def get_profile(name_or_path: str | Path | None = None) -> Profile:
    """A shipped profile by name, or a user's profile file by path.

    Parameters
    ----------
    name_or_path : str or Path, optional
        ``"class-a"``, ``"technical"``, or a path to a ``.toml`` file;
        default :data:`DEFAULT_PROFILE`.

    Returns
    -------
    Profile

    Raises
    ------
    ProfileError
        For an unknown name or a bad file.
    """
    key = DEFAULT_PROFILE if name_or_path is None else str(name_or_path)
    if key.lower() in _SHIPPED:  # names are case-blind: "class-A" is "class-a"
        return read_profile(shipped_path(key.lower()))
    path = Path(key)
    if path.suffix.lower() != ".toml" and not path.exists():
        raise ProfileError(key, f"not a profile name ({', '.join(_SHIPPED)}) nor a .toml file")
    return read_profile(path)
