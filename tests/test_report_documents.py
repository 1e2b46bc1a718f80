"""The review report, PDF and HTML: what a review board reads, checked through poppler's text."""

from __future__ import annotations

import re
import shutil
import subprocess
import unicodedata
from html.parser import HTMLParser
from pathlib import Path

import pytest

from app.cli import main
from app.report.document import REVIEW_AID
from app.report.figures import render_figures
from app.report.tables import seam_rows
from app.review.batch import check_one
from app.review.result import FileReview
from app.review.runner import ReviewSettings

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
VISOR = SAMPLES / "hood_visor.stp"  # G1 seam visor_flat / visor_bend (manifest)
HEATGUN = SAMPLES / "heatgun_covers.stp"  # 0.02 mm gap cover_rear / cover_front (manifest)
SECTIONS = "x:3;y:2"
# The report's own test adds a plane given by point and normal: its spec string must not reach the page.
SECTIONS_PDF = "x:3;y:2;plane:0,60,10,0,1,0"
# Pictures per checked file: findings, 3 curvature views, stripes, combs, one plot per section family (x, y).
PICTURES_PER_FILE = 8

needs_poppler = pytest.mark.skipif(shutil.which("pdftotext") is None, reason="poppler-utils not installed")


def _squash(text: str) -> str:
    # NFKC undoes the ligatures (fi, ff) that pdftotext passes through from the PDF's fonts.
    return re.sub(r"\s+", "", unicodedata.normalize("NFKC", text))


@pytest.fixture(scope="module")
def pdf_report(tmp_path_factory):
    folder = tmp_path_factory.mktemp("pdf")
    out = folder / "review.pdf"
    missing = folder / "gone.stp"
    status = main(
        [
            "check",
            str(VISOR),
            str(HEATGUN),
            str(missing),
            "--sections",
            SECTIONS_PDF,
            "--report",
            str(out),
            "--jobs",
            "2",
            "--quiet",
        ]
    )
    return status, out


@needs_poppler
def test_pdf_holds_the_key_rows(pdf_report):
    status, out = pdf_report
    assert status == 2  # one input missing, the other two still in the report
    text = subprocess.run(["pdftotext", "-layout", str(out), "-"], capture_output=True, text=True, check=True).stdout
    text = unicodedata.normalize("NFKC", text)
    flat = _squash(text)
    for words in (
        "Surface fairness review",
        "FAIL: findings over tolerance",
        "NOT CHECKED: the file cannot be read",
        "no such file",
        "Seams, worst first",
        "Section curves: fairness figures",
        "Inflections of the section curves",
        "Curvature extrema along the sections",
        "Faces and their curvature",
        "Review sign-off",
        "Tolerance profile",
    ):
        assert _squash(words) in flat, words
    assert _squash(REVIEW_AID) in flat
    for path in (VISOR, HEATGUN):
        digest = __import__("hashlib").sha256(path.read_bytes()).hexdigest()
        assert digest in flat, path.name
    assert re.search(r"visor_flat and visor_bend\s.*\sG1\s+FAIL\n", text), "visor seam row"
    assert re.search(r"cover_rear and cover_front\s.*\snone\s+FAIL\n", text), "heat gun seam row"
    assert "gap between them is at most 0.01 mm" in text and "Class-A review" in text
    assert "x = " in text and "y = " in text  # section labels in the figures table


@needs_poppler
def test_pdf_has_every_picture(pdf_report):
    _, out = pdf_report
    listing = subprocess.run(["pdfimages", "-list", str(out)], capture_output=True, text=True, check=True).stdout
    images = [line for line in listing.splitlines()[2:] if line.strip()]
    assert len(images) >= 2 * PICTURES_PER_FILE


