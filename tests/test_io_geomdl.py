"""geomdl JSON exchange: what ``geomdl.exchange.export_json`` writes reads back exactly.

Reference library check: the read face is evaluated against geomdl's own
``evaluate_list`` of the surface it exported (geomdl 5.4).
"""

from __future__ import annotations

import numpy as np
from geomdl import NURBS, exchange, multi

from geometry.io import read_model

POINT_ATOL_MM = 1e-12


def _geomdl_surface(seed: int, name: str):
    rng = np.random.default_rng(seed)
    surf = NURBS.Surface()
    surf.degree_u, surf.degree_v = 3, 2
    nu, nv = 6, 4
    grid = [[10.0 * i, 8.0 * j, float(rng.uniform(-3, 3))] for i in range(nu) for j in range(nv)]
    surf.ctrlpts_size_u, surf.ctrlpts_size_v = nu, nv
    surf.ctrlpts = grid
    surf.weights = [float(w) for w in rng.uniform(0.6, 1.5, nu * nv)]
    surf.knotvector_u = [0, 0, 0, 0, 0.3, 0.6, 1, 1, 1, 1]
    surf.knotvector_v = [0, 0, 0, 0.5, 1, 1, 1]
    surf.name = name
    return surf


def test_export_json_round_trip(tmp_path):
    surfaces = [_geomdl_surface(1, "hood"), _geomdl_surface(2, "lid")]
    container = multi.SurfaceContainer(surfaces)
    path = tmp_path / "pair.json"
    exchange.export_json(container, str(path))
    model = read_model(path)
    assert len(model.faces) == 2  # export_json writes no names
    assert model.edges == () and model.source_units == "mm"
    params = [(u, v) for u in np.linspace(0, 1, 9) for v in np.linspace(0, 1, 7)]
    uv = np.array(params)
    for face, surf in zip(model.faces, surfaces, strict=True):
        expected = np.array(surf.evaluate_list(params))
        np.testing.assert_allclose(face.surface.points_at(uv[:, 0], uv[:, 1]), expected, atol=POINT_ATOL_MM)
    # import_json reads the same file (the format really is geomdl's).
    assert len(exchange.import_json(str(path))) == 2


def test_content_hash_and_source(tmp_path):
    import hashlib

    path = tmp_path / "one.json"
    exchange.export_json(multi.SurfaceContainer([_geomdl_surface(3, "x")]), str(path))
    model = read_model(path)
    assert model.sha256 == hashlib.sha256(path.read_bytes()).hexdigest()
    assert model.source == str(path)
