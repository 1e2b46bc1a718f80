"""Stripe parameters per face for the light modes, in stripe periods.

An integer value of the returned parameter is the middle of a light line, so
the renderer uses it directly as a texture coordinate on a repeating stripe
texture and the stripes stay sharp however close the camera goes.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from geometry.model import Model
from geometry.reflection import LightPlane, eye_rays, highlight_parameter, isophote_angle, reflection_angle

from .results import FaceSamples
from .settings import Mode, StripeSettings

# Distance of the highlight light plane beyond the model, in model sizes.
LIGHT_PLANE_DISTANCE = 0.25
# Highlight lines: samples whose normal is within this sine of the light plane
# get no stripe; there the parameter runs off to infinity and its stripes pack
# tighter than pixels (a moire, not information).
GRAZING_SINE = 0.25
# Stripes whose period on the surface is shorter than the model size over this count are not drawn (NaN):
# they pack tighter than the picture's pixels near silhouettes, and what they show is aliasing, not shape.
DENSEST_ACROSS = 150
# Angle (degrees) the stripe count spreads over for reflection lines.
ANGLE_SPAN = 180.0
# Isophotes spread the stripe count over the model's own range of normal angles (robust ends, percent), at
# least MIN_ISOPHOTE_SPAN_DEG: a gently curved panel gets as many bands as a round body, not one dark field.
ISOPHOTE_PERCENTILE = 1.0
MIN_ISOPHOTE_SPAN_DEG = 10.0
# The light stands this far (degrees) from the model's mean normal: the angle then grows evenly across the
# model, where a light along the mean normal gives rings about one point. Below MEAN_NORMAL_SHARE the model
# faces every way (a closed body) and the light is the across-reference axis itself.
ISOPHOTE_TILT_DEG = 45.0
MEAN_NORMAL_SHARE = 0.3


@dataclass(frozen=True)
class Camera:
    """Where the eye is: perspective (``eye``) or parallel (``eye`` None, ``direction``)."""

    eye: tuple[float, float, float] | None
    direction: tuple[float, float, float] = (0.0, 0.0, -1.0)


def isophote_light(samples: tuple[FaceSamples, ...], across: np.ndarray, along: np.ndarray) -> np.ndarray:
    """The isophotes' light direction: :data:`ISOPHOTE_TILT_DEG` from the mean normal, towards ``across``.

    Parameters
    ----------
    samples : tuple of FaceSamples
    across, along : ndarray of shape (3,)
        The stripe settings' axes; ``along`` stands in where ``across`` is the mean normal.

    Returns
    -------
    ndarray of shape (3,)
        Unit vector; ``across`` for a model whose normals point every way.
    """
    normals = [s.field.normals[s.inside] for s in samples]
    normals = np.concatenate(normals) if normals else np.zeros((0, 3))
    normals = normals[np.isfinite(normals).all(axis=1)]
    mean = normals.mean(axis=0) if normals.size else np.zeros(3)
    if np.linalg.norm(mean) < MEAN_NORMAL_SHARE:
        return np.asarray(across, float)
    mean = mean / np.linalg.norm(mean)
    for axis in (across, along):
        side = np.asarray(axis, float) - (np.asarray(axis, float) @ mean) * mean
        if np.linalg.norm(side) > MEAN_NORMAL_SHARE:
            break
    tilt = np.radians(ISOPHOTE_TILT_DEG)
    light = np.cos(tilt) * mean + np.sin(tilt) * side / np.linalg.norm(side)
    return light / np.linalg.norm(light)


def too_dense(parameter: np.ndarray, points: np.ndarray, shortest_mm: float) -> np.ndarray:
    """Samples whose stripe period on the surface is shorter than ``shortest_mm``.

    Parameters
    ----------
    parameter : ndarray of shape (a, b)
        Stripe parameter on a face's grid (periods).
    points : ndarray of shape (a, b, 3)
        The grid's points (mm).
    shortest_mm : float

    Returns
    -------
    ndarray of bool, shape (a, b)

    Notes
    -----
    The period is 1 / |grad p|, with |grad p| taken as the larger of the rates
    along the grid's rows and columns: the parameter's change per step over the
    step's length on the surface, both by central differences (``numpy.gradient``).
    """
    rate = np.zeros(parameter.shape)
    for axis in (0, 1):
        if parameter.shape[axis] < 2:
            continue
        # change of the parameter and distance on the surface per grid step, both by central differences
        change = np.abs(np.gradient(parameter, axis=axis))
        step = np.linalg.norm(np.gradient(points, axis=axis), axis=-1)
        with np.errstate(invalid="ignore", divide="ignore"):
            rate = np.maximum(rate, change / step)  # NaN beside an undrawn sample: a lone stripe sample is dropped too
    with np.errstate(divide="ignore", invalid="ignore"):
        return ~(1.0 / rate >= shortest_mm)


def stripe_parameters(
    model: Model, samples: tuple[FaceSamples, ...], mode: Mode, stripes: StripeSettings, camera: Camera | None
) -> list[np.ndarray]:
    """The stripe parameter of every face's grid, NaN where its stripes are too dense to draw.

    See :func:`raw_stripe_parameters`; samples whose stripe period is shorter than
    ``model.size / DENSEST_ACROSS`` (:func:`too_dense`) are left undrawn.
    """
    fields = raw_stripe_parameters(model, samples, mode, stripes, camera)
    shortest = max(model.size, 1e-9) / DENSEST_ACROSS
    return [np.where(too_dense(f, s.field.points, shortest), np.nan, f) for f, s in zip(fields, samples, strict=True)]


def raw_stripe_parameters(
    model: Model, samples: tuple[FaceSamples, ...], mode: Mode, stripes: StripeSettings, camera: Camera | None
) -> list[np.ndarray]:
    """The stripe parameter of every face's grid.

    Parameters
    ----------
    model : Model
    samples : tuple of FaceSamples
    mode : Mode
        One of the light modes.
    stripes : StripeSettings
    camera : Camera or None
        Needed by reflection lines only.

    Returns
    -------
    list of ndarray of shape (a, b)
        One per face, in stripe periods; NaN where undefined.
    """
    along = stripes.line_direction
    up = stripes.across_reference
    if mode == Mode.ISOPHOTE:
        light = isophote_light(samples, up, along)
        angles = [isophote_angle(s.field.normals, light) for s in samples]
        shown = np.concatenate([a[s.inside] for a, s in zip(angles, samples, strict=True)]) if samples else []
        shown = np.asarray(shown)[np.isfinite(shown)]
        span = MIN_ISOPHOTE_SPAN_DEG
        if shown.size:
            low, high = np.percentile(shown, [ISOPHOTE_PERCENTILE, 100 - ISOPHOTE_PERCENTILE])
            span = max(high - low, span)
        step = span / stripes.count
        return [a / step for a in angles]
    if mode == Mode.REFLECTION:
        camera = camera or Camera(None)
        eye = None if camera.eye is None else np.asarray(camera.eye, float)
        step = ANGLE_SPAN / stripes.count
        view = np.asarray(camera.direction)
        return [
            reflection_angle(s.field.normals, eye_rays(s.field.points, eye, view), along, up) / step for s in samples
        ]
    if mode == Mode.HIGHLIGHT:
        lo, hi = model.bounds
        size = max(model.size, 1e-9)
        plane_point = hi * up + (lo + hi) / 2 * (1 - up) + LIGHT_PLANE_DISTANCE * size * up
        step = size / stripes.count
        lights = LightPlane(tuple(along), tuple(up), tuple(plane_point))
        return [
            np.where(
                np.abs(s.field.normals @ up) >= GRAZING_SINE,
                highlight_parameter(s.field.points, s.field.normals, lights) / step,
                np.nan,
            )
            for s in samples
        ]
    raise ValueError(f"{mode} is not a light mode")
