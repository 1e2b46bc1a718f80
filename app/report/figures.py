"""The report's pictures, drawn off-screen by the window's own scene (EGL: no display needed).

The faces, the curvature map with its legend, the reflection lines, the seams
and the section combs are drawn by :class:`app.render.scene.Scene` from a
:class:`app.state.Session` holding the checked model, with the window's
settings (the window passes its own when it exports a report): what the
reviewer saw on screen is what the board reads. The cameras look from the
model's principal axes (:mod:`app.report.views`); numbered labels on the model
match the numbers of the findings table, and numbers that would overlap share one.
"""

from __future__ import annotations

import io
from dataclasses import dataclass

import numpy as np

from app.render import colours
from app.render.legend import PRINT_LEGEND
from app.render.scene import Scene
from app.render.tooling import OUT_OF_REACH_NAME, UNDERCUT_NAME, draft_span
from app.review.result import FAIL, FileReview
from app.state import Mode, Session
from app.state.loading import sample_model, typical_curvature
from app.state.results import Loaded, SeamView
from app.state.settings import SectionSettings, StripeSettings
from geometry.conventions import CURVATURE_SIGN
from geometry.model import Model
from geometry.tooling import analyse_tooling

from .settings_text import family_words
from .views import View, choose_views, merge_labels, screen_positions
from .wording import free_planes, section_name
from .wording import number as number_text

IMAGE_SIZE = (1000, 700)
ZOOM = 1.0
# The curvature views leave the legend room at the right.
ZOOM_WITH_LEGEND = 0.82
MARKER_FONT = 22
# Curvature plots span at least +-this (1/mm): a radius of 10 m.
PLOT_SPAN_MIN = 1e-4


@dataclass(frozen=True)
class Figure:
    name: str
    caption: str
    png: bytes


def _set_view(plotter, view: View, zoom: float = ZOOM) -> None:
    """Look at the whole scene from ``view.toward`` with ``view.up`` up, framed to fit."""
    centre = np.asarray(plotter.center, float)
    plotter.camera_position = [tuple(centre + view.toward), tuple(centre), tuple(view.up)]
    plotter.reset_camera()
    plotter.camera.zoom(zoom)


def _png(plotter) -> bytes:
    from PIL import Image

    image = plotter.screenshot(return_img=True)
    buf = io.BytesIO()
    Image.fromarray(image).save(buf, format="PNG", optimize=True)
    return buf.getvalue()


def _markers(review: FileReview) -> tuple[np.ndarray, list[str]]:
    """Positions and numbers of the findings over tolerance that have a place."""
    points, labels = [], []
    for number, finding in enumerate(review.findings, start=1):
        if finding.verdict == FAIL and finding.where is not None:
            points.append(finding.where)
            labels.append(str(number))
    return np.asarray(points, float).reshape(-1, 3), labels


def _add_markers(plotter, review: FileReview) -> None:
    """Number the findings at their places; numbers that would overlap in this view share one label."""
    points, labels = _markers(review)
    if labels:
        camera = plotter.camera
        screen = screen_positions(points, camera.position, camera.focal_point, camera.up, camera.view_angle)
        merged = merge_labels(screen, labels)
        plotter.add_point_labels(
            points[[anchor for anchor, _ in merged]],
            [text for _, text in merged],
            name="finding-numbers",
            font_size=MARKER_FONT,
            point_color=colours.VERDICT["fail"],
            point_size=14,
            text_color="black",
            shape_color=colours.MARK,
            shape_opacity=0.9,
            render_points_as_spheres=True,
            always_visible=True,
        )


def _seam_views(review: FileReview) -> tuple[SeamView, ...]:
    """The check's seams and free edges as the window colours them."""
    return tuple(
        SeamView(np.asarray(line.points, float), "free" if line.kind == "free_edge" else line.verdict)
        for line in review.lines
    )


def report_session(
    model: Model, review: FileReview, stripes: StripeSettings | None = None, section: SectionSettings | None = None
) -> Session:
    """The session the report's pictures are drawn from: the window's samples, settings and combs.

    Parameters
    ----------
    model : Model
    review : FileReview
        Its seam lines and section curves are shown.
    stripes, section : optional
        The window's stripe and section settings (comb gain and density);
        default: the window's defaults.
    """
    session = Session()
    samples = sample_model(model)
    loaded = Loaded(model, samples, seams=_seam_views(review), curvature_scale=typical_curvature(samples))
    session.adopt(loaded, None)
    if stripes is not None:
        session.set_stripes(count=stripes.count, width=stripes.width, direction=stripes.direction)
    if section is not None:
        session.set_section(comb_gain=section.comb_gain, comb_density=section.comb_density)
    return session


