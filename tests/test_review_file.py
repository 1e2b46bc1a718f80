"""Batten's review file: what is written reads back equal; malformed files are refused with file and line."""

from __future__ import annotations

import pytest

from app.review.identity import FindingKey
from app.review.review_file import ACCEPTED, TO_FIX, Disposition, ReviewFile, dumps, loads, read_review_file
from geometry.errors import BattenError

SEAM = FindingKey("seam", ("visor_bend", "visor_flat"), (0.0, 60.0, 0.0))
BUMP = FindingKey("inflection", ("side_panel",), (64.003, 70.0, 5.512))


def _file() -> ReviewFile:
    return ReviewFile(
        (
            Disposition(
                SEAM, ACCEPTED, "Ada Example", "2026-11-30", "soft break agreed with tooling", "curvature jump", 1.0
            ),
            Disposition(BUMP, TO_FIX, "Ben Sample", "2026-12-01", "", "inflections", 4.0),
            Disposition(SEAM, TO_FIX, "Ben Sample", "2026-12-01"),
        ),
        place_tolerance_mm=0.5,
    )


def test_round_trip_keeps_every_field():
    review = _file()
    again = loads(dumps(review))
    assert set(again.dispositions) == set(review.dispositions)
    assert again.place_tolerance_mm == 0.5
    assert again.reviewers == ("Ben Sample", "Ada Example")  # order of the sorted file


def test_text_is_sorted_so_diffs_stay_small():
    review = _file()
    shuffled = ReviewFile(review.dispositions[::-1], review.place_tolerance_mm)
    assert dumps(shuffled) == dumps(review)
    text = dumps(review)
    assert text.startswith("batten review 1\n")
    assert "finding: seam | visor_bend / visor_flat | 0 60 0\n" in text


def test_replacing_a_reviewers_decision_keeps_the_others():
    review = _file().with_disposition(Disposition(SEAM, ACCEPTED, "Ben Sample", "2026-12-02", "fine after all"))
    mine = [d for d in review.dispositions if d.reviewer == "Ben Sample" and d.key == SEAM]
    assert len(mine) == 1 and mine[0].decision == ACCEPTED
    assert len(review.dispositions) == 3


def test_comments_blank_lines_and_a_missing_place_are_read():
    text = "batten review 1\n# a note\n\n\nfinding: free_edge | lid |  -\n"
    text += "decision: to fix\nreviewer: C\ndate: 2026-01-02\n"
    (d,) = loads(text).dispositions
    assert d.key == FindingKey("free_edge", ("lid",), None)


@pytest.mark.parametrize(
    ("text", "line", "words"),
    [
        ("something else\n", 1, "not a Batten review file"),
        ("batten review 1\nfinding: seam | a / b | 0 0\ndecision: to fix\nreviewer: A\ndate: 2026-01-01\n", 2, "three"),
        (
            "batten review 1\nfinding: seam | a / b | 0 0 0\ndecision: maybe\nreviewer: A\ndate: 2026-01-01\n",
            3,
            "decision",
        ),
        (
            "batten review 1\nfinding: seam | a / b | 0 0 0\ndecision: accepted\nreviewer: A\ndate: 2026-01-01\n",
            2,
            "reason",
        ),
        (
            "batten review 1\nfinding: seam | a / b | 0 0 0\ndecision: to fix\nreviewer: A\ndate: 1/2/26\n",
            5,
            "YYYY-MM-DD",
        ),
        ("batten review 1\nreviewer: A\n", 2, "must start with a 'finding:'"),
        ("batten review 1\nfinding: seam | a | 0 0 0\ncolour: red\n", 3, "unknown key"),
    ],
)
def test_malformed_files_name_the_line(text, line, words):
    with pytest.raises(BattenError, match=rf"visor\.review: line {line}: .*{words}"):
        loads(text, "visor.review")


def test_missing_file_is_a_clear_error(tmp_path):
    with pytest.raises(BattenError, match="review file not found"):
        read_review_file(str(tmp_path / "nope.review"))
