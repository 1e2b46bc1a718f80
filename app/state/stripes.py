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
# Angle (degrees) the stripe count spreads over in the angular modes (reflection, isophotes).
ANGLE_SPAN = 180.0


@dataclass(frozen=True)
class Camera:
    """Where the eye is: perspective (``eye``) or parallel (``eye`` None, ``direction``)."""

    eye: tuple[float, float, float] | None
    direction: tuple[float, float, float] = (0.0, 0.0, -1.0)


def stripe_parameters(
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
        step = ANGLE_SPAN / stripes.count
        return [isophote_angle(s.field.normals, up) / step for s in samples]
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