class _Pictures:
    """One off-screen plotter and scene, photographed in several modes and views."""

    def __init__(self, session: Session, review: FileReview):
        import pyvista as pv
        from vtkmodules.vtkCommonCore import vtkLogger

        # VTK logs a harmless note to stderr when it falls back from X to EGL; keep the progress lines readable.
        vtkLogger.SetStderrVerbosity(vtkLogger.VERBOSITY_OFF)
        self.session, self.review = session, review
        self.plotter = pv.Plotter(off_screen=True, window_size=IMAGE_SIZE)
        self.plotter.enable_anti_aliasing("ssaa")
        self.scene = Scene(self.plotter, session)
        self.scene.rebuild()
        self.sections = session.sections, session.section_places
        session.show_sections((), ())
        self.scene.update_sections()
        mesh = self.scene.faces.mesh if self.scene.faces is not None else None
        self.views = choose_views(mesh.points, mesh.point_data["Normals"]) if mesh is not None and mesh.n_points else ()

    def show(self, mode: Mode, view: View, sections: bool = False) -> None:
        session = self.session
        session.show_sections(*(self.sections if sections else ((), ())))
        self.scene.update_sections()
        _set_view(self.plotter, view, ZOOM_WITH_LEGEND if mode in (Mode.CURVATURE, Mode.DRAFT) else ZOOM)
        _add_markers(self.plotter, self.review)
        session.set_camera(self.scene.camera())
        session.set_display(mode=mode)
        self.scene.update_surface()

    @property
    def marker_words(self) -> str:
        return " Numbered labels: the findings over tolerance of the same number." if _markers(self.review)[1] else ""

    def take(self, name: str, caption: str) -> Figure:
        self.scene.place_legend(PRINT_LEGEND)  # set just before the shot: a new bar takes the window's place
        # VTK lays a scalar bar's text out one render behind a change of its font sizes: render once first,
        # or the picture carries the window's small legend text.
        self.plotter.render()
        return Figure(name, caption, _png(self.plotter))

    def close(self) -> None:
        self.plotter.close()


def findings_view(pictures: _Pictures) -> Figure:
    """Where the findings are: shaded model, seams by verdict, numbered markers."""
    view = pictures.views[0]
    pictures.show(Mode.SHADED, view)
    caption = (
        "Seams within tolerance (green), seams over tolerance (red), free edges (amber), in the window's colours; "
        f"{view.words} (model axes)." + pictures.marker_words
    )
    return pictures.take("findings", caption)


def curvature_views(pictures: _Pictures) -> list[Figure]:
    """Mean curvature from each of the chosen views, with the window's map, range and legend."""
    figures = []
    for view in pictures.views:
        pictures.show(Mode.CURVATURE, view)
        low, high = (number_text(v, 3) for v in pictures.session.colour_limits())
        smallest, largest = (number_text(v, 3) for v in pictures.session.value_extremes())
        caption = (
            f"Mean curvature H, {view.words} (model axes), as the window shows it: colours from {low} to {high} "
            f"1/mm, values beyond them in the end colours; the model's values run from {smallest} to {largest} "
            f"1/mm; {CURVATURE_SIGN}." + pictures.marker_words
        )
        figures.append(pictures.take(f"curvature-{view.name}", caption))
    return figures


def stripe_view(pictures: _Pictures) -> Figure:
    """Reflection lines seen from the oblique view, with the window's stripe settings."""
    view = pictures.views[0]
    pictures.show(Mode.REFLECTION, view)
    stripes = pictures.session.display.stripes
    caption = (
        f"Reflection lines as the window draws them: light lines along {stripes.direction}, {stripes.count} per "
        f"180° of reflected-ray angle, light share {stripes.width:g}; {view.words} (model axes). Lines should run "
        "smooth and unbroken across seams; a break or kink shows a tangent or curvature defect."
    )
    return pictures.take("stripes", caption)


def comb_view(pictures: _Pictures) -> Figure | None:
    """Curvature combs of every section curve, as the window draws them."""
    if not pictures.sections[0]:
        return None
    view = pictures.views[0]
    pictures.show(Mode.SHADED, view, sections=True)
    caption = (
        "Curvature combs of the check's sections, drawn as in the window: teeth on the convex side (away from the "
        "centre of curvature), length proportional to |k|, with their envelope; pink dots: inflections, where the "
        f"comb changes side; blue dots: curvature extrema; {view.words} (model axes)."
    )
    return pictures.take("combs", caption)


