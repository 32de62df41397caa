"""Saving is a faithful edit of the user's file: only the values that changed change.

The input is a hand-written, invented scenario with comments and unusual spellings
(tests/data/handwritten_scenario.toml) and the built-in invented demo.  The reference
for "the same data" is the standard library's TOML reader (tomllib); for "the same
scenario", the core's own loader.
"""

from __future__ import annotations

import copy
import difflib
import tomllib
from pathlib import Path
from typing import Any

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from interact.errors import ScenarioError
from interact.scenario import demo_path, edit_scenario_text, scenario_from_dict
from interact.scenario_fields import KeyLines
from interact.tui.form import get_path, key_of, set_path

HANDWRITTEN = Path(__file__).resolve().parent / "data" / "handwritten_scenario.toml"
TEXTS = {"handwritten": HANDWRITTEN.read_text(encoding="utf-8"), "demo": demo_path().read_text(encoding="utf-8")}

#: valid new values a user may give (paths exist in both files)
NEW_VALUES: dict[tuple[str | int, ...], list[Any]] = {
    ("perpetrator", "dose"): ["300 mg", "0.25 g", "75 mg"],
    ("perpetrator", "cmax"): ["1.2 ug/mL", "2 uM", "800 ng/mL"],
    ("perpetrator", "fu_plasma"): [0.1, "3 %", 0.5],
    ("perpetrator", "name"): ["Renamed (invented)"],
    ("perpetrator", "inhibits", 0, "ki"): ["7 uM", "0.9 µM", "1500 nM"],
    ("perpetrator", "inhibits", 0, "target"): ["CYP3A", "CYP3A4"],
    ("victim", "fg"): [0.5, 0.9, "80 %"],
    ("victim", "dose"): ["40 mg", "5 mg"],
    ("victim", "pathways", 0, "fm"): [0.5, 0.75],
    ("title",): ["Renamed invented pair"],
}
#: keys a user may clear (the engine's default applies)
REMOVABLE: list[tuple[str | int, ...]] = [
    ("perpetrator", "blood_plasma_ratio"),
    ("perpetrator", "fa_fg"),
    ("perpetrator", "ka"),
    ("victim", "strengths"),
]


def _diff(before: str, after: str) -> list[str]:
    diff = difflib.unified_diff(before.splitlines(), after.splitlines(), lineterm="", n=0)
    return [d for d in diff if d[:1] in "+-" and d[:3] not in ("+++", "---")]


def _comment(line: str) -> str:
    return line.split("#", 1)[1].strip() if "#" in line and '"' not in line.split("#", 1)[1] else ""


@settings(max_examples=60, deadline=None)
@given(
    which=st.sampled_from(sorted(TEXTS)),
    edits=st.lists(st.sampled_from(sorted(NEW_VALUES)), max_size=4, unique=True),
    removals=st.lists(st.sampled_from(REMOVABLE), max_size=2, unique=True),
    data=st.data(),
)
def test_only_edited_lines_change(which: str, edits: list[Any], removals: list[Any], data: st.DataObject) -> None:
    text = TEXTS[which]
    original = tomllib.loads(text)
    edited = copy.deepcopy(original)
    changed: set[str] = set()
    for path in edits:
        value = data.draw(st.sampled_from(NEW_VALUES[path]))
        if get_path(original, path) != value:
            set_path(edited, path, value)
            changed.add(key_of(path))
    removed = {key_of(p) for p in removals if get_path(original, p, None) is not None}
    for p in removals:
        get_path(edited, p[:-1]).pop(p[-1], None)
    out = edit_scenario_text(text, edited)
    assert tomllib.loads(out) == edited  # reads back as exactly the data (the standard library's reader)
    scenario_from_dict(tomllib.loads(out))  # and loads as a scenario
    lines = text.splitlines()
    where = KeyLines(text)
    own = {key: lines[where.find(key) - 1] for key in changed | removed}  # type: ignore[operator]
    diff = _diff(text, out)
    assert sorted(d[1:] for d in diff if d[0] == "-") == sorted(own.values())
    added = [d[1:] for d in diff if d[0] == "+"]
    assert len(added) == len(changed)
    in_file_order = sorted(changed, key=lambda k: where.find(k) or 0)
    for key, line in zip(in_file_order, added, strict=True):  # the diff lists the new lines in file order
        assert line.startswith(f"{key.rsplit('.', 1)[-1]} = ")
        assert _comment(line) == _comment(own[key])  # a changed value keeps its line's comment


@settings(max_examples=40, deadline=None)
@given(
    drop=st.lists(st.integers(0, 2), max_size=2, unique=True),
    append=st.lists(st.sampled_from(["CYP2C9", "CYP2C19", "OATP1B3"]), max_size=2, unique=True),
)
def test_entries_removed_and_added_keep_the_rest_of_the_file(drop: list[int], append: list[str]) -> None:
    text = TEXTS["handwritten"]
    edited = tomllib.loads(text)
    entries = edited["perpetrator"]["inhibits"]
    for i in sorted(drop, reverse=True):
        del entries[i]
    for target in append:
        entries.append({"target": target, "ki": "9 uM"})
    out = edit_scenario_text(text, edited)
    assert tomllib.loads(out) == edited
    kept_comments = [line for line in text.splitlines() if line.startswith("#")]
    for line in kept_comments[:4]:  # the file's head comment is never touched
        assert line in out
    for i in range(3):  # each entry's target line (with its comment) stays exactly when the entry stays
        target_line = text.splitlines()[KeyLines(text).find(f"perpetrator.inhibits[{i}].target") - 1]  # type: ignore[operator]
        assert (target_line in out.splitlines()) == (i not in drop)


def test_a_scenario_with_problems_is_refused_with_its_field() -> None:
    edited = tomllib.loads(TEXTS["handwritten"])
    edited["victim"]["pathways"][0]["fm"] = 1.5
    with pytest.raises(ScenarioError) as info:
        edit_scenario_text(TEXTS["handwritten"], edited)
    assert any(p.field == "victim.pathways[0].fm" for p in info.value.problems)


def test_no_text_or_broken_text_gives_a_fresh_file_that_reads_back() -> None:
    data = tomllib.loads(TEXTS["handwritten"])
    for start in (None, "this is [not toml"):
        out = edit_scenario_text(start, data)
        assert tomllib.loads(out) == data
