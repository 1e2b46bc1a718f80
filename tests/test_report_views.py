"""Report pictures: views from the model's principal axes, finding labels that never cover each other."""

from __future__ import annotations

import numpy as np

from app.report.views import choose_views, merge_labels, principal_axes, screen_positions, visible_area

RNG = np.random.default_rng(14)


def _tilted_panel(thickness: float = 0.0):
    """A 160 x 110 mm panel, bulged a little, turned so no model axis lies in it (the toaster's case)."""
    u, v = np.meshgrid(np.linspace(-80, 80, 60), np.linspace(-55, 55, 40), indexing="ij")
    w = 5.0 * np.exp(-(u**2 + v**2) / 2000.0) + thickness
    local = np.stack([u, v, w], axis=-1).reshape(-1, 3)
    turn = np.linalg.qr(RNG.normal(size=(3, 3)))[0]
    normals = np.tile([0.0, 0.0, 1.0], (local.shape[0], 1))
    return local @ turn.T, normals @ turn.T, turn


def test_principal_axes_of_a_box_of_points():
    pts = RNG.uniform(-1, 1, size=(20000, 3)) * [50.0, 20.0, 2.0]
    _, axes, spread = principal_axes(pts)
    # Uniform on [-a, a]: standard deviation a / sqrt(3) (any statistics text).
    np.testing.assert_allclose(spread, np.array([50.0, 20.0, 2.0]) / np.sqrt(3), rtol=0.03)
    np.testing.assert_allclose(np.abs(axes), np.eye(3), atol=0.02)


def test_no_view_of_a_panel_is_edge_on():
    points, normals, turn = _tilted_panel()
    panel_normal = turn[:, 2]
    views = choose_views(points, normals)
    best = visible_area(normals, panel_normal)
    for view in views:
        # Each camera sees the panel's front at a steep enough angle: no sliver.
        assert view.toward @ panel_normal > 0.5, view.words
        assert visible_area(normals, view.toward) > 0.5 * best
        assert abs(view.up @ view.toward) < 1e-9
    assert views[1].toward @ panel_normal > 0.999  # the plan view looks straight onto the panel


def test_views_of_a_box_shaped_body_use_its_sides():
    pts = RNG.normal(size=(5000, 3))
    normals = pts / np.linalg.norm(pts, axis=1, keepdims=True)  # a sphere: every side sees as much
    views = choose_views(pts * [40.0, 30.0, 20.0], normals)
    assert views[2].words.startswith("side view")


def test_close_labels_share_one():
    screen = np.array([[0.0, 0.0], [0.5, 0.5], [0.02, 0.03], [0.9, -0.9]])
    assert merge_labels(screen, ["1", "2", "3", "4"]) == [(0, "1, 3"), (1, "2"), (3, "4")]


def test_screen_positions_of_a_camera_on_z():
    pts = np.array([[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, 2.0, 0.0]])
    got = screen_positions(pts, (0, 0, 10), (0, 0, 0), (0, 1, 0), 90.0)
    # Pinhole projection x / depth, divided by tan(45 deg) = 1.
    np.testing.assert_allclose(got, [[0, 0], [0.1, 0], [0, 0.2]], atol=1e-12)
