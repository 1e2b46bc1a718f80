"""Scalar fields for reading a surface through light: reflection lines, highlight lines, isophotes.

Each function returns a *continuous* stripe parameter per sample. The light
stripes sit where the parameter divided by the stripe spacing is an integer, so
a renderer makes them sharp at any resolution by using the parameter as a 1-D
texture coordinate (or evaluating the stripe per fragment), never by colouring
vertices.

All inputs are arrays of samples with the component axis last: ``points`` and
``normals`` of shape (..., 3). Normals are unit normals with the face orientation
applied (see :mod:`geometry.nurbs.differential`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .vectors import unit

# Below this |sin| between a direction and the light-line direction the stripe
# parameter is undefined (the normal or ray runs along the lights).
PARALLEL_SINE = 1e-9


def light_frame(line_direction: np.ndarray, plane_normal: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """An orthonormal frame for a family of parallel light lines lying in a plane.

    Parameters
    ----------
    line_direction : ndarray of shape (3,)
        Direction of the light lines.
    plane_normal : ndarray of shape (3,)
        Normal of the plane holding the lines; its component along the lines is removed.

    Returns
    -------
    along, across, normal : ndarray of shape (3,)
        ``along`` the lines, ``across`` them in the plane, ``normal`` to the plane;
        right-handed (``across = normal x along``).
    """
    along = unit(line_direction)
    normal = np.asarray(plane_normal, dtype=float)
    normal = unit(normal - np.dot(normal, along) * along)
    across = np.cross(normal, along)
    return along, across, normal


@dataclass(frozen=True)
class LightPlane:
    """A family of parallel light lines in one plane.

    Attributes
    ----------
    direction : tuple of 3 floats
        Direction of the lines.
    normal : tuple of 3 floats
        Normal of their plane.
    point : tuple of 3 floats
        A point of the plane; the light line through it has parameter 0.
    """

    direction: tuple[float, float, float]
    normal: tuple[float, float, float]
    point: tuple[float, float, float]

    def frame(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(along, across, normal) unit vectors, see :func:`light_frame`."""
        return light_frame(self.direction, self.normal)


def _pierce(points: np.ndarray, directions: np.ndarray, lights: LightPlane, forward_only: bool) -> np.ndarray:
    """Across-coordinate where the lines ``P + t d`` meet the light plane, shape (...); NaN if they do not.

    ``t = (A - P) . h / (d . h)``; with ``forward_only`` only ``t > 0`` counts (a ray, not a line).
    """
    _, across, normal = lights.frame()
    origin = np.asarray(lights.point, float)
    towards = directions @ normal
    meets = np.abs(towards) > PARALLEL_SINE
    reach = ((origin - points) @ normal) / np.where(meets, towards, 1.0)
    if forward_only:
        meets &= reach > 0
    return np.where(meets, (points + reach[..., None] * directions - origin) @ across, np.nan)


def isophote_angle(normals: np.ndarray, light_direction: np.ndarray) -> np.ndarray:
    """Angle between the surface normal and a light direction, in degrees.

    Parameters
    ----------
    normals : ndarray of shape (..., 3)
        Unit normals.
    light_direction : ndarray of shape (3,)
        Direction towards the light (normalised here).

    Returns
    -------
    angle : ndarray of shape (...)
        In [0, 180]; isophotes are its level sets.

    Notes
    -----
    An isophote is a curve of constant ``n . L`` (Poeschl, "Detecting surface
    irregularities using isophotes", CAGD 1(2), 1984). The angle is used rather
    than the cosine so equal steps give evenly spread stripes. A G1 seam leaves
    isophotes continuous; a kink at the seam shows as a break.
    """
    normals = np.asarray(normals, float)
    light = unit(light_direction)
    # atan2 of sine and cosine keeps full precision near 0 and 180 degrees, where arccos loses half the digits
    sine = np.linalg.norm(np.cross(normals, light), axis=-1)
    return np.degrees(np.arctan2(sine, normals @ light))


def highlight_parameter(points: np.ndarray, normals: np.ndarray, lights: LightPlane) -> np.ndarray:
    """Where the normal line of each sample pierces the plane of parallel light lines.

    Parameters
    ----------
    points, normals : ndarray of shape (..., 3)
    lights : LightPlane

    Returns
    -------
    across : ndarray of shape (...)
        Coordinate (mm) across the lines of the piercing point; NaN where the
        normal runs parallel to the light plane.

    Notes
    -----
    Beier and Chen, "Highlight-line algorithm for realtime surface-quality
    assessment", CAD 26(4), 1994: a sample is on the highlight of the light line
    ``L(l) = A + l B`` when the normal line ``P + m n`` meets it, i.e. when
    their distance ``|(B x n) . (A - P)| / |B x n|`` is zero. For a family of
    parallel lines in one plane, the normal line meets light line ``i`` exactly
    when it pierces the plane on that line, so the across-coordinate of the
    piercing point ``Q = P + m n``, ``m = (A - P) . h / (n . h)``, is a continuous
    parameter whose integer multiples of the spacing are the highlight lines.
    It depends on the surface only, not on the viewer.
    """
    return _pierce(np.asarray(points, float), np.asarray(normals, float), lights, forward_only=False)


