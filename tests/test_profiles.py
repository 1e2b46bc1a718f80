"""Seam tolerance profiles: the shipped files load, bad files fail with the file named.

The shipped values are common practice (no published source); the checks here
are of loading and validation, not of the values.
"""

import pytest

from app.state.profiles import ProfileError, get_profile, load_profile, shipped_names, shipped_path
from geometry.errors import BattenError
from geometry.seam_tolerance import SeamTolerance


def test_shipped_profiles_load_and_say_where_their_values_come_from():
    assert set(shipped_names()) == {"class-a", "technical"}
    for name in shipped_names():
        profile = get_profile(name)
        assert profile.name == name
        assert isinstance(profile.tolerance, SeamTolerance)
        assert profile.tolerance.name == name
        for key in ("position_mm", "tangent_deg", "curvature_relative", "required"):
            assert "common practice" in profile.basis[key]


def test_class_a_values_and_default():
    tol = get_profile().tolerance
    assert get_profile().name == "class-a"
    assert get_profile("class-A").name == "class-a"
    assert (tol.position_mm, tol.tangent_deg, tol.curvature_relative, tol.required) == (0.01, 0.1, 0.05, "G2")
    technical = get_profile("technical").tolerance
    assert technical.position_mm > tol.position_mm and technical.required == "G1"


def test_user_file_by_path_with_a_base(tmp_path):
    path = tmp_path / "ours.toml"
    path.write_text('name = "ours"\nbase = "class-a"\n[tolerance]\nposition_mm = 0.005\n')
    profile = get_profile(str(path))
    assert profile.tolerance.position_mm == 0.005
    assert profile.tolerance.tangent_deg == 0.1  # from the base
    assert profile.basis["position_mm"] == "set in ours.toml"
    assert profile.tolerance.source == str(path)
    assert profile.as_dict()["name"] == "ours"


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("name = 'x'\n[tolerance\n", "not valid TOML"),
        ("name = 'x'\ncolour = 'red'\n", "unknown key"),
        ("name = 'x'\nrequired = 'G2'\n[tolerance]\nposition_mm = 0.01\n", "missing"),
        ("base = 'class-a'\n[tolerance]\nposition_mm = 'small'\n", "must be a number"),
        ("base = 'class-a'\n[tolerance]\ntangent_deg = -1\n", "must be positive"),
        ("base = 'class-a'\nrequired = 'G7'\n", "required must be one of"),
        ("base = 'class-a'\n[tolerance]\nwobble = 1\n", "unknown [tolerance] key"),
        ("base = 'nowhere'\n", "base must name a shipped profile"),
    ],
)
def test_bad_files_name_the_file_and_the_cause(tmp_path, text, words):
    path = tmp_path / "bad.toml"
    path.write_text(text)
    with pytest.raises(ProfileError) as err:
        load_profile(path)
    assert str(path) in str(err.value)
    assert words in str(err.value)
    assert isinstance(err.value, BattenError)  # the command line turns it into exit status 2


def test_missing_file_and_unknown_name():
    with pytest.raises(ProfileError, match="no such profile file"):
        get_profile("/nonexistent/profile.toml")
    with pytest.raises(ProfileError, match="not a profile name"):
        get_profile("class-b")


def test_shipped_files_exist():
    for name in shipped_names():
        assert shipped_path(name).is_file()


def test_the_profile_in_force_is_echoed_and_decides_the_verdict():
    from geometry.seams import check_seams
    from tests.test_seams_shapes import plane_on_cylinder

    model = plane_on_cylinder(20.0)  # a G1, not G2, join
    verdicts = {}
    for name in shipped_names():
        report = check_seams(model, get_profile(name))  # a Profile is accepted as well as its tolerance
        (seam,) = report.seams
        assert seam.tolerance.name == name
        assert seam.as_dict()["profile"] == name
        assert report.as_dict()["profile"]["name"] == name
        verdicts[name] = (seam.continuity, seam.verdict)
    assert verdicts == {"class-a": ("G1", "fail"), "technical": ("G1", "pass")}


def test_geometry_defaults_are_the_shipped_class_a_values():
    shipped = get_profile("class-a").tolerance
    default = SeamTolerance()
    for key in ("position_mm", "tangent_deg", "curvature_relative", "flat_curvature_per_mm", "required", "crease_deg"):
        assert getattr(shipped, key) == getattr(default, key), key
