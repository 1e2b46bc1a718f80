"""Where the camera stands to show a whole item (a seam, an edge, a section) with a margin round it."""

from __future__ import annotations

import numpy as np

# Share of the view's half-size kept free round a framed item, on its tightest side.
FRAME_MARGIN = 0.15


def enclosing_ball(points: np.ndarray, least_radius: float) -> tuple[np.ndarray, float]:
    """Centre and radius of a ball holding every point: the bounding box's centre and farthest point.

    Parameters
    ----------
    points : ndarray of shape (n, 3)
    least_radius : float
        The ball is never smaller (a single point is shown with its surroundings).

    Returns
    -------
    centre : ndarray of shape (3,)
    radius : float
        At most sqrt(3)/2 of the box diagonal away from optimal, which the margin covers.
    """
    points = np.asarray(points, float).reshape(-1, 3)
    centre = (points.min(axis=0) + points.max(axis=0)) / 2
    radius = float(np.linalg.norm(points - centre, axis=1).max())
    return centre, max(radius, least_radius)


def fit_half_angle(view_angle_deg: float, aspect: float) -> float:
    """Half angle (radians) a fitted ball may fill: the narrower of the view's vertical and horizontal ones.

    Parameters
    ----------
    view_angle_deg : float
        The camera's vertical view angle.
    aspect : float
        Width / height of the (free part of the) view.
    """
    half_v = np.radians(view_angle_deg) / 2
    return float(min(half_v, np.arctan(np.tan(half_v) * aspect)))


def framing(
    points: np.ndarray,
    direction: np.ndarray,
    view_angle_deg: float,
    aspect: float,
    least_radius: float,
    margin: float = FRAME_MARGIN,
) -> tuple[np.ndarray, np.ndarray, float]:
    """Camera focal point, position and parallel scale that show every point, looking along ``direction``.

    The ball round the points must fit the narrower of the view's two angles,
    shrunk by ``margin``: a sphere of radius r seen from distance d under half
    angle a fits when d sin(a) >= r (the sphere's tangent cone).

    Parameters
    ----------
    points : ndarray of shape (n, 3)
    direction : ndarray of shape (3,)
        Viewing direction (from the camera to the focal point), kept.
    view_angle_deg : float
        The camera's vertical view angle.
    aspect : float
        Width / height of the view.
    least_radius : float
        Smallest ball shown (mm).
    margin : float

    Returns
    -------
    focal : ndarray of shape (3,)
    position : ndarray of shape (3,)
    parallel_scale : float
        Half the view's height (mm) for a parallel projection.
    """
    centre, radius = enclosing_ball(points, least_radius)
    direction = np.asarray(direction, float) / max(np.linalg.norm(direction), 1e-300)
    reach = radius / (1.0 - margin)
    distance = reach / np.sin(fit_half_angle(view_angle_deg, aspect))
    return centre, centre - direction * distance, reach / min(1.0, aspect)


def legend_room(view_angle_deg: float, aspect: float, room: float, parallel: bool) -> float:
    """How much farther the camera must stand (or wider a parallel view be) for a fitted model to clear a legend.

    A fitted ball fills the narrower of the view's two half angles. With a
    legend at the right and the picture moved left, only ``room`` of the half
    width is left to it on its tighter side: where the width binds, the ball
    must look smaller by the ratio of the two fits (the tangent cone of
    :func:`framing`, d sin(a) = r).

    Parameters
    ----------
    view_angle_deg : float
        The camera's vertical view angle.
    aspect : float
        Width / height of the view.
    room : float
        Share of the view's half width free on the tighter side of the picture's centre, in (0, 1].
    parallel : bool
        A parallel projection (the scale grows by the ratio of the half sizes).

    Returns
    -------
    float
        1 where the height binds, otherwise > 1.
    """
    if parallel:
        return min(1.0, aspect) / min(1.0, aspect * room)
    return float(np.sin(fit_half_angle(view_angle_deg, aspect)) / np.sin(fit_half_angle(view_angle_deg, aspect * room)))
