"""The terminal app, driven headless with Pilot: edits, errors, lists, files, guard, pinning.

Every number the app shows is compared with :func:`interact.assess` on the
equivalent scenario built directly (the core is the reference for the shell);
one check goes through the form to a published value (CPT 2015, Table 2).
The demo scenario is invented and serves only as an input, never as a check value.
"""

from __future__ import annotations

import dataclasses
import shutil
from pathlib import Path
from typing import Any

import pytest
from conftest import base_dict, read_checks
from pilot_helpers import asynctest, replace_text, text_of, type_path

from interact import assess, load_scenario
from interact.cautions import CAUTION_LINE, DOSE_CAUTIONS
from interact.report.numbers import fmt_ratio
from interact.scenario import demo_path
from interact.sources import resolve
from interact.tui.app import InteractApp
from interact.tui.screens import AskPath, ConfirmDiscard, HelpScreen, LoadProblems

SIZE = (120, 40)


def demo() -> Any:
    return load_scenario(demo_path())


@asynctest
async def test_starts_on_the_invented_demo_with_results_and_caution() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert app.valid
        expected = assess(demo())
        assert app.assessment is not None
        assert app.assessment.prediction.total == expected.prediction.total
        answer = text_of(app, "#answer-body")
        assert fmt_ratio(expected.prediction.total) in answer
        assert "STUDY INDICATED" in answer  # the demo's R1 for CYP3A exceeds 1.02 (words, not colour)
        assert DOSE_CAUTIONS[0] in answer  # the dose area repeats the caution
        assert CAUTION_LINE in text_of(app, "#caution-line")
        assert "built-in demo" in app.sub_title and "unsaved" not in app.sub_title


@asynctest
async def test_editing_a_field_updates_the_results() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        before = app.generation
        await replace_text(pilot, app, "victim.pathways[0].fm", "0.5")
        s = demo()
        pw = (dataclasses.replace(s.victim.pathways[0], fm=0.5), *s.victim.pathways[1:])
        expected = assess(dataclasses.replace(s, victim=dataclasses.replace(s.victim, pathways=pw)))
        assert app.generation > before
        assert app.valid
        assert app.assessment is not None
        assert app.assessment.prediction.total == pytest.approx(expected.prediction.total, rel=1e-12)
        assert app.assessment.prediction.total != assess(s).prediction.total
        assert fmt_ratio(expected.prediction.total) in text_of(app, "#answer-body")
        assert "unsaved" in app.sub_title


@asynctest
async def test_field_shows_what_the_value_was_understood_as() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "perpetrator.cmax", "812 ng/mL")
        # 812 ng/mL / 487.6 g/mol = 1.665 uM (unit arithmetic, molar mass of the demo compound)
        note = app.field("perpetrator.cmax").note_text
        assert "812 ng/mL = 1.67 uM" in note
        assert "Imax,u" in note
        # an empty optional field names the default used and its source
        await replace_text(pilot, app, "perpetrator.ka", "")
        ka = app.field("perpetrator.ka").note_text
        assert ka.startswith("empty: 0.1 1/min used, default")
        assert app.assessment is not None
        setting = next(s for s in app.assessment.settings if s.name == "absorption_rate")
        assert setting.origin in ("default", "rule set") and resolve(setting.source) in ka


@asynctest
async def test_invalid_unit_shows_error_keeps_text_and_marks_result_stale() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        good = app.assessment
        await replace_text(pilot, app, "perpetrator.inhibits[0].ki", "4.2 uk", typed=2)
        row = app.field("perpetrator.inhibits[0].ki")
        assert row.text == "4.2 uk"  # the user's text is kept
        assert row.has_error
        assert 'unknown unit "uk"' in row.note_text and "expected a concentration" in row.note_text
        assert not app.valid
        assert app.assessment is good  # last valid result stays ...
        answer = text_of(app, "#answer-body")
        assert answer.startswith("NOT UPDATED")  # ... clearly marked as not reflecting the edit
        assert "perpetrator.inhibits[0].ki" in answer
        assert fmt_ratio(good.prediction.total) in answer
        # fixing the unit clears the mark and updates the result
        await pilot.press("backspace", "backspace", "n", "M")
        assert app.valid and "NOT UPDATED" not in text_of(app, "#answer-body")
        assert app.assessment is not good
        assert "4.2 nM = 0.00420 uM" in row.note_text