def draft_view(pictures: _Pictures, model: Model) -> Figure | None:
    """The check's draft, undercut and cutter reach in the window's draft view; None without a pull."""
    tooling = pictures.review.tooling
    if not tooling or tooling.get("pull") is None:
        return None
    # the check's own analysis again (same grids, same limits): the picture shows what the tables say
    analysis = analyse_tooling(model, tooling["pull"], tooling["draft_min_deg"], tooling["cutter_radius_mm"])
    pictures.session.show_tooling(analysis)
    view = pictures.views[0]
    pictures.show(Mode.DRAFT, view)
    limit, span = draft_span(analysis)
    pull = ", ".join(f"{c:.3g}" for c in tooling["pull"])
    caption = (
        f"Draft against the pull ({pull}) (green arrow) as the window shows it, degrees, from -{span:g} to {span:g}: "
        f"blue faces leave along +pull, green along -pull; pale to red: below the {limit:g} degree limit. Black "
        f"lines: zero draft (where a parting line can run). Overlays: undercut ({UNDERCUT_NAME}), out of the "
        f"cutter's reach ({OUT_OF_REACH_NAME}). Numbers: findings over tolerance; {view.words} (model axes)."
    )
    return pictures.take("draft", caption)


def _png_of(fig) -> bytes:
    """PNG bytes of a matplotlib figure, without a resolution tag (Qt would rescale a tagged image)."""
    from PIL import Image

    fig.canvas.draw()
    pixels = np.asarray(fig.canvas.buffer_rgba())[..., :3]
    buf = io.BytesIO()
    Image.fromarray(np.ascontiguousarray(pixels)).save(buf, format="PNG", optimize=True)
    return buf.getvalue()


def family_plot(review: FileReview, family: str, number: int) -> Figure | None:
    """Signed curvature against arc length for every curve of one section family (matplotlib, no display)."""
    members = {i for i, s in enumerate(review.sections) if s.get("family") == family}
    planes = free_planes(review.sections)
    curves = [
        (c, section_name(review.sections[plane], planes))
        for c, (plane, _) in zip(review.section_curves, review.section_places, strict=True)
        if plane in members and c.points.shape[0] > 1
    ]
    if not curves:
        return None
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure as PlotFigure

    fig = PlotFigure(figsize=(7.5, 3.6), dpi=120)
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    labelled = set()
    for c, label in curves:
        ax.plot(c.arc_length, c.curvature, lw=1.3, label=label if label not in labelled else None)
        labelled.add(label)
        marks = c.inflections.arc_length
        ax.plot(marks, np.zeros(marks.size), "o", color=colours.INFLECTION, ms=5, zorder=5)
    ax.axhline(0.0, color="0.4", lw=0.8)
    ax.set_xlabel("arc length s along the section (mm)")
    ax.set_ylabel("curvature k (1/mm)")
    # Plain 1/mm ticks: no "1e-2" offset above the axis for the reader to multiply in; flat sections get a
    # small fixed span instead of rounding noise stretched over the whole axis.
    low, high = ax.get_ylim()
    if high - low < 2 * PLOT_SPAN_MIN:
        ax.set_ylim(-PLOT_SPAN_MIN, PLOT_SPAN_MIN)
    ax.ticklabel_format(axis="y", style="plain", useOffset=False)
    ax.grid(True, lw=0.3)
    ax.legend(fontsize=7, loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0)
    fig.tight_layout()
    caption = (
        f"Sections of {family_words(family)}: curvature along each curve (one colour per plane), {CURVATURE_SIGN}; "
        "pink dots: inflections. A fair curve shows few monotone pieces and no sign change it was not designed with."
    )
    return Figure(f"family-{number}", caption, _png_of(fig))


def render_figures(
    model: Model, review: FileReview, stripes: StripeSettings | None = None, section: SectionSettings | None = None
) -> tuple[Figure, ...]:
    """Every picture of one file's report, in reading order.

    Parameters
    ----------
    model : Model
    review : FileReview
    stripes, section : optional
        The window's stripe and section settings (see :func:`report_session`).

    Returns
    -------
    tuple of Figure
        Empty when the model has no faces to show.
    """
    if not model.faces:
        return ()
    session = report_session(model, review, stripes, section)
    session.show_sections(review.section_curves, review.section_places)
    pictures = _Pictures(session, review)
    if pictures.scene.faces is None or pictures.scene.faces.mesh.n_cells == 0 or not pictures.views:
        pictures.close()
        return ()
    try:
        figures = [findings_view(pictures), *curvature_views(pictures), stripe_view(pictures)]
        comb = comb_view(pictures)
        draft = draft_view(pictures, model)
        if draft is not None:
            figures.append(draft)
    finally:
        pictures.close()
    if comb is not None:
        figures.append(comb)
    families = list(dict.fromkeys(s.get("family", "") for s in review.sections))
    for number, family in enumerate(families):
        plot = family_plot(review, family, number)
        if plot is not None:
            figures.append(plot)
    return tuple(figures)
