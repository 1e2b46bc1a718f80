"""Point-in-trim test (banded, threaded crossing number) against the plain rule and exact shapes.

The reference is the crossing-number rule itself (Shimrat 1962, Algorithm 112),
written out in numpy over every edge for every point; and an annulus, whose
inside is known exactly (radius between the two circles).
"""

from __future__ import annotations

import numpy as np
import pytest

from geometry.nurbs import compiled_regions
from geometry.nurbs.compiled_regions import points_in_loops

RNG = np.random.default_rng(7)


def _plain(points: np.ndarray, loops) -> np.ndarray:
    """Even-odd crossings of the +x ray with every edge of every loop (no bands)."""
    a = np.concatenate(loops)
    b = np.concatenate([np.roll(lp, -1, axis=0) for lp in loops])
    x, y = points[:, :1], points[:, 1:]
    straddle = (a[:, 1] > y) != (b[:, 1] > y)
    dy = np.where(b[:, 1] == a[:, 1], 1.0, b[:, 1] - a[:, 1])
    cross = straddle & (x < a[:, 0] + (y - a[:, 1]) * (b[:, 0] - a[:, 0]) / dy)
    return (cross.sum(axis=1) % 2).astype(bool)


def _circle(radius: float, n: int, centre=(0.0, 0.0)) -> np.ndarray:
    t = np.linspace(0.0, 2 * np.pi, n, endpoint=False)
    return np.stack([centre[0] + radius * np.cos(t), centre[1] + radius * np.sin(t)], axis=1)


def _star(n: int) -> np.ndarray:
    t = np.sort(RNG.uniform(0.0, 2 * np.pi, n))
    r = RNG.uniform(0.3, 1.0, n)
    return np.stack([r * np.cos(t), r * np.sin(t)], axis=1)


@pytest.mark.parametrize("n", [3, 4, 50, 3000])
def test_bands_give_the_plain_crossing_rule(n):
    loops = [_star(n), _circle(0.1, max(n // 10, 3), (0.05, 0.0))]
    points = RNG.uniform(-1.1, 1.1, (30000, 2))
    k = min(50, n)
    points[:k, 1] = loops[0][:k, 1]  # on vertex heights, where a ray meets an edge's end
    np.testing.assert_array_equal(points_in_loops(points, loops), _plain(points, loops))


def test_an_annulus_of_thousands_of_edges_holds_exactly_the_points_between_its_circles():
    loops = [_circle(1.0, 4000), _circle(0.5, 2000)[::-1]]
    points = RNG.uniform(-1.2, 1.2, (50000, 2))
    r = np.hypot(points[:, 0], points[:, 1])
    clear = (np.abs(r - 1.0) > 1e-3) & (np.abs(r - 0.5) > 1e-3)  # polygon sag of a 4000-gon is 3e-7
    inside = points_in_loops(points, loops)
    np.testing.assert_array_equal(inside[clear], ((r > 0.5) & (r < 1.0))[clear])


def test_edges_across_many_bands_fall_back_to_fewer_bands_and_keep_the_answer():
    # a comb: tall teeth, every tooth edge spans the whole height
    teeth = 400
    x = np.repeat(np.arange(teeth, dtype=float), 2)
    y = np.tile([0.0, 10.0], teeth)
    top = np.stack([x + np.tile([0.0, 0.5], teeth), np.roll(y, 0)], axis=1)
    comb = np.concatenate([top, [[teeth, 0.0], [teeth, -1.0], [0.0, -1.0]]])
    starts, edges, _, _ = compiled_regions._bands(comb[:, 1], np.roll(comb[:, 1], -1))
    assert edges.size <= compiled_regions.MAX_ENTRIES_PER_EDGE * comb.shape[0]
    points = RNG.uniform([-1.0, -2.0], [teeth + 1.0, 11.0], (20000, 2))
    np.testing.assert_array_equal(points_in_loops(points, [comb]), _plain(points, [comb]))


def test_points_outside_every_band_and_nan_points_are_outside():
    loops = [_circle(1.0, 100)]
    points = np.array([[0.0, -5.0], [0.0, 5.0], [np.nan, 0.0], [0.0, np.nan], [0.0, 0.0]])
    np.testing.assert_array_equal(points_in_loops(points, loops), [False, False, False, False, True])
