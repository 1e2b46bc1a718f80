"""The PDF's pages: the document laid out on A4, headings and pictures kept with what follows, a running
header with the model's name and a footer with the page number on every page.

QTextDocument paginates but knows no "keep with next"; :func:`keep_together`
supplies it: after layout, a heading or a picture whose following block (a
table's first body row, a caption) lands on a later page gets a page break
before it, and the layout runs on from there; a short paragraph that a page
end would split moves whole to the next page. QTextDocument also breaks a
table row between its lines where a page ends; :func:`split_rows` finds such
rows after layout and :func:`split_tables` ends the table before each one and
carries on in a new table, with the same header, on the next page. Pages are
then painted one by one, clipped, between a header and a footer of our own, as
QTextDocument's own ``print`` would do without them.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Sequence

# Layout resolution of the document (Qt's default screen resolution: image widths are in these pixels).
LAYOUT_DPI = 96.0
MM_PER_INCH = 25.4
A4_MM = (210.0, 297.0)
MARGIN_MM = 15.0
# Room for the running header and the footer inside the margins.
BAND_MM = 7.0
HEADER_POINT_SIZE = 7.5
OBJECT_CHAR = "\ufffc"  # a block made of this character alone holds an inline image
# Each pass splits the first broken row of every table; a long table needs one pass per page it runs onto.
MOST_PASSES = 40
# A paragraph shorter than this share of a page is never split by a page end.
NOTE_SHARE = 0.3
TABLE = re.compile(r"<table\b[^>]*>.*?</table>", re.S | re.I)
ROW = re.compile(r"<tr\b.*?</tr>", re.S | re.I)
HEAD = re.compile(r"<thead\b.*?</thead>", re.S | re.I)


def _px(mm: float) -> float:
    return mm / MM_PER_INCH * LAYOUT_DPI


def _is_picture(block) -> bool:
    text = block.text().strip()
    return bool(text) and set(text) == {OBJECT_CHAR}


def _keeps_with_next(block) -> bool:
    return block.blockFormat().headingLevel() > 0 or _is_picture(block)


def _is_note(block) -> bool:
    """A paragraph of text outside any table (a note, a caption, a bullet)."""
    from PySide6.QtGui import QTextCursor

    return bool(block.text().strip()) and not _is_picture(block) and QTextCursor(block).currentTable() is None


def _breaks_before(block) -> bool:
    from PySide6.QtGui import QTextFormat

    policy = block.blockFormat().pageBreakPolicy()
    return bool(policy & QTextFormat.PageBreakFlag.PageBreak_AlwaysBefore)


def _bottom_of(layout, block) -> float:
    """Where what a kept block must share a page with ends: a block's bottom, or a table's whole first body row."""
    from PySide6.QtGui import QTextCursor

    table = QTextCursor(block).currentTable()
    if table is None:
        return layout.blockBoundingRect(block).bottom()
    first = min(table.format().headerRowCount(), table.rows() - 1)
    return _row_extent(layout, table, first)[1]


def _group_end(block):
    """The last block a kept block must share a page with (a chain of headings and a picture and caption)."""
    nxt = block.next()
    while nxt.isValid() and not nxt.text().strip() and not _is_picture(nxt):
        nxt = nxt.next()
    if not nxt.isValid():
        return block
    if _keeps_with_next(nxt) and not _breaks_before(nxt):
        return _group_end(nxt)
    return nxt


def keep_together(doc, page_height: float) -> int:
    """Break the page before every heading or picture separated from what follows it.

    Parameters
    ----------
    doc : QTextDocument
        Laid out with a page size (``doc.setPageSize``).
    page_height : float
        Height of one page in layout pixels.

    Returns
    -------
    int
        How many page breaks were added.
    """
    from PySide6.QtGui import QTextBlockFormat, QTextCursor, QTextFormat

    layout = doc.documentLayout()
    added = 0
    block = doc.begin()
    while block.isValid():
        kept = _keeps_with_next(block)
        if kept or _is_note(block):
            top = layout.blockBoundingRect(block).top()
            end = _bottom_of(layout, _group_end(block)) if kept else layout.blockBoundingRect(block).bottom()
            first_page = int(top // page_height)
            # A group taller than a page cannot be kept together; leave it where it falls. A short paragraph
            # (a table's note) moves whole rather than leave a line or two alone at a page's top or foot.
            spans = int((end - 1.0) // page_height) > first_page
            at_top = top <= first_page * page_height + 1.0
            longest = page_height if kept else NOTE_SHARE * page_height
            if spans and not at_top and end - top < longest:
                fmt = QTextBlockFormat()
                fmt.setPageBreakPolicy(QTextFormat.PageBreakFlag.PageBreak_AlwaysBefore)
                QTextCursor(block).mergeBlockFormat(fmt)
                # Lay out again from here: positions read after a format change are stale otherwise.
                doc.markContentsDirty(block.position(), doc.characterCount() - block.position())
                added += 1
        block = block.next()
    return added


def _tables(doc) -> list:
    """The document's tables in reading order (the order of their ``<table>`` elements)."""
    from PySide6.QtGui import QTextCursor

    found, seen = [], set()
    block = doc.begin()
    while block.isValid():
        table = QTextCursor(block).currentTable()
        if table is not None and table.firstPosition() not in seen:
            seen.add(table.firstPosition())
            found.append(table)
        block = block.next()
    return found


