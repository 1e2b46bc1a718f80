"""The one place that knows the other analyses' entry points.

Each function here calls a module of the core or the session (sampling,
seams, adjacency, sections, tolerance profiles) and returns plain data. When
a module is not in this build the function says so (``None`` or an
:class:`Unavailable` note) instead of failing, so a check still reports what
it could measure and names what it could not.
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass

import numpy as np

from geometry.model import Model


@dataclass(frozen=True)
class Unavailable:
    """An analysis this build cannot run, and why (shown in JSON and report)."""

    analysis: str
    reason: str


def _module(name: str):
    try:
        return importlib.import_module(name)
    except ModuleNotFoundError as exc:
        if exc.name and name.startswith(exc.name):
            return None
        raise


def model_grids(model: Model, budget: int) -> list[tuple[np.ndarray, np.ndarray, np.ndarray]] | None:
    """Trim-aware (u, v) grids of every face from :mod:`geometry.sampling`, or None without it.

    Returns
    -------
    list of (u, v, inside)
        Per face: ``u`` of shape (a,), ``v`` of shape (b,), ``inside`` bool of shape (a, b).
    """
    sampling = _module("geometry.sampling")
    if sampling is None or not hasattr(sampling, "model_grids"):
        return None
    return [(g.u, g.v, g.inside) for g in sampling.model_grids(model, budget)]


def read_model(path: str) -> Model:
    """The model in ``path`` through :func:`geometry.io.read_model`.

    Raises
    ------
    geometry.errors.ReadError
        When the file cannot be read (or no reader is in this build).
    """
    from geometry.errors import ReadError

    io = _module("geometry.io")
    reader = getattr(io, "read_model", None)
    if reader is None:
        raise ReadError(path, "no STEP/IGES reader in this build")
    return reader(path)


@dataclass(frozen=True)
class ProfileInForce:
    """The tolerance profile a check runs with.

    Attributes
    ----------
    name : str
    values : dict
        Every value of the profile, JSON-ready (echoed in every result).
    source : object
        The profile object of :mod:`app.state.profiles`, for the analyses that take it.
    """

    name: str
    values: dict
    source: object = None

    def limit(self, key: str, default: float | None = None) -> float | None:
        value = self.values.get(key, default)
        return None if value is None else float(value)


DEFAULT_PROFILE = "class-A"
# As in the shipped class-A profile: no inflection per section curve (common practice, no published source).
CLASS_A_INFLECTIONS_MAX = 0


def _fallback_profile(name_or_path: str | None) -> ProfileInForce:
    """A class-A profile from the seam tolerance's own defaults (common practice, no published source)."""
    from geometry.errors import BattenError
    from geometry.seam_tolerance import SeamTolerance

    if name_or_path not in (None, DEFAULT_PROFILE, DEFAULT_PROFILE.lower()):
        raise BattenError(f"profile {name_or_path!r}: only the built-in class-A profile is in this build")
    tolerance = SeamTolerance(name="class-A (built-in)", source="built-in, common practice (no published source)")
    values = {**tolerance.as_dict(), "section_inflections_max": CLASS_A_INFLECTIONS_MAX}
    return ProfileInForce(tolerance.name, values, tolerance)


def load_profile(name_or_path: str | None) -> ProfileInForce:
    """The profile named (shipped name or TOML path), or the default one.

    Raises
    ------
    geometry.errors.BattenError
        Unknown name, unreadable or invalid file.
    """
    profiles = _module("app.state.profiles")
    if profiles is None or not hasattr(profiles, "get_profile"):
        return _fallback_profile(name_or_path)
    profile = profiles.get_profile(name_or_path)
    return ProfileInForce(profile.name, profile.as_dict(), profile.tolerance)


@dataclass(frozen=True, eq=False)
class Line:
    """A polyline to draw in the pictures: a seam or a free edge (never in the JSON)."""

    kind: str  # "seam" or "free_edge"
    verdict: str
    points: np.ndarray


def seams_and_free_edges(model: Model, profile: ProfileInForce):
    """Seams and free edges as the seam analysis's plain dicts.

    Returns
    -------
    seams, free_edges : tuple of dict
        ``SeamResult.as_dict()`` with ``id`` and ``face_names`` added; the free
        edges of ``SeamReport.as_dict()`` with ``id`` and ``face_name``.
    lines : tuple of Line
    not_run : tuple of Unavailable
    """
    module = _module("geometry.seams")
    if module is None or not hasattr(module, "check_seams"):
        return (), (), (), (Unavailable("seams", "the seam analysis (geometry.seams) is not in this build"),)
    report = module.check_seams(model, profile.source)
    names = [f.name or f"face {i}" for i, f in enumerate(model.faces)]
    seams = []
    lines = []
    for i, seam in enumerate(report.seams):
        entry = {"id": i, "face_names": [names[f] for f in seam.faces], **seam.as_dict()}
        seams.append(entry)
        lines.append(Line("seam", seam.verdict, np.asarray(seam.points)))
    free = []
    for i, (edge, entry) in enumerate(zip(report.free_edges, report.as_dict()["free_edges"], strict=True)):
        free.append({"id": i, "face_name": names[edge.face], **entry})
        lines.append(Line("free_edge", "", np.asarray(edge.points)))
    return tuple(seams), tuple(free), tuple(lines), ()


# Per-point arrays of a section curve: kept for the pictures, left out of the JSON.
_CURVE_ARRAYS = ("points", "arc_length", "curvature")
# Section curves shorter than this fraction of the model size are dropped.
MIN_CURVE_FRACTION = 1e-6


def sections(model: Model, planes, profile: ProfileInForce):
    """Plane sections with inflections, extrema and fairness figures.

    Parameters
    ----------
    model : Model
    planes : sequence of app.review.spec.SectionPlane
    profile : ProfileInForce

    Returns
    -------
    sections : tuple of dict
        One per plane: ``label``, ``family``, ``plane`` and ``curves`` (each
        curve's ``to_json()`` without its per-point arrays).
    curves : tuple of app.review.curves.SectionCurve
        Sampled curves for the pictures.
    not_run : tuple of Unavailable
    """
    from .curves import SectionCurve

    module = _module("geometry.sections")
    if module is None or not hasattr(module, "SectionEngine"):
        return (), (), (Unavailable("sections", "the section analysis (geometry.sections) is not in this build"),)
    engine = module.SectionEngine(model)
    entries, sampled = [], []
    for index, plane in enumerate(planes):
        cut = engine.plane(np.asarray(plane.point), np.asarray(plane.normal))
        curves = []
        for curve in cut.curves:
            if curve.length <= MIN_CURVE_FRACTION * model.size:
                continue  # a plane through a face boundary can leave slivers of no length
            data = {k: v for k, v in curve.to_json().items() if k not in _CURVE_ARRAYS}
            curves.append(data)
            sampled.append(
                SectionCurve(
                    section=index,
                    label=plane.label,
                    points=curve.points,
                    curvature=curve.curvature,
                    arc_length=curve.arc_length,
                    side=curve.sides,
                    inflections=curve.inflections.points,
                    extrema=curve.extrema.points,
                )
            )
        entries.append(
            {
                "label": plane.label,
                "family": plane.family,
                "plane": {"point": list(plane.point), "normal": list(plane.normal)},
                "curves": curves,
            }
        )
    return tuple(entries), tuple(sampled), ()
