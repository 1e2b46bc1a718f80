"""The tolerance profile a check runs with, taken from :mod:`app.state.profiles`."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class ProfileInForce:
    """The tolerance profile a check runs with.

    Attributes
    ----------
    name : str
    values : dict
        Every value of the profile, JSON-ready (echoed in every result).
    source : object
        The profile's seam tolerance (``Profile.tolerance`` of :mod:`app.state.profiles`),
        for the analyses that take it.
    """

    name: str
    values: dict
    source: object = None

    def limit(self, key: str, default: float | None = None) -> float | None:
        value = self.values.get(key, default)
        return None if value is None else float(value)


def load_profile(name_or_path: str | None) -> ProfileInForce:
    """The profile named (shipped name or TOML path), or the default one.

    Raises
    ------
    geometry.errors.BattenError
        Unknown name, unreadable or invalid file.
    """
    # Imported here: app.state imports this module, so a top-level import would be circular.
    from app.state.profiles import get_profile

    profile = get_profile(name_or_path)
    return ProfileInForce(profile.name, profile.as_dict(), profile.tolerance)