@asynctest
async def test_problem_from_validation_lands_under_its_field() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "victim.pathways[0].fm", "0.95")  # 0.95 + 0.08 > 1 (the core's rule)
        assert not app.valid
        pathways = next(r for r in app.form.rows if r.kind == "list" and r.key == "victim.pathways")
        assert "sum to 1.03" in pathways.problem  # shown on the list's title line
        assert "sum to 1.03" in text_of(app, "#answer-body")


@asynctest
async def test_adding_and_removing_a_pathway_matches_the_core() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        s = demo()
        # remove the second pathway (CYP2C9): select its "remove" line and press Enter
        app.form.select("victim.pathways[1]")
        assert app.form.current.kind == "remove"  # type: ignore[union-attr]
        await pilot.press("enter")
        await pilot.pause()
        only3a = dataclasses.replace(s, victim=dataclasses.replace(s.victim, pathways=s.victim.pathways[:1]))
        assert app.valid and app.assessment is not None
        assert app.assessment.prediction.total == pytest.approx(assess(only3a).prediction.total, rel=1e-12)
        # add it back with Ctrl+N from inside the pathway list, then type enzyme and fm
        await app.reveal("victim.pathways[0].fm")
        await pilot.press("ctrl+n")
        await pilot.pause()
        assert not app.valid  # the new pathway is empty: its fields say what is missing
        assert "is missing" in app.field("victim.pathways[1].enzyme").note_text
        assert app.form.current_field is app.field("victim.pathways[1].enzyme")
        await pilot.press("C", "Y", "P", "2", "C")
        await pilot.press("right")  # accept the suggestion: CYP2C8 is the first match; Backspace and 9
        await pilot.press("backspace", "9")
        assert app.field("victim.pathways[1].enzyme").text == "CYP2C9"
        await replace_text(pilot, app, "victim.pathways[1].fm", "0.08")
        assert app.valid and app.assessment is not None
        assert app.assessment.prediction.total == pytest.approx(assess(s).prediction.total, rel=1e-12)
        # a pathway with an enzyme the perpetrator does not touch changes nothing but is reported
        await pilot.press("ctrl+n")
        await replace_text(pilot, app, "victim.pathways[2].enzyme", "CYP2D6")
        await replace_text(pilot, app, "victim.pathways[2].fm", "0.05")
        assert app.valid and app.assessment is not None
        assert app.assessment.prediction.total == pytest.approx(assess(s).prediction.total, rel=1e-12)
        assert any("CYP2D6" in w for w in app.assessment.warnings)


@asynctest
async def test_target_and_metabolite_lists_edit_by_keyboard() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        s = demo()
        # remove the metabolite: Ctrl+R from inside it
        await app.reveal("perpetrator.metabolites[0].cmax")
        await pilot.press("ctrl+r")
        await pilot.pause()
        without = dataclasses.replace(s, perpetrator=dataclasses.replace(s.perpetrator, metabolites=()))
        assert app.valid and app.assessment is not None
        assert app.assessment.prediction.total == pytest.approx(assess(without).prediction.total, rel=1e-12)
        # remove the OATP1B1 target: its basic-model row goes away
        await app.reveal("perpetrator.inhibits[2].ic50")
        await pilot.press("ctrl+r")
        await pilot.pause()
        assert app.valid and app.assessment is not None
        assert all(r.target != "OATP1B1" for r in app.assessment.screen)


@asynctest
async def test_published_r1_through_the_form() -> None:
    """R1 = 1 + [I]/(Ki x fu,inc) for promethazine on CYP2D6: 1.31 in Clin Pharmacol Ther 2015;98:321, Table 2.

    The paper uses total Cmax as [I] (no fu,p), so fu,p = 1 is entered; Ki, fu,inc and [I] are typed into the form.
    """
    row = next(r for r in read_checks("cpt2015_table2_cyp_r_values.csv") if r["inhibitor"] == "promethazine")
    data = base_dict()
    data["perpetrator"]["fu_plasma"] = 1.0
    data["perpetrator"]["inhibits"] = [{"target": "CYP2D6", "ki": "1 uM"}]
    data["victim"]["pathways"] = [{"enzyme": "CYP2D6", "fm": 0.5}]
    app = InteractApp(data=data)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "perpetrator.cmax", f"{row['I_uM_published']} uM")
        await replace_text(pilot, app, "perpetrator.inhibits[0].ki", f"{row['Ki_uM']} uM")
        await replace_text(pilot, app, "perpetrator.inhibits[0].fu_inc", row["fu_inc"])
        assert app.valid and app.assessment is not None
        r1 = next(r for r in app.assessment.screen if r.label == "R1" and r.target == "CYP2D6")
        assert r1.value == pytest.approx(float(row["R_published"]), abs=0.005)  # published to 2 decimals
        assert fmt_ratio(r1.value) in text_of(app, "#answer-body")


