"""Exact placement of the section plane: typed position and normal, nudges, presets, snap to a finding.

Plain functions on a :class:`~app.state.session.Session`; the section panel
and the window's keys call them, tests call them without a window. Every
change goes through ``Session.set_section`` (one place recomputes the
sections and announces them).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from .session import Session
from .settings import AXES

# Named plane normals; "view" is the viewing direction, given by the window.
PRESETS = (*AXES, "view")


def _vector(values, what: str) -> tuple[float, float, float]:
    v = np.asarray(values, float)
    if v.shape != (3,) or not np.isfinite(v).all():
        raise ValueError(f"the plane's {what} needs three finite numbers")
    return tuple(float(x) for x in v)


def set_origin(session: Session, origin, exact: bool = True) -> None:
    """Put the plane through ``origin`` (mm), its normal kept.

    Raises
    ------
    ValueError
        ``origin`` is not three finite numbers; the plane stays.
    """
    session.set_section(exact=exact, origin=_vector(origin, "position"))


def set_normal(session: Session, normal, exact: bool = True) -> None:
    """Turn the plane to ``normal`` (any length but zero), about its origin.

    Raises
    ------
    ValueError
        A zero or non-finite vector; the plane stays.
    """
    normal = _vector(normal, "normal")
    if np.linalg.norm(normal) == 0:
        raise ValueError("the plane's normal cannot be the zero vector")
    session.set_section(exact=exact, normal=normal)


def offset(session: Session) -> float:
    """Signed distance (mm) of the plane from the model's centre, along its normal."""
    if session.model is None:
        return 0.0
    lo, hi = session.model.bounds
    s = session.section
    return float(np.dot(np.subtract(s.origin, (lo + hi) / 2), s.normal))


def set_offset(session: Session, distance: float, exact: bool = True) -> None:
    """Move the plane along its normal to ``distance`` mm from the model's centre (its in-plane point kept)."""
    if not np.isfinite(distance):
        raise ValueError("the plane's offset must be a finite number")
    push(session, float(distance) - offset(session), exact)


def push(session: Session, distance: float, exact: bool = True) -> None:
    """Move the plane ``distance`` mm along its normal."""
    s = session.section
    set_origin(session, np.add(s.origin, distance * np.asarray(s.normal)), exact)


def set_step(session: Session, step: float) -> None:
    """The distance one nudge moves the plane (mm, above zero)."""
    if not np.isfinite(step) or step <= 0:
        raise ValueError("the nudge step must be a positive length")
    # the sections stay where they are: nothing to recompute
    session.section = replace(session.section, nudge_step=float(step))
    session.events.emit("section")


def nudge(session: Session, steps: int = 1, exact: bool = True) -> None:
    """Move the plane ``steps`` nudge steps along its normal (negative: against it)."""
    push(session, steps * session.section.nudge_step, exact)


def preset(session: Session, name: str, view_direction=None) -> None:
    """Turn the plane to a named normal: ``x``, ``y``, ``z``, or ``view`` (``view_direction``, shape (3,)).

    The plane keeps passing through its origin.
    """
    if name not in PRESETS:
        raise ValueError(f"unknown plane preset {name!r}; known: {', '.join(PRESETS)}")
    if name == "view":
        if view_direction is None:
            raise ValueError("the view preset needs the viewing direction")
        set_normal(session, view_direction)
    else:
        set_normal(session, AXES[name])


def snap_to_finding(session: Session, index: int | None = None) -> bool:
    """Put the plane through a finding's location (the selected one by default), normal kept.

    Returns
    -------
    bool
        False when there is no such finding; the plane stays.
    """
    index = session.selection if index is None else index
    if index is None or not 0 <= index < len(session.findings):
        return False
    set_origin(session, session.findings[index].position)
    return True


def readout(session: Session) -> str:
    """One line saying where the plane is: its point, normal and offset from the model's centre."""
    if session.model is None:
        return "no model"
    s = session.section
    point = ", ".join(f"{x:.3f}" for x in s.origin)
    normal = ", ".join(f"{x:.4f}" for x in s.normal)
    return f"through ({point}) mm, normal ({normal}), {offset(session):+.3f} mm from the model's centre"
