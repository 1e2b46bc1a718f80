"""Curvature combs: teeth normal to a curve, as long as its curvature times a scale.

A tooth stands at a point P of the curve along the side vector N the signed
curvature k refers to, and ends at ``P + scale * k * N``. Where k changes sign
the teeth change side, so an inflection shows as the comb crossing its curve;
the envelope (the polyline through the tips) shows how evenly k varies.
"""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np

from .results import CurvatureComb, SectionCurve


def curvature_comb(curve: SectionCurve, scale: float, spacing: float | None = None) -> CurvatureComb:
    """The comb of one curve.

    Parameters
    ----------
    curve : SectionCurve
    scale : float
        mm of tooth per 1/mm of curvature; negative draws the teeth on the
        convex side (away from the centre of curvature).
    spacing : float, optional
        Arc length between teeth in mm. Default: a tooth at every curve
        point (whose spacing the :class:`~geometry.sections.engine.SectionEngine`
        sets). Otherwise teeth sit at ``0, spacing, 2 spacing, ...`` and the
        curve's exact samples are interpolated linearly to them: ask the engine
        for a finer point spacing when the teeth must be exact.

    Returns
    -------
    CurvatureComb
    """
    s = curve.arc_length
    if spacing is None or s.size < 2:
        roots, k, sides, at = curve.points, curve.curvature, curve.sides, s
    else:
        at = np.arange(0.0, curve.length, float(spacing))
        if curve.length - at[-1] > 1e-9 * max(curve.length, 1.0):
            at = np.append(at, curve.length)
        roots = np.stack([np.interp(at, s, curve.points[:, i]) for i in range(3)], axis=1)
        k = np.interp(at, s, curve.curvature)
        sides = np.stack([np.interp(at, s, curve.sides[:, i]) for i in range(3)], axis=1)
        sides /= np.linalg.norm(sides, axis=1, keepdims=True)
    tips = roots + (scale * k)[:, None] * sides
    return CurvatureComb(roots, tips, at, k, float(scale), bool(curve.closed))


def scale_for_longest_tooth(curves: Iterable[SectionCurve], longest_tooth: float) -> float:
    """The scale at which the longest tooth over ``curves`` is ``longest_tooth`` mm (1.0 if all are straight)."""
    peak = max((float(np.max(np.abs(c.curvature))) for c in curves if c.curvature.size), default=0.0)
    return longest_tooth / peak if peak > 0 else 1.0
