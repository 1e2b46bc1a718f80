"""Rows of the report's tables, as text, from a :class:`FileReview`.

Each function returns ``(header, rows)``. A header names its unit in
parentheses, or every cell carries its own; identifiers sit in a ``No.``
column; faces go by their names. Numbers are formatted here once, so the PDF
and the HTML show the same digits.
"""

from __future__ import annotations

import numpy as np

from app.review.result import FAIL, PASS, FileReview, Finding

from .wording import ROUNDING_LEVEL, count_words, curve_name, face_name, free_planes, number, plural, point, quantity

# The release-to-tooling tables' names for the same formatting.
num, xyz = number, point
# The column of identifiers: a table's only number column without a unit.
ID_HEADER = "No."
# measure of a finding -> what was measured, in words
MEASURE_WORDS = {
    "gap": "largest gap between the faces (G0)",
    "angle": "largest angle between the normals (G1)",
    "curvature jump": "largest curvature jump across the seam, of the larger curvature (G2)",
    "continuity": "continuity class",
    "inflections": "inflections on the section curve",
}
# "broken": the faces do not even meet in position.
# Column widths (percent of the page) of each table, so names and places get the room and numbers do not.
WIDTHS = {
    "findings": (5, 27, 26, 12, 9, 21),
    "seams": (5, 27, 8, 10, 10, 10, 10, 12, 8),
    "free_edges": (6, 30, 12, 26, 26),
    "figures": (15, 23, 8, 10, 8, 12, 10, 14),
    "inflections": (30, 18, 30, 22),
    "extrema": (24, 12, 14, 11, 11, 28),
    "faces": (5, 17, 9, 10, 16, 16, 16, 11),
    "checked": (22, 40, 19, 19),
    "files": (55, 12, 20, 13),
    "profile": (70, 30),
}
CONTINUITY_WORDS = {"broken": "none", "G0": "G0", "G1": "G1", "G2": "G2", "G3": "G3"}


def face_names(review: FileReview) -> list[str]:
    return [f.name for f in review.faces]


def finding_value(value, unit: str, limit: bool = False) -> str:
    """A finding's measured value or tolerance with its unit (``0.02 mm``, ``100%``, ``3 inflections``)."""
    if value is None:
        return "no limit"
    if unit == "fraction":
        return quantity(100.0 * float(value), "%", 3)
    if unit == "deg":
        return quantity(value, "°")
    if unit == "count":
        if limit and int(value) == 0:
            return "none"
        return plural(int(value), "inflection")
    return quantity(value, unit)


def _seam_by_id(review: FileReview) -> dict:
    return {s.get("id", i): s for i, s in enumerate(review.seams)}


def finding_place(review: FileReview, finding: Finding) -> str:
    """Where a finding is, for people: the seam and its faces, or the section curve."""
    ref = finding.ref or {}
    if "seam" in ref:
        seam = _seam_by_id(review).get(ref["seam"], {})
        names = seam_faces(review, seam)
        reached = seam.get("continuity", "?")
        if reached == "broken":
            return f"seam {ref['seam']} between {names}: the faces do not meet (not G0)"
        return f"seam {ref['seam']} between {names}: reaches {reached}"
    if "section" in ref and ref["section"] < len(review.sections):
        section = review.sections[ref["section"]]
        curves = len(section.get("curves", ()))
        return "section " + curve_name(section, int(ref.get("curve", 0)), curves, free_planes(review.sections))
    return finding.subject


def finding_rows(review: FileReview):
    """The findings over tolerance, numbered as the markers in the pictures."""
    header = [ID_HEADER, "Where", "What was measured", "Measured", "Allowed", "Position x, y, z (mm)"]
    rows = [
        (
            str(n),
            finding_place(review, f),
            MEASURE_WORDS.get(f.measure, f.measure),
            finding_value(f.value, f.unit),
            finding_value(f.limit, f.unit, limit=True),
            point(f.where),
        )
        for n, f in enumerate(review.findings, start=1)
        if f.verdict == FAIL
    ]
    return header, rows


def seam_faces(review: FileReview, seam: dict) -> str:
    names = seam.get("face_names")
    if not names:
        names = [face_name(i, face_names(review)) for i in seam.get("faces", ())]
    return " and ".join(str(n) for n in names) if len(names) == 2 else " / ".join(map(str, names))


