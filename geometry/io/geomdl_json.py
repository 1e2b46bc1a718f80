"""geomdl's JSON exchange of surfaces (``geomdl.exchange.export_json``).

The layout is ``{"shape": {"type": "surface", "data": [surface, ...]}}`` with, per
surface, ``degree_u/v``, ``size_u/v``, ``knotvector_u/v``,
``control_points.points`` (cartesian, u-major: index ``i * size_v + j``) and
optionally ``control_points.weights``, ``name`` and ``reversed`` (geomdl 5.4,
``geomdl/_exchange.py``, ``export_dict_surf``). Read with the standard
library's json: no geomdl needed at run time. The file has no topology, so the
model has no edges; geomdl trim curves are not read (the face is shown whole and
a warning says so).
"""

from __future__ import annotations

import json

import numpy as np

from ..errors import BattenError, ReadError
from ..kernel.occt_model import MAX_EXTENT_MM
from ..model.topology import Face, SkippedFace
from ..nurbs.surface import NurbsSurface
from .carry import ShapeContents


def _surface(entry: dict) -> tuple[NurbsSurface, bool, str]:
    try:
        nu, nv = int(entry["size_u"]), int(entry["size_v"])
        points = np.asarray(entry["control_points"]["points"], dtype=float)
        weights = entry["control_points"].get("weights")
        degrees = int(entry["degree_u"]), int(entry["degree_v"])
        knots = entry["knotvector_u"], entry["knotvector_v"]
    except (KeyError, TypeError, ValueError, AttributeError) as exc:
        raise BattenError(f"not a surface record of a JSON surface file ({type(exc).__name__}: {exc})") from exc
    if points.ndim != 2 or points.shape != (nu * nv, 3):
        raise BattenError(f"expected {nu} x {nv} three-dimensional control points, got shape {points.shape}")
    w = None
    if weights is not None:
        try:
            w = np.asarray(weights, dtype=float).reshape(nu, nv)
        except (TypeError, ValueError) as exc:
            raise BattenError(f"weights do not match the {nu} x {nv} control net") from exc
    surface = NurbsSurface(degrees[0], degrees[1], knots[0], knots[1], points.reshape(nu, nv, 3), w)
    extent = np.ptp(surface.poles.reshape(-1, 3), axis=0).max()
    if extent > MAX_EXTENT_MM:
        raise BattenError(f"control net spans {extent:.3g} mm, beyond any design model")
    return surface, bool(entry.get("reversed", False)), str(entry.get("name", "") or "")


def read_geomdl_json(path: str, data: bytes) -> ShapeContents:
    """Surfaces of a geomdl JSON file as faces (lengths taken as mm).

    Parameters
    ----------
    path : str
        For messages.
    data : bytes
        The file's content.

    Returns
    -------
    ShapeContents
        One face per surface; bad surfaces are skipped with a warning.

    Raises
    ------
    ReadError
        When the file is not JSON or not geomdl's surface layout.
    """
    try:
        doc = json.loads(data.decode("utf-8"))
        shape = doc["shape"]
        kind = shape.get("type")
        entries = shape["data"]
    except (UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise ReadError(path, f"not valid JSON ({exc})") from exc
    except (KeyError, TypeError, AttributeError) as exc:
        raise ReadError(path, 'not a JSON surface file (no "shape" with "data")') from exc
    if kind != "surface":
        raise ReadError(path, f'the JSON file holds "{kind}" geometry, not surfaces')
    if not isinstance(entries, list):
        raise ReadError(path, 'the JSON file\'s "data" is not a list of surfaces')
    out = ShapeContents(n_input_faces=len(entries))
    for i, entry in enumerate(entries):
        try:
            surface, reversed_, name = _surface(entry)
        except BattenError as exc:
            out.warnings.append(f"surface {i + 1} skipped: {exc}")
            out.skipped.append(SkippedFace(i + 1, "", str(exc)))
            continue
        if isinstance(entry, dict) and entry.get("trims"):
            out.warnings.append(f"surface {i + 1}: trim curves of JSON surface files are not read; shown whole")
        out.faces.append(Face(surface, reversed=reversed_, name=name, body="geomdl"))
    return out
