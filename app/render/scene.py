"""The 3-D scene of a session on any pyvista plotter (the window's, or an off-screen one).

The scene owns the actors and updates them in place where it can (the stripe
parameter on a camera move, line sets while the section plane is dragged),
so an update costs the geometry and a buffer upload, not a new pipeline.
"""

from __future__ import annotations

import numpy as np
import pyvista as pv
from vtkmodules.vtkCommonDataModel import vtkStaticCellLocator
from vtkmodules.vtkRenderingCore import vtkCellPicker

from app.state import Camera, FindingEntry, Mode, Session
from app.state.settings import MEASURE_UNITS, STRIPE_MODES, VALUE_MODES, Measure

from . import colours
from .combs import comb_envelopes, comb_teeth, marker_points, polylines, section_curves
from .framing import framing, legend_room
from .legend import (
    SHIFT,
    WINDOW_LEGEND,
    LegendPlace,
    clipped_ends,
    ends_text,
    fitted,
    legend_boxes,
    measure_title,
    place_legend,
    tick_format,
)
from .meshes import FaceMesh, face_mesh
from .seams import seam_lines
from .stripes import stripe_range, stripe_table
from .tooling import LEGEND_TITLE, add_tooling

# A click this close to a section curve (display pixels) chooses it.
CURVE_PICK_PIXELS = 8.0
# Stands for an infinite value (a flat sample's radius): far above any colour range, finite for VTK.
FLAT_VALUE = 1e30
LEGEND = dict(
    n_labels=5,
    fmt="%.3g",
    vertical=True,
    position_x=0.86,
    position_y=0.25,
    width=0.06,
    height=0.5,
    title_font_size=14,
    label_font_size=12,
    color="black",
)


def legend_title(session: Session) -> str:
    """``Mean curvature H`` over ``(1/mm)``: the quantity in words with its unit (one wording with the report).

    Two lines: the bar stands at the view's right edge, and a one-line title would run past it.
    """
    if session.display.mode == Mode.DEVIATION:
        return "Deviation\n(mm)"
    return measure_title(session.display.measure).replace(" (", "\n(")


