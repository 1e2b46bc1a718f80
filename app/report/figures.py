"""The report's pictures, rendered off-screen with pyvista (EGL: no display needed).

Every picture is a PNG (bytes) with a caption; numbered markers on the model
match the numbers of the findings table, so a reader can go from a row of the
table to the place on the surface.
"""

from __future__ import annotations

import io
from dataclasses import dataclass

import numpy as np

from app.review.result import FAIL, FileReview
from geometry.model import Model
from geometry.reflection import eye_rays, reflection_angle

from .colours import DIVERGING_STOPS, STRIPE_DARK, STRIPE_LIGHT, ramp

IMAGE_SIZE = (1000, 700)
# Curvature map range: this percentile of |H| over all samples, so one sharp
# corner does not wash out the rest of the map.
RANGE_PERCENTILE = 98.0
# Reflection stripes: degrees of reflected-ray rotation per light/dark pair.
STRIPE_PERIOD_DEG = 8.0
# Comb teeth: the longest tooth is this fraction of the model size.
COMB_LENGTH = 0.1
# The colour bar stands at the right edge, without a title (the caption names the quantity and unit);
# the curvature views zoom in less to leave it room.
SCALAR_BAR = {
    "title": "",
    "n_labels": 5,
    "fmt": "%.2e",
    "color": "black",
    "vertical": True,
    "position_x": 0.87,
    "position_y": 0.12,
    "width": 0.08,
    "height": 0.76,
    "label_font_size": 14,
}
ZOOM, ZOOM_WITH_BAR = 1.3, 1.05
VIEWS = (("iso", "isometric view"), ("top", "view from +z"), ("front", "view from -y"))


@dataclass(frozen=True)
class Figure:
    name: str
    caption: str
    png: bytes


def _plotter():
    import pyvista as pv
    from vtkmodules.vtkCommonCore import vtkLogger

    # VTK logs a harmless note to stderr when it falls back from X to EGL; keep the progress lines readable.
    vtkLogger.SetStderrVerbosity(vtkLogger.VERBOSITY_OFF)

    plotter = pv.Plotter(off_screen=True, window_size=IMAGE_SIZE)
    plotter.set_background("white")
    plotter.enable_anti_aliasing("ssaa")
    return plotter


def _set_view(plotter, view: str, zoom: float = ZOOM) -> None:
    if view == "top":
        plotter.view_xy()
    elif view == "front":
        plotter.view_xz()
    else:
        plotter.view_isometric()
    plotter.reset_camera()
    plotter.camera.zoom(zoom)


def _png(plotter) -> bytes:
    from PIL import Image

    image = plotter.screenshot(return_img=True)
    plotter.close()
    buf = io.BytesIO()
    Image.fromarray(image).save(buf, format="PNG", optimize=True)
    return buf.getvalue()


def _lookup(values: np.ndarray, limits: tuple[float, float]):
    import pyvista as pv

    table = pv.LookupTable()
    table.values = (np.asarray(values) * 255).astype(np.uint8)
    table.scalar_range = limits
    return table


def _markers(review: FileReview) -> tuple[np.ndarray, list[str]]:
    """Positions and numbers of the findings over tolerance that have a place."""
    points, labels = [], []
    for number, finding in enumerate(review.findings, start=1):
        if finding.verdict == FAIL and finding.where is not None:
            points.append(finding.where)
            labels.append(str(number))
    return np.asarray(points, float).reshape(-1, 3), labels


def _add_markers(plotter, review: FileReview) -> None:
    points, labels = _markers(review)
    if labels:
        plotter.add_point_labels(
            points,
            labels,
            font_size=20,
            point_color="#d01010",
            point_size=14,
            text_color="black",
            shape_color="#ffe680",
            shape_opacity=0.9,
            render_points_as_spheres=True,
            always_visible=True,
        )


def _finish(plotter, review: FileReview, name: str, caption: str, view: str = "iso", zoom: float = ZOOM) -> Figure:
    """Mark the findings, frame the view and take the picture."""
    _add_markers(plotter, review)
    _set_view(plotter, view, zoom)
    return Figure(name, caption, _png(plotter))


