"""Fairness figures of two revisions side by side: faces, seams, section families.

- Faces (paired by :func:`geometry.compare.correspondence.pair_faces`): the ranges of
  k1 and k2 and the largest |k| over the face's samples.
- Seams (paired by the names of their two faces): the worst gap, angle and
  curvature jump along the seam.
- Section families (``x``, ``y``, ``z``, ``plane``: the planes one SPEC item
  cuts): the number of inflections and the curvature variation, the sum over
  the family's curves of the integral of (dk/ds)^2 over arc length (Farin,
  *Curves and Surfaces for CAGD*, 5th ed., fairness of curves; computed by the
  section analysis from the exact dk/ds). Planes spread over the model's box
  move with the box, so a family compares like with like only when the
  revisions have about the same extent.
"""

from __future__ import annotations

from geometry.compare import FacePairing

from .result import FileReview


def _face_figures(review: FileReview, index: int) -> dict | None:
    face = review.faces[index] if 0 <= index < len(review.faces) else None
    if face is None or face.curvature is None:
        return None
    c = face.curvature
    return {"k1": list(c.k1), "k2": list(c.k2), "max_abs": c.max_abs}


def face_trend(old: FileReview, new: FileReview, pairing: FacePairing) -> list[dict]:
    """Per face pair: names and curvature figures before and after; added and removed faces too."""
    rows = []
    for o, n, how in pairing.pairs:
        rows.append(
            {
                "old_face": o,
                "new_face": n,
                "name": new.faces[n].name or f"face {n}",
                "paired_by": how,
                "before": _face_figures(old, o),
                "after": _face_figures(new, n),
            }
        )
    for o in pairing.removed:
        rows.append({"old_face": o, "new_face": None, "name": old.faces[o].name or f"face {o}", "paired_by": None})
        rows[-1].update(before=_face_figures(old, o), after=None)
    for n in pairing.added:
        rows.append({"old_face": None, "new_face": n, "name": new.faces[n].name or f"face {n}", "paired_by": None})
        rows[-1].update(before=None, after=_face_figures(new, n))
    return rows


_SEAM_KEYS = {"gap_mm": "gap_max", "angle_deg": "angle_max_deg", "curvature_jump": "curvature_jump_max"}


def _seam_figures(seam: dict | None) -> dict | None:
    if seam is None:
        return None
    return {name: seam.get(key) for name, key in _SEAM_KEYS.items()} | {"continuity": seam.get("continuity")}


def seam_trend(old: FileReview, new: FileReview) -> list[dict]:
    """Per seam (by its faces' names): worst gap, angle, curvature jump and class before and after."""

    def by_faces(review: FileReview) -> dict[tuple[str, ...], dict]:
        return {tuple(sorted(s.get("face_names", ()))): s for s in review.seams}

    before, after = by_faces(old), by_faces(new)
    return [
        {"faces": list(key), "before": _seam_figures(before.get(key)), "after": _seam_figures(after.get(key))}
        for key in sorted(before.keys() | after.keys())
    ]


def _families(review: FileReview) -> dict[str, dict]:
    out: dict[str, dict] = {}
    for section in review.sections:
        family = out.setdefault(str(section.get("family", "plane")), {"planes": 0, "inflections": 0, "variation": 0.0})
        family["planes"] += 1
        for curve in section.get("curves", ()):
            figures = curve.get("figures") or {}
            family["inflections"] += int(figures.get("inflections", len(curve.get("inflections", ()))))
            family["variation"] += float(figures.get("curvature_variation") or 0.0)
    return out


def section_trend(old: FileReview, new: FileReview) -> list[dict]:
    """Per section family: planes, inflection count and curvature variation (1/mm^3) before and after."""
    before, after = _families(old), _families(new)
    return [{"family": k, "before": before.get(k), "after": after.get(k)} for k in sorted(before.keys() | after.keys())]
