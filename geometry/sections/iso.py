"""Iso-parameter and boundary curves of a face, analysed like plane sections.

A curve u = const (or v = const) is followed along the other parameter; it is
exact on the surface by construction, so no refinement is needed. Its signed
curvature is the face's normal curvature along it (see
:mod:`geometry.sections.curve_geometry`), and it gets the same knot pairs, special
points and figures as a plane section. Boundary curves are the trimming
loops of a trimmed face (split at corners) and the domain's edges of an
untrimmed one.
"""

from __future__ import annotations

import numpy as np
from scipy.interpolate import CubicSpline

from ..errors import BattenError
from .curve_geometry import ISO_U, ISO_V, PCURVE
from .march import FREE
from .pieces import along_samples, loop_stretches, resample, signed, spans_of, split_at_knots
from .results import SectionCurve

# Inward nudge (fraction of the range) for trim tests on a face's own domain edge.
EDGE_NUDGE = 1e-9
# Bisection steps for where a line leaves the trim (2^-48 of a step).
TRIM_BISECTIONS = 48
# Fewest points on an iso-parameter curve.
MIN_ISO_POINTS = 9
# Curve ends closer than this fraction of the model size close the curve.
CLOSE_FRACTION = 1e-4
# Loop vertices closer than this fraction of the model size are one point.
SAME_POINT = 1e-12


