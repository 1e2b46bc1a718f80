"""Rows of the report's tables, as text, from a :class:`FileReview`.

Each function returns ``(header, rows)``; numbers are formatted here once so the
PDF and the HTML show the same digits.
"""

from __future__ import annotations

from app.review.result import FAIL, FileReview

# Measured values below this are rounding noise of exact joins; tables say so instead of printing 12 digits.
ROUNDING_LEVEL = 1e-9


def num(value, digits: int = 4) -> str:
    """A number for a table cell: ``-`` for missing, 4 significant digits."""
    if value is None:
        return "-"
    try:
        value = float(value)
    except (TypeError, ValueError):
        return str(value)
    if value != value:  # NaN
        return "-"
    if 0 < abs(value) < ROUNDING_LEVEL:
        return "< 1e-9" if value > 0 else "> -1e-9"
    return f"{value:.{digits}g}"


def xyz(point) -> str:
    if point is None:
        return "-"
    return "(" + ", ".join(f"{float(c):.2f}" for c in point) + ")"


def finding_rows(review: FileReview):
    """The findings over tolerance, numbered as the markers in the pictures."""
    header = ["#", "subject", "measure", "value", "tolerance", "unit", "verdict", "where (mm)"]
    rows = [
        (str(n), f.subject, f.measure, num(f.value), num(f.limit), f.unit, f.verdict, xyz(f.where))
        for n, f in enumerate(review.findings, start=1)
        if f.verdict == FAIL
    ]
    return header, rows


def _seam_badness(seam: dict) -> tuple:
    """Failing seams first, then the weaker continuity class, then the larger gap, angle, jump."""
    rank = {"broken": 0, "G0": 1, "G1": 2, "G2": 3}.get(seam.get("continuity"), 4)
    measures = tuple(-float(seam.get(k) or 0.0) for k in ("gap_max", "angle_max_deg", "curvature_jump_rel_max"))
    return (seam.get("verdict") != FAIL, rank, *measures)


def seam_rows(review: FileReview):
    header = ["seam", "faces", "length mm", "gap mm", "angle deg", "jump 1/mm", "jump rel", "class", "verdict"]
    order = sorted(range(len(review.seams)), key=lambda i: _seam_badness(review.seams[i]))
    rows = []
    for i in order:
        s = review.seams[i]
        rows.append(
            (
                str(s.get("id", i)),
                " / ".join(str(f) for f in s.get("face_names") or s.get("faces", ())),
                num(s.get("length")),
                num(s.get("gap_max")),
                num(s.get("angle_max_deg")),
                num(s.get("curvature_jump_max")),
                num(s.get("curvature_jump_rel_max")),
                str(s.get("continuity", "-")),
                str(s.get("verdict", "-")),
            )
        )
    return header, rows


def free_edge_rows(review: FileReview):
    header = ["edge", "face", "length mm", "from (mm)", "to (mm)", "verdict"]
    rows = []
    for i, e in enumerate(review.free_edges):
        pts = e.get("points") or []
        rows.append(
            (
                str(e.get("id", i)),
                str(e.get("face", "-")),
                num(e.get("length")),
                xyz(e.get("start", pts[0] if pts else None)),
                xyz(e.get("end", pts[-1] if pts else None)),
                str(e.get("verdict", "-")),
            )
        )
    return header, rows


def _curves(review: FileReview):
    for si, section in enumerate(review.sections):
        for ci, curve in enumerate(section.get("curves", ())):
            yield si, section, ci, curve


def figure_rows(review: FileReview):
    header = [
        "section",
        "curve",
        "faces",
        "length mm",
        "inflections",
        "extrema",
        "pieces",
        "max |k| 1/mm",
        "int (dk/ds)^2 ds",
    ]
    rows = []
    for _, section, ci, c in _curves(review):
        fig = c.get("figures", {})
        rows.append(
            (
                section.get("label", "-"),
                str(ci + 1),
                ",".join(str(f) for f in c.get("faces", ())),
                num(c.get("length")),
                str(fig.get("inflections", len(c.get("inflections", ())))),
                str(fig.get("extrema", len(c.get("extrema", ())))),
                str(fig.get("monotone_pieces", "-")),
                num(fig.get("max_abs_curvature")),
                num(fig.get("curvature_variation")),
            )
        )
    return header, rows