@asynctest
async def test_save_then_reopen_gives_the_same_scenario(tmp_path: Path) -> None:
    path = tmp_path / "pair.toml"
    shutil.copy(demo_path(), path)
    app = InteractApp(path)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert "unsaved" not in app.sub_title and str(path) in app.sub_title
        await replace_text(pilot, app, "victim.fg", "0.6")
        await replace_text(pilot, app, "perpetrator.inhibits[0].ki", "2.9 uM")
        assert "unsaved" in app.sub_title
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert "unsaved" not in app.sub_title
        edited = app.scenario
    reopened = load_scenario(path)
    assert reopened == edited
    assert reopened.victim.fg == 0.6
    app2 = InteractApp(path)
    async with app2.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert app2.scenario == edited
        assert app2.field("perpetrator.inhibits[0].ki").text == "2.9 uM"  # as the user typed it, not respelled


@asynctest
async def test_demo_save_asks_for_a_name_and_does_not_touch_the_demo(tmp_path: Path) -> None:
    original = demo_path().read_bytes()
    target = tmp_path / "copy.toml"
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "victim.fg", "0.5")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, AskPath)
        await type_path(pilot, app, str(target))
        assert app.path == target and "unsaved" not in app.sub_title
        assert load_scenario(target) == app.scenario
    assert demo_path().read_bytes() == original


@asynctest
async def test_unsaved_changes_guard_on_quit() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+q")  # nothing edited yet would quit at once; edit first
        assert app.return_code == 0
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "victim.fg", "0.3")
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmDiscard)
        assert app.return_code is None
        await pilot.press("escape")  # go back: nothing lost
        await pilot.pause()
        assert not isinstance(app.screen, ConfirmDiscard)
        assert app.field("victim.fg").text == "0.3"
        await pilot.press("ctrl+q")
        await pilot.pause()
        await pilot.press("d")  # discard and quit
        await pilot.pause()
        assert app.return_code == 0


@asynctest
async def test_unsaved_changes_guard_on_open_and_bad_file_changes_nothing(tmp_path: Path) -> None:
    bad = tmp_path / "bad.toml"
    bad.write_text('[perpetrator]\nname = "unterminated\n', encoding="utf-8")
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "victim.fg", "0.3")
        before = dict(app.data)
        await pilot.press("ctrl+o")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmDiscard)
        await pilot.press("escape")
        await pilot.pause()
        assert app.data == before
        # save is impossible to forget: discard explicitly, then try to open a file that is not TOML
        await pilot.press("ctrl+o")
        await pilot.pause()
        await pilot.press("d")
        await pilot.pause()
        assert isinstance(app.screen, AskPath)
        await type_path(pilot, app, str(bad))
        await pilot.pause()
        assert isinstance(app.screen, LoadProblems)
        shown = text_of(app, "#problems")
        assert "could not be parsed" in shown
        await pilot.press("escape")
        assert app.path is None and app.data == before  # nothing changed
        assert app.field("victim.fg").text == "0.3"


@asynctest
async def test_a_file_with_problems_opens_into_the_form_to_be_fixed(tmp_path: Path) -> None:
    broken = tmp_path / "broken.toml"
    text = demo_path().read_text(encoding="utf-8").replace('ki = "4.2 uM"', 'ki = "4.2 parsecs"')
    broken.write_text(text, encoding="utf-8")
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert await app.open_file(broken)
        await pilot.pause()
        assert app.path == broken and not app.valid
        field = app.field("perpetrator.inhibits[0].ki")
        assert field.text == "4.2 parsecs" and field.error and "parsecs" in field.note
        assert "No valid result yet" in text_of(app, "#answer-body")
        await pilot.press("ctrl+s")  # refused: a file that would not load is never written
        await pilot.pause()
        assert broken.read_text(encoding="utf-8") == text
        await replace_text(pilot, app, "perpetrator.inhibits[0].ki", "4.2 uM")
        assert app.valid and not field.error
        await pilot.press("ctrl+s")
        await pilot.pause()
    saved = broken.read_text(encoding="utf-8").splitlines()
    lines = text.splitlines()
    changed = [(a, b) for a, b in zip(lines, saved, strict=True) if a != b]  # only the fixed value changed
    assert len(changed) == 1 and changed[0][0].startswith('ki = "4.2 parsecs"')
    assert changed[0][1].startswith('ki = "4.2 uM" ') and changed[0][1].endswith("# from an invented microsomal incubation")


