"""The --sections SPEC language of ``batten check``."""

from __future__ import annotations

import numpy as np
import pytest

from app.review.spec import SpecError, parse_spec, plane_spec, planes_for

BOX = np.array([[0.0, -10.0, 0.0], [60.0, 10.0, 5.0]])


def test_count_spreads_planes_evenly_inside_the_box():
    planes = planes_for(parse_spec("x:5"), BOX)
    assert [p.point[0] for p in planes] == pytest.approx([10, 20, 30, 40, 50])
    assert all(p.normal == (1.0, 0.0, 0.0) for p in planes)
    assert planes[0].label == "x = 10" and planes[0].family == "x:5"


def test_offsets_and_explicit_plane_and_none():
    planes = planes_for(parse_spec("y=-5,2.5; plane:1,2,3,0,0,2;none"), BOX)
    assert [p.point[1] for p in planes[:2]] == [-5.0, 2.5]
    assert planes[2].point == (1.0, 2.0, 3.0)
    assert planes[2].normal == pytest.approx((0.0, 0.0, 1.0))
    assert planes_for(parse_spec("none"), BOX) == ()


@pytest.mark.parametrize(
    "spec, words",
    [
        ("q:5", "cannot read"),
        ("x:0", "1 to"),
        ("x=1,a", "not a number"),
        ("plane:0,0,0,1", "six numbers"),
        ("plane:0,0,0,0,0,0", "zero normal"),
        ("x=nan", "not finite"),
    ],
)
def test_bad_spec_names_the_item(spec, words):
    with pytest.raises(SpecError, match=words):
        parse_spec(spec)


def test_plane_spec_round_trips_the_window_planes():
    planes = [((0.0, 70.0, 0.0), (0.0, 1.0, 0.0)), ((100.0, 0.0, 0.0), (1.0, 0.0, 0.0))]
    parsed = planes_for(parse_spec(plane_spec(planes)), BOX)
    assert [(p.point, p.normal) for p in parsed] == planes
    assert plane_spec([]) == "none"
