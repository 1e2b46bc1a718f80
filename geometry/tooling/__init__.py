"""Tooling release checks on the exact surfaces: draft, zero-draft curves, undercuts, cutter reach."""

from .analysis import FaceMaps, FaceTooling, ToolingAnalysis, UndercutRegion, analyse_tooling
from .cutter import concave_radius, out_of_reach
from .draft import (
    INSUFFICIENT,
    RELEASE_MINUS,
    RELEASE_PLUS,
    DraftField,
    draft_angles,
    draft_at,
    draft_classes,
    draft_on_grid,
    unit_pull,
)
from .pull import least_out_of_draft, principal_axes
from .zero_draft import ZeroDraftCurve, ZeroDraftTracer, zero_draft_curves

__all__ = [
    "INSUFFICIENT",
    "RELEASE_MINUS",
    "RELEASE_PLUS",
    "DraftField",
    "FaceMaps",
    "FaceTooling",
    "ToolingAnalysis",
    "UndercutRegion",
    "ZeroDraftCurve",
    "ZeroDraftTracer",
    "analyse_tooling",
    "concave_radius",
    "draft_angles",
    "draft_at",
    "draft_classes",
    "draft_on_grid",
    "least_out_of_draft",
    "out_of_reach",
    "principal_axes",
    "unit_pull",
    "zero_draft_curves",
]
