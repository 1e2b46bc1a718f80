"""Meshes of a model's faces for the report's off-screen pictures.

Each face is sampled on its trim-aware (u, v) grid; every grid cell whose four
corners lie inside the trim becomes a quad. Point data carries the curvature
quantities and the normals, so one mesh serves the curvature map and the
stripes.
"""

from __future__ import annotations

import numpy as np
import pyvista as pv

from app.review.faces import face_grids
from geometry import curvature_on_grid
from geometry.model import Model
from geometry.sampling import grid_cells

# Samples over the whole model for the pictures: enough for smooth shading at report size.
MESH_BUDGET = 200_000


def _quads(inside: np.ndarray) -> np.ndarray:
    """VTK cell array of the grid quads whose four corners are inside, shape (5 m,)."""
    corners = grid_cells(inside)
    return np.hstack([np.full((corners.shape[0], 1), 4), corners]).ravel()


def model_mesh(model: Model) -> pv.PolyData:
    """One mesh of every face, with point data ``mean``, ``gaussian``, ``k1``, ``k2``, ``max_abs``,
    ``normals`` (face orientation applied) and ``face`` (index).

    Returns
    -------
    pyvista.PolyData
    """
    parts = []
    for index, (face, (u, v, inside)) in enumerate(zip(model.faces, face_grids(model, MESH_BUDGET), strict=True)):
        field = curvature_on_grid(face.surface, u, v, reversed=face.reversed, workers=1)
        mesh = pv.PolyData(field.points.reshape(-1, 3), faces=_quads(inside))
        good = field.valid & np.isfinite(field.mean)
        for name in ("mean", "gaussian", "k1", "k2", "max_abs"):
            mesh.point_data[name] = np.where(good, getattr(field, name), np.nan).ravel()
        mesh.point_data["normals"] = np.nan_to_num(field.normals.reshape(-1, 3))
        mesh.point_data["face"] = np.full(u.size * v.size, index)
        parts.append(mesh.clean(point_merging=False) if mesh.n_cells else mesh)
    merged = pv.merge(parts, merge_points=False) if len(parts) > 1 else parts[0]
    return merged
