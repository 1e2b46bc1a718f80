"""The sign convention every curvature a user reads follows, in words (written once, see DEVELOPERS.md).

Colour maps (k1, k2, H, K), section curves, their graphs, combs and tables all
take the sign of the normal curvature with respect to the face's unit normal
``(Su x Sv) / |Su x Sv|``, reversed on faces the file marks as reversed.
"""

from __future__ import annotations

CURVATURE_SIGN = (
    "curvature > 0 where the surface bends towards its normal (the normal points out of the side "
    "the file's face orientation gives), < 0 where it bends away; the same sign on maps, sections, "
    "graphs, combs and tables"
)
CURVATURE_SIGN_SHORT = "k > 0: surface bends towards its normal"