def _seam_badness(seam: dict) -> tuple:
    """Failing seams first, then the weaker continuity class, then the larger gap, angle, jump."""
    rank = {"broken": 0, "G0": 1, "G1": 2, "G2": 3}.get(seam.get("continuity"), 4)
    measures = tuple(-float(seam.get(k) or 0.0) for k in ("gap_max", "angle_max_deg", "curvature_jump_rel_max"))
    return (seam.get("verdict") != FAIL, rank, *measures)


# Seams within tolerance listed after those over it (the worst first); the rest are counted, not listed:
# a board reads the failures and the nearest misses, not hundreds of clean joins.
SEAMS_WITHIN_LISTED = 20


def seam_rows(review: FileReview, within_listed: int | None = None):
    """Header and rows of the seam table, worst first; ``within_listed``: at most so many seams within tolerance.

    Returns
    -------
    header : list of str
    rows : list of tuple of str
    left_out : int
        Seams within tolerance not listed.
    """
    header = [
        ID_HEADER,
        "Faces",
        "Length (mm)",
        "Gap (mm)",
        "Angle (°)",
        "Jump (1/mm)",
        "Relative jump (%)",
        "Continuity reached",
        "Verdict",
    ]
    order = sorted(range(len(review.seams)), key=lambda i: _seam_badness(review.seams[i]))
    within = [i for i in order if review.seams[i].get("verdict") != FAIL]
    left_out = 0 if within_listed is None else max(len(within) - within_listed, 0)
    if left_out:
        order = order[: len(order) - left_out]
    rows = []
    for i in order:
        s = review.seams[i]
        rel = s.get("curvature_jump_rel_max")
        rows.append(
            (
                str(s.get("id", i)),
                seam_faces(review, s),
                number(s.get("length")),
                number(s.get("gap_max")),
                number(s.get("angle_max_deg")),
                number(s.get("curvature_jump_max")),
                number(None if rel is None else 100.0 * float(rel), 3),
                CONTINUITY_WORDS.get(s.get("continuity"), str(s.get("continuity", "-"))),
                str(s.get("verdict", "-")),
            )
        )
    return header, rows, left_out


def free_edge_rows(review: FileReview):
    header = [ID_HEADER, "Face", "Length (mm)", "From x, y, z (mm)", "To x, y, z (mm)"]
    names = face_names(review)
    rows = []
    for i, e in enumerate(review.free_edges):
        pts = e.get("points") or []
        rows.append(
            (
                str(e.get("id", i)),
                e.get("face_name") or face_name(e.get("face", "-"), names),
                number(e.get("length")),
                point(e.get("start", pts[0] if pts else None)),
                point(e.get("end", pts[-1] if pts else None)),
            )
        )
    return header, rows


def _curves(review: FileReview):
    """(curve name, curve) of every section curve, in order."""
    planes = free_planes(review.sections)
    for section in review.sections:
        curves = section.get("curves", ())
        for ci, curve in enumerate(curves):
            yield curve_name(section, ci, len(curves), planes), curve


# A section crossing more faces than this names the first few and counts the rest (the JSON names all):
# thirty names stacked in a narrow column made one row fill a page.
FACES_NAMED = 6


def _faces_of(review: FileReview, indices) -> str:
    names = [face_name(i, face_names(review)) for i in indices]
    if len(names) > FACES_NAMED:
        return f"{', '.join(names[: FACES_NAMED - 2])} and {len(names) - FACES_NAMED + 2} more faces"
    return ", ".join(names) or "-"


def figure_rows(review: FileReview):
    header = [
        "Section curve",
        "Faces crossed",
        "Length (mm)",
        "Inflections",
        "Extrema",
        "Monotone pieces",
        "Largest |k| (1/mm)",
        "Variation (1/mm\u00b3)",
    ]
    rows = []
    for name, c in _curves(review):
        fig = c.get("figures", {})
        rows.append(
            (
                name,
                _faces_of(review, c.get("faces", ())),
                number(c.get("length")),
                str(fig.get("inflections", len(c.get("inflections", ())))),
                str(fig.get("extrema", len(c.get("extrema", ())))),
                str(fig.get("monotone_pieces", "-")),
                number(fig.get("max_abs_curvature")),
                number(fig.get("curvature_variation")),
            )
        )
    return header, rows