def _add_dots(plotter, points: np.ndarray, colour: str, size: int) -> None:
    """Points of shape (k, 3) as round dots (nothing when k = 0)."""
    import pyvista as pv

    if points.size:
        plotter.add_mesh(pv.PolyData(points), color=colour, point_size=size, render_points_as_spheres=True)


def curvature_views(mesh, review: FileReview) -> list[Figure]:
    """Mean curvature from each of :data:`VIEWS`, on a diverging map centred on zero."""
    mean = np.asarray(mesh.point_data["mean"])
    finite = np.abs(mean[np.isfinite(mean)])
    top = float(np.percentile(finite, RANGE_PERCENTILE)) if finite.size else 0.0
    top = top if top > 0 else 1e-6
    table = _lookup(ramp(DIVERGING_STOPS, 256), (-top, top))
    figures = []
    for view, words in VIEWS:
        plotter = _plotter()
        plotter.add_mesh(
            mesh,
            scalars="mean",
            cmap=table,
            clim=(-top, top),
            interpolate_before_map=True,
            smooth_shading=True,
            nan_color="#808080",
            show_scalar_bar=False,
        )
        plotter.add_scalar_bar(**SCALAR_BAR)
        caption = (
            f"Mean curvature H (1/mm), {words}. Colour range +-{top:.3g} 1/mm ({RANGE_PERCENTILE:g}th percentile of "
            "|H|; larger values show in the end colours). Numbered markers: findings over tolerance."
        )
        figures.append(_finish(plotter, review, f"curvature-{view}", caption, view, ZOOM_WITH_BAR))
    return figures


def stripe_view(mesh, review: FileReview) -> Figure:
    """Reflection lines of horizontal light lines seen from the isometric view."""
    plotter = _plotter()
    _set_view(plotter, "iso")
    camera = plotter.camera
    view_direction = np.subtract(camera.focal_point, camera.position)
    rays = eye_rays(np.asarray(mesh.points), None, view_direction)
    angle = reflection_angle(
        np.asarray(mesh.point_data["normals"]), rays, np.array([1.0, 0.0, 0.0]), np.array([0.0, 0.0, 1.0])
    )
    stripes = angle / STRIPE_PERIOD_DEG
    lo, hi = np.nanmin(stripes), np.nanmax(stripes)
    lo, hi = np.floor(lo), np.ceil(hi) + (1 if np.ceil(hi) == np.floor(lo) else 0)
    bands = int(2 * (hi - lo))
    values = np.where((np.arange(bands) % 2 == 0)[:, None], STRIPE_LIGHT, STRIPE_DARK)
    shaded = mesh.copy()
    shaded.point_data["stripes"] = stripes
    plotter.add_mesh(
        shaded,
        scalars="stripes",
        cmap=_lookup(values, (lo, hi)),
        clim=(lo, hi),
        interpolate_before_map=True,
        show_scalar_bar=False,
        nan_color="#808080",
        lighting=False,
    )
    caption = (
        f"Reflection lines: parallel light lines along x, {STRIPE_PERIOD_DEG:g} degrees per stripe pair, "
        "isometric view. Lines should run smooth and unbroken across seams; a break or kink shows a "
        "tangent or curvature defect."
    )
    return _finish(plotter, review, "stripes", caption)


