"""Pairing the faces of two revisions: by unique name, else by where the surfaces lie."""

import numpy as np

from geometry.compare import pair_faces
from geometry.model import Face, Model
from geometry.nurbs.primitives import bilinear


def _patch(x0: float, z: float = 0.0, name: str = "") -> Face:
    corners = np.array([[x0, 0, z], [x0, 40, z], [x0 + 40, 0, z], [x0 + 40, 40, z]], float)
    return Face(bilinear(corners), name=name)


def test_stable_names_pair_by_name_even_when_moved():
    old = Model((_patch(0, name="a"), _patch(50, name="b")))
    new = Model((_patch(50, 3.0, name="b"), _patch(0, name="a")))
    pairing = pair_faces(old, new)
    assert sorted(pairing.pairs) == [(0, 1, "name"), (1, 0, "name")]
    assert pairing.added == () and pairing.removed == ()


def test_unnamed_faces_pair_by_geometry_and_far_faces_are_added_and_removed():
    old = Model((_patch(0), _patch(50), _patch(100)))
    # Reordered, one nudged by 0.2 mm, the third replaced by a face far away.
    new = Model((_patch(50, 0.2), _patch(0), _patch(400)))
    pairing = pair_faces(old, new)
    assert sorted(pairing.pairs) == [(0, 1, "geometry"), (1, 0, "geometry")]
    assert pairing.removed == (2,) and pairing.added == (2,)


def test_renamed_faces_fall_back_to_geometry():
    old = Model((_patch(0, name="left"), _patch(50, name="right")))
    new = Model((_patch(0, name="panel_l"), _patch(50, name="right")))
    pairing = pair_faces(old, new)
    assert sorted(pairing.pairs) == [(0, 0, "geometry"), (1, 1, "name")]