class Scene:
    """Actors of the model, its seams, sections and marks on ``plotter``.

    Parameters
    ----------
    plotter : pyvista.Plotter
        A Qt interactor (updates schedule a repaint) or an off-screen plotter.
    session : Session
    auto_render : bool
        Render (off-screen) or schedule a repaint (Qt) after each update; off
        for benchmarks that time the frame apart.
    """

    def __init__(self, plotter: pv.Plotter, session: Session, auto_render: bool = True):
        self.plotter = plotter
        self.auto_render = auto_render
        self.session = session
        self.faces: FaceMesh | None = None
        self.surface_actor = None
        self.surface: pv.PolyData | None = None
        self.legend: str | None = None
        self.legend_ends = None  # the text under the bar naming the true extremes beyond clipped ends
        self._legend_place: LegendPlace | None = None  # where the legend stands now (after fitting)
        self.lines = {name: pv.PolyData() for name in ("curves", "teeth", "envelopes", "seams", "mark")}
        self.points = {name: pv.PolyData() for name in ("inflections", "extrema", "mark_point")}
        self.actors: dict[str, object] = {}
        self._locator = None
        self._stripe_table = None
        self._stripe_limits: tuple[float, float] | None = None
        self._stripe_share: float | None = None
        self._fitted: tuple[tuple, bool] | None = None
        plotter.set_background(colours.BACKGROUND_BOTTOM, top=colours.BACKGROUND_TOP)
        if not getattr(plotter, "off_screen", False):
            # Multisampling smooths triangle edges only; FXAA also smooths stripe edges inside triangles
            # (the report's off-screen pictures are supersampled instead).
            plotter.enable_anti_aliasing("fxaa")
            # a narrower view (a dock widened, the window resized) moves the legend so its text still fits
            plotter.render_window.AddObserver("WindowResizeEvent", lambda *_: self._resized())

    # -- whole model -----------------------------------------------------
    def rebuild(self) -> None:
        """Drop everything and show the session's current model."""
        for title in list(self.plotter.scalar_bars.keys()):
            self.plotter.remove_scalar_bar(title, render=False)
        self.plotter.clear_actors()
        self.legend = None
        self.legend_ends = None
        self.actors.clear()
        self.surface_actor = None
        self.faces = None
        # the camera right after the last fit, and whether that fit left room for a legend
        self._fitted = None
        self._locator = None
        if self.session.model is None:
            return
        self.faces = face_mesh(self.session.samples)
        self.update_surface()
        self.update_seams()
        self.update_sections()
        self.mark(None)
        self.fit()

    def fit(self) -> None:
        """Fit the whole model in the view, keeping the viewing direction, in the room the legend leaves."""
        # the renderer's own reset: the plotter's renders a frame whatever ``render`` says
        self.plotter.renderer.reset_camera(render=False)
        if self.legend is None:
            self._fitted = (self._camera_key(), False)
            return
        cam = self._view_camera()
        width, height = self.plotter.render_window.GetSize()
        farther = legend_room(cam.view_angle, width / max(height, 1), self._room(), bool(cam.parallel_projection))
        if cam.parallel_projection:
            cam.parallel_scale = cam.parallel_scale * farther
        else:
            cam.Dolly(1.0 / farther)
        self.plotter.reset_camera_clipping_range()
        self._fitted = (self._camera_key(), True)

    def _remove_legend(self) -> None:
        # Remove rather than hide: pyvista shares one bar per title and only ever widens a shared
        # bar's range, so a reused bar would keep a wider range than a narrowed map shows.
        for title in list(self.plotter.scalar_bars.keys()):
            self.plotter.remove_scalar_bar(title, render=False)
        if self.legend_ends is not None:
            self.plotter.remove_actor(self.legend_ends, render=False)
            self.legend_ends = None
        self.legend = None

    def _pin_legend(self, limits: tuple[float, float]) -> None:
        """Make the map and its legend show exactly ``limits`` (one lookup table for both)."""
        mapper = self.surface_actor.mapper
        mapper.scalar_range = limits
        mapper.lookup_table.scalar_range = limits
        bar = self.plotter.scalar_bars[self.legend]
        bar.SetLookupTable(mapper.lookup_table)
        bar.SetVisibility(True)

    def update_surface(self) -> None:
        """Re-show the faces in the session's display mode."""
        if self.faces is None:
            return
        if self.surface_actor is not None:
            self.plotter.remove_actor(self.surface_actor, render=False)
        for name in [n for n in self.actors if n.startswith("tooling ")]:
            self.plotter.remove_actor(self.actors.pop(name), render=False)
        self._remove_legend()
        # a shallow copy per mode (arrays shared), so one mode's arrays never reach another's mapper
        mesh = self.surface = self.faces.mesh.copy(deep=False)
        mode = self.session.display.mode
        common = dict(name="faces", smooth_shading=True, render=False, pickable=True)
        if mode in VALUE_MODES:
            self._show_values(mesh, common)
        elif mode == Mode.DRAFT and self.session.tooling is not None:
            # the draft view draws the check's own grids (one analysis for window, check and report)
            added = add_tooling(self.plotter, self.session.tooling, self.session.model.bounds, LEGEND)
            self.surface_actor = added.pop("faces")
            self.surface = self.surface_actor.mapper.dataset
            self.actors.update({f"tooling {name}": actor for name, actor in added.items()})
            self.legend = LEGEND_TITLE
            self._pin_legend(tuple(self.surface_actor.mapper.scalar_range))
            self.place_legend()
        elif mode in STRIPE_MODES:
            self.update_stripes(render=False)
            self.surface_actor = self.plotter.add_mesh(
                mesh,
                scalars="stripe",
                cmap=self._stripe_table,
                clim=self._stripe_limits,
                interpolate_before_map=True,  # per-fragment lookup: sharp stripes
                lighting=False,
                show_scalar_bar=False,
                **common,
            )
        else:
            self.surface_actor = self.plotter.add_mesh(
                mesh, scalars=None, color=colours.SURFACE, show_scalar_bar=False, **colours.SHADED_LIGHT, **common
            )
        # With a legend at the right edge the model moves left (the view's centre moves right), so they do not meet.
        self._view_camera().SetWindowCenter(SHIFT if self.legend is not None else 0.0, 0.0)
        room = self._fit_kept()
        if room is not None and room != (self.legend is not None):
            self.fit()  # a legend came or went since the fit and the view was not moved: fit for the new room
        self._render()

    def _resized(self) -> None:
        """A resized view: the legend placed for its width, and the model fitted again unless the user moved it."""
        self.place_legend()
        if self._fit_kept() is not None:
            self.fit()

    def _fit_kept(self) -> bool | None:
        """Whether the last fit left a legend room, while the camera is still where it put it; None after a move."""
        if self._fitted is None or self._fitted[0] != self._camera_key():
            return None
        return self._fitted[1]

    def _view_camera(self) -> pv.Camera:
        """The renderer's camera, taken as placed.

        pyvista's ``plotter.camera`` first moves a camera it has not seen placed
        to its default and renders a frame (0.2 to 0.3 s on a large model).
        """
        cam = self.plotter.renderer.camera
        cam.is_set = True
        return cam

    def _camera_key(self) -> tuple:
        cam = self._view_camera()
        return (tuple(cam.position), tuple(cam.focal_point), tuple(cam.up), cam.parallel_scale)

    def _show_values(self, mesh: pv.PolyData, common: dict) -> None:
        """The colour map of the current measure, lit by :data:`colours.MAP_LIGHT`, with its legend."""
        session = self.session
        values = self.faces.point_values(session.measure_fields())
        # A flat sample's radius is infinite: it maps above the range (the calm end), it is not "no value".
        values[np.isposinf(values)] = FLAT_VALUE
        values[~np.isfinite(values)] = np.nan
        mesh.point_data["value"] = values
        measure = None if session.display.mode == Mode.DEVIATION else session.display.measure
        limits = session.colour_limits()
        self.legend = legend_title(session)
        table = colours.lookup_table(session.signed_values, limits, reverse=measure == Measure.MIN_RADIUS)
        self.surface_actor = self.plotter.add_mesh(
            mesh,
            scalars="value",
            cmap=table,
            clim=limits,
            nan_color=colours.MISSING,
            scalar_bar_args=LEGEND | {"title": self.legend},
            **colours.MAP_LIGHT,
            **common,
        )
        self._pin_legend(limits)
        bar = self.plotter.scalar_bars[self.legend]
        bar.SetLabelFormat(tick_format(*limits, LEGEND["n_labels"]))
        unit = "mm" if measure is None else MEASURE_UNITS[measure]
        below, above = clipped_ends(measure, limits, session.value_extremes(), unit)
        # Clipped ends: a swatch of the end colour beyond each clipped end, the true extremes in words below.
        bar.SetDrawBelowRangeSwatch(below is not None)
        bar.SetDrawAboveRangeSwatch(above is not None)
        bar.SetBelowRangeAnnotation("")
        bar.SetAboveRangeAnnotation("")
        words = [f"\u25b2 {above}" if above else "", f"\u25bc {below}" if below else ""]
        self.legend_ends = ends_text("\n".join(w for w in words if w))
        self.plotter.add_actor(self.legend_ends, name="legend-ends", reset_camera=False, pickable=False, render=False)
        self.place_legend()

    def _room(self) -> float:
        """Share of the half width free for the model on the tighter side of its centre (1 without a legend).

        The picture's centre sits SHIFT left of the view's; the bar's left edge
        (moved left in a narrow view so its text fits) bounds it on the right.
        """
        if self.legend is None or self.legend not in self.plotter.scalar_bars or self._legend_place is None:
            return 1.0
        bar_left = self._legend_place.x  # as placed (fitted to the view's width)
        return float(np.clip(min(1.0 - SHIFT, 2.0 * bar_left - 1.0 + SHIFT), 0.2, 1.0))

    def place_legend(self, where: LegendPlace = WINDOW_LEGEND) -> None:
        """Put the legend (bar, title, clipped ends) at ``where`` with its font sizes (window or print)."""
        if self.legend is None or self.legend not in self.plotter.scalar_bars:
            return
        labels = self._legend_labels()
        left, _, right, _ = self.plotter.renderer.GetViewport()
        view_px = int(self.plotter.window_size[0] * (right - left))
        self._legend_place = fitted(where, self.legend, labels, view_px)
        place_legend(self.plotter.scalar_bars[self.legend], self.legend_ends, self._legend_place)

    def _legend_labels(self) -> tuple[str, ...]:
        bar = self.plotter.scalar_bars[self.legend]
        low, high = bar.GetLookupTable().GetRange()
        return tuple(bar.GetLabelFormat() % v for v in (low, high))

    def legend_boxes(self) -> np.ndarray:
        """Pixels the legend covers, boxes (left, top, right, bottom) from the top left, shape (k, 4); none without."""
        if self.legend is None or self.legend not in self.plotter.scalar_bars or self._legend_place is None:
            return np.zeros((0, 4))
        ends = (self.legend_ends.GetInput() or "") if self.legend_ends is not None else ""
        size = tuple(self.plotter.window_size)
        return legend_boxes(self._legend_place, self.legend, self._legend_labels(), ends, size)

    def update_stripes(self, render: bool = True) -> None:
        """Recompute the stripe parameter (after a camera move in reflection mode)."""
        if self.faces is None or self.surface is None or self.session.display.mode not in STRIPE_MODES:
            return
        parameter = self.faces.point_values(self.session.stripe_fields())
        limits = stripe_range(parameter)
        share = self.session.display.stripes.width
        if self._stripe_limits != limits or self._stripe_share != share:
            self._stripe_table, self._stripe_limits, self._stripe_share = stripe_table(share, limits), limits, share
            if self.surface_actor is not None and self.surface_actor.mapper.lookup_table is not None:
                self.surface_actor.mapper.lookup_table = self._stripe_table
                self.surface_actor.mapper.scalar_range = limits
        self.surface.point_data["stripe"] = parameter
        if render:
            self._render()

    def camera(self) -> Camera:
        """The plotter's camera as the session describes it."""
        cam = self._view_camera()
        position, focal = np.array(cam.position), np.array(cam.focal_point)
        direction = tuple(float(x) for x in (focal - position) / max(np.linalg.norm(focal - position), 1e-300))
        if cam.parallel_projection:
            return Camera(None, direction)
        return Camera(tuple(float(x) for x in position), direction)

    # -- lines and markers -----------------------------------------------
    def _show_lines(self, name: str, data: pv.PolyData, **style) -> None:
        """Swap new geometry into a persistent actor (created on first use)."""
        target = self.lines.get(name, self.points.get(name))
        target.copy_from(data)
        if name not in self.actors and data.n_points:
            self.actors[name] = self.plotter.add_mesh(target, name=name, render=False, pickable=False, **style)
        if name in self.actors:
            self.actors[name].SetVisibility(data.n_points > 0)

    def update_seams(self) -> None:
        if self.session.loaded is None:
            return
        data = seam_lines(self.session.loaded.seams) if self.session.display.show_seams else pv.PolyData()
        style = dict(line_width=4, render_lines_as_tubes=False)
        if data.n_points:
            style.update(scalars="colour", rgb=True, show_scalar_bar=False)
        self.lines["seams"].copy_from(data)
        if "seams" in self.actors:
            self.plotter.remove_actor(self.actors.pop("seams"), render=False)
        if data.n_points:
            self.actors["seams"] = self.plotter.add_mesh(
                self.lines["seams"], name="seams", render=False, pickable=False, **style
            )
        self._render()

    def update_sections(self) -> None:
        """Curves, comb teeth, envelopes, inflection and extremum markers of the current sections."""
        session = self.session
        combs = session.combs
        sections = session.sections
        self._show_lines("curves", section_curves(sections), color=colours.SECTION, line_width=2)
        self._show_lines("teeth", comb_teeth(combs), color=colours.COMB, line_width=1)
        self._show_lines("envelopes", comb_envelopes(combs), color=colours.ENVELOPE, line_width=2)
        marker = dict(point_size=12, render_points_as_spheres=True)
        self._show_lines(
            "inflections", marker_points([c.inflections.points for c in sections]), color=colours.INFLECTION, **marker
        )
        self._show_lines(
            "extrema", marker_points([c.extrema.points for c in sections]), color=colours.EXTREMUM, **marker
        )
        self._render()

    # -- findings --------------------------------------------------------
    def mark(self, finding: FindingEntry | None) -> None:
        """Highlight one finding (its path and point), or clear the mark."""
        if finding is None:
            path, point = pv.PolyData(), pv.PolyData()
        else:
            path = polylines([finding.path]) if finding.path.shape[0] >= 2 else pv.PolyData()
            point = marker_points([finding.position])
        self._show_lines("mark", path, color=colours.MARK, line_width=7)
        self._show_lines("mark_point", point, color=colours.MARK, point_size=20, render_points_as_spheres=True)
        self._render()

    def focus(self, finding: FindingEntry) -> None:
        """Turn the camera onto a finding, keeping the viewing direction: the whole item in view, with a margin.

        A seam or an edge is framed over its full length, a section over its
        extent, a point with ``finding.extent`` round it.
        """
        cam = self._view_camera()
        position, focal = np.array(cam.position), np.array(cam.focal_point)
        width, height = self.plotter.render_window.GetSize()
        points = finding.path if finding.path.shape[0] >= 2 else finding.position[None, :]
        points = np.vstack([points, finding.position])
        aspect = self._room() * width / max(height, 1)  # the width the legend leaves
        focal, position, scale = framing(
            points, focal - position, cam.view_angle, aspect, max(finding.extent, 1e-3) / 2
        )
        cam.focal_point = tuple(focal)
        cam.position = tuple(position)
        if cam.parallel_projection:
            cam.parallel_scale = scale
        self.plotter.reset_camera_clipping_range()
        self.mark(finding)

    # -- picking ---------------------------------------------------------
    def pick(self, x: int, y: int) -> tuple[int, int, int] | None:
        """(face, i, j) of the grid sample nearest the surface under display pixel (x, y)."""
        if self.faces is None or self.surface_actor is None or self.session.display.mode == Mode.DRAFT:
            return None  # the draft view draws its own grids, which the curvature probe does not index
        if self._locator is None:
            self._locator = vtkStaticCellLocator()
            self._locator.SetDataSet(self.faces.mesh)
            self._locator.BuildLocator()
        picker = vtkCellPicker()
        picker.SetTolerance(0.0005)
        picker.AddLocator(self._locator)
        picker.PickFromListOn()
        picker.AddPickList(self.surface_actor)
        if not picker.Pick(x, y, 0, self.plotter.renderer):
            return None
        cell = picker.GetCellId()
        if cell < 0:
            return None
        ids = self.faces.mesh.get_cell(cell).point_ids
        where = np.array(picker.GetPickPosition())
        nearest = min(ids, key=lambda p: np.linalg.norm(self.faces.mesh.points[p] - where))
        return self.faces.locate(int(nearest))

    def to_display(self, points: np.ndarray) -> np.ndarray:
        """Display pixel coordinates (VTK's: origin bottom left) of world points.

        Parameters
        ----------
        points : ndarray of shape (n, 3)

        Returns
        -------
        ndarray of shape (n, 2)
            NaN for points behind the camera.
        """
        renderer = self.plotter.renderer
        matrix = renderer.GetActiveCamera().GetCompositeProjectionTransformMatrix(renderer.GetTiledAspectRatio(), -1, 1)
        m = np.array([[matrix.GetElement(i, j) for j in range(4)] for i in range(4)])
        h = np.c_[np.asarray(points, float).reshape(-1, 3), np.ones(len(points))] @ m.T
        with np.errstate(divide="ignore", invalid="ignore"):
            ndc = np.where(h[:, 3:] > 0, h[:, :2] / h[:, 3:], np.nan)
        (x0, y0, x1, y1), (width, height) = renderer.GetViewport(), self.plotter.render_window.GetSize()
        return np.c_[(x0 + (ndc[:, 0] + 1) / 2 * (x1 - x0)) * width, (y0 + (ndc[:, 1] + 1) / 2 * (y1 - y0)) * height]

    def curve_at(self, x: float, y: float, pixels: float = CURVE_PICK_PIXELS) -> int | None:
        """Index (in ``session.sections``) of the section curve nearest display pixel (x, y), if within ``pixels``."""
        sections = self.session.sections
        if not sections:
            return None
        points = np.concatenate([c.points for c in sections])
        owner = np.repeat(np.arange(len(sections)), [c.points.shape[0] for c in sections])
        distance = np.linalg.norm(self.to_display(points) - (x, y), axis=1)
        if not np.isfinite(distance).any() or np.nanmin(distance) > pixels:
            return None
        return int(owner[np.nanargmin(distance)])

    def _render(self) -> None:
        # Qt plotters paint on their next event; off-screen ones only when asked.
        if not self.auto_render:
            return
        if getattr(self.plotter, "off_screen", False):
            self.plotter.render()
        else:
            self.plotter.update()