def highlight_distance(
    points: np.ndarray, normals: np.ndarray, line_point: np.ndarray, line_direction: np.ndarray
) -> np.ndarray:
    """Distance between each sample's normal line and one light line (Beier and Chen 1994, eq. 2).

    Parameters
    ----------
    points, normals : ndarray of shape (..., 3)
    line_point : ndarray of shape (3,)
        A point A of the light line.
    line_direction : ndarray of shape (3,)
        Its direction B.

    Returns
    -------
    distance : ndarray of shape (...)
        ``|(B x n) . (A - P)| / |B x n|`` in mm; NaN where n is parallel to B.
    """
    direction = unit(line_direction)
    cross = np.cross(direction, np.asarray(normals, float))
    size = np.linalg.norm(cross, axis=-1)
    ok = size > PARALLEL_SINE
    offset = np.asarray(line_point, float) - np.asarray(points, float)
    value = np.abs(np.sum(cross * offset, axis=-1)) / np.where(ok, size, 1.0)
    return np.where(ok, value, np.nan)


def reflect(directions: np.ndarray, normals: np.ndarray) -> np.ndarray:
    """Mirror directions about the tangent planes: ``r = d - 2 (d . n) n``.

    Parameters
    ----------
    directions, normals : ndarray of shape (..., 3)

    Returns
    -------
    reflected : ndarray of shape (..., 3)
    """
    directions = np.asarray(directions, float)
    normals = np.asarray(normals, float)
    return directions - 2.0 * np.sum(directions * normals, axis=-1, keepdims=True) * normals


def eye_rays(points: np.ndarray, eye: np.ndarray | None, view_direction: np.ndarray | None = None) -> np.ndarray:
    """Unit rays from the eye to each sample.

    Parameters
    ----------
    points : ndarray of shape (..., 3)
    eye : ndarray of shape (3,) or None
        Eye position for a perspective view; None for a parallel view.
    view_direction : ndarray of shape (3,), optional
        The viewing direction of a parallel view.

    Returns
    -------
    rays : ndarray of shape (..., 3)
    """
    points = np.asarray(points, float)
    if eye is None:
        return np.broadcast_to(unit(view_direction), points.shape)
    rays = points - np.asarray(eye, float)
    return rays / np.maximum(np.linalg.norm(rays, axis=-1, keepdims=True), 1e-300)


def reflection_angle(normals: np.ndarray, rays: np.ndarray, line_direction: np.ndarray, up: np.ndarray) -> np.ndarray:
    """Reflection-line parameter for light lines far away: the angle of the reflected ray about the lines.

    Parameters
    ----------
    normals : ndarray of shape (..., 3)
    rays : ndarray of shape (..., 3)
        Unit eye rays to the samples (:func:`eye_rays`).
    line_direction : ndarray of shape (3,)
        Direction of the light lines.
    up : ndarray of shape (3,)
        Reference direction across the lines; the angle is zero when the
        reflected ray points along it.

    Returns
    -------
    angle : ndarray of shape (...)
        Degrees in (-180, 180]; NaN where the reflected ray runs along the lines.

    Notes
    -----
    Reflection lines (Klass, "Correction of local surface irregularities using
    reflection lines", CAD 12(2), 1980) are the images, mirrored in the surface,
    of parallel light lines as seen from the eye. The eye ray ``d`` is reflected
    about the normal, ``r = d - 2 (d . n) n``. Parallel light lines at a large
    distance are the planes of the pencil through the line direction ``a``; the
    reflected ray sees the light whose plane it lies in, so the stripe parameter
    is the angle of ``r`` about ``a``: ``atan2(r . c, r . u)`` with ``u, c``
    spanning the plane normal to ``a``. Being a function of direction only, it
    is defined for every sample (no ray misses the lights). The field depends on
    the eye: recompute it when the camera moves.
    """
    _, across, normal = light_frame(line_direction, up)
    mirrored = reflect(rays, normals)
    first, second = mirrored @ normal, mirrored @ across
    ok = np.hypot(first, second) > PARALLEL_SINE
    return np.where(ok, np.degrees(np.arctan2(second, first)), np.nan)


def reflection_parameter(points: np.ndarray, normals: np.ndarray, rays: np.ndarray, lights: LightPlane) -> np.ndarray:
    """Reflection-line parameter for light lines in a plane at a finite distance.

    Parameters
    ----------
    points, normals : ndarray of shape (..., 3)
    rays : ndarray of shape (..., 3)
        Unit eye rays to the samples (:func:`eye_rays`).
    lights : LightPlane

    Returns
    -------
    across : ndarray of shape (...)
        Across-coordinate (mm) where the reflected eye ray meets the light
        plane; NaN where it runs away from the plane or along it.

    Notes
    -----
    Klass (1980): the reflected ray ``P + t r`` meets the plane ``(X - A) . h = 0`` at
    ``t = (A - P) . h / (r . h)``; only ``t > 0`` sees the light.
    """
    return _pierce(np.asarray(points, float), reflect(rays, normals), lights, forward_only=True)
