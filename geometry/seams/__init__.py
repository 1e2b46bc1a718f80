"""Seams between faces: which faces meet, and the gap, angle and curvature jump (G0/G1/G2) along them.

:func:`check_seams` measures every seam of a model (:mod:`.check` drives it:
:mod:`.adjacency` finds the pairs, :mod:`.edges` and :mod:`.measures` measure
them, :mod:`.batch` refines the worst points, :mod:`.tolerance` judges them).
"""

from .adjacency import FreeEdge, SeamPair, find_seams
from .check import check_seams
from .results import SeamReport, SeamResult, Worst
from .tolerance import SeamTolerance, classify

__all__ = [
    "FreeEdge",
    "SeamPair",
    "SeamReport",
    "SeamResult",
    "SeamTolerance",
    "Worst",
    "check_seams",
    "classify",
    "find_seams",
]
