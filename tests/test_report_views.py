"""Report pictures: views from the model's principal axes, none edge-on, the model framed in the free part."""

from __future__ import annotations

import numpy as np

from app.report.views import SLIVER, choose_views, fit_move, principal_axes, projected_area, triangle_patches

RNG = np.random.default_rng(14)


def _tilted_panel(thickness: float = 0.0):
    """A 160 x 110 mm panel, bulged a little, turned so no model axis lies in it (the toaster's case)."""
    u, v = np.meshgrid(np.linspace(-80, 80, 60), np.linspace(-55, 55, 40), indexing="ij")
    w = 5.0 * np.exp(-(u**2 + v**2) / 2000.0) + thickness
    local = np.stack([u, v, w], axis=-1).reshape(-1, 3)
    turn = np.linalg.qr(RNG.normal(size=(3, 3)))[0]
    normals = np.tile([0.0, 0.0, 1.0], (local.shape[0], 1))
    return local @ turn.T, normals @ turn.T, turn


def _grid(corner, along_u, along_v, normal, nu, nv):
    """Triangles of a flat rectangle: points, exact normals, triangle indices (offset by the caller)."""
    s, t = np.meshgrid(np.linspace(0, 1, nu), np.linspace(0, 1, nv), indexing="ij")
    points = corner + s[..., None] * along_u + t[..., None] * along_v
    i, j = np.meshgrid(np.arange(nu - 1), np.arange(nv - 1), indexing="ij")
    a = (i * nv + j).ravel()
    triangles = np.concatenate([np.stack([a, a + nv, a + 1], 1), np.stack([a + 1, a + nv, a + nv + 1], 1)])
    return points.reshape(-1, 3), np.tile(normal, (nu * nv, 1)), triangles


def _folded_sheet():
    """A cooker top: a 300 x 240 mm top (normal +z) folded down into a 300 x 125 mm front (normal -y),
    sampled coarsely on the large top and finely on the front, as face grids of different density are."""
    top = _grid(np.array([0.0, 0, 0]), np.array([300.0, 0, 0]), np.array([0.0, 240, 0]), [0, 0, 1], 13, 11)
    front = _grid(np.array([0.0, 0, -125]), np.array([300.0, 0, 0]), np.array([0.0, 0, 125]), [0, -1, 0], 60, 40)
    points = np.concatenate([top[0], front[0]])
    normals = np.concatenate([top[1], front[1]])
    triangles = np.concatenate([top[2], front[2] + top[0].shape[0]])
    return points, normals, triangles


def test_principal_axes_of_a_box_of_points():
    pts = RNG.uniform(-1, 1, size=(20000, 3)) * [50.0, 20.0, 2.0]
    _, axes, spread = principal_axes(pts)
    # Uniform on [-a, a]: standard deviation a / sqrt(3) (any statistics text).
    np.testing.assert_allclose(spread, np.array([50.0, 20.0, 2.0]) / np.sqrt(3), rtol=0.03)
    np.testing.assert_allclose(np.abs(axes), np.eye(3), atol=0.02)


def test_projected_area_of_a_tilted_rectangle():
    points, normals, triangles = _grid(np.zeros(3), np.array([30.0, 0, 0]), np.array([0.0, 20, 0]), [0, 0, 1], 7, 5)
    _, patch_normals, areas = triangle_patches(points, normals, triangles)
    assert np.isclose(areas.sum(), 600.0)
    angle = np.radians(np.array([0.0, 30.0, 60.0, 90.0, 120.0]))
    towards = np.column_stack([np.sin(angle), np.zeros_like(angle), np.cos(angle)])
    # A flat area A seen at angle a to its normal projects to A cos(a), nothing from behind (exact geometry).
    np.testing.assert_allclose(projected_area(patch_normals, areas, towards), 600.0 * np.clip(np.cos(angle), 0, None))


def test_no_view_of_a_panel_is_edge_on():
    points, normals, turn = _tilted_panel()
    panel_normal = turn[:, 2]
    views = choose_views(points, normals)
    best = projected_area(normals, np.ones(len(normals)), panel_normal[None])[0]
    for view in views:
        # Each camera sees the panel's front at a steep enough angle: no sliver.
        assert view.toward @ panel_normal > SLIVER, view.words
        assert abs(view.up @ view.toward) < 1e-9
    assert projected_area(normals, np.ones(len(normals)), np.array([v.toward for v in views])).min() > SLIVER * best
    assert views[1].toward @ panel_normal > 0.999  # the plan view looks straight onto the panel


def _sphere_directions(count: int = 4000) -> np.ndarray:
    """Evenly spread unit directions (the golden-angle spiral; Saff and Kuijlaars, Math. Intelligencer 19, 1997)."""
    k = np.arange(count) + 0.5
    z = 1 - 2 * k / count
    angle = np.pi * (1 + 5**0.5) * k
    return np.column_stack([np.sqrt(1 - z**2) * np.cos(angle), np.sqrt(1 - z**2) * np.sin(angle), z])


def test_a_folded_sheet_is_never_seen_edge_on():
    points, normals, triangles = _folded_sheet()
    centres, patch_normals, areas = triangle_patches(points, normals, triangles)
    views = choose_views(centres, patch_normals, areas)
    towards = np.array([v.toward for v in views])
    shown = projected_area(patch_normals, areas, towards)
    best = projected_area(patch_normals, areas, _sphere_directions()).max()  # brute force over the sphere
    assert shown.min() >= SLIVER * best
    # The top, the larger part, is never seen within 15 degrees of edge-on (common practice for a readable view).
    assert (towards @ [0, 0, 1] > np.sin(np.radians(15))).all()


def test_the_densely_sampled_part_does_not_outvote_the_large_one():
    # Counted by samples, the finely gridded front (2400 samples) outweighs the top (143); by area it does not.
    points, normals, triangles = _folded_sheet()
    centres, patch_normals, areas = triangle_patches(points, normals, triangles)
    plan = choose_views(centres, patch_normals, areas)[1]
    best = projected_area(patch_normals, areas, _sphere_directions()).max()
    assert projected_area(patch_normals, areas, plan.toward[None])[0] > 0.95 * best


def test_views_of_a_box_shaped_body_use_its_sides():
    pts = RNG.normal(size=(5000, 3))
    normals = pts / np.linalg.norm(pts, axis=1, keepdims=True)  # a sphere: every side sees as much
    views = choose_views(pts * [40.0, 30.0, 20.0], normals)
    assert views[2].words.startswith("side view")


def test_fit_centres_and_fills_the_free_part():
    pixels = np.array([[100.0, 200.0], [300.0, 260.0]])  # an outline 200 x 60 px centred at (200, 230)
    dx, dy, zoom = fit_move(pixels, (0.0, 0.0, 600.0, 700.0), fill=0.9)
    assert (dx, dy) == (100.0, 120.0)
    assert np.isclose(zoom, 0.9 * 600 / 200)  # the width is the tighter way
