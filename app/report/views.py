"""Where the report's cameras stand, and where the finding numbers go in each picture.

Views come from the model's principal axes, not the file's x, y, z: a flat
panel lying in any orientation is seen from the side its normals face, an
oblique view shows its shape, and no picture looks at it edge-on. Numbers whose
markers fall close together in a picture share one label (``1, 4``) instead of
covering each other.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

# Oblique views lean this much along the largest and the middle extent (unit: the thinnest direction).
OBLIQUE = (0.55, 0.35)
# A view whose visible area is below this share of the best view's is an edge-on sliver: not shown.
SLIVER = 0.35
# Labels nearer than this (fraction of the picture height) in both directions share one label.
LABEL_GAP = (0.14, 0.1)
# Components of a view direction smaller than this are left out of its name.
AXIS_WORD = 0.3


@dataclass(frozen=True)
class View:
    """A camera direction: ``toward`` points from the model to the camera; ``up`` is the picture's up."""

    name: str
    words: str
    toward: np.ndarray
    up: np.ndarray


def principal_axes(points: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Centre, principal directions and spreads of a point cloud.

    Parameters
    ----------
    points : ndarray of shape (n, 3)

    Returns
    -------
    centre : ndarray of shape (3,)
    axes : ndarray of shape (3, 3)
        Rows are unit directions, the largest spread first (eigenvectors of the
        covariance matrix: principal component analysis, Jolliffe, *Principal
        Component Analysis*, 2nd ed., sec. 1.1).
    spread : ndarray of shape (3,)
        Standard deviation along each row of ``axes``.
    """
    pts = np.asarray(points, float).reshape(-1, 3)
    pts = pts[np.isfinite(pts).all(axis=1)]
    centre = pts.mean(axis=0)
    values, vectors = np.linalg.eigh(np.cov((pts - centre).T) + 1e-12 * np.eye(3))
    order = np.argsort(values)[::-1]
    return centre, vectors[:, order].T, np.sqrt(np.clip(values[order], 0.0, None))


def visible_area(normals: np.ndarray, toward: np.ndarray) -> float:
    """How much surface faces a camera in direction ``toward`` (sum of positive n . toward).

    Parameters
    ----------
    normals : ndarray of shape (n, 3)
        Unit normals of evenly spread samples, face orientation applied.
    toward : ndarray of shape (3,)
    """
    return float(np.clip(normals @ toward, 0.0, None).sum())


def _unit(v) -> np.ndarray:
    v = np.asarray(v, float)
    return v / np.linalg.norm(v)


def direction_words(toward: np.ndarray) -> str:
    """``from +z`` or ``from +x, -y, +z``: the model axes the camera looks from."""
    parts = [f"{'+' if c > 0 else '-'}{'xyz'[i]}" for i, c in enumerate(toward) if abs(c) >= AXIS_WORD]
    return "from " + ", ".join(parts)


def _up_for(toward: np.ndarray, preferred: np.ndarray) -> np.ndarray:
    for candidate in (preferred, np.array([0.0, 0.0, 1.0]), np.array([0.0, 1.0, 0.0])):
        up = candidate - (candidate @ toward) * toward
        if np.linalg.norm(up) > 0.2:
            return _unit(up)
    return _unit(np.cross(toward, [1.0, 0.0, 0.0]))


def choose_views(points: np.ndarray, normals: np.ndarray) -> tuple[View, View, View]:
    """An oblique view, a view onto the largest extent and a third view, none of them edge-on.

    Parameters
    ----------
    points, normals : ndarray of shape (n, 3)
        Samples of the model's faces and their unit normals (face orientation applied).

    Returns
    -------
    tuple of View
        ``oblique`` (the oblique direction that sees most surface), ``plan``
        (along the thinnest direction, from the side more surface faces), and
        ``side``: the axis view seeing most surface, or when every axis view is
        a sliver, the oblique view from the other side.
    """
    _, axes, _ = principal_axes(points)
    normals = np.nan_to_num(np.asarray(normals, float).reshape(-1, 3))
    big, mid, thin = axes
    world_up = np.array([0.0, 0.0, 1.0])

    def area(v):
        return visible_area(normals, v)

    signs = [(a, b, c) for a in (1, -1) for b in (1, -1) for c in (1, -1)]
    obliques = [_unit(c * thin + a * OBLIQUE[0] * big + b * OBLIQUE[1] * mid) for a, b, c in signs]
    oblique = max(obliques, key=area)
    plan = max((thin, -thin), key=area)
    sides = [big, -big, mid, -mid]
    side = max(sides, key=area)
    if area(side) < SLIVER * max(area(plan), 1e-12):
        # Every axis view sees the model edge-on: look obliquely from the other end instead.
        mirrored = _unit(oblique - 2.0 * (oblique @ big) * big)
        side, side_words = mirrored, "oblique view"
    else:
        side_words = "side view"
    return (
        View("oblique", f"oblique view {direction_words(oblique)}", oblique, _up_for(oblique, world_up)),
        View("plan", f"view onto the model {direction_words(plan)}", plan, _up_for(plan, mid)),
        View("side", f"{side_words} {direction_words(side)}", side, _up_for(side, world_up)),
    )


def screen_positions(points: np.ndarray, position, focal_point, up, view_angle_deg: float) -> np.ndarray:
    """Where points land in a perspective picture, in units of half the picture's height.

    Parameters
    ----------
    points : ndarray of shape (n, 3)
    position, focal_point, up : sequence of 3 floats
        The camera.
    view_angle_deg : float
        Vertical view angle.

    Returns
    -------
    ndarray of shape (n, 2)
        Right and up from the picture's centre.
    """
    forward = _unit(np.subtract(focal_point, position))
    right = _unit(np.cross(forward, up))
    true_up = np.cross(right, forward)
    rel = np.asarray(points, float).reshape(-1, 3) - np.asarray(position, float)
    depth = np.maximum(rel @ forward, 1e-9)
    scale = np.tan(np.radians(view_angle_deg) / 2.0)
    return np.column_stack([rel @ right, rel @ true_up]) / (depth * scale)[:, None]


def merge_labels(screen: np.ndarray, labels: list[str]) -> list[tuple[int, str]]:
    """Labels that would overlap in the picture, joined: ``[(index of the anchor point, "1, 4"), ...]``.

    Parameters
    ----------
    screen : ndarray of shape (n, 2)
        Picture positions (:func:`screen_positions`).
    labels : list of str
        One per point, in reading order.
    """
    screen = np.asarray(screen, float).reshape(-1, 2)
    close = (np.abs(screen[:, None, :] - screen[None, :, :]) < LABEL_GAP).all(axis=2)
    anchor_of = np.full(len(labels), -1)
    for i in range(len(labels)):  # one pass per label group, in reading order
        if anchor_of[i] < 0:
            anchor_of[close[i] & (anchor_of < 0)] = i
    return [(int(a), ", ".join(labels[j] for j in np.flatnonzero(anchor_of == a))) for a in dict.fromkeys(anchor_of)]
