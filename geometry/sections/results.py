"""Result types of the section analysis: curves, their special points, figures, combs.

All are frozen dataclasses of read-only arrays, safe to hand between threads;
``to_json()`` gives plain dicts and lists for the command line and reports.
Lengths in mm, curvature in 1/mm, arc length measured along the curve from
its first point.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np


def _freeze(obj) -> None:
    for f in fields(obj):
        value = getattr(obj, f.name)
        if isinstance(value, np.ndarray):
            frozen = np.array(value)
            frozen.setflags(write=False)
            object.__setattr__(obj, f.name, frozen)


def _plain(a: np.ndarray) -> list:
    return np.asarray(a).tolist()


@dataclass(frozen=True, eq=False)
class CurvePoints:
    """Special points on one curve: inflections or curvature extrema.

    Attributes
    ----------
    points : ndarray of shape (m, 3)
        Positions on the exact surface.
    arc_length : ndarray of shape (m,)
        Arc length s from the curve's first point.
    faces : ndarray of int, shape (m,)
        Index of the face (in ``Model.faces``) the point lies on.
    uv : ndarray of shape (m, 2)
        Parameters on that face.
    curvature : ndarray of shape (m,)
        Signed curvature there (0 at an inflection up to the root tolerance).
    is_maximum : ndarray of bool, shape (m,)
        Extrema: True for a local maximum of the signed curvature, False for a
        minimum. Inflections: True where the curvature goes from - to + with s.
    at_seam : ndarray of bool, shape (m,)
        True where the sign change happens across a face seam (the curvature
        jumps there) rather than inside a face.
    at_knot : ndarray of bool, shape (m,)
        True where it happens across a knot line of the face, where the
        curvature or its derivative jumps (a C2 spline's dk/ds jumps at simple
        knots): the point is the crossing of the knot line, not a root.
    """

    points: np.ndarray
    arc_length: np.ndarray
    faces: np.ndarray
    uv: np.ndarray
    curvature: np.ndarray
    is_maximum: np.ndarray
    at_seam: np.ndarray
    at_knot: np.ndarray

    def __post_init__(self):
        _freeze(self)

    def __len__(self) -> int:
        return int(self.arc_length.size)

    @classmethod
    def empty(cls) -> CurvePoints:
        return cls(
            np.zeros((0, 3)),
            np.zeros(0),
            np.zeros(0, int),
            np.zeros((0, 2)),
            np.zeros(0),
            np.zeros(0, bool),
            np.zeros(0, bool),
            np.zeros(0, bool),
        )

    def to_json(self, with_curvature: bool = True) -> list[dict]:
        """One dict per point: ``point``, ``s``, ``face``, ``uv`` (and ``curvature``, ``maximum``)."""
        out = []
        for i in range(len(self)):
            item = {
                "point": _plain(self.points[i]),
                "s": float(self.arc_length[i]),
                "face": int(self.faces[i]),
                "uv": _plain(self.uv[i]),
                "at_seam": bool(self.at_seam[i]),
                "at_knot": bool(self.at_knot[i]),
            }
            if with_curvature:
                item["curvature"] = float(self.curvature[i])
                item["maximum"] = bool(self.is_maximum[i])
            out.append(item)
        return out


@dataclass(frozen=True)
class FairnessFigures:
    """Numbers that summarise how fair one curve is.

    Attributes
    ----------
    length : float
        Arc length in mm.
    inflections : int
        Sign changes of the signed curvature.
    extrema : int
        Local extrema of the signed curvature inside faces.
    monotone_pieces : int
        Pieces over which the curvature is monotone (Farin's criterion for a
        fair curve is a curvature plot of few monotone pieces; Farin, *Curves
        and Surfaces for CAGD*, 5th ed., 2002, the chapter on fairing; the
        chapter is cited from memory).
    max_abs_curvature : float
        max |k| in 1/mm.
    curvature_variation : float
        Integral of (dk/ds)^2 over arc length, in 1/mm^3, by the trapezoid rule
        on the exact dk/ds: the curve form of Moreton and Sequin's minimum
        variation functional ("Functional optimization for fair surface
        design", SIGGRAPH 1992).
        Seams count with the variation inside each face only; curvature jumps
        at seams are the seam analysis's business.
    """

    length: float
    inflections: int
    extrema: int
    monotone_pieces: int
    max_abs_curvature: float
    curvature_variation: float

    def to_json(self) -> dict:
        return {f.name: getattr(self, f.name) for f in fields(self)}


@dataclass(frozen=True, eq=False)
class SectionCurve:
    """One analysed curve: a plane-section chain, an iso-parameter or a boundary curve.

    Attributes
    ----------
    kind : str
        ``"plane"``, ``"iso_u"`` (u = const), ``"iso_v"`` (v = const) or ``"boundary"``.
    points : ndarray of shape (n, 3)
        Points on the exact surface at (nearly) even arc-length spacing. Where a
        chain crosses a seam both faces' points are kept (two nearly equal points).
    arc_length : ndarray of shape (n,)
        s at each point, from 0 to the curve's length.
    curvature : ndarray of shape (n,)
        Signed curvature, exact from the surface derivatives, signed like the
        colour map: positive where the face bends towards its normal (face
        orientation applied). Plane sections: the curve's in-plane curvature
        with that sign; other curves: the normal curvature of the face along
        the curve (see :mod:`geometry.sections.curve_geometry`).
    slope : ndarray of shape (n,)
        dk/ds, exact (from third derivatives).
    abs_curvature : ndarray of shape (n,)
        The space curve's full curvature |C' x C''| / |C'|^3.
    tangents : ndarray of shape (n, 3)
        Unit tangents in the direction of increasing s.
    sides : ndarray of shape (n, 3)
        Unit vectors the signed curvature refers to, on the side of the face
        normal: ``curvature * sides`` is the curvature vector (towards the
        centre of curvature).
    faces : ndarray of int, shape (n,)
    uv : ndarray of shape (n, 2)
        Face and parameters of each point.
    pieces : ndarray of int, shape (n,)
        Which face piece of the chain each point belongs to (0, 1, ... in order).
    spans : ndarray of int, shape (n,)
        Which smooth stretch each point is on: the label changes at seams and
        where the curve crosses a knot line (two points a hair either side).
    closed : bool
        The curve closes on itself (the last point connects to the first).
    inflections : CurvePoints
    extrema : CurvePoints
    figures : FairnessFigures
    plane : ndarray of shape (2, 3) or None
        (point, unit normal) of the cutting plane, for plane sections.
    parameter : float or None
        The fixed parameter of an iso-parameter or boundary curve.
    """

    kind: str
    points: np.ndarray
    arc_length: np.ndarray
    curvature: np.ndarray
    slope: np.ndarray
    abs_curvature: np.ndarray
    tangents: np.ndarray
    sides: np.ndarray
    faces: np.ndarray
    uv: np.ndarray
    pieces: np.ndarray
    spans: np.ndarray
    closed: bool
    inflections: CurvePoints
    extrema: CurvePoints
    figures: FairnessFigures
    plane: np.ndarray | None = None
    parameter: float | None = None

    def __post_init__(self):
        _freeze(self)

    @property
    def length(self) -> float:
        return float(self.arc_length[-1]) if self.arc_length.size else 0.0

    def curvature_plot(self) -> tuple[np.ndarray, np.ndarray]:
        """Data for a curvature-versus-arc-length graph: (s, k), each of shape (n,)."""
        return self.arc_length, self.curvature

    def to_json(self) -> dict:
        """Plain dict: points, arc_length and curvature per point, special points, figures."""
        out = {
            "kind": self.kind,
            "closed": self.closed,
            "length": self.length,
            "points": _plain(self.points),
            "arc_length": _plain(self.arc_length),
            "curvature": _plain(self.curvature),
            "faces": sorted({int(f) for f in self.faces}),
            "inflections": self.inflections.to_json(with_curvature=False),
            "extrema": self.extrema.to_json(),
            "figures": self.figures.to_json(),
        }
        if self.plane is not None:
            out["plane"] = {"point": _plain(self.plane[0]), "normal": _plain(self.plane[1])}
        if self.parameter is not None:
            out["parameter"] = self.parameter
        return out


@dataclass(frozen=True, eq=False)
class PlaneSection:
    """All curves where one plane cuts a model.

    Attributes
    ----------
    origin, normal : ndarray of shape (3,)
        The plane: a point on it and its unit normal.
    curves : tuple of SectionCurve
        Chains joined across faces, longest first.
    """

    origin: np.ndarray
    normal: np.ndarray
    curves: tuple[SectionCurve, ...]

    def __post_init__(self):
        _freeze(self)
        object.__setattr__(self, "curves", tuple(self.curves))

    @property
    def point_count(self) -> int:
        return sum(c.points.shape[0] for c in self.curves)

    def to_json(self) -> dict:
        return {
            "plane": {"point": _plain(self.origin), "normal": _plain(self.normal)},
            "curves": [c.to_json() for c in self.curves],
        }


@dataclass(frozen=True, eq=False)
class CurvatureComb:
    """Curvature comb of one curve, ready to draw.

    Attributes
    ----------
    roots : ndarray of shape (m, 3)
        Tooth roots on the curve, at even arc-length spacing.
    tips : ndarray of shape (m, 3)
        ``roots + scale * curvature * sides``: teeth stand on the side the curve
        turns to for a positive scale (a negative scale draws them outside).
    arc_length : ndarray of shape (m,)
    curvature : ndarray of shape (m,)
    scale : float
        mm of tooth per 1/mm of curvature.
    closed : bool
        The envelope closes (the curve does).
    """

    roots: np.ndarray
    tips: np.ndarray
    arc_length: np.ndarray
    curvature: np.ndarray
    scale: float
    closed: bool

    def __post_init__(self):
        _freeze(self)

    @property
    def envelope(self) -> np.ndarray:
        """Polyline through the tips, shape (m, 3), or (m + 1, 3) closed back to the first."""
        if self.closed and self.tips.shape[0]:
            return np.concatenate([self.tips, self.tips[:1]])
        return self.tips

    def to_json(self) -> dict:
        return {
            "scale": self.scale,
            "roots": _plain(self.roots),
            "tips": _plain(self.tips),
            "arc_length": _plain(self.arc_length),
            "curvature": _plain(self.curvature),
            "closed": self.closed,
        }