def test_html_is_self_contained(tmp_path):
    from app.report import write_report

    review, figures = check_one(str(VISOR), ReviewSettings(sections=SECTIONS), render_figures, False)
    out = write_report(tmp_path / "review.html", [review], [figures], created="2026-12-01 19:00 UTC")
    html = out.read_text()
    sources = re.findall(r'<img src="([^"]+)"', html)
    assert len(sources) == len(figures) == PICTURES_PER_FILE
    assert all(s.startswith("data:image/png;base64,") for s in sources)
    # no remote resource (a base64 picture may spell "http" by chance: look at how each address starts)
    addresses = re.findall(r'(?:src|href)="([^"]+)"', html)
    assert not [a for a in addresses if a.lower().startswith(("http:", "https:", "//", "ftp:"))]
    for words in ("visor_flat and visor_bend", REVIEW_AID.split(".")[0], review.sha256, "2026-12-01 19:00 UTC"):
        assert words in html
    assert sorted(tmp_path.iterdir()) == [out]  # no temporary file left


def test_seam_table_lists_the_worst_first():
    seams = (
        {"id": 0, "face_names": ["a", "b"], "continuity": "G2", "verdict": "pass", "gap_max": 0.0},
        {"id": 1, "face_names": ["b", "c"], "continuity": "G1", "verdict": "fail", "curvature_jump_rel_max": 0.2},
        {"id": 2, "face_names": ["c", "d"], "continuity": "broken", "verdict": "fail", "gap_max": 0.02},
        {
            "id": 3,
            "face_names": ["d", "e"],
            "continuity": "G1",
            "verdict": "fail",
            "curvature_jump_rel_max": 0.9,
            "angle_max_deg": 0.01,
        },
    )
    _, rows, _ = seam_rows(FileReview(source="x", status="checked", seams=seams))
    assert [r[0] for r in rows] == ["2", "3", "1", "0"]


def test_seams_within_tolerance_beyond_the_nearest_misses_are_counted_not_listed():
    # 3 failing seams and 50 passing ones, the passing ones by rising angle: the worst pass come first.
    failing = [{"id": i, "face_names": ["a", "b"], "continuity": "G1", "verdict": "fail"} for i in range(3)]
    passing = [
        {"id": 10 + i, "face_names": ["a", "b"], "continuity": "G2", "verdict": "pass", "angle_max_deg": 0.001 * i}
        for i in range(50)
    ]
    _, rows, left_out = seam_rows(FileReview(source="x", status="checked", seams=(*failing, *passing)), 20)
    assert left_out == 30 and len(rows) == 23
    assert [r[0] for r in rows[:3]] == ["0", "1", "2"] and rows[3][0] == "59"  # every failure, then the worst pass


def test_a_large_models_tooling_table_lists_the_faces_with_something_to_report():
    from app.report.tables import TOOLING_FACES_ALL, tooling_rows

    def face(i, concave=None, short=0.0):
        return {
            "face": i,
            "name": f"panel_{i}",
            "area_mm2": 100.0,
            "draft_range_deg": None,
            "least_draft_deg": None,
            "insufficient_area_mm2": short,
            "undercut_area_mm2": 0.0,
            "concave_radius_mm": concave,
            "out_of_reach_area_mm2": 0.0,
        }

    faces = [face(i, concave=400.0 + i) for i in range(TOOLING_FACES_ALL + 10)]
    faces += [face(98, concave=4.0), face(99, short=2.5)]
    review = FileReview(source="x", status="checked", tooling={"faces": faces}, profile={"flat_curvature_per_mm": 1e-6})
    _, rows = tooling_rows(review)
    # the tightest concave face and the one short of draft; gently concave panels are nothing to report
    assert [r[1] for r in rows] == ["panel_98", "panel_99"]


def test_a_section_across_many_faces_names_a_few_and_counts_the_rest():
    from app.report.tables import figure_rows
    from app.review.faces import FaceSummary

    faces = tuple(FaceSummary(i, f"fascia_{i:02d}", "", (3, 3), (4, 4), False, False, False, None) for i in range(12))
    section = {"label": "x = 80", "curves": [{"faces": list(range(12)), "figures": {}}]}
    _, rows = figure_rows(FileReview(source="x", status="checked", faces=faces, sections=(section,)))
    assert rows[0][1] == "fascia_00, fascia_01, fascia_02, fascia_03 and 8 more faces"


