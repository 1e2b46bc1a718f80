"""Results to pyvista objects, on an off-screen plotter (no window needed)."""

from __future__ import annotations

import numpy as np
import pytest
import pyvista as pv
from numpy.testing import assert_allclose
from render_support import offscreen_scene

from app.render import colours
from app.render.combs import comb_teeth, polylines
from app.render.meshes import face_mesh, grid_triangles
from app.render.scene import Scene
from app.render.stripes import TEXELS, stripe_range, stripe_table
from app.state import Mode, Session
from app.state.demo import demo_model


@pytest.fixture
def session():
    s = Session()
    s.show_model(demo_model())
    return s


@pytest.fixture
def scene(session):
    with offscreen_scene(session, (320, 240)) as built:
        yield built


def test_grid_triangles_keep_only_cells_inside():
    inside = np.ones((3, 4), bool)
    inside[0, 0] = False
    tris = grid_triangles(inside)
    assert tris.shape == (2 * (2 * 3 - 1), 3)
    assert 0 not in tris


def test_face_mesh_maps_samples_to_points(session):
    mesh = face_mesh(session.samples)
    sizes = [s.inside.size for s in session.samples]
    assert mesh.mesh.n_points == sum(sizes)
    face, i, j = mesh.locate(sizes[0] + 7)
    assert (face, i, j) == (1, *divmod(7, session.samples[1].inside.shape[1]))
    assert_allclose(mesh.mesh.points[sizes[0] + 7], session.samples[1].field.points[i, j], atol=1e-5)


def test_diverging_table_is_neutral_at_zero():
    table = colours.ramp_table(colours.DIVERGING, 257)
    middle = table[128, :3]
    assert np.all(middle > 230)  # near-white at zero
    assert table[0, 2] > table[0, 0] and table[-1, 0] > table[-1, 2]  # cool below zero, warm above


def test_stripe_table_light_share_and_whole_periods():
    parameter = np.linspace(-3.2, 7.9, 500)
    low, high = stripe_range(parameter)
    assert low == np.floor(low) and high == np.ceil(high) and low < -3.2 and high > 7.9
    table = stripe_table(0.25, (low, high))
    values = np.array([table.map_value(float(x))[:3] for x in (0.0, 0.5, 3.0, 3.5)])
    assert values[0].min() > 0.9 and values[1].max() < 0.2  # light on integers, dark half-way
    assert values[2].min() > 0.9 and values[3].max() < 0.2
    assert TEXELS >= 16 * (high - low)


def test_stripe_range_is_bounded_for_grazing_normals():
    parameter = np.concatenate([np.linspace(0, 5, 1000), [1e9, -1e9]])
    low, high = stripe_range(parameter)
    assert high - low <= TEXELS // 16


def test_polylines_and_teeth(session):
    lines = polylines([np.zeros((3, 3)), np.ones((1, 3)), np.ones((2, 3))])
    assert lines.n_points == 5 and lines.n_lines == 2
    session.set_section(enabled=True, normal=(0, 1, 0))
    teeth = comb_teeth(session.combs)
    assert teeth.n_lines == sum(c.roots.shape[0] for c in session.combs)


@pytest.mark.parametrize("mode", list(Mode))
def test_every_mode_draws_the_faces(scene, session, mode):
    session.set_display(mode=mode)
    scene.update_surface()
    assert scene.surface_actor is not None
    image = scene.plotter.screenshot(None, return_img=True)
    assert image.std() > 5  # something drawn, not a blank frame
    if mode in (Mode.REFLECTION, Mode.HIGHLIGHT, Mode.ISOPHOTE):
        assert "stripe" in scene.surface.point_data
        assert scene.surface_actor.mapper.interpolate_before_map  # per-fragment lookup


def test_reflection_stripes_follow_the_camera(scene, session):
    session.set_display(mode=Mode.REFLECTION)
    scene.update_surface()
    session.set_camera(scene.camera())
    scene.update_stripes()
    before = scene.surface.point_data["stripe"].copy()
    scene.plotter.camera.azimuth = 40
    session.set_camera(scene.camera())
    scene.update_stripes()
    assert not np.allclose(scene.surface.point_data["stripe"], before)


