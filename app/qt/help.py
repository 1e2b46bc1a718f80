"""The Help menu's two windows: a short guide to the inspection window, and what Batten is built on."""

from __future__ import annotations

import html
import importlib.metadata as metadata
import platform
import re

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QDialog, QDialogButtonBox, QTextBrowser, QVBoxLayout, QWidget

from geometry import __version__
from geometry.conventions import CURVATURE_SIGN

# Libraries Batten runs on that are not its own requirements but that users ask about.
ALSO_SHOWN = ("vtk", "shiboken6")

GUIDE = f"""
<h2>Working in the inspection window</h2>
<p>Batten is a review aid: the tolerances that decide a surface's release are your
organisation's own surface quality standard; the profile in force only mirrors them.</p>

<h3>What each display mode shows</h3>
<dl>
<dt><b>Shaded</b></dt><dd>The faces as they are, lit, to see the shape.</dd>
<dt><b>Curvature</b></dt><dd>A colour for the chosen curvature measure at every point (Gaussian,
mean, k1, k2, the larger magnitude, or the smallest radius). The legend gives the range; its end
colours also cover values beyond it. Sign: {html.escape(CURVATURE_SIGN)}.</dd>
<dt><b>Reflection lines</b></dt><dd>Stripes as a row of straight lights would reflect in the
surface from where you look. They move with the view; a kink in a stripe where two faces meet is a
break in tangency, a sudden bend in its width a jump in curvature.</dd>
<dt><b>Highlight lines</b></dt><dd>Stripes fixed to the model (not to the view), so two people
looking from different sides see the same lines.</dd>
<dt><b>Isophotes</b></dt><dd>Bands of equal angle between the surface normal and one direction:
the edges of the bands should run on smoothly across seams.</dd>
<dt><b>Draft</b></dt><dd>The draft angle for the pull direction, faces short of the profile's
least draft and undercuts: what a tool maker asks before cutting the steel.</dd>
<dt><b>Deviation</b></dt><dd>After <i>File &gt; Compare with…</i>: how far this revision lies from
the earlier one, in mm, on either side.</dd>
</dl>

<h3>Placing a section</h3>
<p>Tick <i>section plane</i> in the <i>Sections</i> panel. A plane appears across the model: drag
it to slide it, drag its arrow to turn it. Every curve where it cuts the faces carries a curvature
comb on its convex side; the teeth's length is the curvature. Click a curve to show it in the graph
at the bottom. More planes, their spacing and the comb's size are set in the same panel.</p>

<h3>Reading a seam finding</h3>
<p>A seam is where two faces meet. Each one is measured along its whole length in three steps:
the <b>gap</b> between the faces (G0, in mm), the <b>angle</b> between their normals (G1, in
degrees) and the <b>jump in curvature</b> across the seam (G2, in 1/mm). A finding gives the worst
value and where it is; click it to see the place in the view. A seam kinked on purpose (a designed
crease) only has to close. Record what the review board decided under the findings list; the
decision is kept in the review file beside the model and goes into the report.</p>

<h3>Around the view</h3>
<p>The <i>View</i> menu and the toolbar switch the display mode, look at the model from the front,
top, right or at an angle, and switch between perspective and a parallel projection (true lengths
across the screen). The window remembers its size, its panels and the last display settings.</p>
"""


def licence_of(dist: metadata.Distribution) -> str:
    """The licence a distribution declares: its SPDX expression, a licence classifier or a short text."""
    meta = dist.metadata
    expression = meta.get("License-Expression")
    if expression:
        return expression
    classifiers = [c.split(" :: ")[-1] for c in meta.get_all("Classifier") or [] if c.startswith("License ::")]
    if classifiers:
        return ", ".join(classifiers)
    text = (meta.get("License") or "").strip()
    if text and "\n" not in text and len(text) <= 60:
        return text
    return "given in the package's licence file"


def dependencies() -> list[tuple[str, str, str]]:
    """(name, version, licence) of every library Batten requires, as installed, and of :data:`ALSO_SHOWN`."""
    try:
        requires = metadata.distribution("batten").requires or []
    except metadata.PackageNotFoundError:
        requires = []
    names = [re.split(r"[\s\[<>=!~;]", r, maxsplit=1)[0] for r in requires if "extra ==" not in r]
    rows = []
    for name in dict.fromkeys([*names, *ALSO_SHOWN]):
        try:
            dist = metadata.distribution(name)
        except metadata.PackageNotFoundError:
            rows.append((name, "not installed", ""))
            continue
        rows.append((dist.metadata["Name"], dist.version, licence_of(dist)))
    return rows


def runtime_versions() -> list[tuple[str, str]]:
    """(what, version) of Batten, Python, Qt, VTK and the CAD kernel's binding."""
    from PySide6 import __version__ as pyside_version
    from PySide6.QtCore import qVersion
    from vtkmodules.vtkCommonCore import vtkVersion

    try:
        ocp = metadata.version("cadquery-ocp-novtk")
    except metadata.PackageNotFoundError:
        ocp = "not installed"
    return [
        ("Batten", __version__),
        ("Python", platform.python_version()),
        ("Qt", f"{qVersion()} (PySide6 {pyside_version})"),
        ("VTK", vtkVersion.GetVTKVersion()),
        ("OCP (CAD kernel)", ocp),
    ]


def about_html() -> str:
    versions = "".join(f"<tr><td>{html.escape(a)}</td><td>{html.escape(b)}</td></tr>" for a, b in runtime_versions())
    libraries = "".join(
        f"<tr><td>{html.escape(n)}</td><td>{html.escape(v)}</td><td>{html.escape(lic)}</td></tr>"
        for n, v, lic in dependencies()
    )
    return (
        f"<h2>Batten {html.escape(__version__)}</h2>"
        "<p>Fairness inspection of freeform NURBS surfaces: curvature, reflections, seams and review "
        "reports. A review aid: your organisation's surface quality standard decides.</p>"
        f"<h3>Running on</h3><table cellspacing='4'>{versions}</table>"
        "<h3>Libraries and their licences</h3><p>As declared by the installed packages.</p>"
        "<table cellspacing='4'><tr><th align='left'>package</th><th align='left'>version</th>"
        f"<th align='left'>licence</th></tr>{libraries}</table>"
    )


class TextWindow(QDialog):
    """A closable window of rich text (the guide, the about box)."""

    def __init__(self, parent: QWidget | None, title: str, text: str, object_name: str):
        super().__init__(parent)
        self.setObjectName(object_name)
        self.setWindowTitle(title)
        self.resize(640, 620)
        self.browser = QTextBrowser()
        self.browser.setOpenExternalLinks(False)
        self.browser.setHtml(text)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        buttons.rejected.connect(self.close)
        layout = QVBoxLayout(self)
        layout.addWidget(self.browser)
        layout.addWidget(buttons)
        self.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose, False)


def show_guide(parent: QWidget) -> TextWindow:
    return _show(parent, "Batten guide", GUIDE, "guide")


def show_about(parent: QWidget) -> TextWindow:
    return _show(parent, "About Batten", about_html(), "about")


def _show(parent: QWidget, title: str, text: str, name: str) -> TextWindow:
    """One window of each kind per main window, raised again when asked twice."""
    window = parent.findChild(TextWindow, name)
    if window is None:
        window = TextWindow(parent, title, text, name)
    window.show()
    window.raise_()
    return window