def _row_extent(layout, table, row: int) -> tuple[float, float]:
    """Top of the first line and bottom of the last line of any cell in ``row``, in layout pixels."""
    top, bottom = float("inf"), float("-inf")
    for column in range(table.columns()):
        cell = table.cellAt(row, column)
        block, last = cell.firstCursorPosition().block(), cell.lastCursorPosition().block()
        while block.isValid():
            rect, lines = layout.blockBoundingRect(block), block.layout()
            for i in range(lines.lineCount()):
                line = lines.lineAt(i)
                top = min(top, rect.top() + line.y())
                bottom = max(bottom, rect.top() + line.y() + line.height())
            if block == last:
                break
            block = block.next()
    return top, bottom


def split_rows(doc, page_height: float) -> dict[int, int]:
    """The first row of each table that QTextDocument broke across a page end: ``{table index: row}``.

    Rows taller than a page cannot be kept whole and are left alone.
    """
    layout = doc.documentLayout()
    broken = {}
    for index, table in enumerate(_tables(doc)):
        for row in range(table.format().headerRowCount(), table.rows()):
            top, bottom = _row_extent(layout, table, row)
            if not top < bottom or bottom - top >= page_height:
                continue
            if int(top // page_height) != int((bottom - 1.0) // page_height):
                broken[index] = row
                break
    return broken


def _break_before(open_tag: str) -> str:
    """A ``<table ...>`` tag that starts a new page."""
    if re.search(r"style\s*=\s*\"", open_tag, re.I):
        return re.sub(r"(style\s*=\s*\")", r"\1page-break-before: always; ", open_tag, count=1, flags=re.I)
    return open_tag[:-1] + ' style="page-break-before: always">'


def _table(open_tag: str, head_html: str, rows: list[str]) -> str:
    return f"{open_tag}{head_html}<tbody>{''.join(rows)}</tbody></table>"


def split_tables(html: str, broken: dict[int, int]) -> str:
    """End each table of ``broken`` before its broken row and go on in a new table on the next page.

    Parameters
    ----------
    html : str
        The document; its ``<table>`` elements are not nested, in the order of :func:`_tables`.
    broken : dict of int to int
        From :func:`split_rows`: table index to the row (header rows counted) that must start a page.
    """
    pieces, at = [], 0
    for index, match in enumerate(TABLE.finditer(html)):
        if index not in broken:
            continue
        table = match.group(0)
        open_tag = table[: table.index(">") + 1]
        head = HEAD.search(table)
        head_html = head.group(0) if head else ""
        body = table[head.end() :] if head else table[len(open_tag) :]
        rows = ROW.findall(body)
        skipped = len(ROW.findall(head_html))
        cut = broken[index] - skipped
        if cut <= 0:
            replaced = _break_before(open_tag) + table[len(open_tag) :]
        else:
            replaced = _table(open_tag, head_html, rows[:cut]) + _table(_break_before(open_tag), head_html, rows[cut:])
        pieces += [html[at : match.start()], replaced]
        at = match.end()
    return "".join(pieces) + html[at:]


def _finish_layout(doc) -> None:
    """Lay the whole document out afresh: block formats changed after layout leave later blocks unpainted."""
    doc.markContentsDirty(0, doc.characterCount())
    layout = doc.documentLayout()
    block = doc.begin()
    while block.isValid():
        layout.blockBoundingRect(block)
        block = block.next()


def chapter_pages(doc, page_height: float) -> list[tuple[int, str]]:
    """(first page, title) of every level-2 heading, in order."""
    layout = doc.documentLayout()
    found = []
    block = doc.begin()
    while block.isValid():
        if block.blockFormat().headingLevel() == 2:
            found.append((int(layout.blockBoundingRect(block).top() // page_height), block.text().strip()))
        block = block.next()
    return found


def print_pages(
    writer,
    doc,
    html: str,
    header: Callable[[int, str], tuple[str, str]],
    chapters_named: Sequence[str],
) -> int:
    """Lay ``html`` out in ``doc`` on the writer's pages and paint them with a running header and footer.

    Parameters
    ----------
    writer : QPdfWriter
        With its page size and margins set.
    doc : QTextDocument
        Holding the pictures as resources.
    html : str
        The document.
    header : callable
        ``header(page_index, chapter_title) -> (left, right)``: the header's two texts.
    chapters_named : sequence of str
        Level-2 headings that name a model; the pages under any other heading (or
        before the first) belong to the whole review.

    Returns
    -------
    int
        Number of pages.
    """
    from PySide6.QtCore import QPointF, QRectF, QSizeF, Qt
    from PySide6.QtGui import QFont, QPainter

    width_mm = A4_MM[0] - 2 * MARGIN_MM
    height_mm = A4_MM[1] - 2 * MARGIN_MM - 2 * BAND_MM
    page = QSizeF(_px(width_mm), _px(height_mm))
    for _ in range(MOST_PASSES):
        doc.setHtml(html)
        doc.setPageSize(page)
        keep_together(doc, page.height())
        _finish_layout(doc)
        broken = split_rows(doc, page.height())
        if not broken:
            break
        html = split_tables(html, broken)
    count = doc.pageCount()
    chapters = chapter_pages(doc, page.height())
    named = set(chapters_named)

    painter = QPainter(writer)
    scale = writer.resolution() / LAYOUT_DPI
    band = _px(BAND_MM)
    font = QFont(doc.defaultFont())
    font.setPointSizeF(HEADER_POINT_SIZE)  # points of the PDF device: drawn before the layout's scale
    left_align = int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter)
    right_align = int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
    width = page.width() * scale
    try:
        for index in range(count):
            if index:
                writer.newPage()
            title = ""
            for first, name in chapters:
                if first <= index:
                    title = name if name in named else ""
            left, right = header(index, title)
            painter.setFont(font)
            top = QRectF(0.0, 0.0, width, band * 0.7 * scale)
            painter.drawText(top, left_align, left)
            painter.drawText(top, right_align, right)
            painter.drawLine(QPointF(0.0, band * 0.75 * scale), QPointF(width, band * 0.75 * scale))
            foot = QRectF(0.0, (band + page.height() + band * 0.3) * scale, width, band * 0.7 * scale)
            painter.drawText(foot, int(Qt.AlignmentFlag.AlignCenter), f"Page {index + 1} of {count}")
            painter.save()
            painter.scale(scale, scale)
            painter.translate(0.0, band - index * page.height())
            clip = QRectF(0.0, index * page.height(), page.width(), page.height())
            painter.setClipRect(clip)
            doc.drawContents(painter, clip)
            painter.restore()
    finally:
        painter.end()
    return count