def test_report_needs_a_known_extension(tmp_path):
    from app.report import write_report
    from geometry.errors import BattenError

    with pytest.raises(BattenError, match=r"\.pdf or \.html"):
        write_report(tmp_path / "r.txt", [])


# -- reading the report as its reader does ------------------------------------------------------------
UNIT = re.compile(r"\((mm|1/mm|1/mm²|1/mm³|°|%)\)")
NUMBER = re.compile(r"^[-+]?\d+(\.\d+)?(×10[⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+)?$")
PAGE_FOOT = re.compile(r"^\s*Page \d+ of \d+\s*$")


def _pdf_pages(path) -> list[list[str]]:
    text = subprocess.run(["pdftotext", "-layout", str(path), "-"], capture_output=True, text=True, check=True).stdout
    text = unicodedata.normalize("NFKC", text)
    return [[line.strip() for line in page.splitlines() if line.strip()] for page in text.split("\f") if page.strip()]


class _Tables(HTMLParser):
    """Headings and tables (header cells, body rows) of the report's HTML."""

    def __init__(self):
        super().__init__()
        self.headings, self.tables, self._text, self._in = [], [], None, None

    def handle_starttag(self, tag, attrs):
        if tag == "br" and self._text is not None:
            self._text.append(" ")
        elif tag in ("h1", "h2", "h3"):
            self._text, self._in = [], tag
        elif tag == "table":
            self.tables.append({"header": [], "rows": []})
        elif tag == "tr" and self.tables:
            self._row = []
        elif tag in ("td", "th"):
            self._text, self._in = [], tag

    def handle_endtag(self, tag):
        if tag == self._in and self._text is not None:
            text = "".join(self._text).replace("\u2060", "").strip()
            if tag in ("h1", "h2", "h3"):
                self.headings.append(text)
            elif tag == "th":
                self.tables[-1]["header"].append(text)
            else:
                self._row.append(text)
            self._text, self._in = None, None
        elif tag == "tr" and self.tables and self._row:
            self.tables[-1]["rows"].append(self._row)
            self._row = []

    def handle_data(self, data):
        if self._text is not None:
            self._text.append(data)


@pytest.fixture(scope="module")
def html_report(pdf_report, tmp_path_factory):
    """The same files and sections as the PDF, without pictures (the text is the same)."""
    from app.report import write_report

    folder = tmp_path_factory.mktemp("html")
    settings = ReviewSettings(sections=SECTIONS_PDF)
    missing = pdf_report[1].parent / "gone.stp"
    reviews = [check_one(str(p), settings, False, False)[0] for p in (VISOR, HEATGUN, missing)]
    out = write_report(folder / "review.html", reviews, created="2026-12-01 19:00 UTC")
    parsed = _Tables()
    parsed.feed(out.read_text())
    return reviews, out.read_text(), parsed


def _profile_keys() -> set[str]:
    from app.profiles import get_profile

    values = get_profile("class-a").as_dict()
    return {k for k in [*values, *values["basis"]] if "_" in k}


@needs_poppler
def test_pdf_has_no_spec_strings_or_profile_keys(pdf_report):
    _, out = pdf_report
    text = "\n".join("\n".join(p) for p in _pdf_pages(out))
    assert "plane:" not in text and "x:3" not in text and "y:2" not in text
    assert "plane 1 through (0, 60, 10) mm with normal (0, 1, 0)" in text
    for key in _profile_keys():
        assert key not in text, key
    assert "gaussian" not in text and "Gaussian" in text
    assert not re.search(r"(?<![\w.])-0(?![.\d×])", text), "a -0 on the page"
    assert not re.search(r"\b1 (faces|planes|curves|seams|findings|inflections|files)\b", text)
    assert not re.search(r"\b([02-9]|\d\d+) (face|plane|curve|seam|finding|inflection|file)\b", text)


