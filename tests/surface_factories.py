"""Test-only builders of random geomdl / Batten surface pairs (seeded)."""

import numpy as np
from geomdl import NURBS

import geometry.nurbs


def random_geomdl_nurbs(seed: int, degrees=(3, 2), counts=(6, 5), rational=True):
    """A geomdl NURBS surface with a random net and interior knots, repeated ones included."""
    rng = np.random.default_rng(seed)
    (p, q), (nu, nv) = degrees, counts
    surf = NURBS.Surface()
    surf.degree_u, surf.degree_v = p, q
    poles = rng.normal(scale=10.0, size=(nu, nv, 3))
    poles[..., 0] += np.arange(nu)[:, None] * 20.0
    poles[..., 1] += np.arange(nv)[None, :] * 20.0
    weights = rng.uniform(0.5, 2.0, size=(nu, nv)) if rational else np.ones((nu, nv))
    surf.ctrlpts_size_u, surf.ctrlpts_size_v = nu, nv
    surf.ctrlpts = poles.reshape(-1, 3).tolist()
    surf.weights = weights.ravel().tolist()

    def knots(deg, n):
        inner = np.sort(rng.uniform(0.1, 0.9, n - deg - 1))
        if inner.size >= 2:
            inner[1] = inner[0]  # a double interior knot
        return [0.0] * (deg + 1) + sorted(inner.tolist()) + [1.0] * (deg + 1)

    surf.knotvector_u = knots(p, nu)
    surf.knotvector_v = knots(q, nv)
    return surf, geometry.nurbs.from_geomdl(surf)
