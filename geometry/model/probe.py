"""Closest points on surfaces and the point probe of a model.

:func:`closest_parameters` is point inversion (The NURBS Book, 2nd ed., sec. 6.1,
eq. 6.3-6.6): Newton's method on ``f = Su . r = 0, g = Sv . r = 0`` with
``r = S(u, v) - P``, compiled (:mod:`geometry.nurbs.compiled_inversion`), damped
(Levenberg-Marquardt) where the Jacobian is singular (a collapsed pole) and
clamped to the domain.
:func:`probe_point` finds the nearest point on a trimmed model: dense samples in
a k-d tree give starting parameters, inversion refines them on the exact
surface, and a refined point that leaves the trim falls back to the best sample
inside it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import BattenError
from ..nurbs.compiled_inversion import NEWTON_ITERATIONS, invert
from ..nurbs.differential import curvature_at
from ..nurbs.surface import NurbsSurface
from .topology import Face, Model

# Samples per face used to seed the nearest-point search.
SEED_SAMPLES = 4000
# Candidate samples (over the whole model) refined exactly.
SEED_CANDIDATES = 8
# Parts each trim-polyline segment is cut into when the nearest point lies on the trim.
TRIM_SUBDIVISION = 32


def closest_parameters(
    surface: NurbsSurface, points: np.ndarray, u: np.ndarray, v: np.ndarray, iterations: int = NEWTON_ITERATIONS
) -> tuple[np.ndarray, np.ndarray]:
    """Parameters of the surface points nearest to given points, from nearby starts.

    Parameters
    ----------
    surface : NurbsSurface
    points : ndarray of shape (k, 3)
    u, v : ndarray of shape (k,)
        Starting parameters (e.g. a p-curve's, or the nearest sample's).
    iterations : int

    Returns
    -------
    u, v : ndarray of shape (k,)
        Local minimisers of ``|S(u, v) - P|`` inside the domain.

    Notes
    -----
    The NURBS Book, eq. 6.6: the Newton step ``delta`` solves
    ``J delta = -(f, g)`` with ``J = [[|Su|^2 + r.Suu, Su.Sv + r.Suv],
    [Su.Sv + r.Suv, |Sv|^2 + r.Svv]]``. A step that would leave the domain is
    clamped to its boundary (sec. 6.1, the clamping for open surfaces). Runs
    compiled, each point on its own (:func:`geometry.nurbs.compiled_inversion.invert`);
    for points on many surfaces at once, call that with a pack of them.
    """
    return invert(surface.pack, 0, points, u, v, iterations)


@dataclass(frozen=True)
class ProbeResult:
    """Everything the probe reports at one point of a face.

    Lengths in mm, curvatures in 1/mm (gaussian in 1/mm^2); the normal follows
    the face's orientation; ``distance`` is from the query point (0 for a
    parameter query).
    """

    face: int
    u: float
    v: float
    point: tuple[float, float, float]
    normal: tuple[float, float, float]
    distance: float
    gaussian: float
    mean: float
    k1: float
    k2: float
    dir1: tuple[float, float, float]
    dir2: tuple[float, float, float]
    inside: bool
    name: str = ""
    on_trim_boundary: bool = False

    def as_dict(self) -> dict:
        return {k: getattr(self, k) for k in self.__dataclass_fields__}


def _vec(a) -> tuple[float, float, float]:
    return tuple(float(x) for x in a)


def probe_uv(
    model: Model, face_index: int, u: float, v: float, query: np.ndarray | None = None, on_boundary: bool = False
) -> ProbeResult:
    """Curvature, normal and point of one face at given parameters.

    Parameters
    ----------
    model : Model
    face_index : int
        0-based index into ``model.faces``.
    u, v : float
        Must lie in the face's parameter domain.
    query : ndarray of shape (3,), optional
        Point to measure ``distance`` from.
    on_boundary : bool
        (u, v) was taken on the trim's boundary (counted as on the face).

    Raises
    ------
    BattenError
        For a face index or parameters outside the model.
    """
    if not 0 <= face_index < len(model.faces):
        raise BattenError(f"face {face_index} does not exist: the model has faces 0 to {len(model.faces) - 1}")
    face = model.faces[face_index]
    (u0, u1), (v0, v1) = face.surface.domain
    if not (np.isfinite(u) and np.isfinite(v)):
        raise BattenError("u and v must be finite numbers")
    tol_u, tol_v = 1e-9 * (u1 - u0), 1e-9 * (v1 - v0)
    if not (u0 - tol_u <= u <= u1 + tol_u and v0 - tol_v <= v <= v1 + tol_v):
        raise BattenError(f"(u, v) = ({u}, {v}) is outside face {face_index}'s domain [{u0}, {u1}] x [{v0}, {v1}]")
    field = curvature_at(face.surface, np.array([u]), np.array([v]), reversed=face.reversed)
    point = field.points[0]
    distance = 0.0 if query is None else float(np.linalg.norm(point - np.asarray(query, float)))
    return ProbeResult(
        face=face_index,
        u=float(u),
        v=float(v),
        point=_vec(point),
        normal=_vec(field.normals[0]),
        distance=distance,
        gaussian=float(field.gaussian[0]),
        mean=float(field.mean[0]),
        k1=float(field.k1[0]),
        k2=float(field.k2[0]),
        dir1=_vec(field.dir1[0]),
        dir2=_vec(field.dir2[0]),
        inside=on_boundary or bool(face.inside(np.array(u), np.array(v))),
        name=face.name,
        on_trim_boundary=on_boundary,
    )


def _face_seeds(face: Face, n: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Sample points of a face inside its trim: (points (k, 3), u (k,), v (k,))."""
    from .sampling import face_grid

    grid = face_grid(face, n)
    uu, vv = np.meshgrid(grid.u, grid.v, indexing="ij")
    pts = face.surface.points_grid(grid.u, grid.v)
    keep = grid.inside
    return pts[keep], uu[keep], vv[keep]


