"""Batten's review file: the reviewers' dispositions of findings, as plain text.

The file sits beside the model and is meant to live in version control, so
it is line based, sorted and free of anything that changes between runs::

    batten review 1
    # comment lines start with '#'
    place tolerance mm: 1

    finding: seam | visor_bend / visor_flat | 0 60 0
    measure: curvature jump
    value: 1
    decision: accepted
    reason: the soft break is the design's; agreed with tooling
    reviewer: Ada Example
    date: 2026-12-02

One block per disposition, blocks separated by blank lines. ``finding`` is the
finding's identity (:mod:`app.review.identity`): kind, face names joined by
``/``, and the anchor's x y z in mm (``-`` when it has none). ``measure`` and
``value`` record what the reviewer saw; ``decision`` is ``accepted`` (a
``reason`` is then required) or ``to fix``; ``date`` is YYYY-MM-DD.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from datetime import date as _date

from geometry.errors import BattenError

from .identity import PLACE_TOLERANCE_MM, FindingKey

HEADER = "batten review 1"
ACCEPTED, TO_FIX = "accepted", "to fix"
DECISIONS = (ACCEPTED, TO_FIX)
_KEYS = ("finding", "measure", "value", "decision", "reason", "reviewer", "date")
_TOLERANCE_KEY = "place tolerance mm"


@dataclass(frozen=True)
class Disposition:
    """One reviewer's decision on one finding.

    Attributes
    ----------
    key : FindingKey
    decision : str
        :data:`ACCEPTED` or :data:`TO_FIX`.
    reason : str
        Why (required for an accepted finding).
    reviewer : str
    date : str
        ISO date, YYYY-MM-DD.
    measure : str
    value : float or None
        What the finding measured when the decision was made.
    """

    key: FindingKey
    decision: str
    reviewer: str
    date: str
    reason: str = ""
    measure: str = ""
    value: float | None = None

    def to_dict(self) -> dict:
        return {
            "finding": self.key.label,
            "kind": self.key.kind,
            "faces": list(self.key.faces),
            "anchor": None if self.key.anchor is None else list(self.key.anchor),
            "decision": self.decision,
            "reason": self.reason,
            "reviewer": self.reviewer,
            "date": self.date,
            "measure": self.measure,
            "value": self.value,
        }


@dataclass(frozen=True)
class ReviewFile:
    """Every disposition of a model's findings, and the tolerance they are re-found with."""

    dispositions: tuple[Disposition, ...] = ()
    place_tolerance_mm: float = PLACE_TOLERANCE_MM
    source: str = field(default="", compare=False)

    @property
    def reviewers(self) -> tuple[str, ...]:
        """Names of the reviewers, in order of first appearance."""
        return tuple(dict.fromkeys(d.reviewer for d in self.dispositions))

    def with_disposition(self, new: Disposition) -> ReviewFile:
        """A copy where ``new`` replaces any disposition of the same finding by the same reviewer."""
        kept = tuple(d for d in self.dispositions if not (d.key == new.key and d.reviewer == new.reviewer))
        return ReviewFile((*kept, new), self.place_tolerance_mm, self.source)

    def without(self, key: FindingKey) -> ReviewFile:
        return ReviewFile(tuple(d for d in self.dispositions if d.key != key), self.place_tolerance_mm, self.source)


def _number(x: float) -> str:
    return f"{x:.6g}" if x != 0 else "0"


def _finding_line(key: FindingKey) -> str:
    at = "-" if key.anchor is None else " ".join(_number(round(c, 6)) for c in key.anchor)
    return f"{key.kind} | {' / '.join(key.faces)} | {at}"


def dumps(review: ReviewFile) -> str:
    """The file's text: header, tolerance, then the blocks sorted by finding, reviewer and date."""
    lines = [HEADER, f"{_TOLERANCE_KEY}: {_number(review.place_tolerance_mm)}"]
    order = sorted(review.dispositions, key=lambda d: (_finding_line(d.key), d.reviewer, d.date))
    for d in order:
        lines.append("")
        lines.append(f"finding: {_finding_line(d.key)}")
        if d.measure:
            lines.append(f"measure: {d.measure}")
        if d.value is not None:
            lines.append(f"value: {_number(d.value)}")
        lines.append(f"decision: {d.decision}")
        if d.reason:
            lines.append(f"reason: {_one_line(d.reason)}")
        lines.append(f"reviewer: {_one_line(d.reviewer)}")
        lines.append(f"date: {d.date}")
    return "\n".join(lines) + "\n"


def _one_line(text: str) -> str:
    return " ".join(str(text).split())