class IsoCurves:
    """Iso-parameter and boundary curves, for :class:`geometry.sections.engine.SectionEngine`."""

    def iso_curves(
        self, face: int, direction: str, values, exact: bool = True, kind: str | None = None, nudge: float = 0.0
    ) -> tuple[SectionCurve, ...]:
        """Curves u = const (``direction="u"``) or v = const of one face, inside its trim.

        Parameters
        ----------
        face : int
            Index into ``model.faces``.
        direction : {"u", "v"}
            Which parameter is held fixed.
        values : array_like of shape (m,)
            The fixed parameter values (clipped into the domain).
        exact : bool
            Root finding for inflections and extrema (see :meth:`plane`).
        kind : str, optional
            Label of the curves (default ``"iso_u"`` / ``"iso_v"``).
        nudge : float
            Trim tests run this far (parameter units) towards the domain's
            inside, for curves on the domain edge itself.

        Returns
        -------
        tuple of SectionCurve
            One per stretch inside the trim; signed curvature is the face's
            normal curvature along the curve, s runs with the free parameter.
        """
        if direction not in ("u", "v"):
            raise BattenError(f"iso-parameter direction must be 'u' or 'v', got {direction!r}")
        field_kind = ISO_U if direction == "u" else ISO_V
        f = self.model.faces[face]
        grid = self.grids[face]
        fixed_axis = 0 if direction == "u" else 1
        lo = (self.evaluator.u_lo, self.evaluator.v_lo)[fixed_axis][face]
        hi = (self.evaluator.u_hi, self.evaluator.v_hi)[fixed_axis][face]
        values = np.clip(np.atleast_1d(np.asarray(values, float)), lo, hi)
        running = grid.v if direction == "u" else grid.u
        t = np.interp(np.linspace(0, running.size - 1, 4 * running.size - 3), np.arange(running.size), running)
        curves = []
        for value in values:
            for line in self._iso_runs(f, fixed_axis, float(value), t, nudge):
                faces = np.full(line.shape[0], face)
                xyz = self.evaluator.derivatives(faces, line, 0)[0, 0].T
                uv = resample(line, xyz, False, self.spacing, MIN_ISO_POINTS)
                uv, _, pairs = split_at_knots(uv, np.full(uv.shape[0], FREE), *self.knots[face], self.ranges[face])
                spans = spans_of(pairs)
                faces = np.full(uv.shape[0], face)
                curve = self._geometry(field_kind, faces, uv)
                curve["spans"] = spans
                if curve["points"].shape[0] < 2 or np.ptp(curve["points"], axis=0).max() < 1e-9 * self.size:
                    continue  # a collapsed edge (a pole of the surface)
                closed = bool(np.linalg.norm(curve["points"][0] - curve["points"][-1]) < CLOSE_FRACTION * self.size)
                curve = along_samples(curve)
                curve["pieces"] = np.zeros(curve["points"].shape[0], int)
                curves.append(
                    self._finish(kind or field_kind, field_kind, curve, closed, exact, parameter=float(value))
                )
        return tuple(curves)

    def _iso_runs(self, face, fixed_axis: int, value: float, t: np.ndarray, nudge: float) -> list[np.ndarray]:
        """Stretches of the line (value fixed, t running) inside the trim, each (k, 2) in uv order."""

        def uv_of(tt, at=value):
            cols = [np.full(np.shape(tt), at), tt]
            return np.stack(cols[::-1] if fixed_axis else cols, axis=-1)

        if not face.is_trimmed:
            return [uv_of(t)]
        (u0, u1), (v0, v1) = face.surface.domain
        lo, hi = ((u0, u1), (v0, v1))[fixed_axis]
        probe_at = value + nudge if value <= 0.5 * (lo + hi) else value - nudge
        inside = face.inside(*uv_of(t, probe_at).T)
        change = np.flatnonzero(np.diff(inside.astype(int)))
        if change.size:
            # the trim boundary between samples i and i + 1, by bisection along the line
            a, b = t[change], t[change + 1]
            a_in = inside[change]
            for _ in range(TRIM_BISECTIONS):
                mid = 0.5 * (a + b)
                ok = face.inside(*uv_of(mid, probe_at).T)
                a, b = np.where(ok == a_in, mid, a), np.where(ok == a_in, b, mid)
            cut = 0.5 * (a + b)
        starts = np.flatnonzero(np.diff(np.concatenate([[0], inside.astype(int)])) == 1)
        stops = np.flatnonzero(np.diff(np.concatenate([inside.astype(int), [0]])) == -1)
        runs = []
        for i0, i1 in zip(starts, stops, strict=True):
            tt = t[i0 : i1 + 1]
            if i0 > 0:
                tt = np.concatenate([[cut[np.searchsorted(change, i0 - 1)]], tt])
            if i1 < t.size - 1:
                tt = np.concatenate([tt, [cut[np.searchsorted(change, i1)]]])
            if tt.size >= 2:
                runs.append(uv_of(tt))
        return runs

    def boundary_curves(self, face: int, exact: bool = True) -> tuple[SectionCurve, ...]:
        """The face's boundary: its trimming loops, or the domain's edges u = u0, u1, v = v0, v1 when untrimmed.

        Parameters
        ----------
        face : int
        exact : bool
            Root finding for inflections and extrema.

        Returns
        -------
        tuple of SectionCurve
            ``kind="boundary"`` (a domain edge; ``parameter`` is its fixed value)
            or ``kind="trim"`` (a stretch of a trimming loop between corners;
            ``parameter`` is the loop's index, 0 the outer loop). Edges that
            collapse to a point (poles) are left out.
        """
        if self.model.faces[face].is_trimmed:
            return self.trim_curves(face, exact)
        (u0, u1), (v0, v1) = self.model.faces[face].surface.domain
        out = []
        for direction, (lo, hi) in (("u", (u0, u1)), ("v", (v0, v1))):
            out += self.iso_curves(face, direction, [lo, hi], exact, kind="boundary", nudge=EDGE_NUDGE * (hi - lo))
        return tuple(out)

    def trim_curves(self, face: int, exact: bool = True) -> tuple[SectionCurve, ...]:
        """The face's trimming loops, split at their corners, as curves on the exact surface.

        Notes
        -----
        A loop is stored as a polyline in (u, v) (:attr:`geometry.model.Face.loops`);
        each stretch between corners (turns above CORNER_DEG in space) is
        interpolated by a cubic spline in (u, v) over chord length (periodic for
        a loop with no corner; de Boor, *A Practical Guide to Splines*, 1978,
        ch. IV) and composed with the exact surface. The signed curvature, the
        surface's normal curvature along the loop, depends on the spline's
        direction only, so it is accurate to the third order in the polyline's
        spacing; dk/ds and the full curvature to the second.
        """
        f = self.model.faces[face]
        out = []
        for index, loop in enumerate(f.loops):
            uv = self.evaluator.clip(np.full(loop.shape[0], face), np.asarray(loop, float))
            xyz = self.evaluator.derivatives(np.full(uv.shape[0], face), uv, 0)[0, 0].T
            for piece_uv, piece_xyz, closed in loop_stretches(uv, xyz, SAME_POINT * self.size):
                curve = self._trim_curve(face, piece_uv, piece_xyz, closed, exact, index)
                if curve is not None:
                    out.append(curve)
        return tuple(out)

    def _trim_curve(self, face, uv, xyz, closed, exact, index) -> SectionCurve | None:
        if closed:
            uv, xyz = np.concatenate([uv, uv[:1]]), np.concatenate([xyz, xyz[:1]])
        t = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(xyz, axis=0), axis=1))])
        if t[-1] <= SAME_POINT * self.size:
            return None
        spline = CubicSpline(t, uv, bc_type="periodic" if closed else "not-a-knot")
        count = max(MIN_ISO_POINTS, int(np.ceil(t[-1] / self.spacing)) + 1)
        at = np.linspace(0.0, t[-1], count)

        def geometry(tt: np.ndarray) -> dict:
            faces = np.full(tt.size, face)
            motion = tuple(np.ascontiguousarray(spline(tt, k).T) for k in (1, 2, 3))
            return self._geometry(PCURVE, faces, self.evaluator.clip(faces, spline(tt)), motion=motion)

        curve = along_samples(geometry(at))
        curve["pieces"] = np.zeros(at.size, int)
        curve["spans"] = np.zeros(at.size, int)

        def probe(ia, ib, frac):
            return signed(geometry(at[ia] + frac * (at[ib] - at[ia])), curve["orient"][ia])

        return self._finish("trim", PCURVE, curve, closed, exact, parameter=float(index), probe=probe)