def comb_view(mesh, review: FileReview, model: Model) -> Figure | None:
    """Curvature combs of every section curve on the grey model, inflections marked."""
    import pyvista as pv

    curves = [c for c in review.section_curves if c.points.shape[0] > 1]
    if not curves:
        return None
    peak = max(float(np.nanmax(np.abs(c.curvature))) for c in curves)
    scale = COMB_LENGTH * model.size / peak if peak > 0 else 0.0
    plotter = _plotter()
    plotter.add_mesh(mesh, color="#c8ccd0", smooth_shading=True, opacity=0.55)
    for c in curves:
        tips = c.points + (scale * c.curvature)[:, None] * c.side
        plotter.add_mesh(pv.lines_from_points(c.points), color="#202020", line_width=2)
        plotter.add_mesh(pv.lines_from_points(tips), color="#0b4fa8", line_width=3)
        step = max(1, c.points.shape[0] // 80)
        teeth = np.stack([c.points[::step], tips[::step]], axis=1).reshape(-1, 3)
        plotter.add_mesh(pv.line_segments_from_points(teeth), color="#3d7fd6", line_width=1)
        _add_dots(plotter, c.inflections, "#d01010", 14)
    caption = (
        "Curvature combs of the section family (teeth normal to each section curve, length proportional to "
        "curvature; blue line: the comb's envelope). Red dots: inflections, where the comb changes side."
    )
    return _finish(plotter, review, "combs", caption)


def findings_view(mesh, review: FileReview, model: Model) -> Figure:
    """Where the findings are: grey model, seams over tolerance in red, numbered markers."""
    import pyvista as pv

    plotter = _plotter()
    plotter.add_mesh(
        mesh,
        scalars="face",
        cmap=_lookup(
            ramp(((0.0, (0.80, 0.83, 0.86)), (1.0, (0.62, 0.68, 0.74))), 64), (0, max(len(model.faces) - 1, 1))
        ),
        show_scalar_bar=False,
        smooth_shading=True,
    )
    for line in review.lines:
        if line.points.shape[0] < 2:
            continue
        bad = line.verdict == FAIL
        colour = "#e08000" if line.kind == "free_edge" else "#d01010" if bad else "#208040"
        plotter.add_mesh(
            pv.lines_from_points(line.points), color=colour, line_width=7 if bad else 4, render_lines_as_tubes=True
        )
    _add_dots(
        plotter, np.concatenate([np.zeros((0, 3)), *(c.inflections for c in review.section_curves)]), "#b000b0", 11
    )
    caption = (
        "Faces (grey shades), seams within tolerance (green), seams over tolerance (red), free edges "
        "(orange), inflections of the sections (purple dots); numbers match the findings table."
    )
    return _finish(plotter, review, "findings", caption)


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
    curves = [c for c in review.section_curves if c.section in members and c.points.shape[0] > 1]
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
    for c in curves:
        label = c.label if c.label not in labelled else None
        labelled.add(c.label)
        (line,) = ax.plot(c.arc_length, c.curvature, lw=1.3, label=label)
        if c.inflections.size:
            at = np.argmin(np.linalg.norm(c.points[None] - c.inflections[:, None], axis=2), axis=1)
            ax.plot(c.arc_length[at], np.zeros(at.size), "o", color="#d01010", ms=5, zorder=5)
    ax.axhline(0.0, color="0.4", lw=0.8)
    ax.set_xlabel("arc length s along the section (mm)")
    ax.set_ylabel("signed curvature (1/mm)")
    ax.ticklabel_format(axis="y", style="sci", scilimits=(-2, 2))
    ax.grid(True, lw=0.3)
    ax.legend(fontsize=7, loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0)
    fig.tight_layout()
    caption = (
        f"Section family '{family}': signed curvature along each curve (one colour per plane); red dots: "
        "inflections. A fair curve shows few monotone pieces and no sign change it was not designed with."
    )
    return Figure(f"family-{number}", caption, _png_of(fig))


def render_figures(model: Model, review: FileReview) -> tuple[Figure, ...]:
    """Every picture of one file's report, in reading order.

    Returns
    -------
    tuple of Figure
        Empty when the model has no faces to show.
    """
    from .scene import model_mesh

    if not model.faces:
        return ()
    mesh = model_mesh(model)
    if mesh.n_cells == 0:
        return ()
    figures = [findings_view(mesh, review, model), *curvature_views(mesh, review), stripe_view(mesh, review)]
    comb = comb_view(mesh, review, model)
    if comb is not None:
        figures.append(comb)
    families = list(dict.fromkeys(s.get("family", "") for s in review.sections))
    for number, family in enumerate(families):
        plot = family_plot(review, family, number)
        if plot is not None:
            figures.append(plot)
    return tuple(figures)
