"""The report's pictures, drawn off-screen by the window's own scene (EGL: no display needed).

The faces, the curvature map with its legend, the reflection lines, the seams
and the section combs are drawn by :class:`app.render.scene.Scene` from a
:class:`app.state.Session` holding the checked model, with the window's
settings (the window passes its own when it exports a report): what the
reviewer saw on screen is what the board reads. The cameras look from the
model's principal axes and frame the model tight (:mod:`app.report.views`);
numbered labels beside the findings' places match the numbers of the findings
table, placed so that none covers another (:mod:`app.report.labels`).
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

from . import labels as numbering
from .settings_text import family_words
from .tables import flat_level
from .views import View, choose_views, fit_move, triangle_patches
from .wording import free_planes, quantity, section_name
from .wording import number as number_text

IMAGE_SIZE = (1000, 700)
MARKER_FONT = 22
# Pixels kept clear round the model's outline and the legend when framing.
FRAME_GAP = 24
# A picture other than the findings one is left unnumbered when more than this share of its leaders cross labels.
CLUTTER = 0.1
# Curvature plots span at least +-this (1/mm): a radius of 10 m.
PLOT_SPAN_MIN = 1e-4


@dataclass(frozen=True)
class Figure:
    name: str
    caption: str
    png: bytes


def _set_view(plotter, view: View) -> None:
    """Look at the whole scene from ``view.toward`` with ``view.up`` up (then :func:`_fit` frames it)."""
    centre = np.asarray(plotter.center, float)
    plotter.camera_position = [tuple(centre + view.toward), tuple(centre), tuple(view.up)]
    plotter.reset_camera()


def _top_left(scene: Scene, points: np.ndarray) -> np.ndarray:
    """Picture pixels of world points, x right, y down, shape (n, 2)."""
    pixels = scene.to_display(points)
    return np.column_stack([pixels[:, 0], scene.plotter.window_size[1] - pixels[:, 1]])


def _free_parts(scene: Scene) -> list[tuple[float, float, float, float]]:
    """Parts of the picture the model may take: left of the whole legend, or beside its bar between
    its title and its ends text (a long, low model), each inside a margin."""
    width, height = scene.plotter.window_size
    boxes = scene.legend_boxes()
    if not len(boxes):
        return [(FRAME_GAP, FRAME_GAP, width - FRAME_GAP, height - FRAME_GAP)]
    beside = boxes[1]  # the bar and its tick labels
    below = boxes[2, 1] if len(boxes) > 2 else height
    return [
        (FRAME_GAP, FRAME_GAP, boxes[:, 0].min() - FRAME_GAP, height - FRAME_GAP),
        (FRAME_GAP, boxes[0, 3] + FRAME_GAP, beside[0] - FRAME_GAP, below - FRAME_GAP),
    ]


def _fit(scene: Scene, points: np.ndarray) -> None:
    """Frame the model's outline in the picture's free part (beside the legend), moving the camera.

    Twice: under perspective the first move changes the outline a little.
    """
    height = scene.plotter.window_size[1]
    parts = _free_parts(scene)
    outline = _top_left(scene, points)
    # the part where the model shows largest
    free = max(parts, key=lambda part: fit_move(outline, part)[2])
    camera = scene.plotter.camera
    for _ in range(2):
        camera.zoom(fit_move(_top_left(scene, points), free)[2])
        dx, dy, _ = fit_move(_top_left(scene, points), free)
        # one pixel at the focal point, in mm: the view's height there over the picture's height
        distance = np.linalg.norm(np.subtract(camera.focal_point, camera.position))
        pixel = 2.0 * distance * np.tan(np.radians(camera.view_angle) / 2.0) / height
        forward = np.subtract(camera.focal_point, camera.position) / distance
        up = np.asarray(camera.up, float)
        right_dir = np.cross(forward, up)
        right_dir /= np.linalg.norm(right_dir)
        up = np.cross(right_dir, forward)
        # moving the camera left and up moves the picture right and down
        shift = (-dx * right_dir + dy * up) * pixel
        camera.position = tuple(np.add(camera.position, shift))
        camera.focal_point = tuple(np.add(camera.focal_point, shift))
    scene.plotter.reset_camera_clipping_range()


def _png(image: np.ndarray) -> bytes:
    from PIL import Image

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


def _numbered(scene: Scene, review: FileReview, image: np.ndarray, optional: bool) -> tuple[np.ndarray, str]:
    """The picture with the findings' numbers beside their places, and the caption's words on them.

    ``optional``: a picture whose numbers would be cluttered (leaders through
    other labels, numbers without room) is left unnumbered; the findings picture
    numbers them.
    """
    points, numbers = _markers(review)
    if not numbers:
        return image, ""
    scale = image.shape[1] / scene.plotter.window_size[0]
    anchors, texts = numbering.same_spot(_top_left(scene, points) * scale, numbers)
    font = round(MARKER_FONT * scale)
    keep_free = scene.legend_boxes() * scale
    placed = numbering.place(anchors, texts, numbering.box_sizes(texts, font), image.shape[1::-1], keep_free)
    if optional and (placed.left_out or numbering.tangles(placed) > CLUTTER * len(placed.texts)):
        return image, "Findings not numbered here: from this side their places lie too close together to label."
    drawn = numbering.draw(image, placed, font, colours.VERDICT["fail"], colours.MARK)
    return drawn, _number_words(placed.left_out)


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
        self.views = ()
        if mesh is not None and mesh.n_cells:
            self.points = np.asarray(mesh.points)
            triangles = np.asarray(mesh.faces).reshape(-1, 4)[:, 1:]
            patches = triangle_patches(self.points, mesh.point_data["Normals"], triangles)
            self.views = choose_views(*patches)

    def show(self, mode: Mode, view: View, sections: bool = False) -> None:
        """The scene in ``mode`` from ``view``, the legend in its print place and the model framed beside it."""
        session = self.session
        session.show_sections(*(self.sections if sections else ((), ())))
        self.scene.update_sections()
        _set_view(self.plotter, view)
        session.set_display(mode=mode)
        self.scene.update_surface()
        self.scene.place_legend(PRINT_LEGEND)
        _fit(self.scene, self.points)
        session.set_camera(self.scene.camera())
        self.scene.update_stripes(render=False)  # reflection lines follow the framed camera

    def take(self, name: str, caption: str, numbered: bool = False, optional: bool = False) -> Figure:
        """The picture as shown; ``numbered``: the findings' numbers drawn on it and named in the caption
        (``optional``: unless they would be cluttered, see :func:`_numbered`)."""
        self.scene.place_legend(PRINT_LEGEND)  # set just before the shot: a new bar takes the window's place
        # VTK lays a scalar bar's text out one render behind a change of its font sizes: render once first,
        # or the picture carries the window's small legend text.
        self.plotter.render()
        image = self.plotter.screenshot(return_img=True)
        if numbered:
            image, words = _numbered(self.scene, self.review, image, optional)
            caption += f" {words}" if words else ""
        return Figure(name, caption, _png(image))

    def close(self) -> None:
        self.plotter.close()


def _number_words(left_out: list[str]) -> str:
    """What the numbers on a picture are, and which found no room in it."""
    words = "Numbers: the findings over tolerance of the same number, a line to each one's place."
    if left_out:
        many = len(left_out) > 1 or "," in left_out[0]
        words += (
            f" No room in this picture for {'numbers' if many else 'number'} {', '.join(left_out)}: "
            "the findings table lists every finding with its position."
        )
    return words


def findings_view(pictures: _Pictures) -> Figure:
    """Where the findings are: shaded model, seams by verdict, numbered markers."""
    view = pictures.views[0]
    pictures.show(Mode.SHADED, view)
    caption = (
        "Seams within tolerance (green), seams over tolerance (red), free edges (amber), in the window's colours; "
        f"{view.words} (model axes)."
    )
    return pictures.take("findings", caption, numbered=True)


def curvature_views(pictures: _Pictures) -> list[Figure]:
    """Mean curvature from each of the chosen views, with the window's map, range and legend."""
    figures = []
    flat = flat_level(pictures.review)
    for view in pictures.views:
        pictures.show(Mode.CURVATURE, view)
        low, high = (number_text(v, 3) for v in pictures.session.colour_limits())
        extremes = pictures.session.value_extremes()
        if not np.all(np.abs(extremes) < flat):
            smallest, largest = (number_text(v, 3) for v in extremes)
            values = f"the model's values run from {smallest} to {largest} 1/mm"
        else:
            # "from 0 to 0 1/mm" tells a reader nothing: say what it means
            values = (
                f"every face is flat (|H| below the profile's flat level of {_flat_words(pictures.review)} everywhere)"
            )
        caption = (
            f"Mean curvature H, {view.words} (model axes), as the window shows it: colours from {low} to {high} "
            f"1/mm, values beyond them in the end colours; {values}; {CURVATURE_SIGN}."
        )
        figures.append(pictures.take(f"curvature-{view.name}", caption, numbered=True, optional=True))
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
    if _straight(pictures.session.sections, flat_level(pictures.review)):
        caption += f" Every section is straight (|k| below {_flat_words(pictures.review)}): the combs have no teeth."
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
        f"cutter's reach ({OUT_OF_REACH_NAME}); {view.words} (model axes)."
    )
    return pictures.take("draft", caption, numbered=True, optional=True)


def _straight(curves, flat: float) -> bool:
    """Whether every section curve's curvature stays below the flat level (1/mm)."""
    return all(np.all(np.abs(np.nan_to_num(c.curvature)) < flat) for c in curves)


def _flat_words(review: FileReview) -> str:
    return quantity(flat_level(review), "1/mm")


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
    straight = _straight([c for c, _ in curves], flat_level(review))
    if high - low < 2 * PLOT_SPAN_MIN or straight:
        ax.set_ylim(-PLOT_SPAN_MIN, PLOT_SPAN_MIN)
    ax.ticklabel_format(axis="y", style="plain", useOffset=False)
    ax.grid(True, lw=0.3)
    ax.legend(fontsize=7, loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0)
    fig.tight_layout()
    caption = (
        f"Sections of {family_words(family)}: curvature along each curve (one colour per plane), {CURVATURE_SIGN}; "
        "pink dots: inflections. A fair curve shows few monotone pieces and no sign change it was not designed with."
    )
    if straight:
        caption += f" Every curve of this family is straight: |k| stays below the flat level of {_flat_words(review)}."
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
