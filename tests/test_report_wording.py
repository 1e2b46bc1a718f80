"""The report's wording: numbers with units, counts, settings and sections in words (no raw keys)."""

from __future__ import annotations

import pytest

from app.profiles import get_profile, shipped_names
from app.report.settings_text import profile_rows, sections_sentence, setting_sentence
from app.report.wording import count_words, number, plural, point, quantity, section_name


@pytest.mark.parametrize(
    ("value", "text"),
    [
        (-0.0, "0"),
        (-1e-7, "-1×10⁻⁷"),
        (-0.00001, "-1×10⁻⁵"),
        (0.001382, "0.001382"),
        (2.179e5, "217900"),
        (12000.0, "12000"),
        (2.179e7, "2.179×10⁷"),
        (0.02, "0.02"),
        (-29.84, "-29.84"),
        (None, "-"),
        (float("nan"), "-"),
        (-0.00004, "-4×10⁻⁵"),
        (-0.000049999, "-5×10⁻⁵"),
    ],
)
def test_numbers_never_read_minus_zero(value, text):
    assert number(value) == text


def test_rounded_to_zero_has_no_sign():
    assert number(-1e-5, digits=1) != "-0"
    assert point((-0.001, 0.0, -0.0)) == "(0, 0, 0)"


def test_units_and_counts():
    assert quantity(0.02, "mm") == "0.02 mm"
    assert quantity(0.1, "°") == "0.1°"
    assert plural(1, "face") == "1 face" and plural(2, "face") == "2 faces"
    assert plural(3, "extremum") == "3 extrema" and plural(1, "inflection") == "1 inflection"
    assert count_words(0, "seam") == "no seams"


@pytest.mark.parametrize("name", shipped_names())
def test_profile_rows_have_no_keys(name):
    profile = get_profile(name).as_dict()
    rows = profile_rows(profile)
    assert len(rows) == len([k for k in profile if k not in ("name", "title", "path", "source", "basis")])
    text = " ".join(sentence + " " + basis for sentence, basis in rows)
    for key in profile:
        if "_" in key:
            assert key not in text
    assert "common practice" in text


def test_a_setting_added_later_still_reads_as_words():
    assert setting_sentence("draft_min_deg", 1.5) == "Draft min: 1.5°."
    assert setting_sentence("undercut_max_mm", None) == "Undercut max: no limit."


def test_sections_in_words():
    text = sections_sentence("x:5;y=-20,0;plane:90,0,0,0,1,0")
    assert "5 planes normal to the x axis" in text
    assert "planes normal to the y axis at y = -20 and 0 mm" in text
    assert "plane 1 through (90, 0, 0) mm with normal (0, 1, 0)" in text
    assert ":" not in text.split(":", 1)[1]
    assert sections_sentence("none") == "No sections were cut."
    assert section_name({"label": "x = 80"}) == "x = 80 mm"
    assert section_name({"label": "plane:90,0,0,0,1,0"}, ["plane:90,0,0,0,1,0"]) == "plane 1"
