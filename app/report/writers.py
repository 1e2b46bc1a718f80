"""Write the review document as PDF (Qt's rich-text engine) or as one self-contained HTML file."""

from __future__ import annotations

import base64
import os
from collections.abc import Sequence
from pathlib import Path

from app.review.result import FileReview, now_stamp
from geometry import __version__
from geometry.errors import BattenError
from geometry.io.files import pdf_complete, write_atomically

from .document import TITLE, document, image_key, model_name
from .figures import Figure
from .pages import MARGIN_MM, print_pages

FORMATS = {".pdf": "pdf", ".html": "html", ".htm": "html"}
RESOURCE_SCHEME = "batten-image"
# More files than this: the cover's running header counts them instead of naming them.
MODELS_IN_HEADER = 3

_app = None  # the QApplication this module made, kept alive for later reports


def _gui_application():
    """The running Qt application, or a new one (text layout needs one).

    A full QApplication, so a window opened later in the same process can use
    it; off-screen only where there is no display to talk to.
    """
    global _app
    from PySide6.QtGui import QGuiApplication
    from PySide6.QtWidgets import QApplication

    app = QGuiApplication.instance()
    if app is None:
        if not (os.environ.get("DISPLAY") or os.environ.get("WAYLAND_DISPLAY")):
            os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
        _app = app = QApplication(["batten-report"])
    return app


def _images(figures: Sequence[Sequence[Figure]]) -> dict[str, bytes]:
    return {image_key(i, f.name): f.png for i, figs in enumerate(figures) for f in figs}


def _printable(text: str) -> str:
    """Text any encoder takes: bytes of a file name that were not UTF-8 (lone surrogates) become U+FFFD."""
    return text.encode("utf-8", "surrogateescape").decode("utf-8", "replace")


def html_bytes(
    reviews: Sequence[FileReview], figures: Sequence[Sequence[Figure]], created: str, comparison=None
) -> bytes:
    """The report as a self-contained HTML file (pictures as data URIs)."""
    images = _images(figures)

    def src(name: str) -> str:
        return "data:image/png;base64," + base64.b64encode(images[name]).decode("ascii")

    return _printable(document(reviews, figures, src, created, __version__, comparison=comparison)).encode("utf-8")


def running_header(reviews: Sequence[FileReview], created: str):
    """``header(page, chapter) -> (left, right)`` for :func:`app.report.pages.print_pages`."""
    names = [model_name(r) for r in reviews]
    everything = ", ".join(names) if len(names) <= MODELS_IN_HEADER else f"{len(names)} files"

    def header(_page: int, chapter: str) -> tuple[str, str]:
        return f"{TITLE}: {chapter or everything}", f"Batten {__version__}, {created}"

    return header


def write_pdf_file(target: str, reviews, figures, created: str, comparison=None) -> None:
    """Lay the document out with QTextDocument and paint it to ``target`` with QPdfWriter (A4)."""
    _gui_application()
    from PySide6.QtCore import QMarginsF, QUrl
    from PySide6.QtGui import QImage, QPageLayout, QPageSize, QPdfWriter, QTextDocument

    writer = QPdfWriter(target)
    writer.setPageSize(QPageSize(QPageSize.PageSizeId.A4))
    writer.setPageMargins(QMarginsF(*(MARGIN_MM,) * 4), QPageLayout.Unit.Millimeter)
    writer.setTitle(TITLE)
    writer.setCreator(f"Batten {__version__}")
    doc = QTextDocument()
    for name, png in _images(figures).items():
        doc.addResource(
            QTextDocument.ResourceType.ImageResource, QUrl(f"{RESOURCE_SCHEME}:{name}"), QImage.fromData(png, "PNG")
        )
    html = document(
        reviews, figures, lambda name: f"{RESOURCE_SCHEME}:{name}", created, __version__, comparison=comparison
    )
    print_pages(writer, doc, _printable(html), running_header(reviews, created), [model_name(r) for r in reviews])
    del doc, writer  # the PDF is finished when the writer goes; the atomic writer checks it is complete


def write_report(
    path: str | os.PathLike,
    reviews: Sequence[FileReview],
    figures: Sequence[Sequence[Figure]] | None = None,
    created: str | None = None,
    comparison=None,
    inputs: Sequence[str] = (),
) -> Path:
    """Write one review document covering ``reviews`` (in order), atomically.

    Parameters
    ----------
    path : path-like
        ``.pdf`` for PDF, ``.html``/``.htm`` for a self-contained HTML file.
    reviews : sequence of FileReview
    figures : sequence of sequence of Figure, optional
        The pictures of each review (:func:`app.report.figures.render_figures`);
        none when omitted.
    created : str, optional
        Time stamp printed on the cover; default now (UTC).
    comparison : app.review.comparison.Comparison, optional
        A comparison with the previous revision, given its own chapter.
    inputs : sequence of str, optional
        The files the reviews read; the report never replaces one of them.

    Returns
    -------
    Path

    Raises
    ------
    BattenError
        Unknown extension, or the file cannot be written (nothing partial is left).
    """
    fmt = FORMATS.get(Path(path).suffix.lower())
    if fmt is None:
        raise BattenError(f"{path}: report must end in .pdf or .html")
    figures = list(figures) if figures is not None else [() for _ in reviews]
    created = created or now_stamp()
    if fmt == "html":
        return write_atomically(path, html_bytes(reviews, figures, created, comparison), inputs=inputs)
    return write_atomically(
        path,
        lambda tmp: write_pdf_file(tmp, reviews, figures, created, comparison),
        inputs=inputs,
        verify=pdf_complete,
    )
