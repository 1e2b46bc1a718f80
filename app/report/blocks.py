"""HTML building blocks of the review document: headings, tables, facts, verdicts, pictures.

Only the HTML subset Qt's rich-text engine lays out is used (tables with
border attributes, inline styles, ``page-break-before``), so the PDF laid out
by QTextDocument and the HTML file opened in a browser read the same. Cells
are escaped here unless they are :class:`~app.report.wording.Markup`.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from html import escape

from app.render.colours import VERDICT
from app.review.result import ERROR, FAIL, PASS, UNREADABLE

from .wording import html

# the window's verdict colours (one palette); the two "not checked" states have their own
VERDICT_COLOURS = {PASS: VERDICT["pass"], FAIL: VERDICT["fail"], UNREADABLE: "#7a4b00", ERROR: "#5a5a5a"}
VERDICT_WORDS = {
    PASS: "PASS: no finding over tolerance",
    FAIL: "FAIL: findings over tolerance",
    UNREADABLE: "NOT CHECKED: the file cannot be read",
    ERROR: "NOT CHECKED: the analysis stopped on an internal error",
}
# Cells this short (numbers, classes, verdicts, "x = 80 mm") never break mid-word.
NOWRAP_CHARS = 14
HEADER_COLOUR = "#e4e8ec"
SMALL = "font-size: 8pt;"
WJ = "\u2060"  # word joiner: no line break here
# Qt's line breaker may break after "/" (1/mm) and after "|" (|k|): a word joiner there keeps the unit whole.
_BREAK_AFTER = re.compile(r"(/|\|(?=\S))")
_TAG = re.compile(r"(<[^>]*>)")


def unbroken(text: str) -> str:
    """HTML ``text`` with no line break inside a unit or a norm: ``1/mm`` and ``|k|`` stay whole at a line end."""
    # only between tags: a "/" inside "</b>" or an attribute is markup, not text
    parts = _TAG.split(text)
    parts[::2] = [_BREAK_AFTER.sub(lambda m: m.group(1) + WJ, p) for p in parts[::2]]
    return "".join(parts)


def heading(text: str, level: int = 3, new_page: bool = False) -> str:
    """A heading; the PDF keeps it on the page of the content that follows it."""
    style = "page-break-before: always; " if new_page else ""
    size = {1: "20pt", 2: "15pt", 3: "11.5pt"}.get(level, "10pt")
    return f'<h{level} style="{style}font-size: {size};">{html(text)}</h{level}>'


def paragraph(text: str, small: bool = False, italic: bool = False) -> str:
    body = unbroken(html(text))
    body = f"<i>{body}</i>" if italic else body
    return f'<p style="{SMALL}">{body}</p>' if small else f"<p>{body}</p>"


def bullets(items: Sequence[str]) -> str:
    return "<ul>" + "".join(f"<li>{html(i)}</li>" for i in items) + "</ul>"


def _cell(value) -> str:
    text = str(value)
    if text in (FAIL, "FAIL"):
        body = f'<b><font color="{VERDICT_COLOURS[FAIL]}">FAIL</font></b>'
    elif text in (PASS, "PASS"):
        body = f'<font color="{VERDICT_COLOURS[PASS]}">pass</font>'
    elif text in (UNREADABLE, ERROR):
        body = f'<font color="{VERDICT_COLOURS[text]}">not checked</font>'
    else:
        body = html(value)
    nowrap = ' style="white-space: nowrap;"' if len(text) <= NOWRAP_CHARS else ""
    return f"<td{nowrap}>{body}</td>"


def _header_cell(text: str, width: int | None) -> str:
    # A one-word header never breaks; longer ones wrap between words.
    nowrap = ' style="white-space: nowrap;"' if " " not in text.strip() else ""
    size = f' width="{width}%"' if width else ""
    return f'<th bgcolor="{HEADER_COLOUR}" align="left"{size}{nowrap}>{unbroken(html(text))}</th>'


def table(header: Sequence[str], rows: Sequence[Sequence], empty: str, widths: Sequence[int] | None = None) -> str:
    """A table with a header row that repeats on every page, or the sentence ``empty`` when it has no rows.

    ``widths``: percent of the page per column (none: the layout decides).
    """
    if not rows:
        return paragraph(empty, italic=True)
    if widths is None or len(widths) != len(header):
        widths = [None] * len(header)
    head = "".join(_header_cell(h, w) for h, w in zip(header, widths, strict=True))
    body = "".join("<tr>" + "".join(_cell(c) for c in row) + "</tr>" for row in rows)
    return (
        '<table border="1" cellspacing="0" cellpadding="3" width="100%" style="border-collapse: collapse; '
        f'{SMALL}"><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>'
    )


def facts(pairs: Sequence[tuple[str, str]]) -> str:
    """Label and value, one pair a row."""
    rows = "".join(
        f'<tr><td bgcolor="#f0f2f4" width="28%"><b>{html(k)}</b></td><td>{html(v)}</td></tr>' for k, v in pairs
    )
    return f'<table border="1" cellspacing="0" cellpadding="3" width="100%" style="font-size: 9pt;">{rows}</table>'


def verdict_box(verdict: str, detail: str) -> str:
    colour = VERDICT_COLOURS[verdict]
    return (
        f'<table border="0" cellspacing="0" cellpadding="8" width="100%"><tr><td bgcolor="{colour}">'
        f'<font color="white" size="5"><b>{escape(VERDICT_WORDS[verdict])}</b></font><br/>'
        f'<font color="white">{html(detail)}</font></td></tr></table>'
    )


def notice(title: str, text: str) -> str:
    return (
        '<table border="1" cellspacing="0" cellpadding="6" width="100%"><tr><td bgcolor="#fdf6e3">'
        f"<b>{html(title)}</b> {html(text)}</td></tr></table>"
    )


def figure(src: str, caption: str, width: int) -> str:
    """A picture and its caption; the PDF keeps the two on one page.

    Each in its own paragraph: Qt lays an inline image over the text above otherwise.
    """
    text = unbroken(html(caption))
    return f'<p align="center"><img src="{src}" width="{width}"/></p><p style="{SMALL}"><i>{text}</i></p>'
