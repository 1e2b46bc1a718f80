"""The PDF's pages: a table row is never split by a page end, and a table that runs on repeats its header."""

from __future__ import annotations

import shutil
import subprocess

import pytest

from app.report.pages import split_rows, split_tables

ROWS = 160
needs_poppler = pytest.mark.skipif(shutil.which("pdftotext") is None, reason="poppler-utils not installed")


def long_table() -> str:
    """A heading, then a table whose rows are one to six lines tall, so page ends fall inside rows."""
    rows = "".join(f"<tr><td>{i}</td><td>begin{i} {'word ' * (4 + (i * 37) % 70)}end{i}</td></tr>" for i in range(ROWS))
    return (
        '<h2>Long table</h2><table border="1" cellspacing="0" cellpadding="3" width="100%" style="font-size: 9pt;">'
        f"<thead><tr><th>Row</th><th>Text of the row</th></tr></thead><tbody>{rows}</tbody></table><p>after</p>"
    )


def test_split_tables_repeats_the_header():
    html = long_table()
    split = split_tables(html, {0: 11})  # header row 0, body rows 1.. : row 11 is body row 10
    assert split.count("<table") == 2 and split.count("<thead>") == 2
    second = split[split.index("<table", split.index("<table") + 1) :]
    assert second.startswith('<table border="1"') and "page-break-before: always" in second[:200]
    assert "begin10 " in second and "begin9 " not in second


@needs_poppler
def test_rows_stay_whole_and_headers_repeat(tmp_path):
    from PySide6.QtCore import QMarginsF
    from PySide6.QtGui import QPageLayout, QPageSize, QPdfWriter, QTextDocument

    from app.report.pages import A4_MM, BAND_MM, MARGIN_MM, _px, print_pages
    from app.report.writers import _gui_application

    _gui_application()
    out = tmp_path / "long.pdf"
    writer = QPdfWriter(str(out))
    writer.setPageSize(QPageSize(QPageSize.PageSizeId.A4))
    writer.setPageMargins(QMarginsF(*(MARGIN_MM,) * 4), QPageLayout.Unit.Millimeter)
    doc = QTextDocument()
    count = print_pages(writer, doc, long_table(), lambda page, chapter: ("Long", f"{page}"), [])
    height = _px(A4_MM[1] - 2 * MARGIN_MM - 2 * BAND_MM)
    assert split_rows(doc, height) == {}
    del doc, writer
    text = subprocess.run(["pdftotext", "-layout", str(out), "-"], capture_output=True, text=True, check=True).stdout
    pages = [page for page in text.split("\f") if page.strip()]
    assert len(pages) == count > 2
    for i in range(ROWS):
        where = [n for n, page in enumerate(pages) if f"begin{i} " in page]
        assert len(where) == 1 and f"end{i}" in pages[where[0]], f"row {i} is split across pages"
    for page in pages:
        if "begin" in page:
            assert "Text of the row" in page  # every page of the table starts with its header


@needs_poppler
@pytest.mark.parametrize("filler_lines", [32, 48, 66])
def test_a_heading_keeps_a_tall_first_row(tmp_path, filler_lines):
    # The first row's tall cell is not in its first column: the heading once stayed behind alone.
    filler = "".join(f"<p>filler line {i}</p>" for i in range(filler_lines))
    faces = ", ".join(f"face_{i:02d}" for i in range(14))
    table = (
        '<table border="1" width="100%"><thead><tr><th width="15%">Curve</th><th width="15%">Faces</th></tr></thead>'
        f"<tbody><tr><td>first</td><td>{faces}</td></tr><tr><td>second</td><td>{faces}</td></tr></tbody></table>"
    )
    pages = _printed(tmp_path, f"{filler}<h3>Tall rows</h3>{table}")
    where = [n for n, page in enumerate(pages) if "Tall rows" in page]
    assert len(where) == 1 and "face_13" in pages[where[0]]


def _printed(tmp_path, html: str) -> list[str]:
    from PySide6.QtCore import QMarginsF
    from PySide6.QtGui import QPageLayout, QPageSize, QPdfWriter, QTextDocument

    from app.report.pages import MARGIN_MM, print_pages
    from app.report.writers import _gui_application

    _gui_application()
    out = tmp_path / "printed.pdf"
    writer = QPdfWriter(str(out))
    writer.setPageSize(QPageSize(QPageSize.PageSizeId.A4))
    writer.setPageMargins(QMarginsF(*(MARGIN_MM,) * 4), QPageLayout.Unit.Millimeter)
    doc = QTextDocument()
    print_pages(writer, doc, html, lambda page, chapter: ("", ""), [])
    del doc, writer
    text = subprocess.run(["pdftotext", "-layout", str(out), "-"], capture_output=True, text=True, check=True).stdout
    return [page for page in text.split("\f") if page.strip()]


@needs_poppler
def test_a_short_note_is_never_split_by_a_page_end(tmp_path):
    # A table's note once ran over a page end and left its last word alone on a page of its own.
    note = "<p>opening-word " + "middle words of a note that wraps over several lines " * 10 + "closing-word</p>"
    splits = 0
    # without the rule, 34 and 35 filler lines put a page end inside the note (measured when written)
    for filler_lines in range(32, 38):
        filler = "".join(f"<p>filler line {i}</p>" for i in range(filler_lines))
        pages = _printed(tmp_path, filler + note + "<p>after the note</p>")
        where = [n for n, page in enumerate(pages) if "opening-word" in page]
        splits += "closing-word" not in pages[where[0]]
    assert splits == 0


@pytest.mark.parametrize("width", [300, 330, 360, 400])
def test_units_and_norms_never_break_at_a_line_end(width):
    """Qt's line breaker may break after "/" and "|": a narrow header must still read "|k|" and "1/mm" whole.

    CI once printed "Largest |" over "k| (1/mm)" when a column came out narrower.
    """
    from PySide6.QtGui import QTextDocument

    from app.report.blocks import paragraph, table
    from app.report.writers import _gui_application

    _gui_application()
    header = ["Section curve", "Faces crossed", "Length (mm)", "Largest |k| (1/mm)", "Variation (1/mm³)"]
    doc = QTextDocument()
    doc.setHtml(table(header, [["x = 1 mm", "a", "1", "2", "3"]], "") + paragraph("so |k| is 1/mm " * 30))
    doc.setTextWidth(width)
    doc.size()  # lays the document out
    block, broken = doc.begin(), []
    while block.isValid():
        layout, text = block.layout(), block.text()
        for i in range(layout.lineCount()):
            end = layout.lineAt(i).textStart() + layout.lineAt(i).textLength()
            if end < len(text) and text[end - 1] in "/|" and not text[end].isspace():
                broken.append(text[: end + 3])
        block = block.next()
    assert not broken
