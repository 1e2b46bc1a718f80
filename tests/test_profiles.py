"""Seam tolerance profiles: the shipped files load, bad files fail with the file named.

The shipped values are common practice (no published source); the checks here
are of loading and validation, not of the values.
"""

import pytest

from app.profiles import ProfileError, get_profile, read_profile, shipped_names, shipped_path
from geometry.errors import BattenError
from geometry.seams import SeamTolerance


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
        ("base = 'class-a'\n[tolerance]\ntangent_deg = -1\n", "must be above 0"),
        ("base = 'class-a'\nrequired = 'G7'\n", "required must be one of"),
        ("base = 'class-a'\n[tolerance]\nwobble = 1\n", "unknown [tolerance] key"),
        ("base = 'nowhere'\n", "base must name a shipped profile"),
        ("base = 'class-a'\n[tolerance]\nsection_inflections_max = -1\n", "whole number >= 0"),
        ("base = 'class-a'\n[tolerance]\nsection_inflections_max = 1.5\n", "whole number >= 0"),
        ("base = 'class-a'\n[tolerance]\nsection_inflections_max = 'few'\n", "whole number >= 0"),
    ],
)
def test_bad_files_name_the_file_and_the_cause(tmp_path, text, words):
    path = tmp_path / "bad.toml"
    path.write_text(text)
    with pytest.raises(ProfileError) as err:
        read_profile(path)
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


def test_inflection_limit_per_section():
    """Class-A: none (common practice, no published source); technical: no limit, listed not judged."""
    class_a, technical = get_profile("class-a"), get_profile("technical")
    assert class_a.section_inflections_max == 0 and class_a.as_dict()["section_inflections_max"] == 0
    assert "common practice" in class_a.basis["section_inflections_max"]
    assert technical.section_inflections_max is None and technical.as_dict()["section_inflections_max"] is None


def test_inflection_limit_is_inherited_and_can_be_lifted(tmp_path):
    inherited = tmp_path / "inherited.toml"
    inherited.write_text('name = "inherited"\nbase = "class-a"\n')
    assert get_profile(str(inherited)).section_inflections_max == 0
    lifted = tmp_path / "lifted.toml"
    lifted.write_text('name = "lifted"\nbase = "class-a"\n[tolerance]\nsection_inflections_max = "none"\n')
    assert get_profile(str(lifted)).section_inflections_max is None
    two = tmp_path / "two.toml"
    two.write_text('name = "two"\nbase = "technical"\n[tolerance]\nsection_inflections_max = 2\n')
    profile = get_profile(str(two))
    assert profile.section_inflections_max == 2 and profile.basis["section_inflections_max"] == "set in two.toml"


def test_the_review_reads_the_inflection_limit_the_profile_gives():
    """app.review judges section curves by the key the profile echoes."""
    from app.review.findings import INFLECTION_LIMIT_KEY

    assert get_profile("class-a").limit(INFLECTION_LIMIT_KEY) == 0
    assert get_profile("technical").limit(INFLECTION_LIMIT_KEY) is None
