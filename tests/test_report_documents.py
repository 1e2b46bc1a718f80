"""The review report, PDF and HTML: what a review board reads, checked through poppler's text."""

from __future__ import annotations

import re
import shutil
import subprocess
import unicodedata
from pathlib import Path

import pytest

from app.cli import main
from app.report.document import REVIEW_AID
from app.report.tables import seam_rows
from app.review.batch import check_one
from app.review.result import FileReview
from app.review.runner import ReviewSettings

SAMPLES = Path(__file__).resolve().parents[1] / "sample_surfaces"
VISOR = SAMPLES / "hood_visor.stp"  # G1 seam visor_flat / visor_bend (manifest)
HEATGUN = SAMPLES / "heatgun_covers.stp"  # 0.02 mm gap cover_rear / cover_front (manifest)
SECTIONS = "x:3;y:2"
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
            SECTIONS,
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
        "Seams (worst first)",
        "Sections: fairness figures",
        "Inflections",
        "Curvature extrema",
        "Faces and curvature ranges",
        "Review sign-off",
        "Tolerance profile",
    ):
        assert _squash(words) in flat, words
    assert _squash(REVIEW_AID) in flat
    for path in (VISOR, HEATGUN):
        digest = __import__("hashlib").sha256(path.read_bytes()).hexdigest()
        assert digest in flat, path.name
    assert re.search(r"visor_flat / visor_bend\s.*\sG1\s+FAIL\n", text), "visor seam row"
    assert re.search(r"cover_rear / cover_front\s.*\sbroken\s+FAIL\n", text), "heat gun seam row"
    assert re.search(r"position_mm\s+0\.01\s", text) and "class-a" in text
    assert "x = " in text and "y = " in text  # section labels in the figures table


@needs_poppler
def test_pdf_has_every_picture(pdf_report):
    _, out = pdf_report
    listing = subprocess.run(["pdfimages", "-list", str(out)], capture_output=True, text=True, check=True).stdout
    images = [line for line in listing.splitlines()[2:] if line.strip()]
    assert len(images) >= 2 * PICTURES_PER_FILE


def test_html_is_self_contained(tmp_path):
    from app.report import write_report

    review, figures = check_one(str(VISOR), ReviewSettings(sections=SECTIONS), True, False)
    out = write_report(tmp_path / "review.html", [review], [figures], created="2026-12-01 19:00 UTC")
    html = out.read_text()
    sources = re.findall(r'<img src="([^"]+)"', html)
    assert len(sources) == len(figures) == PICTURES_PER_FILE
    assert all(s.startswith("data:image/png;base64,") for s in sources)
    assert "http" not in "".join(re.findall(r'(?:src|href)="([^"]+)"', html))
    for words in ("visor_flat / visor_bend", REVIEW_AID.split(".")[0], review.sha256, "2026-12-01 19:00 UTC"):
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
    _, rows = seam_rows(FileReview(source="x", status="checked", seams=seams))
    assert [r[0] for r in rows] == ["2", "3", "1", "0"]


def test_report_needs_a_known_extension(tmp_path):
    from app.report import write_report
    from geometry.errors import BattenError

    with pytest.raises(BattenError, match=r"\.pdf or \.html"):
        write_report(tmp_path / "r.txt", [])