@asynctest
async def test_pin_shows_later_edits_as_differences() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        pinned_total = app.assessment.prediction.total  # type: ignore[union-attr]
        await pilot.press("f3")
        await replace_text(pilot, app, "victim.fg", "0.9")
        answer = text_of(app, "#answer-body")
        assert "What-if: pinned result against now" in answer
        assert "victim.fg: 0.45 -> 0.9" in answer
        assert fmt_ratio(pinned_total) in answer and fmt_ratio(app.assessment.prediction.total) in answer  # type: ignore[union-attr]
        await pilot.press("f3")
        assert "What-if" not in text_of(app, "#answer-body")


@asynctest
async def test_help_lists_every_binding_and_the_equations() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await pilot.press("f1")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        shown = " ".join(str(w.content) for w in app.screen.query("Static"))  # type: ignore[attr-defined]
        listed = {k.lower() for k, _ in InteractApp.KEY_HELP}
        for binding in InteractApp.BINDINGS:
            assert binding.key.replace("ctrl+", "ctrl+").lower() in listed, binding.key  # type: ignore[union-attr]
        for k, _ in InteractApp.KEY_HELP:
            assert k in shown
        for term in ("Iin,max,u", "Cheng & Prusoff", "AUCR_h", "Fahmi", "ICH M12 5.3.1"):
            assert term in shown
        await pilot.press("escape")
        await pilot.press("f2")
        await pilot.pause()
        cautions = str(app.screen.query_one("#caution-text").content)  # type: ignore[attr-defined]
        for c in DOSE_CAUTIONS:
            assert c in cautions


@asynctest
async def test_layout_fits_80_by_24() -> None:
    app = InteractApp()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        line = app.query_one("#caution-line")
        assert line.region.height >= 1 and line.region.bottom <= 23  # above the key line, on screen
        assert app.query_one("#left").region.width >= 38
        assert app.query_one("#detail").region.height >= 3
        assert app.query_one("#views").region.width >= 38


def test_first_screen_does_not_wait_for_the_engine() -> None:
    """Importing the app must not import pint or the engine: they load in a thread after the first paint."""
    import subprocess
    import sys

    code = (
        "import sys, interact.tui.app;"
        "print(','.join(m for m in ('pint', 'interact.units', 'interact.assessment', 'scipy') if m in sys.modules))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.strip()
    assert out == "", f"imported before the first screen: {out}"


def test_run_app_refuses_a_file_that_is_not_toml(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    from interact.tui import run_app

    bad = tmp_path / "broken.toml"
    bad.write_text('[perpetrator]\nname = "unterminated\n', encoding="utf-8")
    assert run_app(bad) == 2
    err = capsys.readouterr().err
    assert str(bad) in err and "could not be parsed" in err
    assert "Traceback" not in err


@asynctest
async def test_a_scenario_with_problems_starts_in_the_form_with_every_problem(tmp_path: Path) -> None:
    bad = tmp_path / "broken.toml"
    text = demo_path().read_text(encoding="utf-8").replace("fu_plasma = 0.04", "fu_plasma = 4").replace("fm = 0.82", 'fm = "high"')
    bad.write_text(text, encoding="utf-8")
    app = InteractApp(bad)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert not app.valid and app.path == bad
        assert app.field("perpetrator.fu_plasma").error and app.field("victim.pathways[0].fm").error
        assert app.field("victim.pathways[0].fm").text == "high"  # as written, to be fixed here
        shown = text_of(app, "#answer-body")
        assert "perpetrator.fu_plasma" in shown and "victim.pathways[0].fm" in shown


@asynctest
async def test_rule_set_choice_changes_the_rules_used() -> None:
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "rules", "fda-2020")
        assert app.valid and app.assessment is not None
        assert app.assessment.rules.id == "fda-2020"
        assert "ich-m12" not in text_of(app, "#answer-body").split("Basic static models")[1][:30]


@asynctest
async def test_save_as_asks_before_replacing_another_file(tmp_path: Path) -> None:
    other = tmp_path / "other.toml"
    other.write_text("# someone else's file\n", encoding="utf-8")
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await pilot.press("f6")
        await pilot.pause()
        await type_path(pilot, app, str(other))
        assert isinstance(app.screen, AskPath)  # first Enter only warns
        assert "exists" in str(app.screen.query_one("#path-note").content)  # type: ignore[attr-defined]
        assert other.read_text(encoding="utf-8") == "# someone else's file\n"
        await pilot.press("enter")
        await pilot.pause()
        assert not isinstance(app.screen, AskPath)
        assert load_scenario(other) == app.scenario