class _Reader:
    def __init__(self, source: str):
        self.source = source or "review file"

    def fail(self, line: int, why: str) -> BattenError:
        return BattenError(f"{self.source}: line {line}: {why}")

    def key(self, text: str, line: int) -> FindingKey:
        parts = [p.strip() for p in text.split("|")]
        if len(parts) != 3 or not parts[0] or not parts[1]:
            raise self.fail(line, "finding must read 'KIND | FACE / FACE | X Y Z' (or '-' for no place)")
        faces = tuple(sorted(f.strip() for f in parts[1].split(" / ") if f.strip()))
        if parts[2] == "-":
            return FindingKey(parts[0], faces, None)
        try:
            xyz = tuple(float(c) for c in parts[2].split())
        except ValueError:
            xyz = ()
        if len(xyz) != 3:
            raise self.fail(line, f"the finding's place must be three numbers, got '{parts[2]}'")
        return FindingKey(parts[0], faces, xyz)

    def block(self, entries: dict[str, tuple[int, str]], first: int) -> Disposition:
        for needed in ("finding", "decision", "reviewer", "date"):
            if needed not in entries:
                raise self.fail(first, f"the block has no '{needed}:' line")
        decision = entries["decision"][1]
        if decision not in DECISIONS:
            raise self.fail(entries["decision"][0], f"decision must be 'accepted' or 'to fix', got '{decision}'")
        reason = entries.get("reason", (0, ""))[1]
        if decision == ACCEPTED and not reason:
            raise self.fail(first, "an accepted finding needs a 'reason:' line")
        line, day = entries["date"]
        try:
            _date.fromisoformat(day)
        except ValueError:
            raise self.fail(line, f"date must be YYYY-MM-DD, got '{day}'") from None
        value = None
        if "value" in entries:
            line, text = entries["value"]
            try:
                value = float(text)
            except ValueError:
                raise self.fail(line, f"value must be a number, got '{text}'") from None
        return Disposition(
            key=self.key(entries["finding"][1], entries["finding"][0]),
            decision=decision,
            reviewer=entries["reviewer"][1],
            date=day,
            reason=reason,
            measure=entries.get("measure", (0, ""))[1],
            value=value,
        )


_LINE = re.compile(r"^([a-z][a-z ]*):\s*(.*)$")


def loads(text: str, source: str = "") -> ReviewFile:
    """Read a review file's text.

    Raises
    ------
    BattenError
        Naming the file and line, for anything that is not a well-formed review file.
    """
    reader = _Reader(source)
    lines = text.splitlines()
    if not lines or lines[0].strip() != HEADER:
        raise reader.fail(1, f"not a Batten review file (the first line must be '{HEADER}')")
    tolerance = PLACE_TOLERANCE_MM
    blocks: list[tuple[int, dict[str, tuple[int, str]]]] = []
    current: dict[str, tuple[int, str]] | None = None
    for number, raw in enumerate(lines[1:], start=2):
        line = raw.strip()
        if line.startswith("#"):
            continue
        if not line:
            current = None
            continue
        match = _LINE.match(line)
        if not match:
            raise reader.fail(number, f"expected 'key: value', got '{line}'")
        key, value = match.group(1).strip(), match.group(2).strip()
        if key == _TOLERANCE_KEY and current is None:
            try:
                tolerance = float(value)
            except ValueError:
                raise reader.fail(number, f"the place tolerance must be a number of mm, got '{value}'") from None
            if not tolerance > 0:
                raise reader.fail(number, "the place tolerance must be positive")
            continue
        if key not in _KEYS:
            raise reader.fail(number, f"unknown key '{key}' (known: {', '.join(_KEYS)})")
        if current is None:
            if key != "finding":
                raise reader.fail(number, "a block must start with a 'finding:' line")
            current = {}
            blocks.append((number, current))
        if key in current:
            raise reader.fail(number, f"'{key}:' appears twice in one block")
        current[key] = (number, value)
    return ReviewFile(tuple(reader.block(entries, first) for first, entries in blocks), tolerance, source)


def read_review_text(path: str) -> str:
    """The text of a review file, checked to be well formed.

    Raises
    ------
    BattenError
        A missing, unreadable or malformed file (naming the file and line).
    """
    try:
        with open(path, encoding="utf-8") as fh:
            text = fh.read()
    except FileNotFoundError:
        raise BattenError(f"{path}: review file not found") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise BattenError(f"{path}: cannot read the review file ({exc})") from None
    loads(text, path)
    return text


def read_review_file(path: str) -> ReviewFile:
    """Read a review file from disk (see :func:`read_review_text` for the errors)."""
    return loads(read_review_text(path), path)
