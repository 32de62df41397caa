"""Scenario files: validation with key paths and lines, atomic save, lossless round trip."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import load_scenario, loads_scenario, save_scenario
from interact.errors import InputError, ScenarioError
from interact.scenario import demo_path, dumps_scenario, scenario_from_dict, scenario_to_dict


def test_demo_loads_and_is_marked_invented() -> None:
    s = load_scenario(demo_path())
    assert s.invented
    assert "invented" in s.perpetrator.name.lower()


def test_round_trip_is_lossless(tmp_path: Path) -> None:
    s = load_scenario(demo_path())
    out = tmp_path / "copy.toml"
    save_scenario(s, out)
    again = load_scenario(out)
    assert again == s
    assert dumps_scenario(again) == dumps_scenario(s)


def test_all_problems_reported_with_paths_and_lines() -> None:
    text = """
title = "bad"
[perpetrator]
name = "P"
dose = "100 mg"
cmax = "1 kg"
fu_plasma = 1.5

[[perpetrator.inhibits]]
target = "CYP9Z9"
ki = "1 uM"

[victim]
name = "V"
dose = "10 mg"
interval = "24 h"

[[victim.pathways]]
enzyme = "CYP3A"
fm = 0.7

[[victim.pathways]]
enzyme = "CYP2D6"
fm = 0.6
"""
    with pytest.raises(ScenarioError) as info:
        loads_scenario(text, source="bad.toml")
    problems = {p.field: p for p in info.value.problems}
    assert "perpetrator.cmax" in problems and "is a mass" in problems["perpetrator.cmax"].message
    assert problems["perpetrator.cmax"].line == 6
    assert "perpetrator.fu_plasma" in problems and problems["perpetrator.fu_plasma"].line == 7
    assert "perpetrator.inhibits[0].target" in problems and problems["perpetrator.inhibits[0].target"].line == 10
    assert "perpetrator.molar_mass" in problems  # mass dose without molar mass
    assert "victim.pathways" in problems and "sum to 1.3" in problems["victim.pathways"].message
    assert str(info.value).startswith("bad.toml: ")


@pytest.mark.parametrize(
    ("path", "value", "field", "fragment"),
    [
        (("victim", "pathways", 0, "fm"), 1.2, "victim.pathways[0].fm", "outside"),
        (("victim", "pathways", 0, "fm"), -0.1, "victim.pathways[0].fm", "outside"),
        (("perpetrator", "fu_plasma"), 0.0, "perpetrator.fu_plasma", "outside"),
        (("perpetrator", "inhibits", 0, "fu_inc"), 2.0, "perpetrator.inhibits[0].fu_inc", "outside"),
        (("victim", "pathways", 0, "enzyme"), "CYP99", "victim.pathways[0].enzyme", "not a known enzyme"),
        (("victim", "pathways", 0, "enzyme"), "OATP1B1", "victim.pathways[0].enzyme", "transporter"),
        (("perpetrator", "route"), "rectal", "perpetrator.route", "not one of"),
        (("victim", "interval"), "24 mg", "victim.interval", "is a mass"),
        (("perpetrator", "cmax"), "1 ug/mL", None, None),  # fine: molar mass given
    ],
)
def test_single_problem(scenario_dict: dict, path: tuple, value: object, field: str | None, fragment: str | None) -> None:
    node = scenario_dict
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = value
    if field is None:
        scenario_from_dict(scenario_dict)
        return
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(scenario_dict)
    fields = [p.field for p in info.value.problems]
    assert field in fields
    assert fragment in next(p.message for p in info.value.problems if p.field == field)


def test_mass_concentration_needs_molar_mass(scenario_dict: dict) -> None:
    del scenario_dict["perpetrator"]["molar_mass"]
    scenario_dict["perpetrator"]["dose"] = "250 umol"
    scenario_dict["perpetrator"]["cmax"] = "812 ng/mL"
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(scenario_dict)
    assert [p.field for p in info.value.problems] == ["perpetrator.cmax"]


def test_unknown_key_is_reported(scenario_dict: dict) -> None:
    scenario_dict["victim"]["fm"] = 0.5
    with pytest.raises(ScenarioError, match=r"victim\.fm: is not a known key"):
        scenario_from_dict(scenario_dict)


def test_ic50_needs_cheng_prusoff_inputs(scenario_dict: dict) -> None:
    scenario_dict["perpetrator"]["inhibits"][0] = {"target": "CYP3A", "ic50": "2 uM", "mechanism": "competitive"}
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(scenario_dict)
    assert {"perpetrator.inhibits[0].substrate_conc", "perpetrator.inhibits[0].km"} <= {p.field for p in info.value.problems}


def test_unreadable_file_and_bad_toml(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="could not be read"):
        load_scenario(tmp_path / "missing.toml")
    bad = tmp_path / "bad.toml"
    bad.write_text("title = ", encoding="utf-8")
    with pytest.raises(InputError, match="could not be parsed"):
        load_scenario(bad)


def test_save_is_atomic_and_keeps_old_file_on_failure(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    s = load_scenario(demo_path())
    target = tmp_path / "s.toml"
    target.write_text("original", encoding="utf-8")

    def boom(*args: object, **kwargs: object) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(InputError, match="cannot be written"):
        save_scenario(s, target)
    assert target.read_text(encoding="utf-8") == "original"
    assert [p.name for p in tmp_path.iterdir()] == ["s.toml"]  # no temporary file left behind


def test_to_dict_from_dict_identity() -> None:
    s = load_scenario(demo_path())
    assert scenario_from_dict(scenario_to_dict(s)) == s


def test_hostile_strings_survive_round_trip(scenario_dict: dict, tmp_path: Path) -> None:
    scenario_dict["title"] = 'quote " backslash \\ newline \n tab \t <script>alert(1)</script> ünï'
    s = scenario_from_dict(scenario_dict)
    save_scenario(s, tmp_path / "h.toml")
    assert load_scenario(tmp_path / "h.toml").title == scenario_dict["title"]


def test_new_file_gets_usual_permissions(tmp_path: Path) -> None:
    mask = os.umask(0o022)
    try:
        save_scenario(load_scenario(demo_path()), tmp_path / "new.toml")
    finally:
        os.umask(mask)
    assert (tmp_path / "new.toml").stat().st_mode & 0o777 == 0o644


def test_save_over_a_file_keeps_comments_and_spelling(tmp_path: Path) -> None:
    """Nothing the user wrote is lost: comments and unchanged values survive a save."""
    import dataclasses

    path = tmp_path / "mine.toml"
    path.write_text(demo_path().read_text(encoding="utf-8"), encoding="utf-8")
    s = load_scenario(path)
    edited = dataclasses.replace(s, victim=dataclasses.replace(s.victim, fg=0.5))
    save_scenario(edited, path)
    text = path.read_text(encoding="utf-8")
    assert "# Built-in demo scenario." in text  # the file's own header comment
    assert 'cmax = "1.6 ug/mL"            # total plasma Cmax at steady state, highest dose' in text
    assert "fg = 0.5" in text and "fg = 0.45" not in text
    assert load_scenario(path) == edited


def test_save_removes_entries_no_longer_there(tmp_path: Path) -> None:
    import dataclasses

    path = tmp_path / "mine.toml"
    path.write_text(demo_path().read_text(encoding="utf-8"), encoding="utf-8")
    s = load_scenario(path)
    fewer = dataclasses.replace(s, perpetrator=dataclasses.replace(s.perpetrator, metabolites=(), inhibits=s.perpetrator.inhibits[:1]))
    save_scenario(fewer, path)
    assert load_scenario(path) == fewer
    assert "Corvexazole M3" not in path.read_text(encoding="utf-8")


def test_save_over_a_non_toml_file_writes_fresh(tmp_path: Path) -> None:
    path = tmp_path / "junk.toml"
    path.write_text("not [toml", encoding="utf-8")
    s = load_scenario(demo_path())
    save_scenario(s, path)
    assert load_scenario(path) == s


def test_a_file_written_by_the_former_toml_writer_reads_back_and_is_written_the_same() -> None:
    """Output moved from a hand-written TOML writer to tomlkit: a file the former writer wrote (quotes, backslash,
    tab, newline, a control character and non-ASCII letters in its text) loads, and is written again byte for byte."""
    path = Path(__file__).parent / "data" / "written_by_the_former_toml_writer.toml"
    text = path.read_text(encoding="utf-8")
    s = loads_scenario(text)
    body = "".join(line for line in text.splitlines(keepends=True) if not line.startswith("# "))
    assert dumps_scenario(s) == body
    assert loads_scenario(dumps_scenario(s)) == s


@settings(max_examples=60, deadline=None)
@given(title=st.text(min_size=1, max_size=40), notes=st.text(max_size=80))
def test_any_text_is_written_by_tomlkit_so_that_it_reads_back(title: str, notes: str) -> None:
    from dataclasses import replace

    s = replace(load_scenario(demo_path()), title=title, notes=notes)
    assert loads_scenario(dumps_scenario(s)) == s
