"""Undercuts: samples whose straight path out of the mould is blocked by the part.

A sample leaves with the mould half that moves along its release direction
``s = sign(draft) d`` (``+d`` on a zero-draft wall). It is an undercut when the
ray from it along ``s`` hits the part again (common practice: a feature the
tool cannot draw away from without a side action). The rays are cast in
batches against the model's display tessellation by trimesh, with Intel's
Embree engine when ``embreex`` is installed (trimesh's numpy triangle test
otherwise); no ray is cast one by one in Python.

The tessellation lies off the exact surface by the chord's sag (``h^2 k / 8``
for a step h on a bend of curvature k), so a ray starts a clearance away from
its own surface, outwards along the normal and along ``s``; features smaller
than that clearance are not seen.
"""

from __future__ import annotations

import numpy as np


def release_directions(draft: np.ndarray, pull: np.ndarray) -> np.ndarray:
    """Release direction of each sample, shape (k, 3): +pull where draft >= 0, -pull elsewhere.

    Parameters
    ----------
    draft : ndarray of shape (k,)
        Degrees.
    pull : ndarray of shape (3,)
        Unit pull direction.
    """
    side = np.where(np.nan_to_num(draft) >= 0.0, 1.0, -1.0)
    return side[:, None] * pull[None, :]


class RayCaster:
    """Batched occlusion queries against one triangle mesh (Embree's bounding volume hierarchy).

    Parameters
    ----------
    vertices : ndarray of shape (m, 3)
    triangles : ndarray of int, shape (t, 3)

    Notes
    -----
    Embree works in single precision: about 1e-7 of the model's size, far below
    the clearance a ray starts with.
    """

    def __init__(self, vertices: np.ndarray, triangles: np.ndarray):
        from embreex import rtcore_scene  # compiled engine: loaded only when undercuts are checked
        from embreex.mesh_construction import TriangleMesh

        self._scene = rtcore_scene.EmbreeScene()
        # the mesh keeps a reference to the scene; the scene owns the geometry
        self._mesh = TriangleMesh(
            self._scene, np.ascontiguousarray(vertices, np.float32), np.ascontiguousarray(triangles, np.int32)
        )

    def hits(self, origins: np.ndarray, directions: np.ndarray) -> np.ndarray:
        """Whether each ray meets the mesh, shape (k,).

        Parameters
        ----------
        origins, directions : ndarray of shape (k, 3)
        """
        if origins.shape[0] == 0:
            return np.zeros(0, dtype=bool)
        found = self._scene.run(
            np.ascontiguousarray(origins, np.float32), np.ascontiguousarray(directions, np.float32), query="OCCLUDED"
        )
        return np.asarray(found) >= 0


def blocked_release(
    caster: RayCaster, points: np.ndarray, normals: np.ndarray, draft: np.ndarray, pull: np.ndarray, clearance: float
) -> np.ndarray:
    """Samples whose release path hits the part, shape (k,).

    Parameters
    ----------
    caster : RayCaster
        The model's tessellation.
    points, normals : ndarray of shape (k, 3)
        Surface points and outward unit normals.
    draft : ndarray of shape (k,)
        Degrees.
    pull : ndarray of shape (3,)
        Unit pull direction.
    clearance : float
        mm the ray starts away from its own surface (see module notes).
    """
    ok = np.all(np.isfinite(normals), axis=1)
    directions = release_directions(draft, pull)
    origins = points + clearance * (np.nan_to_num(normals) + directions)
    out = np.zeros(points.shape[0], dtype=bool)
    out[ok] = caster.hits(origins[ok], directions[ok])
    return out