def inflection_rows(review: FileReview):
    header = ["Section curve", "Arc length s (mm)", "Point x, y, z (mm)", "Face"]
    names = face_names(review)
    rows = [
        (name, number(p.get("s")), point(p.get("point")), face_name(p.get("face", "-"), names))
        for name, c in _curves(review)
        for p in c.get("inflections", ())
    ]
    return header, rows


def _radius(curvature, flat: float) -> str:
    if curvature is None or abs(float(curvature)) < flat:
        return "flat"
    return number(1.0 / abs(float(curvature)))


def flat_level(review: FileReview) -> float:
    """Curvature (1/mm) below which the check's profile counts a surface as flat."""
    return float(review.profile.get("flat_curvature_per_mm") or 1e-6)


def extrema_rows(review: FileReview):
    header = ["Section curve", "Arc length s (mm)", "Curvature k (1/mm)", "Radius (mm)", "Kind", "Point x, y, z (mm)"]
    flat = flat_level(review)
    rows = []
    for name, c in _curves(review):
        for p in c.get("extrema", ()):
            k = p.get("curvature")
            kind = "-" if "maximum" not in p else ("maximum" if p["maximum"] else "minimum")
            rows.append((name, number(p.get("s")), number(k), _radius(k, flat), kind, point(p.get("point"))))
    return header, rows


def _span(pair) -> str:
    # A curvature range ending within rounding noise of zero ends at zero.
    low, high = (0.0 if abs(float(v)) < ROUNDING_LEVEL else v for v in pair)
    return f"{number(low, 3)} to {number(high, 3)}"


def face_rows(review: FileReview):
    header = [
        ID_HEADER,
        "Face",
        "Degree u \u00d7 v",
        "Control points u \u00d7 v",
        "k1, lowest to highest (1/mm)",
        "k2, lowest to highest (1/mm)",
        "Gaussian K, lowest to highest (1/mm\u00b2)",
        "Smallest radius (mm)",
    ]
    rows = []
    for f in review.faces:
        c = f.curvature
        rows.append(
            (
                str(f.id),
                f.name or f"face {f.id}",
                f"{f.degrees[0]} \u00d7 {f.degrees[1]}",
                f"{f.poles[0]} \u00d7 {f.poles[1]}",
                _span(c.k1) if c else "-",
                _span(c.k2) if c else "-",
                _span(c.gaussian) if c else "-",
                ("flat" if c.min_radius is None else number(c.min_radius)) if c else "-",
            )
        )
    return header, rows


def checked_rows(review: FileReview):
    """What the check measured and judged, each count saying what it counts."""
    header = ["Check", "What was measured", "Within tolerance", "Over tolerance"]
    counts = review.summary()["counts"]
    seams = counts.get("seam", {})
    rows = [
        (
            "Seam continuity",
            count_words(len(review.seams), "seam") + " between faces",
            plural(seams.get(PASS, 0), "seam"),
            plural(seams.get(FAIL, 0), "seam"),
        )
    ]
    curves = [c for _, c in _curves(review)]
    found = sum(len(c.get("inflections", ())) for c in curves)
    measured = (
        f"{plural(len(review.sections), 'section plane')} cut, {plural(len(curves), 'section curve')}, "
        f"{plural(found, 'inflection')} on them"
    )
    if not review.sections:
        rows.append(("Inflections of section curves", "no section planes cut", "not checked", "-"))
    elif "inflection" in counts:
        judged = counts["inflection"]
        rows.append(
            (
                "Inflections of section curves",
                measured,
                plural(judged.get(PASS, 0), "curve"),
                plural(judged.get(FAIL, 0), "curve"),
            )
        )
    else:
        rows.append(("Inflections of section curves", measured, "listed, not judged", "-"))
    length = sum(float(e.get("length") or 0.0) for e in review.free_edges)
    edges = count_words(len(review.free_edges), "free edge")
    rows.append(("Open boundary", f"{edges}, {quantity(length, 'mm')} in all", "listed, not judged", "-"))
    return header, rows


