"""The bundled sample products hold the facts their manifest promises.

Two independent evaluations check each designed fact: Batten's own core on the
builder's surfaces (geometry.nurbs.curvature_at) and the OCP kernel on the surfaces
read back from the written STEP files (GeomLProp_SLProps, BRepExtrema).
Normal curvature in a direction d follows from the principal curvatures by
Euler's theorem, k(d) = k1 cos^2 + k2 sin^2 (do Carmo 1976, sec. 3-2).
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from geometry.nurbs import curvature_at
from sample_surfaces import products

ROOT = Path(__file__).resolve().parents[1]
SAMPLES_DIR = ROOT / "sample_surfaces"

MANIFEST = json.loads((SAMPLES_DIR / "manifest.json").read_text(encoding="utf-8"))
BY_NAME = {s["name"]: s for s in MANIFEST["samples"]}
BUILT = {make().stem: make() for make in products.ALL}

# Exact constructions evaluate to rounding: 1e-9 in mm and 1/mm is far above
# double rounding at these sizes and far below any defect the samples carry.
ROUNDING = 1e-9
# OCP writes STEP reals with 15 significant digits; its read-back keeps that.
READ_BACK = 1e-9
ANGLE_ROUNDING_DEG = 1e-9
SEAM_SAMPLES = 9
MAX_FILE_BYTES = 1_000_000


# -- helpers ---------------------------------------------------------------------------


def _faces_of(entry):
    built = BUILT[entry["name"]]
    return {f.name: f for f in built.faces}


def _seam_params(surface, side: str, n: int) -> tuple[np.ndarray, np.ndarray]:
    (u0, u1), (v0, v1) = surface.domain
    t = np.linspace(0.0, 1.0, n)
    if side[0] == "u":
        return np.full(n, u0 if side == "u0" else u1), v0 + t * (v1 - v0)
    return u0 + t * (u1 - u0), np.full(n, v0 if side == "v0" else v1)


def _along(surface, side, u, v) -> np.ndarray:
    ders = surface.derivatives_at(u, v, 1)
    return ders[0, 1] if side[0] == "u" else ders[1, 0]


def _unit(a: np.ndarray) -> np.ndarray:
    return a / np.linalg.norm(a, axis=-1, keepdims=True)


def _core_side(face, side, n=SEAM_SAMPLES):
    """Points, normals, seam tangents and curvature field along one side (Batten's core)."""
    u, v = _seam_params(face.surface, side, n)
    field = curvature_at(face.surface, u, v, reversed=face.reversed)
    return field, _unit(_along(face.surface, side, u, v)), (u, v)


def _angle_deg(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Angle between unit vectors, accurate near 0 (atan2 of sine and cosine)."""
    return np.degrees(np.arctan2(np.linalg.norm(np.cross(a, b), axis=-1), np.sum(a * b, axis=-1)))


def _euler(k1, k2, dir1, dir2, d) -> np.ndarray:
    return k1 * np.sum(d * dir1, axis=-1) ** 2 + k2 * np.sum(d * dir2, axis=-1) ** 2


def _seam_measures_core(entry, seam):
    faces = _faces_of(entry)
    a, b = (faces[name] for name in seam["faces"])
    fa, ta, _ = _core_side(a, seam["sides"][0])
    fb, _, _ = _core_side(b, seam["sides"][1])
    cross = _unit(np.cross(fa.normals, ta))  # in the tangent plane, across the seam
    gap = np.linalg.norm(fa.points - fb.points, axis=1)
    angle = _angle_deg(fa.normals, fb.normals)
    ka = _euler(fa.k1, fa.k2, fa.dir1, fa.dir2, cross)
    kb = _euler(fb.k1, fb.k2, fb.dir1, fb.dir2, cross)
    return gap, angle, ka, kb


def _read_step(path: Path):
    from OCP.IFSelect import IFSelect_RetDone
    from OCP.STEPControl import STEPControl_Reader

    reader = STEPControl_Reader()
    assert reader.ReadFile(str(path)) == IFSelect_RetDone
    reader.TransferRoots()
    return reader.OneShape()


def _shape_faces(shape):
    from OCP.TopAbs import TopAbs_FACE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    out = []
    explorer = TopExp_Explorer(shape, TopAbs_FACE)
    while explorer.More():
        out.append(TopoDS.Face(explorer.Current()))
        explorer.Next()
    return out


def _occ_surface(face):
    from OCP.BRep import BRep_Tool

    return BRep_Tool.Surface_s(face)


def _occ_props(surface, u, v):
    """Point, normal and normal-curvature function of an OCP surface at (u, v)."""
    from OCP.GeomLProp import GeomLProp_SLProps
    from OCP.gp import gp_Dir

    props = GeomLProp_SLProps(surface, float(u), float(v), 2, 1e-9)
    assert props.IsNormalDefined() and props.IsCurvatureDefined()
    point = np.array(props.Value().Coord())
    normal = np.array(props.Normal().Coord())
    kmax, kmin = props.MaxCurvature(), props.MinCurvature()
    if props.IsUmbilic():  # every direction is principal
        dmax_v = _unit(np.array(props.D1U().Coord()))
    else:
        dmax, dmin = gp_Dir(), gp_Dir()
        props.CurvatureDirections(dmax, dmin)
        dmax_v = np.array(dmax.Coord())
    dmin_v = np.cross(normal, dmax_v)
    return point, normal, (kmax, kmin, dmax_v, dmin_v)


def _step_faces_by_name(entry):
    faces = _shape_faces(_read_step(SAMPLES_DIR / entry["files"]["step"]))
    return {f["name"]: faces[f["index"]] for f in entry["faces"]}


def _seam_measures_occ(entry, seam):
    """The same measures from OCP on the STEP read back, at the same parameters."""
    built = _faces_of(entry)
    occ = _step_faces_by_name(entry)
    a, b = seam["faces"]
    ua, va = _seam_params(built[a].surface, seam["sides"][0], SEAM_SAMPLES)
    ub, vb = _seam_params(built[b].surface, seam["sides"][1], SEAM_SAMPLES)
    tangents = _unit(_along(built[a].surface, seam["sides"][0], ua, va))
    sa, sb = _occ_surface(occ[a]), _occ_surface(occ[b])
    rows = []
    for i in range(SEAM_SAMPLES):
        pa, na, ca = _occ_props(sa, ua[i], va[i])
        pb, nb, cb = _occ_props(sb, ub[i], vb[i])
        d = _unit(np.cross(na, tangents[i]))
        ka = ca[0] * np.dot(d, ca[2]) ** 2 + ca[1] * np.dot(d, ca[3]) ** 2
        kb = cb[0] * np.dot(d, cb[2]) ** 2 + cb[1] * np.dot(d, cb[3]) ** 2
        angle = _angle_deg(na, nb)
        rows.append((np.linalg.norm(pa - pb), angle, ka, kb))
    return tuple(np.array(c) for c in zip(*rows, strict=True))


def _seams(continuity: str):
    return [
        pytest.param(entry, seam, id=f"{entry['name']}:{'/'.join(seam['faces'])}")
        for entry in MANIFEST["samples"]
        for seam in entry["seams"]
        if seam["continuity"] == continuity
    ]


# -- the files -----------------------------------------------------------------------------


@pytest.mark.parametrize("entry", MANIFEST["samples"], ids=lambda e: e["name"])
def test_files_exist_and_are_small(entry):
    for name in entry["files"].values():
        path = SAMPLES_DIR / name
        assert path.is_file()
        assert path.stat().st_size < MAX_FILE_BYTES


def test_build_is_deterministic_and_current(tmp_path):
    from sample_surfaces.build_samples import build_all

    manifest = build_all(tmp_path, large=False)  # the large sample has its own test below
    assert manifest == {k: v for k, v in MANIFEST.items() if k != "large_samples"}
    for entry in manifest["samples"]:
        for name in entry["files"].values():
            assert (tmp_path / name).read_bytes() == (SAMPLES_DIR / name).read_bytes(), name


@pytest.mark.parametrize("entry", MANIFEST["samples"], ids=lambda e: e["name"])
def test_step_faces_topology_and_names(entry):
    """Face count, names, and shared edges = designed seams (order: see the IGES test)."""
    from OCP.collections import IndexedDataMap_TopoDS_Shape_List_TopoDS_Shape_TopTools_ShapeMapHasher as EdgeFaces
    from OCP.TopAbs import TopAbs_EDGE, TopAbs_FACE
    from OCP.TopExp import TopExp

    path = SAMPLES_DIR / entry["files"]["step"]
    shape = _read_step(path)
    faces = _shape_faces(shape)
    assert len(faces) == entry["face_count"]
    text = path.read_text(encoding="ascii")
    for listed in entry["faces"]:
        assert f"ADVANCED_FACE('{listed['name']}'" in text
    assert f"PRODUCT('{entry['product']}'" in text
    edge_faces = EdgeFaces()
    TopExp.MapShapesAndAncestors_s(shape, TopAbs_EDGE, TopAbs_FACE, edge_faces)
    uses = [edge_faces.FindFromIndex(i).Size() for i in range(1, edge_faces.Extent() + 1)]
    assert uses.count(2) == len(entry["seams"]) - sum(s["continuity"] == "broken" for s in entry["seams"])
    assert uses.count(1) == entry["unshared_edges_step"]  # a gap is not sewn: both its edges stay unshared
    assert max(uses) <= 2


@pytest.mark.parametrize("entry", MANIFEST["samples"], ids=lambda e: e["name"])
def test_iges_has_named_trimmed_surfaces(entry):
    """IGES 5.3 face mode: one 144 per face, each with a 406 form 15 name."""
    text = (SAMPLES_DIR / entry["files"]["iges"]).read_text(encoding="ascii")
    directory = [line for line in text.splitlines() if line[72:73] == "D"]
    types = [int(line[:8]) for line in directory[::2]]
    assert types.count(144) == entry["face_count"]
    assert types.count(128) == entry["face_count"]
    for listed in entry["faces"]:
        assert f"{len(listed['name'])}H{listed['name']};" in text
    global_section = "".join(line[:72] for line in text.splitlines() if line[72:73] == "G")
    assert ",11," in global_section  # IGES version flag 11 = 5.3


def _read_iges(path: Path):
    from OCP.IFSelect import IFSelect_RetDone
    from OCP.IGESControl import IGESControl_Reader

    reader = IGESControl_Reader()
    assert reader.ReadFile(str(path)) == IFSelect_RetDone
    reader.TransferRoots()
    return reader.OneShape()


@pytest.mark.parametrize("entry", MANIFEST["samples"], ids=lambda e: e["name"])
def test_iges_and_step_hold_the_same_faces_in_the_same_order(entry):
    """OCP reads both files back; each face's mid-parameter point is the listed one."""
    step = _shape_faces(_read_step(SAMPLES_DIR / entry["files"]["step"]))
    iges = _shape_faces(_read_iges(SAMPLES_DIR / entry["files"]["iges"]))
    assert len(iges) == len(step) == entry["face_count"]
    for face_step, face_iges, listed in zip(step, iges, entry["faces"], strict=True):
        (u0, u1), (v0, v1) = _faces_of(entry)[listed["name"]].surface.domain
        for face in (face_step, face_iges):
            point, _, _ = _occ_props(_occ_surface(face), 0.5 * (u0 + u1), 0.5 * (v0 + v1))
            np.testing.assert_allclose(point, listed["point"], atol=READ_BACK)


def test_read_model_opens_every_sample():
    """The project's reader sees every face of every sample, in order, with its name and trim."""
    io = pytest.importorskip("geometry.io")
    if not hasattr(io, "read_model"):
        pytest.skip("geometry.io.read_model not there yet")
    pytest.importorskip("geometry.kernel.step")
    pytest.importorskip("geometry.kernel.iges")
    for entry in MANIFEST["samples"]:
        for kind in ("step", "iges"):
            model = io.read_model(SAMPLES_DIR / entry["files"][kind])
            assert [f.name for f in model.faces] == [f["name"] for f in entry["faces"]], (entry["name"], kind)
            assert [f.is_trimmed for f in model.faces] == [f["trimmed"] for f in entry["faces"]], (entry["name"], kind)


# -- the designed seams ------------------------------------------------------------------------


@pytest.mark.parametrize(("entry", "seam"), _seams("G2"))
def test_g2_seams_match_in_position_tangent_and_curvature(entry, seam):
    """Exact by construction: C2 splits at simple knots (The NURBS Book P2.5), or the
    collinear-rows and three-row conditions on the quintic blend (Farin, 5th ed., ch. 5)."""
    core, occ = _seam_measures_core(entry, seam), _seam_measures_occ(entry, seam)
    np.testing.assert_allclose(core[2:], occ[2:], atol=READ_BACK)  # the two evaluations agree
    for gap, angle, ka, kb in (core, occ):
        assert np.max(gap) < ROUNDING
        assert np.max(angle) < ANGLE_ROUNDING_DEG
        np.testing.assert_allclose(ka, kb, atol=ROUNDING)
    if "cross_curvature" in seam:
        np.testing.assert_allclose(ka, seam["cross_curvature"][0], atol=ROUNDING)
        np.testing.assert_allclose(kb, seam["cross_curvature"][1], atol=ROUNDING)


def test_steamer_seams_carry_real_curvature():
    """The G2 check is not vacuous: the steamer's seams bend (|k| well above rounding)."""
    entry = BY_NAME["steamer_body"]
    for seam in entry["seams"]:
        _, _, ka, _ = _seam_measures_core(entry, seam)
        assert np.min(np.abs(ka)) > 1e-3


@pytest.mark.parametrize(("entry", "seam"), _seams("G1"))
def test_g1_seam_is_tangent_with_the_designed_curvature_jump(entry, seam):
    """Plane tangent to a cylinder of radius R: angle 0, curvature jump exactly 1/R.

    A circular cylinder's normal curvature across its rulings is 1/R in size
    (do Carmo 1976, sec. 3-2, example); a plane's is 0."""
    core, occ = _seam_measures_core(entry, seam), _seam_measures_occ(entry, seam)
    np.testing.assert_allclose(core[2:], occ[2:], atol=READ_BACK)
    for gap, angle, ka, kb in (core, occ):
        assert np.max(gap) < ROUNDING
        assert np.max(angle) < ANGLE_ROUNDING_DEG
        np.testing.assert_allclose(np.abs(ka - kb), seam["curvature_jump"], atol=ROUNDING)
        np.testing.assert_allclose(ka, seam["cross_curvature"][0], atol=ROUNDING)
        np.testing.assert_allclose(kb, seam["cross_curvature"][1], atol=ROUNDING)
    assert seam["curvature_jump"] == pytest.approx(1.0 / products.VISOR_RADIUS, abs=0)


def test_soleplate_meets_the_head_at_a_right_angle():
    """The body ends straight (last two pole rows equal), so its normal is perpendicular to +x there."""
    entry = BY_NAME["steamer_body"]
    crease = [s for s in entry["seams"] if s["continuity"] == "G0"]
    assert len(crease) == 4
    built = _faces_of(entry)
    cap = _occ_surface(_step_faces_by_name(entry)["head_soleplate"])
    _, cap_normal, _ = _occ_props(cap, 0.0, 0.0)
    np.testing.assert_allclose(cap_normal, [1.0, 0.0, 0.0], atol=ROUNDING)
    for seam in crease:
        field, _, _ = _core_side(built[seam["faces"][0]], seam["sides"][0])
        np.testing.assert_allclose(field.points[:, 0], 180.0, atol=ROUNDING)  # on the soleplate's plane
        angle = _angle_deg(field.normals, np.broadcast_to(cap_normal, field.normals.shape))
        np.testing.assert_allclose(angle, seam["angle_deg"], atol=ANGLE_ROUNDING_DEG)


def test_gap_seam_is_open_by_exactly_the_designed_gap():
    """A translation by d perpendicular to a straight seam opens a gap of exactly d."""
    entry = BY_NAME["heatgun_covers"]
    (seam,) = entry["seams"]
    gap, angle, ka, kb = _seam_measures_core(entry, seam)
    np.testing.assert_allclose(gap, seam["gap_mm"], atol=1e-12)
    assert np.max(angle) < ANGLE_ROUNDING_DEG
    np.testing.assert_allclose(ka, kb, atol=ROUNDING)
    # Independent: the kernel's minimum distance between the two faces read back.
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape

    occ = _step_faces_by_name(entry)
    dist = BRepExtrema_DistShapeShape(occ["cover_rear"], occ["cover_front"])
    assert dist.IsDone()
    assert dist.Value() == pytest.approx(products.GAP_MM, abs=1e-7)


# -- the designed inflections ------------------------------------------------------------------


def _section_z2(surface, plane, s: np.ndarray) -> np.ndarray:
    """f_xx (section y = c) or f_yy (section x = c) of the graph face, by OCP at each s."""
    from OCP.gp import gp_Pnt, gp_Vec

    normal = plane["normal"]
    out = []
    for value in s:
        u, v = (value, plane["point"][1]) if normal[1] == 1.0 else (plane["point"][0], value)
        p, d1u, d1v, d2u, d2v, d2uv = gp_Pnt(), gp_Vec(), gp_Vec(), gp_Vec(), gp_Vec(), gp_Vec()
        surface.D2(float(u), float(v), p, d1u, d1v, d2u, d2v, d2uv)
        out.append((d2u if normal[1] == 1.0 else d2v).Z())
    return np.array(out)


# Either side of a listed root, well inside the gap to the next one (the closest two, on
# x = 133.33, are 0.068 mm apart); dense samples for counting sign changes, in mm.
ROOT_SIDE_MM = 0.01
DENSE_STEP_MM = 0.005


def test_bump_sections_inflect_where_listed():
    """Section curvature of a graph z = f(x, c) is f_xx / (1 + f_x^2)^1.5: its sign is f_xx's."""
    entry = BY_NAME["toaster_panel"]
    surface = _occ_surface(_step_faces_by_name(entry)["side_panel"])
    for section in [*entry["inflections"], *entry["default_sections"]]:
        along = 0 if section["plane"]["normal"][1] == 1.0 else 1
        size = 160.0 if along == 0 else 110.0
        dense = _section_z2(surface, section["plane"], np.linspace(0.0, size, round(size / DENSE_STEP_MM) + 1))
        signs = np.sign(dense[np.abs(dense) > ROUNDING])
        assert np.count_nonzero(np.diff(signs) != 0) == section["count"]
        if not section["count"]:
            continue
        s = np.array([uv[along] for uv in section["uv"]])
        np.testing.assert_allclose(_section_z2(surface, section["plane"], s), 0.0, atol=ROUNDING)
        left = _section_z2(surface, section["plane"], s - ROOT_SIDE_MM)
        right = _section_z2(surface, section["plane"], s + ROOT_SIDE_MM)
        assert np.all(left * right < 0)
    assert any(section["count"] == 0 for section in entry["default_sections"])
    for section in entry["clean_sections"]:
        along_x = section["plane"]["normal"][1] == 1.0
        dense = _section_z2(surface, section["plane"], np.linspace(0.0, 160.0 if along_x else 110.0, 1601))
        assert np.all(dense < 0)  # the crown alone: convex everywhere, no inflection


def test_steamer_cross_sections_are_convex_and_its_profile_concave():
    """By OCP on the STEP faces: x = u exactly, so an iso-u curve is the cross-section x = u.

    A planar curve is convex where (C' x C'') keeps one sign (do Carmo 1976, sec. 1-5);
    the top line (the middle of the upper faces, y = 0 by symmetry) is z(x) with
    curvature of the sign of z_xx, which must stay negative (concave, no inflection).
    """
    from OCP.gp import gp_Pnt, gp_Vec

    entry = BY_NAME["steamer_body"]
    faces = _step_faces_by_name(entry)
    turns, top = [], []
    for part in ("grip", "head"):
        for side in ("upper", "side_r", "lower", "side_l"):
            surface = _occ_surface(faces[f"{part}_{side}"])
            u0, u1, v0, v1 = surface.Bounds()
            for u in np.linspace(u0, u1, 7):
                for v in np.linspace(v0, v1, 41):
                    p, du, dv, duu, dvv, duv = gp_Pnt(), gp_Vec(), gp_Vec(), gp_Vec(), gp_Vec(), gp_Vec()
                    surface.D2(float(u), float(v), p, du, dv, duu, dvv, duv)
                    turns.append(dv.Y() * dvv.Z() - dv.Z() * dvv.Y())
                    if side == "upper" and v == 0.5 * (v0 + v1):
                        assert abs(p.Y()) < ROUNDING
                        top.append(duu.Z())
    assert np.all(np.array(turns) < 0)  # one turning sense all round: convex cross-sections
    assert len(top) == 14 and np.all(np.array(top) < 0)


def test_bump_inflections_agree_with_the_core():
    """Batten's core: the normal curvature along the section changes sign at each listed point."""
    entry = BY_NAME["toaster_panel"]
    face = BUILT["toaster_panel"].faces[0]
    section = entry["inflections"][0]  # the plane y = 70: the x direction is the section direction
    u = np.array([uv[0] for uv in section["uv"]])
    v = np.full(u.size, section["plane"]["point"][1])
    x_dir = np.array([1.0, 0.0, 0.0])
    signs = []
    for offset in (-0.5, 0.5):
        field = curvature_at(face.surface, u + offset, v)
        tangent = _unit(x_dir - np.sum(x_dir * field.normals, axis=1, keepdims=True) * field.normals)
        signs.append(np.sign(_euler(field.k1, field.k2, field.dir1, field.dir2, tangent)))
    assert np.all(signs[0] * signs[1] < 0)


def test_blend_section_has_no_inflection():
    """The quintic blend's control polygon is convex: its section never curves the other way."""
    built = BUILT["breadbin_roll_top"]
    for face in built.faces:
        (u0, u1), (v0, v1) = face.surface.domain
        u = np.linspace(u0, u1, 401)
        field = curvature_at(face.surface, u, np.full(u.size, 0.5 * (v0 + v1)))
        assert np.all(field.k2 <= ROUNDING)  # k1 = 0 along the straight rulings
        assert np.all(np.abs(field.k1) <= ROUNDING)


# -- the trimmed face --------------------------------------------------------------------------


def test_dial_plate_has_a_round_hole():
    from OCP.BRepAdaptor import BRepAdaptor_Curve
    from OCP.BRepTools import BRepTools
    from OCP.TopAbs import TopAbs_EDGE, TopAbs_WIRE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    entry = BY_NAME["dial_plate"]
    face = _step_faces_by_name(entry)["dial_plate"]
    wires = []
    explorer = TopExp_Explorer(face, TopAbs_WIRE)
    while explorer.More():
        wires.append(TopoDS.Wire(explorer.Current()))
        explorer.Next()
    assert len(wires) == entry["trim"]["loops"]
    outer = BRepTools.OuterWire_s(face)
    (hole,) = [w for w in wires if not w.IsSame(outer)]
    explorer = TopExp_Explorer(hole, TopAbs_EDGE)
    edge = TopoDS.Edge(explorer.Current())
    curve = BRepAdaptor_Curve(edge)
    pts = np.array([curve.Value(t).Coord() for t in np.linspace(curve.FirstParameter(), curve.LastParameter(), 50)])
    cx, cy = entry["trim"]["hole_centre_uv"]
    # x = u and y = v on this face, so the hole is round in plan; the kernel's 3-D
    # curve is its fit to the (u, v) circle (OCP's default 1e-5 tolerance).
    np.testing.assert_allclose(np.hypot(pts[:, 0] - cx, pts[:, 1] - cy), entry["trim"]["hole_radius_uv"], atol=1e-4)


@pytest.mark.parametrize("entry", MANIFEST.get("large_samples", []), ids=lambda e: e["name"])
def test_large_sample_has_its_designed_faces_and_seams(entry):
    """The large sample: face count, and one shared edge per designed G2, G1 and crease seam."""
    from OCP.collections import IndexedDataMap_TopoDS_Shape_List_TopoDS_Shape_TopTools_ShapeMapHasher as EdgeFaces
    from OCP.TopAbs import TopAbs_EDGE, TopAbs_FACE
    from OCP.TopExp import TopExp

    path = SAMPLES_DIR / entry["files"]["step"]
    shape = _read_step(path)
    assert len(_shape_faces(shape)) == entry["face_count"] >= 300
    edge_faces = EdgeFaces()
    TopExp.MapShapesAndUniqueAncestors_s(shape, TopAbs_EDGE, TopAbs_FACE, edge_faces)
    uses = [edge_faces.FindFromIndex(k).Size() for k in range(1, edge_faces.Extent() + 1)]
    classes = entry["seam_classes"]
    assert sum(n == 2 for n in uses) == classes["G2"] + classes["G1"] + classes["G0_crease"]
    assert sum(n == 1 for n in uses) == entry["unshared_edges_step"]
