"""Standard directions to look at a model from, and the projection of the view.

Model axes: x to the right, y away from the viewer, z up (the front view looks
along +y). The isometric view looks from the front, right and top at once.
"""

from __future__ import annotations

import numpy as np

# name -> (direction from the model to the eye, up direction)
STANDARD_VIEWS: dict[str, tuple[tuple[float, float, float], tuple[float, float, float]]] = {
    "front": ((0.0, -1.0, 0.0), (0.0, 0.0, 1.0)),
    "top": ((0.0, 0.0, 1.0), (0.0, 1.0, 0.0)),
    "right": ((1.0, 0.0, 0.0), (0.0, 0.0, 1.0)),
    "isometric": ((1.0, -1.0, 1.0), (0.0, 0.0, 1.0)),
}


def look_from(plotter, name: str, fit) -> None:
    """Turn the camera to the standard view ``name`` and fit the model in it.

    Parameters
    ----------
    plotter : pyvista.Plotter
    name : str
        A key of :data:`STANDARD_VIEWS`.
    fit : callable()
        Centres and fits the visible model, keeping the direction (``Scene.fit``).
    """
    eye, up = STANDARD_VIEWS[name]
    camera = plotter.camera
    focal = np.asarray(camera.focal_point, float)
    distance = max(float(np.linalg.norm(np.asarray(camera.position) - focal)), 1.0)
    camera.position = tuple(focal + distance * np.asarray(eye) / np.linalg.norm(eye))
    camera.up = up
    fit()
    plotter.update()


def view_direction(plotter) -> np.ndarray:
    """Unit vector from the focal point to the eye, shape (3,)."""
    camera = plotter.camera
    d = np.asarray(camera.position, float) - np.asarray(camera.focal_point, float)
    return d / np.linalg.norm(d)


def set_parallel(plotter, parallel: bool) -> None:
    """Parallel projection (true lengths across the screen) or perspective."""
    if parallel:
        plotter.enable_parallel_projection()
    else:
        plotter.disable_parallel_projection()
    plotter.update()


def is_parallel(plotter) -> bool:
    return bool(plotter.camera.GetParallelProjection())