def file_rows(reviews):
    """The cover's list of files: name, faces, findings over tolerance, verdict."""
    header = ["File", "Faces", "Findings over tolerance", "Verdict"]
    rows = []
    for r in reviews:
        checked = r.status == "checked"
        rows.append(
            (
                r.source,
                plural(len(r.faces), "face") if checked else "-",
                plural(len(r.failures), "finding") if checked else "not checked",
                r.verdict,
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
    limit = "not judged" if t["draft_min_deg"] is None else f"{num(t['draft_min_deg'])}\u00b0"
    cutter = "not judged" if t["cutter_radius_mm"] is None else f"{num(t['cutter_radius_mm'])} mm ball end"
    radius = t["concave_radius_mm"]
    return [
        ("Pull direction", pull),
        ("Least draft required", limit),
        (
            "Area short of draft",
            "-" if t["insufficient_area_mm2"] is None else f"{num(t['insufficient_area_mm2'])} mm\u00b2",
        ),
        ("Undercut area", "-" if t["undercut_area_mm2"] is None else f"{num(t['undercut_area_mm2'])} mm\u00b2"),
        ("Ball-end cutter", cutter),
        ("Tightest concave radius", "nothing concave" if _concave(review, radius) == "none" else f"{num(radius)} mm"),
    ]


def _concave(review: FileReview, radius) -> str:
    """A concave radius, or "none" where nothing is concave (no radius, or one flatter than the profile's flat)."""
    if radius is None or float(radius) * flat_level(review) >= 1.0:
        return "none"
    return num(radius)


# Up to this many faces the tooling table lists every face; beyond, only those with something to report.
TOOLING_FACES_ALL = 10


def _tooling_remark(f: dict) -> bool:
    """Whether a face has area short of draft, undercut or out of the cutter's reach."""
    areas = (f.get(k) for k in ("insufficient_area_mm2", "undercut_area_mm2", "out_of_reach_area_mm2"))
    return any(a is not None and float(a) > 0 for a in areas)


def listed_tooling_faces(review: FileReview) -> tuple[list[dict], int]:
    """The faces the tooling table lists, and how many faces with nothing to report it leaves out.

    Up to :data:`TOOLING_FACES_ALL` faces, all; beyond, those with a remark and
    the face holding the model's tightest concave radius (a gently concave
    panel far wider than the cutter is nothing to report).
    """
    faces = list((review.tooling or {}).get("faces", ()))
    if len(faces) <= TOOLING_FACES_ALL:
        return faces, 0
    radii = [
        float(f["concave_radius_mm"]) if _concave(review, f.get("concave_radius_mm")) != "none" else np.inf
        for f in faces
    ]
    tightest = int(np.argmin(radii)) if np.isfinite(min(radii, default=np.inf)) else -1
    listed = [f for i, f in enumerate(faces) if _tooling_remark(f) or i == tightest]
    return listed, len(faces) - len(listed)


def tooling_rows(review: FileReview):
    """Per face: draft range, least draft, area short of draft, undercut area, concave radius, area out of reach.

    Without a pull direction the draft and undercut columns are left out: nothing was measured in them.
    """
    header = [
        "No.",
        "Face",
        "Area (mm\u00b2)",
        "Draft range (\u00b0)",
        "Least |draft| (\u00b0)",
        "Short of draft (mm\u00b2)",
        "Undercut (mm\u00b2)",
        "Tightest concave radius (mm)",
        "Out of cutter reach (mm\u00b2)",
    ]
    rows = []
    for f in listed_tooling_faces(review)[0]:
        span = f["draft_range_deg"]
        rows.append(
            (
                str(f["face"]),
                f["name"] or "-",
                num(f["area_mm2"]),
                "-" if span is None else f"{num(span[0])} .. {num(span[1])}",
                num(f["least_draft_deg"]),
                num(f["insufficient_area_mm2"]),
                num(f["undercut_area_mm2"]),
                _concave(review, f["concave_radius_mm"]),
                num(f["out_of_reach_area_mm2"]),
            )
        )
    if (review.tooling or {}).get("pull") is None:
        keep = [0, 1, 2, 7, 8]
        header, rows = [header[k] for k in keep], [tuple(row[k] for k in keep) for row in rows]
    return header, rows


def undercut_rows(review: FileReview):
    header = ["Region", "No.", "Face", "Area (mm\u00b2)", "Centre x, y, z (mm)"]
    regions = (review.tooling or {}).get("undercuts", ())
    rows = [
        (str(i + 1), str(r["face"]), r["name"] or "-", num(r["area_mm2"]), xyz(r["centre"]))
        for i, r in enumerate(regions)
    ]
    return header, rows