def inflection_rows(review: FileReview):
    header = ["section", "curve", "s mm", "point (mm)", "face", "(u, v)"]
    rows = []
    for _, section, ci, c in _curves(review):
        for p in c.get("inflections", ()):
            uv = p.get("uv")
            rows.append(
                (
                    section.get("label", "-"),
                    str(ci + 1),
                    num(p.get("s")),
                    xyz(p.get("point")),
                    str(p.get("face", "-")),
                    "-" if uv is None else f"({num(uv[0])}, {num(uv[1])})",
                )
            )
    return header, rows


def extrema_rows(review: FileReview):
    header = ["section", "curve", "s mm", "curvature 1/mm", "radius mm", "kind", "point (mm)"]
    rows = []
    for _, section, ci, c in _curves(review):
        for p in c.get("extrema", ()):
            k = p.get("curvature")
            radius = None if not k else 1.0 / abs(float(k))
            kind = "-" if "maximum" not in p else ("max" if p["maximum"] else "min")
            rows.append(
                (
                    section.get("label", "-"),
                    str(ci + 1),
                    num(p.get("s")),
                    num(k),
                    num(radius),
                    kind,
                    xyz(p.get("point")),
                )
            )
    return header, rows


def face_rows(review: FileReview):
    header = ["face", "name", "degrees", "poles", "k1 min..max", "k2 min..max", "K min..max", "min radius mm"]
    rows = []
    for f in review.faces:
        c = f.curvature
        span = (lambda a: f"{num(a[0], 3)} .. {num(a[1], 3)}") if c else None
        rows.append(
            (
                str(f.id),
                f.name or "-",
                f"{f.degrees[0]} x {f.degrees[1]}",
                f"{f.poles[0]} x {f.poles[1]}",
                span(c.k1) if c else "-",
                span(c.k2) if c else "-",
                span(c.gaussian) if c else "-",
                num(c.min_radius) if c else "-",
            )
        )
    return header, rows


def _area(value) -> str:
    return "-" if value is None else f"{num(value)} mm^2"


def tooling_facts(review: FileReview) -> list[tuple[str, str]]:
    """The tooling settings and totals of a file, as (label, text) pairs (empty when not checked)."""
    t = review.tooling
    if not t:
        return []
    pull = "none (no draft or undercut check)" if t["pull"] is None else f"{xyz(t['pull'])} (from {t['pull_source']})"
    limit = "not judged" if t["draft_min_deg"] is None else f"{num(t['draft_min_deg'])} deg"
    cutter = "not judged" if t["cutter_radius_mm"] is None else f"{num(t['cutter_radius_mm'])} mm ball end"
    radius = t["concave_radius_mm"]
    return [
        ("pull direction", pull),
        ("least draft", limit),
        (
            "area short of draft",
            "-" if t["insufficient_area_mm2"] is None else f"{num(t['insufficient_area_mm2'])} mm^2",
        ),
        ("undercut area", "-" if t["undercut_area_mm2"] is None else f"{num(t['undercut_area_mm2'])} mm^2"),
        ("cutter", cutter),
        ("tightest concave radius", "nothing concave" if radius is None else f"{num(radius)} mm"),
    ]


def tooling_rows(review: FileReview):
    """Per face: draft range, least draft, area short of draft, undercut area, concave radius, area out of reach."""
    header = [
        "face",
        "area mm^2",
        "draft deg",
        "least |draft|",
        "short mm^2",
        "undercut mm^2",
        "radius mm",
        "no reach mm^2",
    ]
    rows = []
    for f in (review.tooling or {}).get("faces", ()):
        span = f["draft_range_deg"]
        rows.append(
            (
                f"{f['face']} {f['name']}".strip(),
                num(f["area_mm2"]),
                "-" if span is None else f"{num(span[0])} .. {num(span[1])}",
                num(f["least_draft_deg"]),
                num(f["insufficient_area_mm2"]),
                num(f["undercut_area_mm2"]),
                num(f["concave_radius_mm"]),
                num(f["out_of_reach_area_mm2"]),
            )
        )
    return header, rows


def undercut_rows(review: FileReview):
    header = ["region", "face", "area mm^2", "centre (mm)"]
    regions = (review.tooling or {}).get("undercuts", ())
    rows = [
        (str(i + 1), f"{r['face']} {r['name']}".strip(), num(r["area_mm2"]), xyz(r["centre"]))
        for i, r in enumerate(regions)
    ]
    return header, rows