def probe_point(model: Model, query: np.ndarray) -> ProbeResult:
    """The nearest point of the model to a query point, with its curvature.

    Parameters
    ----------
    model : Model
    query : ndarray of shape (3,)

    Returns
    -------
    ProbeResult

    Notes
    -----
    Samples inside each face's trim go into a k-d tree (scipy ``cKDTree``); the
    nearest few samples seed point inversion (:func:`closest_parameters`) on
    their exact surfaces. A refined point outside its trim means the face's
    nearest point is on its trim boundary, which is then searched instead, so
    the answer is always on the face; the best candidate wins.

    Only faces that can hold one of the nearest samples are sampled: a face
    lies inside the box of its control net (the convex-hull property, The
    NURBS Book, 2nd ed., P4.9), so a face whose box is further from the query
    than the :data:`SEED_CANDIDATES`-th nearest sample found so far holds none
    of them (faces are taken nearest box first).
    """
    from scipy.spatial import cKDTree

    q = np.asarray(query, float).reshape(3)
    if not np.all(np.isfinite(q)):
        raise BattenError("the query point must have finite coordinates")
    seeds = _nearest_faces_seeds(model, q)
    owner = np.concatenate([np.full(len(s[0]), i) for i, s in seeds])
    if owner.size == 0:
        raise BattenError("the model has no sample inside any face's trim")
    pts = np.concatenate([s[0] for _, s in seeds])
    us = np.concatenate([s[1] for _, s in seeds])
    vs = np.concatenate([s[2] for _, s in seeds])
    k = min(SEED_CANDIDATES, owner.size)
    _, nearest = cKDTree(pts).query(q, k=k)
    nearest = np.atleast_1d(nearest)
    best = None
    for i in nearest:  # a handful of candidates, not per sample
        face = model.faces[owner[i]]
        u, v = closest_parameters(face.surface, q[None], us[i : i + 1], vs[i : i + 1])
        snapped = not face.inside(u, v)[0]
        if snapped:  # the surface's nearest point is off the face: the face's is on its trim
            u, v = _nearest_on_trim(face, q)
        dist = float(np.linalg.norm(face.surface.points_at(u, v)[0] - q))
        if best is None or dist < best[0]:
            best = (dist, int(owner[i]), float(u[0]), float(v[0]), snapped)
    return probe_uv(model, best[1], best[2], best[3], query=q, on_boundary=best[4])


def _box_distances(model: Model, query: np.ndarray) -> np.ndarray:
    """Distance from ``query`` to each face's control-net box, shape (faces,): a lower bound to the face."""
    boxes = np.array(
        [(f.surface.poles.reshape(-1, 3).min(axis=0), f.surface.poles.reshape(-1, 3).max(axis=0)) for f in model.faces]
    )
    outside = np.maximum(boxes[:, 0] - query, 0.0) + np.maximum(query - boxes[:, 1], 0.0)
    return np.linalg.norm(outside, axis=1)


def _nearest_faces_seeds(model: Model, query: np.ndarray) -> list[tuple[int, tuple]]:
    """(face index, :func:`_face_seeds`) for the faces that can hold the nearest seeds, nearest box first."""
    lower = _box_distances(model, query)
    kept: list[tuple[int, tuple]] = []
    nearest = np.empty(0)  # the SEED_CANDIDATES smallest sample distances so far
    for i in np.argsort(lower, kind="stable").tolist():  # per face, as the seeds always were
        if nearest.size >= SEED_CANDIDATES and lower[i] > nearest[-1]:
            break  # this face and every later one lie further than the candidates found
        found = _face_seeds(model.faces[i], SEED_SAMPLES)
        kept.append((i, found))
        if len(found[0]):
            nearest = np.sort(np.concatenate([nearest, np.linalg.norm(found[0] - query, axis=1)]))[:SEED_CANDIDATES]
    return kept


def _nearest_on_trim(face: Face, query: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Parameters of the trim-boundary point nearest to ``query``, shapes (1,) and (1,).

    The loops' (u, v) segments are subdivided into :data:`TRIM_SUBDIVISION`
    parts and evaluated on the surface at once; the nearest evaluated point wins
    (the loops themselves are within the readers' chord deflection of the
    trimming curves).
    """
    t = np.linspace(0.0, 1.0, TRIM_SUBDIVISION, endpoint=False)
    uv = []
    for loop in face.loops:
        a, b = loop, np.roll(loop, -1, axis=0)
        uv.append((a[:, None, :] + t[None, :, None] * (b - a)[:, None, :]).reshape(-1, 2))
    uv = np.concatenate(uv)
    pts = face.surface.points_at(uv[:, 0], uv[:, 1])
    i = int(np.argmin(np.einsum("ki,ki->k", pts - query, pts - query)))
    return uv[i : i + 1, 0], uv[i : i + 1, 1]
