"""Exact evaluation of many faces at scattered (face, u, v) samples in one pass.

Section curves cross many faces, and each step of a Newton iteration needs the
derivatives of every face at a few dozen points. Evaluating face by face pays
numpy's call overhead once per face and iteration; here faces of equal degrees
share one pass: their knot vectors are laid end to end (each shifted so that
the vectors do not overlap), one span search and one basis evaluation serve
every sample, and each sample gathers the (p + 1) x (q + 1) poles of its own
face from a padded stack of control nets.

The basis functions are those of :mod:`geometry.basis` (The NURBS Book, 2nd
ed., A2.2/A2.3 and eq. 2.9); rational derivatives follow from the homogeneous
ones by eq. 4.20 (A4.4), via :func:`geometry.nurbs.rational_quotient`.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from .basis import nonzero_basis_derivatives
from .nurbs import NurbsSurface, rational_quotient

# Gap between consecutive shifted knot vectors; any positive value works.
_KNOT_GAP = 1.0


class _Axis:
    """One parameter direction of a group of faces: shifted, concatenated knots."""

    def __init__(self, knot_vectors: Sequence[np.ndarray], degree: int, counts: Sequence[int]):
        parts, starts, shifts, lo, hi = [], [], [], [], []
        end, start = 0.0, 0
        for knots, n in zip(knot_vectors, counts, strict=True):
            shift = 0.0 if not parts else end + _KNOT_GAP - knots[0]
            parts.append(knots + shift)
            starts.append(start)
            shifts.append(shift)
            lo.append(knots[degree])
            hi.append(knots[n])
            end = parts[-1][-1]
            start += knots.size
        self.knots = np.concatenate(parts)
        self.degree = degree
        self.starts = np.array(starts)
        self.shifts = np.array(shifts)
        self.lo = np.array(lo)
        self.hi = np.array(hi)
        # The domain's end belongs to the last non-empty span of its own face, not
        # to the gap after it: evaluate one ulp inside (the basis is continuous).
        self.hi_shifted = np.nextafter(self.hi + self.shifts, -np.inf)

    def basis(self, member: np.ndarray, t: np.ndarray, order: int) -> tuple[np.ndarray, np.ndarray]:
        """Non-zero basis derivatives (order + 1, k, p + 1) and local first pole indices (k,)."""
        t = np.clip(t, self.lo[member], self.hi[member])
        shifted = np.minimum(t + self.shifts[member], self.hi_shifted[member])
        n_total = self.knots.size - self.degree - 1
        ders, spans = nonzero_basis_derivatives(self.knots, self.degree, n_total, shifted, order)
        return ders, spans - self.starts[member] - self.degree


class _Group:
    """Faces of one degree pair, evaluated together."""

    def __init__(self, surfaces: Sequence[NurbsSurface]):
        first = surfaces[0]
        self.p, self.q = first.degree_u, first.degree_v
        self.rational = any(s.is_rational for s in surfaces)
        counts = [s.shape for s in surfaces]
        self.u = _Axis([s.knots_u for s in surfaces], self.p, [c[0] for c in counts])
        self.v = _Axis([s.knots_v for s in surfaces], self.q, [c[1] for c in counts])
        nu = max(c[0] for c in counts)
        nv = max(c[1] for c in counts)
        dim = 4 if self.rational else 3
        net = np.zeros((len(surfaces), nu, nv, dim))
        for i, s in enumerate(surfaces):
            a, b = s.shape
            net[i, :a, :b] = s.homogeneous[..., :dim]
        self.net = net

    def derivatives(self, member: np.ndarray, u: np.ndarray, v: np.ndarray, order: int) -> np.ndarray:
        du, iu0 = self.u.basis(member, u, order)
        dv, iv0 = self.v.basis(member, v, order)
        iu = iu0[:, None] + np.arange(self.p + 1)
        iv = iv0[:, None] + np.arange(self.q + 1)
        local = self.net[member[:, None, None], iu[:, :, None], iv[:, None, :]]  # (k, p+1, q+1, dim)
        dim = local.shape[-1]
        hom = np.zeros((order + 1, order + 1, dim, u.size))
        for k in range(order + 1):
            part = np.einsum("ka,kabd->kbd", du[k], local)
            for l in range(order + 1 - k):
                hom[k, l] = np.einsum("kb,kbd->dk", dv[l], part)
        return rational_quotient(hom, order) if self.rational else hom


class FaceEvaluator:
    """Exact derivatives of a model's face surfaces at scattered samples.

    Parameters
    ----------
    surfaces : sequence of NurbsSurface
        One per face, indexed as the model's faces.
    """

    def __init__(self, surfaces: Sequence[NurbsSurface]):
        self.surfaces = tuple(surfaces)
        keys = [(s.degree_u, s.degree_v) for s in self.surfaces]
        self._groups: list[tuple[np.ndarray, _Group]] = []
        self._group_of = np.zeros(len(keys), dtype=int)
        self._member_of = np.zeros(len(keys), dtype=int)
        for g, key in enumerate(dict.fromkeys(keys)):
            idx = np.array([i for i, k in enumerate(keys) if k == key])
            self._group_of[idx] = g
            self._member_of[idx] = np.arange(idx.size)
            self._groups.append((idx, _Group([self.surfaces[i] for i in idx])))
        self.u_lo = np.array([s.domain[0][0] for s in self.surfaces])
        self.u_hi = np.array([s.domain[0][1] for s in self.surfaces])
        self.v_lo = np.array([s.domain[1][0] for s in self.surfaces])
        self.v_hi = np.array([s.domain[1][1] for s in self.surfaces])

    def clip(self, faces: np.ndarray, uv: np.ndarray) -> np.ndarray:
        """Parameters clipped into each sample's face domain, shape (k, 2)."""
        u = np.clip(uv[:, 0], self.u_lo[faces], self.u_hi[faces])
        v = np.clip(uv[:, 1], self.v_lo[faces], self.v_hi[faces])
        return np.stack([u, v], axis=1)

    def derivatives(self, faces: np.ndarray, uv: np.ndarray, order: int) -> np.ndarray:
        """Partial derivatives S_kl (k + l <= order) of each sample's face.

        Parameters
        ----------
        faces : ndarray of int, shape (k,)
            Face index of each sample.
        uv : ndarray of shape (k, 2)
            Parameters (clipped into the face's domain).
        order : int
            Highest total order, 0 to 3.

        Returns
        -------
        ders : ndarray of shape (order + 1, order + 1, 3, k)
            Components first: ``ders[k, l, :, i]`` is d^(k+l) S / du^k dv^l at sample i.
        """
        faces = np.asarray(faces, dtype=int).ravel()
        uv = np.asarray(uv, dtype=float).reshape(-1, 2)
        out = np.zeros((order + 1, order + 1, 3, faces.size))
        groups = self._group_of[faces]
        for g, (_, group) in enumerate(self._groups):
            sel = np.flatnonzero(groups == g) if len(self._groups) > 1 else np.arange(faces.size)
            if sel.size == 0:
                continue
            member = self._member_of[faces[sel]]
            out[..., sel] = group.derivatives(member, uv[sel, 0], uv[sel, 1], order)[:, :, :3]
        return out
