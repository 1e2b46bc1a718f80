"""Run every analysis of a fairness check on a model, without Qt.

Used by ``batten check`` and by the window's "Export report" alike.
"""

from .result import FAIL, PASS, SCHEMA_VERSION, UNREADABLE, FileReview, Finding, Kind, Verdict, check_document
from .runner import ReviewSettings, review_file, review_model
from .spec import DEFAULT_SPEC, PlaneItem, SpecError, parse_spec, plane_items, plane_spec, spec_text

__all__ = [
    "DEFAULT_SPEC",
    "FAIL",
    "PASS",
    "SCHEMA_VERSION",
    "UNREADABLE",
    "Verdict",
    "FileReview",
    "Finding",
    "Kind",
    "PlaneItem",
    "ReviewSettings",
    "SpecError",
    "check_document",
    "parse_spec",
    "plane_items",
    "plane_spec",
    "review_file",
    "review_model",
    "spec_text",
]
