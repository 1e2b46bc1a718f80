"""Sampled section curves, as the report's figures need them."""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np


@dataclass(frozen=True, eq=False)
class SectionCurve:
    """One curve of one plane section, sampled.

    Attributes
    ----------
    section : int
        Index of the plane in the review's ``sections``.
    label : str
        The plane's label (``"x = 40"``).
    points : ndarray of shape (n, 3)
        Along the curve, in mm.
    curvature : ndarray of shape (n,)
        Signed curvature in 1/mm (sign relative to the plane's fixed side).
    arc_length : ndarray of shape (n,)
        Arc length from the first point, mm.
    side : ndarray of shape (n, 3)
        Unit vectors in the plane, normal to the curve, on the side positive
        curvature points to: comb teeth are ``points + scale * curvature * side``.
    inflections : ndarray of shape (i, 3)
    extrema : ndarray of shape (e, 3)
    """

    section: int
    label: str
    points: np.ndarray
    curvature: np.ndarray
    arc_length: np.ndarray
    side: np.ndarray
    inflections: np.ndarray
    extrema: np.ndarray

    def __post_init__(self):
        for f in fields(self):
            value = getattr(self, f.name)
            if isinstance(value, np.ndarray):
                value.setflags(write=False)
