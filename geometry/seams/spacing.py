"""How densely a seam is sampled: by its length, its bending and the surfaces' knots.

A seam gets the most samples any of these asks for, within a floor and a cap:

- length: no two samples further apart than :data:`MAX_SPACING_MM`;
- bending: the 3-D edge's tangent turns by at most :data:`TURN_PER_SAMPLE_DEG`
  from one sample to the next (the total turning is summed over the seam's
  polyline);
- knots: :data:`PER_SPAN` samples in every knot span of side a's surface (and
  side b's, where the seam's p-curve on b is known) that the seam crosses. A
  B-spline surface is one polynomial (rational) piece per span and is only
  ``C^(p - m)`` across a knot of multiplicity ``m`` (The NURBS Book, 2nd ed.,
  P3.5 and P2.5), so the measures change character at knots and a few samples
  per span see each piece.

The floor, :data:`MIN_SAMPLES`, keeps short, straight seams of one span from
being judged on a handful of points; the maxima are then refined between the
samples (:func:`geometry.seams.batch.refine_maxima_batch`). All values are
common practice for inspecting seams, not from a published source.
"""

from __future__ import annotations

import numpy as np

from ..model.topology import Model
from ..nurbs.compiled_eval import SurfacePack, knot_spans
from ..vectors import dot, unit

# Largest spacing between samples along a seam, mm.
MAX_SPACING_MM = 1.0
# Turning of the edge's tangent between two samples, at most (degrees).
TURN_PER_SAMPLE_DEG = 2.0
# Samples in each knot span the seam crosses.
PER_SPAN = 4
# Fewest and most samples along one seam.
MIN_SAMPLES, MAX_SAMPLES = 17, 4097


def sample_counts(
    lengths: np.ndarray,
    max_spacing: float = MAX_SPACING_MM,
    min_samples: int = MIN_SAMPLES,
    turning: np.ndarray | None = None,
    spans: np.ndarray | None = None,
) -> np.ndarray:
    """Samples per seam, shape (s,).

    Parameters
    ----------
    lengths : ndarray of shape (s,)
        mm.
    max_spacing : float
        Largest spacing, mm.
    min_samples : int
        Fewest samples (at least 3).
    turning : ndarray of shape (s,), optional
        Total turning of each seam's tangent, radians (default 0).
    spans : ndarray of int, shape (s,), optional
        Knot spans each seam crosses (default 1).

    Returns
    -------
    ndarray of int, shape (s,)
    """
    lengths = np.asarray(lengths, float)
    turning = np.zeros_like(lengths) if turning is None else np.asarray(turning, float)
    spans = np.ones_like(lengths) if spans is None else np.asarray(spans, float)
    n = np.maximum.reduce(
        [
            np.ceil(lengths / max_spacing) + 1,
            np.ceil(turning / np.radians(TURN_PER_SAMPLE_DEG)) + 1,
            PER_SPAN * spans + 1,
        ]
    )
    return np.clip(n, max(min_samples, 3), max(MAX_SAMPLES, min_samples)).astype(int)


def _polyline_turning(points: np.ndarray, owner: np.ndarray, n_lines: int) -> np.ndarray:
    """Sum of the angles between consecutive legs of each polyline, radians, shape (n_lines,)."""
    legs = np.diff(points, axis=0)
    same = owner[1:] == owner[:-1]
    legs, leg_owner = legs[same], owner[1:][same]
    length = np.linalg.norm(legs, axis=1)
    keep = length > 0  # repeated vertices turn nothing
    legs, leg_owner = unit(legs[keep]), leg_owner[keep]
    turn_same = leg_owner[1:] == leg_owner[:-1]
    angles = np.arctan2(np.linalg.norm(np.cross(legs[:-1], legs[1:]), axis=1), dot(legs[:-1], legs[1:]))
    return np.bincount(leg_owner[1:][turn_same], angles[turn_same], minlength=n_lines)


def _spans_crossed(pack: SurfacePack, faces: np.ndarray, uv: np.ndarray, owner: np.ndarray, n_lines: int):
    """Knot spans of its face each uv polyline runs through (1 + the knot lines it crosses), shape (n_lines,)."""
    spans = knot_spans(pack, faces, uv[:, 0], uv[:, 1])
    changes = (spans[1:] != spans[:-1]).sum(axis=1) * (owner[1:] == owner[:-1])
    return 1 + np.bincount(owner[1:], changes, minlength=n_lines).astype(int)


def seam_demands(model: Model, pairs) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Length, turning and knot spans crossed of each seam, from its polylines.

    Parameters
    ----------
    model : Model
    pairs : sequence of SeamPair

    Returns
    -------
    lengths : ndarray of shape (s,)
        Of the 3-D polyline, mm.
    turning : ndarray of shape (s,)
        Radians.
    spans : ndarray of int, shape (s,)
        The larger count of the two sides (side b's only where its p-curve runs
        along the seam point for point, as on a shared edge of the file).
    """
    n = len(pairs)
    if n == 0:
        return np.zeros(0), np.zeros(0), np.zeros(0, dtype=int)
    pack = SurfacePack.of([f.surface for f in model.faces])
    points = np.concatenate([p.points for p in pairs])
    owner = np.repeat(np.arange(n), [p.points.shape[0] for p in pairs])
    legs = np.linalg.norm(np.diff(points, axis=0), axis=1) * (owner[1:] == owner[:-1])
    lengths = np.bincount(owner[1:], legs, minlength=n)
    turning = _polyline_turning(points, owner, n)
    uv_a = np.concatenate([p.uv_a for p in pairs])
    owner_a = np.repeat(np.arange(n), [p.uv_a.shape[0] for p in pairs])
    face_a = np.array([p.face_a for p in pairs])[owner_a]
    spans = _spans_crossed(pack, face_a, uv_a, owner_a, n)
    along = [i for i, p in enumerate(pairs) if p.edge >= 0 and p.targets_b[0].shape[0] == p.uv_a.shape[0]]
    if along:
        uv_b = np.concatenate([pairs[i].targets_b[0] for i in along])
        owner_b = np.repeat(np.arange(len(along)), [pairs[i].targets_b[0].shape[0] for i in along])
        face_b = np.array([pairs[i].face_b for i in along])[owner_b]
        spans[along] = np.maximum(spans[along], _spans_crossed(pack, face_b, uv_b, owner_b, len(along)))
    return lengths, turning, spans


__all__ = [
    "MAX_SAMPLES",
    "MAX_SPACING_MM",
    "MIN_SAMPLES",
    "PER_SPAN",
    "TURN_PER_SAMPLE_DEG",
    "sample_counts",
    "seam_demands",
]
