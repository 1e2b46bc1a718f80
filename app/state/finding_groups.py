"""The findings as a tree: by kind, then by face (or section curve); every entry's title unique.

Plain data for the findings panel (and tests): the panel draws these groups
and keeps nothing of its own.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, replace

from app.review.result import Kind, Verdict

from .results import FindingEntry

# Kinds whose entries sit under the section curve they lie on rather than under a face.
BY_SECTION = (Kind.INFLECTION, Kind.SECTION_EXTREMUM)
WHOLE_MODEL = "whole model"


def unique_titles(found: list[FindingEntry]) -> list[FindingEntry]:
    """The same entries; titles that read alike get where they are (mm) and, if still alike, a number.

    Two free edges of one face with the same length read "free edge of side,
    110.1 mm" twice: a user cannot tell which is which without the place.
    """
    count = Counter(f.title for f in found)
    placed = [
        f if count[f.title] == 1 else replace(f, title=f"{f.title} near ({', '.join(f'{x:.1f}' for x in f.position)})")
        for f in found
    ]
    count, seen = Counter(f.title for f in placed), Counter()
    out = []
    for f in placed:
        if count[f.title] > 1:
            seen[f.title] += 1
            f = replace(f, title=f"{f.title} #{seen[f.title]}")
        out.append(f)
    return out


def place_of(finding: FindingEntry) -> str:
    """The group an entry sits in under its kind: its face(s) or section curve."""
    if finding.place:
        return finding.place
    head, sep, _ = finding.title.partition(": ")
    return head if sep else WHOLE_MODEL


@dataclass(frozen=True)
class PlaceGroup:
    """Entries of one kind at one place: (index in the session's findings, entry) pairs."""

    place: str
    entries: tuple[tuple[int, FindingEntry], ...]

    @property
    def failing(self) -> int:
        return sum(1 for _, f in self.entries if f.verdict == Verdict.FAIL)


@dataclass(frozen=True)
class KindGroup:
    kind: Kind
    places: tuple[PlaceGroup, ...]

    @property
    def entries(self) -> list[tuple[int, FindingEntry]]:
        return [pair for place in self.places for pair in place.entries]

    @property
    def failing(self) -> int:
        return sum(p.failing for p in self.places)

    @property
    def notes_only(self) -> bool:
        """Nothing judged here: the group starts folded."""
        return all(f.verdict == Verdict.NOTE for _, f in self.entries)


def group_findings(pairs: list[tuple[int, FindingEntry]], kind_order) -> list[KindGroup]:
    """(index, finding) pairs as kind groups (in ``kind_order``), each split by place, failing places first.

    Within a place the session's order (failing first) is kept.
    """
    groups = []
    for kind in kind_order:
        of_kind = [(i, f) for i, f in pairs if f.kind == kind]
        if not of_kind:
            continue
        places: dict[str, list] = {}
        for i, f in of_kind:
            places.setdefault(place_of(f), []).append((i, f))
        built = [PlaceGroup(name, tuple(entries)) for name, entries in places.items()]
        built.sort(key=lambda g: -g.failing)  # stable: otherwise the order they first appear in
        groups.append(KindGroup(kind, tuple(built)))
    return groups
