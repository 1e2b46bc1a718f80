"""Images of the 3-D view as the model looks, without the tools drawn over it."""

from __future__ import annotations

import contextlib

# pyvista's lists of interactive widgets on a plotter (section plane, boxes, sliders, ...)
WIDGET_LISTS = (
    "plane_widgets",
    "box_widgets",
    "line_widgets",
    "sphere_widgets",
    "slider_widgets",
    "spline_widgets",
    "button_widgets",
    "camera_widgets",
    "distance_widgets",
    "logo_widgets",
)


def _widgets(plotter) -> list:
    found = []
    lists = getattr(plotter, "widgets", plotter)  # pyvista >= 0.47 keeps them in plotter.widgets
    for name in WIDGET_LISTS:
        found.extend(getattr(lists, name, None) or [])
    axes = getattr(plotter.renderer, "axes_widget", None)
    if axes is not None:
        found.append(axes)
    return found


@contextlib.contextmanager
def tools_hidden(plotter):
    """Switch off every widget (plane handles, outline, arrow, the axes marker) and render; restore after."""
    hidden = [w for w in _widgets(plotter) if w.GetEnabled()]
    for widget in hidden:
        widget.EnabledOff()
    plotter.render()
    try:
        yield
    finally:
        for widget in hidden:
            widget.EnabledOn()
        plotter.render()


def screenshot_without_tools(plotter, path: str) -> None:
    """Write the view (PNG or JPEG by the name's extension) without the tool widgets."""
    with tools_hidden(plotter):
        plotter.screenshot(path)
