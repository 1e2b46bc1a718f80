"""Plane sections of a model: typed curves for the findings and the pictures, plain dicts for the JSON."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from geometry.model import Model

# Per-point arrays of a section curve: kept for the pictures, left out of the JSON.
_CURVE_ARRAYS = ("points", "arc_length", "curvature")


@dataclass(frozen=True, eq=False)
class CutSections:
    """Section curves as the findings judge them, from the check or from the window.

    Attributes
    ----------
    labels : tuple of str
        One per plane, as tables and findings name it.
    curves : tuple of geometry.sections.SectionCurve
    places : tuple of (plane, curve) pairs
        Index of each curve's plane in ``labels`` and of the curve among that
        plane's curves (both from 0).
    """

    labels: tuple[str, ...] = ()
    curves: tuple = ()
    places: tuple[tuple[int, int], ...] = ()


def curve_entry(curve) -> dict:
    """A section curve's ``to_json()`` without its per-point arrays (the check's JSON form)."""
    return {k: v for k, v in curve.to_json().items() if k not in _CURVE_ARRAYS}


def cut_sections(model: Model, planes):
    """Plane sections with inflections, extrema and fairness figures (:class:`geometry.sections.engine.SectionEngine`).

    Parameters
    ----------
    model : Model
    planes : sequence of app.review.spec.SectionPlane

    Returns
    -------
    sections : tuple of dict
        One per plane: ``label``, ``family``, ``plane`` and ``curves`` (each
        curve's ``to_json()`` without its per-point arrays).
    curves : tuple of geometry.sections.results.SectionCurve
        The exact curves, for the pictures (the window draws the same type).
    places : tuple of (plane, curve) pairs
        Index of each curve's plane in ``sections`` and of the curve among
        that plane's curves (both from 0), as the window numbers them.
    """
    # Imported here: scipy.spatial behind it costs ~0.3 s, and app.review is imported for `batten --help`.
    from geometry.sections import SectionEngine

    engine = SectionEngine(model)
    entries, sampled, places = [], [], []
    for index, plane in enumerate(planes):
        cut = engine.plane(np.asarray(plane.point), np.asarray(plane.normal))
        curves = []
        for number, curve in enumerate(cut.curves):
            curves.append(curve_entry(curve))
            sampled.append(curve)
            places.append((index, number))
        entries.append(
            {
                "label": plane.label,
                "family": plane.family,
                "plane": {"point": list(plane.point), "normal": list(plane.normal)},
                "curves": curves,
            }
        )
    return tuple(entries), tuple(sampled), tuple(places)