def test_focus_frames_the_whole_finding(scene, session):
    finding = session.findings[0]  # the demo's seam, along its whole 60 mm edge
    start = np.array(scene.plotter.camera.position)
    scene.focus(finding)
    lo, hi = finding.path.min(axis=0), finding.path.max(axis=0)
    assert_allclose(scene.plotter.camera.focal_point, (lo + hi) / 2)  # the item's middle, not its worst point
    assert not np.allclose(scene.plotter.camera.position, start)
    seen = scene.to_display(finding.path)
    size = np.array(scene.plotter.render_window.GetSize(), float)
    assert (seen > 0).all() and (seen < size).all()  # every point of the seam in view
    assert scene.actors["mark_point"].GetVisibility()


def test_legend_survives_opening_another_model(scene, session):
    session.set_display(mode=Mode.CURVATURE)
    scene.update_surface()
    session.show_model(demo_model())
    scene.rebuild()
    bar = scene.plotter.scalar_bars[scene.legend]
    assert bar.GetVisibility() and scene.plotter.renderer.HasViewProp(bar)
    session.set_display(mode=Mode.SHADED)
    scene.update_surface()
    assert not any(b.GetVisibility() for b in scene.plotter.scalar_bars.values())


def legend_ranges(scene) -> tuple[tuple[float, float], tuple[float, float]]:
    """The range the surface's mapper colours by, and the range its legend's lookup table labels."""
    bar = scene.plotter.scalar_bars[scene.legend]
    return tuple(scene.surface_actor.mapper.scalar_range), tuple(bar.GetLookupTable().GetRange())


@pytest.mark.parametrize("mode", [Mode.CURVATURE, Mode.DEVIATION])
def test_a_narrowed_range_reaches_map_and_legend(scene, session, mode):
    # pyvista shares a bar per title and only widens it: narrowing used to leave map and legend wide.
    session.set_display(mode=mode)
    scene.update_surface()
    auto = session.colour_limits()
    for limits in [(-0.5 * auto[1], 0.5 * auto[1]), (-2 * auto[1], 2 * auto[1]), (0.25 * auto[1], 0.5 * auto[1])]:
        session.set_colour_range(False, *limits)
        scene.update_surface()
        mapper, legend = legend_ranges(scene)
        assert_allclose(mapper, limits)
        assert_allclose(legend, limits)
    session.set_colour_range(True)
    scene.update_surface()
    mapper, legend = legend_ranges(scene)
    assert_allclose(mapper, auto)
    assert_allclose(legend, auto)
    assert len(scene.plotter.scalar_bars) == 1


@pytest.mark.parametrize("width", [320, 420, 900])
def test_the_legend_text_fits_a_narrow_view(session, width):
    # A legend placed in fixed viewport units cut its title off in a narrow view ("Mean curvatur").
    session.set_display(mode=Mode.CURVATURE)
    plotter = pv.Plotter(off_screen=True, window_size=(width, 500))
    plotter.set_background("white")
    scene = Scene(plotter, session)
    scene.rebuild()
    plotter.set_background("white")
    scene.update_surface()
    pixels = plotter.screenshot(return_img=True)[..., :3].astype(int)
    plotter.close()
    assert scene.legend is not None
    edge = pixels[:, -3:]
    assert (edge.sum(axis=2) < 300).sum() == 0  # no dark text pixel touches the right edge


def test_fitting_the_view_draws_no_frame(scene, session):
    # pyvista's plotter-level camera reset renders a frame whatever it is told; on a large model each
    # such frame cost 0.2 to 0.3 s before the first coloured picture (the window's fit runs twice)
    scene.session.set_display(mode=Mode.CURVATURE)
    scene.update_surface()
    scene.plotter.show(auto_close=False)  # from now on the plotter renders when asked, as the window's does
    frames = []
    scene.plotter.render_window.AddObserver("EndEvent", lambda *_: frames.append(1))
    scene.fit()
    scene.camera()
    assert frames == []
    scene.plotter.render()
    assert frames == [1]  # the observer does see frames
