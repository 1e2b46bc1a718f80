"""Where the report's cameras stand: directions from the model's principal axes, none edge-on, framed tight.

Views come from the model's principal axes, not the file's x, y, z: a flat
panel lying in any orientation is seen from the side its normals face, an
oblique view shows its shape, and no picture looks at the model edge-on. How
much of the model a direction shows is its projected area: the surface area
facing the camera, each piece counted by the cosine of its angle to the view
(Foley et al., *Computer Graphics*, 2nd ed., sec. 16.1: projected area of a
surface element). Every candidate direction is scored in one matrix product.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

# Oblique views lean this much along the largest and the middle extent (unit: the thinnest direction).
OBLIQUE = (0.55, 0.35)
# A view showing less than this share of the best view's projected area sees the model too nearly
# edge-on to judge a surface by: not shown. Our choice, checked on the samples' pictures.
SLIVER = 0.6
# Components of a view direction smaller than this are left out of its name.
AXIS_WORD = 0.3
# Share of the free picture area (each way) the model's outline fills after framing.
FILL = 0.9


@dataclass(frozen=True)
class View:
    """A camera direction: ``toward`` points from the model to the camera; ``up`` is the picture's up."""

    name: str
    words: str
    toward: np.ndarray
    up: np.ndarray


def principal_axes(points: np.ndarray, weights: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Centre, principal directions and spreads of a point cloud.

    Parameters
    ----------
    points : ndarray of shape (n, 3)
    weights : ndarray of shape (n,), optional
        What each point stands for (the area of its piece of surface); equal if omitted.

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
    weights = np.ones(pts.shape[0]) if weights is None else np.asarray(weights, float).ravel()
    keep = np.isfinite(pts).all(axis=1) & np.isfinite(weights) & (weights > 0)
    pts, weights = pts[keep], weights[keep]
    centre = np.average(pts, axis=0, weights=weights)
    spread = ((pts - centre) * weights[:, None]).T @ (pts - centre) / weights.sum()
    values, vectors = np.linalg.eigh(spread + 1e-12 * np.eye(3))
    order = np.argsort(values)[::-1]
    return centre, vectors[:, order].T, np.sqrt(np.clip(values[order], 0.0, None))


def triangle_patches(
    points: np.ndarray, normals: np.ndarray, triangles: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Centre, unit normal and area of each triangle of a face mesh.

    Parameters
    ----------
    points, normals : ndarray of shape (n, 3)
        Mesh nodes and their exact unit normals (face orientation applied).
    triangles : ndarray of int, shape (t, 3)

    Returns
    -------
    centres : ndarray of shape (t, 3)
    normals : ndarray of shape (t, 3)
        The mean of the corners' exact normals, normalised (the winding plays no part).
    areas : ndarray of shape (t,)
        Half the length of the cross product of two edges.
    """
    corners = np.asarray(points, float)[triangles]
    areas = 0.5 * np.linalg.norm(np.cross(corners[:, 1] - corners[:, 0], corners[:, 2] - corners[:, 0]), axis=1)
    mean = np.nan_to_num(np.asarray(normals, float))[triangles].sum(axis=1)
    length = np.linalg.norm(mean, axis=1, keepdims=True)
    unit = np.divide(mean, length, out=np.zeros_like(mean), where=length > 0)
    return corners.mean(axis=1), unit, np.nan_to_num(areas)


def projected_area(normals: np.ndarray, areas: np.ndarray, towards: np.ndarray) -> np.ndarray:
    """Surface area facing each camera direction, seen in projection: sum of area * max(0, n . toward).

    Parameters
    ----------
    normals : ndarray of shape (t, 3)
    areas : ndarray of shape (t,)
    towards : ndarray of shape (m, 3)
        Unit directions from the model to the camera.

    Returns
    -------
    ndarray of shape (m,)
    """
    return np.clip(np.asarray(normals, float) @ np.asarray(towards, float).T, 0.0, None).T @ np.asarray(areas, float)


def _unit(v) -> np.ndarray:
    v = np.asarray(v, float)
    return v / np.linalg.norm(v, axis=-1, keepdims=True)


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


def choose_views(points: np.ndarray, normals: np.ndarray, areas: np.ndarray | None = None) -> tuple[View, View, View]:
    """An oblique view, a view onto the largest extent and a third view, none of them edge-on.

    Parameters
    ----------
    points, normals : ndarray of shape (n, 3)
        Samples of the model's faces and their unit normals (face orientation
        applied): the mesh's triangles (:func:`triangle_patches`) or grid samples.
    areas : ndarray of shape (n,), optional
        Area each sample stands for; equal if omitted. Weighting by area keeps a
        finely gridded small face from outvoting a coarsely gridded large one.

    Returns
    -------
    tuple of View
        ``oblique`` (the oblique direction showing the most area), ``plan``
        (along the thinnest direction, from the side showing more), and
        ``side``: the axis view along the largest or middle extent showing the
        most area, when it shows at least :data:`SLIVER` of the best view's; else
        the oblique view from the model's other end showing the most.
    """
    normals = np.nan_to_num(np.asarray(normals, float).reshape(-1, 3))
    areas = np.ones(normals.shape[0]) if areas is None else np.asarray(areas, float)
    _, axes, _ = principal_axes(points, areas)
    big, mid, thin = axes
    signs = np.array([(a, b, c) for a in (1, -1) for b in (1, -1) for c in (1, -1)], float)
    obliques = _unit(signs[:, 2:3] * thin + signs[:, 0:1] * OBLIQUE[0] * big + signs[:, 1:2] * OBLIQUE[1] * mid)
    plans = np.stack([thin, -thin])
    sides = np.stack([big, -big, mid, -mid])
    shown = projected_area(normals, areas, np.concatenate([obliques, plans, sides]))
    on_oblique, on_plan, on_side = np.split(shown, [8, 10])
    best = max(float(shown.max()), 1e-300)
    first = int(np.argmax(on_oblique))
    oblique, plan = obliques[first], plans[int(np.argmax(on_plan))]
    if on_side.max() >= SLIVER * best:
        side, side_words = sides[int(np.argmax(on_side))], "side view"
    else:
        # Every axis view sees the model too nearly edge-on: look obliquely from its other end instead.
        other_end = signs[:, 0] != signs[first, 0]
        side = obliques[int(np.argmax(np.where(other_end, on_oblique, -1.0)))]
        side_words = "oblique view"
    world_up = np.array([0.0, 0.0, 1.0])
    return (
        View("oblique", f"oblique view {direction_words(oblique)}", oblique, _up_for(oblique, world_up)),
        View("plan", f"view onto the model {direction_words(plan)}", plan, _up_for(plan, mid)),
        View("side", f"{side_words} {direction_words(side)}", side, _up_for(side, world_up)),
    )


def fit_move(pixels: np.ndarray, free: tuple[float, ...], fill: float = FILL) -> tuple[float, float, float]:
    """How to move a camera so the points' outline fills the free part of the picture.

    Parameters
    ----------
    pixels : ndarray of shape (n, 2)
        The points in the picture now, x right, y down.
    free : (left, top, right, bottom)
        The part of the picture the model may take, pixels (the legend's strip left out).
    fill : float
        Share of the free part's width or height the outline takes, whichever is tighter.

    Returns
    -------
    dx, dy : float
        Pixels the outline's centre must move (right, down) to the free part's centre.
    zoom : float
        Factor to enlarge the picture by (a camera zoom).
    """
    low, high = pixels.min(axis=0), pixels.max(axis=0)
    left, top, right, bottom = free
    target = np.array([(left + right) / 2, (top + bottom) / 2])
    dx, dy = target - (low + high) / 2
    extent = np.maximum(high - low, 1.0)
    zoom = fill * min((right - left) / extent[0], (bottom - top) / extent[1])
    return float(dx), float(dy), float(zoom)
