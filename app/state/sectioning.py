"""Section curves and curvature combs for the window, from the core's :mod:`geometry.sections.engine`.

The session keeps one :class:`geometry.sections.engine.SectionEngine` per model (its
grids are built once, off the GUI thread) and asks it for the family of planes
in the section settings: fast (markers interpolated) while the plane is being
dragged, exact (markers by root finding) once it rests.
"""

from __future__ import annotations

import numpy as np

from geometry.sections import (
    CurvatureComb,
    SectionCurve,
    SectionEngine,
    curvature_comb,
    scale_for_longest_tooth,
)

from .settings import SectionSettings


def sections_for(
    engine: SectionEngine | None, settings: SectionSettings, exact: bool
) -> tuple[tuple[SectionCurve, ...], tuple[tuple[int, int], ...]]:
    """Every curve cut by the family of planes in ``settings`` (none when the tool is off).

    Returns
    -------
    curves : tuple of SectionCurve
    where : tuple of (plane, curve) pairs
        Index of each curve's plane in the family and of the curve among that
        plane's curves (both from 0).
    """
    if engine is None or not settings.enabled:
        return (), ()
    family = engine.family(settings.origin, settings.normal, settings.count, settings.spacing, exact=exact)
    kept = [(curve, p) for p, section in enumerate(family) for curve in section.curves if curve.points.shape[0] >= 2]
    where, seen = [], {}
    for _, p in kept:
        where.append((p, seen.get(p, 0)))
        seen[p] = seen.get(p, 0) + 1
    return tuple(c for c, _ in kept), tuple(where)


# At comb gain 1 the longest tooth of the sections on screen is this share of the model size.
COMB_REACH = 0.1
# Sections bent less than this share of the model's typical curvature are flat: the model's stands in.
FLAT_SHARE = 1e-6


def comb_scale(
    model_size: float, typical_curvature: float, gain: float, curves: tuple[SectionCurve, ...] = ()
) -> float:
    """Tooth length per unit curvature (mm^2), for the window and the report alike.

    The longest tooth of ``curves`` is ``gain * COMB_REACH * model_size``
    (common practice: a comb is read by its shape, which must be visible
    whatever the curvature's magnitude); a gently curved section gets teeth as
    long as a tight one's.

    Parameters
    ----------
    model_size : float
        mm.
    typical_curvature : float
        The model's typical |k| (1/mm), see :func:`app.state.loading.typical_curvature`;
        it stands in when the sections are (nearly) straight or there are none,
        0 for a flat model (then 1 / size stands in).
    gain : float
        The user's multiplier (:attr:`SectionSettings.comb_gain`).
    curves : tuple of SectionCurve
        The section curves the combs stand on.
    """
    typical = typical_curvature or 1.0 / max(model_size, 1e-9)
    # a straight curve's |k| is rounding noise: scaled up to a tooth it would draw a comb of noise
    bent = [c for c in curves if c.curvature.size and np.max(np.abs(c.curvature)) > FLAT_SHARE * typical]
    if bent:
        return gain * scale_for_longest_tooth(bent, COMB_REACH * model_size)
    return gain * COMB_REACH * model_size / typical


def combs_for(curves: tuple[SectionCurve, ...], scale: float, spacing: float) -> tuple[CurvatureComb, ...]:
    """Comb of each curve, teeth on the convex side (away from the centre of curvature).

    The one place the comb side is chosen: the window and the report both draw
    these. ``curve.curvature * curve.sides`` points to the centre of curvature
    whatever the sign convention, so a negative scale puts the teeth outside
    (see :func:`geometry.sections.combs.curvature_comb`).
    """
    return tuple(curvature_comb(c, -scale, spacing) for c in curves)
