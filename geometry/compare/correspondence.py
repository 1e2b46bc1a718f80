"""Which face of one revision of a model is which face of the next.

Faces whose names are unique and present in both revisions pair by name.
The rest pair by geometry: every face is sampled, each sample of one revision
finds its nearest sample of the other (one k-d tree query per revision), and
two faces are as alike as the number of samples that find each other within
:data:`MATCH_DISTANCE_REL` of the model's size. The pairing that shares the
most such samples wins (an optimal assignment, scipy's
``linear_sum_assignment``, Crouse 2016); a face that shares too few samples
with any face of the other revision counts as added or removed.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass

import numpy as np

from ..model.sampling import model_grids
from ..model.topology import Model

# Samples per revision for the geometric pairing.
MATCH_BUDGET = 20_000
# A sample finds its partner within this fraction of the model's diagonal (or MATCH_DISTANCE_MIN mm).
MATCH_DISTANCE_REL = 0.02
MATCH_DISTANCE_MIN = 0.5
# Two faces correspond when at least this fraction of the smaller face's samples find the other face.
MATCH_SHARE = 0.3


@dataclass(frozen=True)
class FacePairing:
    """Correspondence of the faces of an old and a new revision.

    Attributes
    ----------
    pairs : tuple of (int, int, str)
        (old face, new face, how): how is ``"name"`` or ``"geometry"``.
    removed : tuple of int
        Old faces with no partner.
    added : tuple of int
        New faces with no partner.
    """

    pairs: tuple[tuple[int, int, str], ...]
    removed: tuple[int, ...]
    added: tuple[int, ...]

    def new_for_old(self) -> dict[int, int]:
        return {o: n for o, n, _ in self.pairs}

    def old_for_new(self) -> dict[int, int]:
        return {n: o for o, n, _ in self.pairs}


def _unique_names(model: Model) -> dict[str, int]:
    counts = Counter(f.name for f in model.faces if f.name)
    return {f.name: i for i, f in enumerate(model.faces) if f.name and counts[f.name] == 1}


def _samples(model: Model, budget: int) -> tuple[np.ndarray, np.ndarray]:
    """Inside samples of every face: points (k, 3) and owning face (k,)."""
    pts, owner = [], []
    for index, (face, grid) in enumerate(zip(model.faces, model_grids(model, budget), strict=True)):
        keep = grid.inside
        pts.append(face.surface.points_grid(grid.u, grid.v)[keep])
        owner.append(np.full(int(keep.sum()), index))
    if not pts:
        return np.zeros((0, 3)), np.zeros(0, int)
    return np.concatenate(pts), np.concatenate(owner)


def pair_faces(old: Model, new: Model, budget: int = MATCH_BUDGET) -> FacePairing:
    """Pair the faces of two revisions: by unique name first, then by shape and place.

    Parameters
    ----------
    old, new : Model
    budget : int
        Samples per revision for the geometric pairing.

    Returns
    -------
    FacePairing
    """
    old_names, new_names = _unique_names(old), _unique_names(new)
    pairs = [(old_names[n], new_names[n], "name") for n in sorted(old_names.keys() & new_names.keys())]
    left_old = sorted(set(range(len(old.faces))) - {o for o, _, _ in pairs})
    left_new = sorted(set(range(len(new.faces))) - {n for _, n, _ in pairs})
    if left_old and left_new:
        pairs += _pair_by_geometry(old, new, left_old, left_new, budget)
    paired_old = {o for o, _, _ in pairs}
    paired_new = {n for _, n, _ in pairs}
    return FacePairing(
        tuple(sorted(pairs, key=lambda p: p[1])),
        tuple(i for i in range(len(old.faces)) if i not in paired_old),
        tuple(i for i in range(len(new.faces)) if i not in paired_new),
    )


def _pair_by_geometry(old: Model, new: Model, left_old: list[int], left_new: list[int], budget: int):
    from scipy.optimize import linear_sum_assignment
    from scipy.spatial import cKDTree

    reach = max(MATCH_DISTANCE_MIN, MATCH_DISTANCE_REL * max(old.size, new.size))
    p_old, f_old = _samples(old, budget)
    p_new, f_new = _samples(new, budget)
    keep_old, keep_new = np.isin(f_old, left_old), np.isin(f_new, left_new)
    p_old, f_old, p_new, f_new = p_old[keep_old], f_old[keep_old], p_new[keep_new], f_new[keep_new]
    if not len(p_old) or not len(p_new):
        return []
    shared = np.zeros((len(old.faces), len(new.faces)))
    # Both directions: a face that shrank and one that grew are both found.
    dist, j = cKDTree(p_old).query(p_new, distance_upper_bound=reach)
    hit = np.isfinite(dist)
    np.add.at(shared, (f_old[j[hit]], f_new[hit]), 1.0)
    dist, j = cKDTree(p_new).query(p_old, distance_upper_bound=reach)
    hit = np.isfinite(dist)
    np.add.at(shared, (f_old[hit], f_new[j[hit]]), 1.0)
    size_old = np.bincount(f_old, minlength=len(old.faces)).astype(float)
    size_new = np.bincount(f_new, minlength=len(new.faces)).astype(float)
    sub = shared[np.ix_(left_old, left_new)]
    rows, cols = linear_sum_assignment(-sub)
    out = []
    for r, c in zip(rows, cols, strict=True):
        o, n = left_old[r], left_new[c]
        smaller = min(size_old[o], size_new[n])
        # Each shared sample counted once per direction: at most size_old + size_new.
        if smaller > 0 and sub[r, c] >= MATCH_SHARE * 2 * smaller:
            out.append((o, n, "geometry"))
    return out
