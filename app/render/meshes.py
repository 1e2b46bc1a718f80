"""Face meshes: every face's sample grid as triangles, merged into one mesh with a face index.

All grid nodes are kept as mesh points (in each face's row-major order, after
the faces before it), so per-sample arrays of the session map onto the mesh by
concatenating their ravelled grids; only cells whose four corners are on the
face become triangles.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pyvista as pv

from app.state.results import FaceSamples
from geometry.model.sampling import cell_triangles, grid_cells


def grid_triangles(inside: np.ndarray, offset: int = 0) -> np.ndarray:
    """Two triangles per grid cell with four corners inside, as node indices, shape (t, 3).

    Parameters
    ----------
    inside : ndarray of bool, shape (a, b)
    offset : int
        Added to every index (position of the face's first node in the merged mesh).
    """
    return cell_triangles(grid_cells(inside)) + offset


@dataclass
class FaceMesh:
    """The merged mesh of all faces, and where each face's nodes are in it.

    Attributes
    ----------
    mesh : pyvista.PolyData
        Point data: ``Normals`` (exact, face orientation applied), ``face``.
    offsets : ndarray of int, shape (faces + 1,)
        Face f's nodes are points ``offsets[f]:offsets[f + 1]``.
    shapes : list of (a, b)
    """

    mesh: pv.PolyData
    offsets: np.ndarray
    shapes: list[tuple[int, int]]

    def point_values(self, per_face: list[np.ndarray]) -> np.ndarray:
        """Concatenate per-face grids (each of shape (a, b)) into one point array."""
        return np.concatenate([np.asarray(f, float).ravel() for f in per_face])

    def locate(self, point_id: int) -> tuple[int, int, int]:
        """(face, i, j) of a mesh point."""
        face = int(np.searchsorted(self.offsets, point_id, side="right") - 1)
        i, j = divmod(int(point_id - self.offsets[face]), self.shapes[face][1])
        return face, i, j


def face_mesh(samples: tuple[FaceSamples, ...]) -> FaceMesh:
    """The merged triangle mesh of every sampled face.

    Triangles are wound (i, j) -> (i + 1, j) -> (i, j + 1), along Su then Sv; the
    exact normals (reversed faces flipped) are handed to the renderer, so
    shading never depends on winding.
    """
    shapes = [s.inside.shape for s in samples]
    sizes = [a * b for a, b in shapes]
    offsets = np.concatenate([[0], np.cumsum(sizes)]).astype(int)
    points = np.concatenate([s.field.points.reshape(-1, 3) for s in samples])
    normals = np.concatenate([s.field.normals.reshape(-1, 3) for s in samples])
    triangles = np.concatenate([grid_triangles(s.inside, off) for s, off in zip(samples, offsets, strict=False)])
    cells = np.concatenate([np.full((triangles.shape[0], 1), 3), triangles], axis=1).ravel()
    mesh = pv.PolyData(np.nan_to_num(points), faces=cells)
    mesh.point_data["Normals"] = np.nan_to_num(normals)
    mesh.point_data.active_normals_name = "Normals"
    mesh.point_data["face"] = np.repeat(np.arange(len(samples)), sizes)
    return FaceMesh(mesh, offsets, shapes)
