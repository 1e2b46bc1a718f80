"""Which files `batten check` covers: folders, glob patterns, --exclude, STEP and IGES only."""

from __future__ import annotations

import os

import pytest

from app.review.discover import discover
from geometry.errors import BattenError


@pytest.fixture
def vault(tmp_path):
    names = ("a/lid.stp", "a/lid.IGES", "a/notes.txt", "a/old/lid_v1.step", "b/panel.igs", "b/panel.json", "c/x.pdf")
    for name in names:
        path = tmp_path / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text("placeholder")
    return tmp_path


def _names(paths, root):
    return [os.path.relpath(p, root) for p in paths]


def test_a_folder_is_searched_recursively_for_step_and_iges_only(vault):
    found = discover([str(vault)])
    assert _names(found, vault) == ["a/lid.IGES", "a/lid.stp", "a/old/lid_v1.step", "b/panel.igs"]


def test_patterns_expand_sorted_and_exclude_matches_names_and_folders(vault):
    found = discover([f"{vault}/**/*.st*p"], exclude=("old",))
    assert _names(found, vault) == ["a/lid.stp"]
    found = discover([str(vault / "a"), str(vault / "b")], exclude=("*.IGES", "*panel*"))
    assert _names(found, vault) == ["a/lid.stp", "a/old/lid_v1.step"]


def test_named_files_keep_their_order_once_each_whatever_their_type(vault):
    model = str(vault / "b/panel.json")
    found = discover([model, str(vault / "b"), str(vault / "b/panel.igs"), "missing.stp"])
    assert _names(found, vault) == ["b/panel.json", "b/panel.igs", os.path.relpath("missing.stp", vault)]


@pytest.mark.parametrize(
    "inputs, exclude, words",
    [
        (["{root}/c"], (), "holds no STEP or IGES file"),
        (["{root}/**/*.prt"], (), "no STEP or IGES file matches"),
        (["{root}/b"], ("*",), "leaves out every file"),
    ],
)
def test_inputs_that_give_no_file_stop_the_run(vault, inputs, exclude, words):
    with pytest.raises(BattenError, match=words):
        discover([i.format(root=vault) for i in inputs], exclude)