@needs_poppler
def test_pdf_headings_are_never_last_on_a_page(pdf_report, html_report):
    _, out = pdf_report
    headings = set(html_report[2].headings) | {"Pictures"}
    pages = _pdf_pages(out)
    assert len(pages) > 3
    for number, lines in enumerate(pages, start=1):
        body = [line for line in lines if not PAGE_FOOT.match(line)]
        assert body[-1] not in headings, f"page {number} ends with the heading {body[-1]!r}"


@needs_poppler
def test_pdf_pages_carry_model_name_and_number(pdf_report):
    _, out = pdf_report
    pages = _pdf_pages(out)
    for number, lines in enumerate(pages, start=1):
        assert lines[0].startswith("Surface fairness review:"), number
        assert any(name in lines[0] for name in ("hood_visor.stp", "heatgun_covers.stp", "gone.stp")), number
        assert lines[-1] == f"Page {number} of {len(pages)}"
    assert any("hood_visor.stp" in p[0] and "heatgun" not in p[0] for p in pages)


def test_html_tables_give_every_number_column_a_unit(html_report):
    _, _, parsed = html_report
    checked = 0
    for table in parsed.tables:
        header = table["header"]
        for col, title in enumerate(header):
            cells = [row[col] for row in table["rows"] if col < len(row) and row[col] not in ("-", "")]
            if not cells or not all(NUMBER.match(c) for c in cells):
                continue
            checked += 1
            # Whole numbers alone may be counts or identifiers (No., Inflections): they need no unit.
            if not all(re.fullmatch(r"\d+", c) for c in cells):
                assert UNIT.search(title), f"column {title!r} of numbers has no unit"
    assert checked > 10


def test_html_tables_name_faces(html_report):
    reviews, text, parsed = html_report
    names = {f.name for r in reviews for f in r.faces}
    assert {"visor_flat", "visor_bend", "cover_rear", "cover_front"} <= names
    face_columns = 0
    for table in parsed.tables:
        if table["header"][:1] == ["File"]:
            continue  # the cover's list of files counts faces
        for col, title in enumerate(table["header"]):
            if title in ("Face", "Faces", "Faces crossed"):
                face_columns += 1
                for row in table["rows"]:
                    cell_names = set(re.split(r", | and ", row[col]))
                    assert cell_names <= names, (title, row[col])
    assert face_columns >= 5
    assert "visor_flat and visor_bend" in text


def test_html_and_pdf_carry_the_same_text(pdf_report, html_report):
    """Every word of every heading and table cell of the HTML is in the PDF (same files, same sections).

    Words, not whole cells: pdftotext interleaves the lines of wrapped cells that stand side by side.
    """
    _, out = pdf_report
    words = {w for page in _pdf_pages(out) for line in page for w in re.split(r"\s+|×", line)}
    flat = _squash("".join("".join(page) for page in _pdf_pages(out)))
    _, _, parsed = html_report
    for text in [
        *parsed.headings,
        *(c for t in parsed.tables for c in [*t["header"], *(x for r in t["rows"] for x in r)]),
    ]:
        # pdftotext drops the spaces around a narrow "×": compare the words on either side of it.
        # A word longer than a column (the file's SHA-256) wraps inside itself: look for it squashed.
        split = re.split(r"\s+|×", unicodedata.normalize("NFKC", text))
        missing = [w for w in split if w and w not in words and not (len(w) > 40 and w in flat)]
        assert not missing, (text, missing)


def test_html_says_what_was_not_checked(html_report):
    _, text, parsed = html_report
    assert "What was checked" in parsed.headings
    # Draft and undercut run with every check now: their section is there, no "not part of this check" line.
    assert "Release to tooling" in parsed.headings
    assert "Free edges (open boundaries) are listed for the reviewer, not judged." in text
    assert "NOT CHECKED: the file cannot be read" in text
