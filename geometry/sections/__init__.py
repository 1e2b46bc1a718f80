"""Plane and iso-parameter sections of a model, their signed curvature, combs, inflections, extrema.

:class:`SectionEngine` cuts (:mod:`.engine`; marching in :mod:`.march`, curves
in :mod:`.pieces` and :mod:`.iso`); :mod:`.curve_geometry` signs the curvature,
:mod:`.features` finds inflections and extrema, :mod:`.combs` builds combs.
"""

from .combs import curvature_comb, scale_for_longest_tooth
from .engine import SectionEngine, in_plane_axes, parallel_planes, plane_section, section_family
from .results import CurvatureComb, PlaneSection, SectionCurve

__all__ = [
    "CurvatureComb",
    "PlaneSection",
    "SectionCurve",
    "SectionEngine",
    "curvature_comb",
    "in_plane_axes",
    "parallel_planes",
    "plane_section",
    "scale_for_longest_tooth",
    "section_family",
]
