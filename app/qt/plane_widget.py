"""The section plane in the 3-D view: a handle the user drags along its normal and turns by its arrow.

VTK's implicit plane widget moves the plane by the mouse motion projected on
the normal, in world units at the picked point: with the normal towards the
viewer that projection vanishes and the plane hardly moves. Here a drag moves
the plane so that its trace follows the cursor along the normal's direction on
screen; when the normal looks (nearly) along the view, the cursor's vertical
motion pushes the plane away from the viewer (up) or towards it (down), at the
model's scale on screen. The handle only shows the plane and reports moves:
the session holds where the plane is.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
from vtkmodules.vtkCommonDataModel import vtkPlane
from vtkmodules.vtkInteractionWidgets import vtkImplicitPlaneRepresentation, vtkImplicitPlaneWidget2

# Below this on-screen length of one mm of normal (in mm per mm of cursor motion, i.e.
# |projection| / pixel size), the normal looks along the view and the vertical motion pushes.
FACING_SHARE = 0.35
# The arrow and origin ball: this many pixels (VTK's handle size), whatever the zoom.
HANDLE_PIXELS = 8.0


class PlaneHandle:
    """A VTK implicit plane widget on ``view`` that reports ``moved(origin, normal)``.

    Parameters
    ----------
    view : pyvistaqt.QtInteractor
    moved : callable
        ``moved(origin, normal)``, tuples of 3 floats, on every drag step.
    to_display : callable
        World points, shape (n, 3), to display pixels, shape (n, 2) (the scene's).
    colour : tuple of 3 floats
    """

    def __init__(self, view, moved: Callable, to_display: Callable, colour=(0.23, 0.43, 0.65)):
        self.view = view
        self.moved = moved
        self.to_display = to_display
        self.rep = vtkImplicitPlaneRepresentation()
        self.rep.SetPlaceFactor(1.0)
        self.rep.SetOutlineTranslation(False)
        self.rep.SetScaleEnabled(False)
        self.rep.SetDrawPlane(False)
        self.rep.SetTubing(False)
        self.rep.SetHandleSize(HANDLE_PIXELS)
        self.rep.SetForegroundColor(*colour)
        self.rep.SetEdgeColor(*colour)
        self.rep.GetOutlineProperty().SetColor(*colour)
        self.rep.GetPlaneProperty().SetOpacity(0.25)
        self.widget = vtkImplicitPlaneWidget2()
        self.widget.SetRepresentation(self.rep)
        self.widget.SetInteractor(view.iren.interactor)
        self.widget.SetCurrentRenderer(view.renderer)
        self.widget.AddObserver("StartInteractionEvent", self._started)
        self.widget.AddObserver("InteractionEvent", self._interaction)
        self.widget.AddObserver("EndInteractionEvent", lambda *_: self.rep.SetDrawPlane(False))
        # listed with the plotter's own widgets: exported pictures leave them all out (app.qt.snapshot)
        getattr(view, "widgets", view).plane_widgets.append(self.widget)
        self._last_mouse = None
        self._origin = np.zeros(3)
        self._normal = np.array([1.0, 0.0, 0.0])
        self.shown = False

    def show(self, bounds, origin, normal) -> None:
        """Place the handle in ``bounds`` (xmin, xmax, ymin, ymax, zmin, zmax) through ``origin``."""
        self.rep.PlaceWidget(list(bounds))
        self.place(origin, normal)
        self.widget.On()
        self.shown = True

    def hide(self) -> None:
        self.widget.Off()
        self.shown = False

    def place(self, origin, normal) -> None:
        """Show the plane where the session has it (no callback)."""
        self._origin, self._normal = np.array(origin, float), np.array(normal, float)
        self.rep.SetOrigin(*self._origin)
        self.rep.SetNormal(*self._normal)
        self.rep.UpdatePlacement()

    def set_visible(self, on: bool) -> None:
        """Show or hide the handle without forgetting it (exported pictures leave it out)."""
        self.widget.SetEnabled(bool(on) and self.shown)

    def plane(self) -> tuple[np.ndarray, np.ndarray]:
        plane = vtkPlane()
        self.rep.GetPlane(plane)
        return np.array(plane.GetOrigin()), np.array(plane.GetNormal())

    def _started(self, *_) -> None:
        self._last_mouse = np.array(self.view.iren.interactor.GetEventPosition(), float)
        self.rep.SetDrawPlane(True)

    def _interaction(self, *_) -> None:
        origin, normal = self.plane()
        mouse = np.array(self.view.iren.interactor.GetEventPosition(), float)
        last, self._last_mouse = self._last_mouse, mouse
        if self.rep.GetInteractionState() == vtkImplicitPlaneRepresentation.Pushing and last is not None:
            # our own push replaces VTK's (which vanishes with the normal towards the viewer)
            distance = self.push_for(self._origin, self._normal, mouse - last)
            origin = self._origin + distance * self._normal
            normal = self._normal
            self.rep.SetOrigin(*origin)
        self._origin, self._normal = origin, normal
        self.moved(tuple(float(x) for x in origin), tuple(float(x) for x in normal))

    def push_for(self, origin: np.ndarray, normal: np.ndarray, motion: np.ndarray) -> float:
        """Distance (mm) along ``normal`` for a cursor motion of ``motion`` display pixels, shape (2,).

        The plane's trace follows the cursor along the normal's direction on
        screen; a normal that looks along the view takes the vertical motion
        at the screen scale at ``origin`` (up: away from the viewer).
        """
        mm_per_pixel = self.pixel_size(origin)
        ends = self.to_display(np.array([origin, origin + normal * mm_per_pixel]))
        along = ends[1] - ends[0]  # display pixels per pixel-size of normal motion
        if not np.isfinite(along).all():
            return 0.0
        share = float(np.hypot(*along))
        if share >= FACING_SHARE:
            return float(np.dot(motion, along) / share**2 * mm_per_pixel)
        cam = self.view.camera
        looking = np.subtract(cam.focal_point, cam.position)
        away = 1.0 if np.dot(looking, normal) >= 0 else -1.0
        return float(motion[1] * mm_per_pixel * away)

    def pixel_size(self, point: np.ndarray) -> float:
        """World size (mm) of one display pixel at ``point`` on the screen."""
        cam = self.view.camera
        height = max(self.view.render_window.GetSize()[1], 1)
        if cam.parallel_projection:
            return 2.0 * cam.parallel_scale / height
        looking = np.subtract(cam.focal_point, cam.position)
        looking /= max(np.linalg.norm(looking), 1e-300)
        depth = max(float(np.dot(np.subtract(point, cam.position), looking)), 1e-9)
        return 2.0 * depth * np.tan(np.radians(cam.view_angle) / 2) / height
