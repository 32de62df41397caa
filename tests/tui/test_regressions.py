"""Reproductions of screen and file bugs found by hand in tmux; each must stay fixed.

The reference for every answer is the core (``assess`` of the scenario the app holds,
rendered by the report layer); the hand-written file is an invented input
(tests/data/handwritten_scenario.toml) and the fitted Ki comes from the core's fit of
the nlstools 'vmkmki' data (source line in tests/data/nlstools_vmkmki.csv).
"""

from __future__ import annotations

import difflib
import shutil
import tomllib
from pathlib import Path
from typing import Any

import pytest
from pilot_helpers import asynctest, replace_text

from interact import assess
from interact.errors import ScenarioError
from interact.kinetics import fit_inhibition, read_incubation_csv
from interact.scenario import demo_path, edit_scenario_text, load_scenario, scenario_from_dict
from interact.tui.app import InteractApp
from interact.tui.document_view import DocumentView
from interact.tui.fitting_view import FitPane
from interact.tui.results import compare, render_answer
from interact.tui.screens import AskPath

# The reference answers come from the API (assess, fit_inhibition), which also emits the model's warnings; the app
# passes warn=False. The warnings' emission is checked in tests/api/test_warnings.py.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

DATA = Path(__file__).resolve().parents[1] / "data"
HANDWRITTEN = DATA / "handwritten_scenario.toml"
FIT_DATA = DATA / "nlstools_vmkmki.csv"


def painted(app: Any) -> list[str]:
    """The screen as painted (what the terminal shows), one string a line."""
    return [strip.text for strip in app.screen._compositor.render_strips()]


def painted_answer(app: Any) -> list[str]:
    view = app.query_one("#answer-body", DocumentView)
    region = view.scrollable_content_region
    return [line[region.x : region.x + region.width].rstrip() for line in painted(app)[region.y : region.bottom]]


def answer_lines(app: Any, doc: Any) -> list[str]:
    view = app.query_one("#answer-body", DocumentView)
    width = view.scrollable_content_region.width
    return ["".join(seg.text for seg in line).rstrip() for line in doc.lines(width)]


def painted_field(app: Any, key: str) -> str:
    """The painted line of a field (label and value), or "" when it is scrolled out of view."""
    form = app.form
    row = next(r for r in form.rows if r.key == key and r.state is not None)
    region = form.scrollable_content_region
    y = row.line - form.scroll_offset.y
    if not 0 <= y < region.height:
        return ""
    return painted(app)[region.y + y][region.x : region.right]


async def edit_dose_and_save(path: Path, *, check_opened: bool = False) -> str:
    """Open ``path`` in the app, type 300 mg as the precipitant's dose, Ctrl+S; the saved text.

    ``check_opened`` also checks that the file opened valid, with the answer assess() gives for it.
    """
    app = InteractApp(path)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        if check_opened:
            assert app.valid, app.problems
            assert app.assessment is not None and app.assessment.prediction.total == assess(load_scenario(path)).prediction.total
        await replace_text(pilot, app, "perpetrator.dose", "300 mg")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert "unsaved" not in app.sub_title
    return path.read_text(encoding="utf-8")


def changed_lines(before: str, after: str) -> list[str]:
    return [
        d
        for d in difflib.unified_diff(before.splitlines(), after.splitlines(), lineterm="", n=0)
        if d[:1] in "+-" and d[:3] not in ("+++", "---")
    ]


@asynctest
async def test_answer_follows_the_fitted_ki_used_from_the_fitting_view_with_a_pinned_result() -> None:
    comp = fit_inhibition(read_incubation_csv(FIT_DATA, substrate_unit="uM", inhibitor_unit="uM"))
    app = InteractApp()
    app.animation_level = "none"
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await pilot.press("f3")  # pin
        await replace_text(pilot, app, "victim.dose", "5 mg")
        pinned_a, pinned_data = app.pinned  # type: ignore[misc]
        await pilot.press("f4", "f4")  # answer -> plots -> fitting: the answer is hidden
        await pilot.pause()
        pane = app.query_one(FitPane)
        pane.fit, pane.source = comp, str(FIT_DATA)
        app.query_one("#fit-target").value = "CYP3A"  # type: ignore[attr-defined]
        app.query_one("#fit-accept").disabled = False
        app.query_one("#fit-accept").press()  # type: ignore[attr-defined]
        await pilot.pause()
        assert app.data["perpetrator"]["inhibits"][0]["ki"].startswith(f"{comp.ki.value:.6g}")
        await pilot.press("f4")  # back to the answer
        await pilot.pause()
        expected = assess(scenario_from_dict(app.data))
        assert app.assessment == expected
        doc = render_answer(expected, compare(pinned_a, pinned_data, expected, app.data), narrow=False)
        want = answer_lines(app, doc)
        got = painted_answer(app)
        assert got == (want + [""] * len(got))[: len(got)]
        # the cursor is at the end of the carried Ki: typing appends, it does not prefix the old text
        state = app.field("perpetrator.inhibits[0].ki")
        assert state.cursor == len(state.text)


@asynctest
async def test_edited_field_is_repainted_when_the_form_is_scrolled() -> None:
    app = InteractApp()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        for key, text in (("victim.pathways[0].fm", "0.7"), ("victim.dose", "300 mg"), ("perpetrator.dose", "300 mg")):
            state = await app.reveal(key)
            state.cursor = len(state.text)
            await pilot.pause()
            await pilot.press("ctrl+u", *text)
            await pilot.pause()
            assert app.field(key).text == text
            assert app.form.scroll_offset.y > 0 or key == "perpetrator.dose"
            line = painted_field(app, key)
            assert line[app.form.LABEL_WIDTH :].startswith(text), (key, line)
        # a newly added pathway: its fm row shows what is typed, not "is missing"
        await app.reveal("victim.pathways")
        await pilot.press("enter")  # "add a pathway" is selected by reveal of the list key
        await pilot.pause()
        n = len(app.data["victim"]["pathways"]) - 1
        await replace_text(pilot, app, f"victim.pathways[{n}].enzyme", "CYP2D6")
        state = await app.reveal(f"victim.pathways[{n}].fm")
        await pilot.pause()
        await pilot.press("0", ".", "1")
        await pilot.pause()
        assert app.data["victim"]["pathways"][n]["fm"] == 0.1
        assert painted_field(app, f"victim.pathways[{n}].fm")[app.form.LABEL_WIDTH :].startswith("0.1")
        assert "missing" not in app.field(f"victim.pathways[{n}].fm").note


@pytest.mark.parametrize("size", [(80, 24), (120, 40), (160, 50)])
@asynctest
async def test_no_answer_text_under_the_scrollbar(size: tuple[int, int]) -> None:
    app = InteractApp()
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        view = app.query_one("#answer-body", DocumentView)
        assert view.virtual_size.height > view.scrollable_content_region.height  # it scrolls: there is a scrollbar
        want = answer_lines(app, view.document)
        assert max(len(line) for line in want) <= view.scrollable_content_region.width
        for top in (0, len(want) // 2):
            view.scroll_to(y=top, animate=False, immediate=True)
            await pilot.pause()
            got = painted_answer(app)
            expect = (want[view.scroll_offset.y :] + [""] * len(got))[: len(got)]
            assert got == expect


@asynctest
async def test_ctrl_s_changes_only_the_edited_value_of_a_hand_written_file(tmp_path: Path) -> None:
    path = tmp_path / "mine.toml"
    shutil.copy(HANDWRITTEN, path)
    original = path.read_text(encoding="utf-8")
    saved = await edit_dose_and_save(path)
    # exactly the edited line changed, and it keeps its comment (at the same column)
    assert changed_lines(original, saved) == [
        '-dose = "200 mg"               # highest dose',
        '+dose = "300 mg"               # highest dose',
    ]
    # defaults written out, aliases, percentages and micro signs all stay as written
    for kept in (
        'mechanism = "competitive"     # confirmed by fit run 7',
        'fu_inc = "10 %"',
        'target = "CYP3A4"',
        'ki = "15 µM"',
        "fa_fg = 1",
    ):
        assert kept in saved
    assert load_scenario(path).perpetrator.dose.magnitude == 300


@asynctest
async def test_saving_after_removing_a_target_removes_only_that_table(tmp_path: Path) -> None:
    path = tmp_path / "mine.toml"
    shutil.copy(HANDWRITTEN, path)
    original = path.read_text(encoding="utf-8")
    app = InteractApp(path)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await app.reveal("perpetrator.inhibits[1].target")
        await pilot.press("ctrl+r")
        await pilot.pause()
        await pilot.press("ctrl+s")
        await pilot.pause()
    saved = path.read_text(encoding="utf-8")
    block = (
        '[[perpetrator.inhibits]]\ntarget = "CYP2D6"\n'
        'ki = "15 µM"                  # micro sign, as the lab sheet wrote it\nfu_inc = 0.8\n\n'
    )
    assert block in original
    assert saved == original.replace(block, "")  # that table and nothing else
    assert 'mechanism = "competitive"     # confirmed by fit run 7' in saved  # stays with CYP3A4


@asynctest
async def test_save_as_from_the_demo_starts_from_the_demo_text(tmp_path: Path) -> None:
    target = tmp_path / "from-demo.toml"
    demo_text = demo_path().read_text(encoding="utf-8")
    app = InteractApp()
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "victim.fg", "0.5")
        await pilot.press("f6")
        await pilot.pause()
        assert isinstance(app.screen, AskPath)
        from pilot_helpers import type_path

        await type_path(pilot, app, str(target))
    saved = target.read_text(encoding="utf-8")
    assert changed_lines(demo_text, saved) == ["-fg = 0.45", "+fg = 0.5"]
    # mechanism stays on the targets that had it (it moved onto OATP1B1 before)
    data = tomllib.loads(saved)
    assert [e.get("mechanism") for e in data["perpetrator"]["inhibits"]] == ["competitive", "competitive", None]


def test_a_file_that_would_not_load_is_never_produced() -> None:
    data = tomllib.loads(HANDWRITTEN.read_text(encoding="utf-8"))
    data["perpetrator"]["inhibits"][0]["ki"] = "2.1 uM/"  # a unit spelling that cannot be read back
    with pytest.raises(ScenarioError) as info:
        edit_scenario_text(HANDWRITTEN.read_text(encoding="utf-8"), data)
    assert any(p.field == "perpetrator.inhibits[0].ki" for p in info.value.problems)


@asynctest
async def test_a_save_that_cannot_be_read_back_leaves_the_file_alone(tmp_path: Path) -> None:
    path = tmp_path / "mine.toml"
    shutil.copy(HANDWRITTEN, path)
    original = path.read_bytes()
    app = InteractApp(path)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "perpetrator.cmax", "900 ng/")
        assert not app.valid
        await pilot.press("ctrl+s")
        await pilot.pause()
    assert path.read_bytes() == original


@asynctest
async def test_undo_and_redo_cover_removal_typing_and_the_fitted_ki() -> None:
    comp = fit_inhibition(read_incubation_csv(FIT_DATA, substrate_unit="uM", inhibitor_unit="uM"))
    app = InteractApp()
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        start = app.data
        start_answer = app.assessment
        await app.reveal("perpetrator.inhibits[2].target")
        await pilot.press("ctrl+r")  # remove OATP1B1
        await pilot.pause()
        assert len(app.data["perpetrator"]["inhibits"]) == 2
        await pilot.press("ctrl+z")
        await pilot.pause()
        assert app.data == start and app.assessment == start_answer
        assert app.field("perpetrator.inhibits[2].ic50").text == "2.5 uM"
        await replace_text(pilot, app, "victim.fg", "0.70", typed=4)  # one typing run: one undo step
        assert app.field("victim.fg").text == "0.70"
        pane = app.query_one(FitPane)
        pane.fit, pane.source = comp, str(FIT_DATA)
        app.query_one("#fit-target").value = "CYP3A"  # type: ignore[attr-defined]
        pane.accept()
        await pilot.pause()
        fitted = app.data
        assert app.field("perpetrator.inhibits[0].ki").text == fitted["perpetrator"]["inhibits"][0]["ki"]
        await pilot.press("ctrl+z")  # the fitted Ki goes
        await pilot.pause()
        assert app.field("perpetrator.inhibits[0].ki").text == "4.2 uM"
        assert app.field("victim.fg").text == "0.70"  # the exact text typed, restored
        await pilot.press("ctrl+z")  # the typing goes
        await pilot.pause()
        assert app.data == start and app.field("victim.fg").text == "0.45"
        await pilot.press("ctrl+y", "ctrl+y")
        await pilot.pause()
        assert app.data == fitted
        assert app.assessment == assess(scenario_from_dict(fitted))


@asynctest
async def test_f5_visits_every_group_and_every_entry() -> None:
    app = InteractApp()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        visited = []
        for _ in range(30):
            await pilot.press("f5")
            row = app.form.current
            assert row is not None
            if visited and row.key == visited[-1]:
                break
            visited.append(row.key)
        entries = {k.rsplit(".", 1)[0] for k in visited if "[" in k}
        expected = set(app.form.entry_keys())  # every target, metabolite and pathway
        assert expected <= entries | {k for k in visited}, expected - entries
        for group in ("victim.", "title", "physiology."):
            assert any(k.startswith(group) for k in visited), group


@asynctest
async def test_80_by_24_shows_the_title_the_whole_footer_and_marks_cut_labels() -> None:
    app = InteractApp()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "victim.fg", "0.5")
        await pilot.pause()
        screen = painted(app)
        assert "* unsaved" in screen[0]
        assert "Save as" in screen[-1]
        await app.reveal("victim.narrow_therapeutic_index")
        await pilot.pause()
        line = painted_field(app, "victim.narrow_therapeutic_index")
        label = line[: app.form.LABEL_WIDTH].strip()
        assert label.endswith("…") and "Narrow ther. index".startswith(label[:-1])
        assert "Narrow ther. index" in str(app.query_one("#detail").content)  # type: ignore[attr-defined]


@asynctest
async def test_f4_from_a_fitting_button_moves_on_and_focus_returns_to_the_form() -> None:
    app = InteractApp()
    app.animation_level = "none"
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await pilot.press("f4", "f4")
        await pilot.pause()
        app.query_one("#fit-run").focus()
        await pilot.pause()
        await pilot.press("f4")
        await pilot.pause()
        assert app.query_one("#views").active == "answer"  # type: ignore[attr-defined]
        assert app.focused is app.form


@asynctest
async def test_a_file_in_ich_m12_words_opens_into_the_form_and_saves_in_its_own_words(tmp_path: Path) -> None:
    # [precipitant]/[object] (ICH M12 terms) are the file's table names: the form shows their values and a save
    # changes only the edited value, keeping the file's words
    path = tmp_path / "m12.toml"
    original = HANDWRITTEN.read_text(encoding="utf-8").replace("[perpetrator", "[precipitant").replace("[victim", "[object")
    assert "[precipitant]" in original and "[object]" in original
    path.write_text(original, encoding="utf-8")
    saved = await edit_dose_and_save(path, check_opened=True)
    assert changed_lines(original, saved) == [
        '-dose = "200 mg"               # highest dose',
        '+dose = "300 mg"               # highest dose',
    ]
    assert load_scenario(path).perpetrator.dose.magnitude == 300


def test_the_app_knows_the_same_table_aliases_as_the_scenario_reader() -> None:
    from interact.scenario import SPELLINGS
    from interact.tui.app import FORM_NAMES

    assert FORM_NAMES == {v: k for k, v in SPELLINGS.items()}


@asynctest
async def test_adding_or_removing_an_entry_keeps_the_exact_text_typed_in_other_fields() -> None:
    # found by the state machine: the rows were rebuilt from the data, so "0.5 to 2" came back as "0.5, 2"
    app = InteractApp(HANDWRITTEN)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "victim.trough_boundary", "0.5 to 2", typed=8)
        await replace_text(pilot, app, "perpetrator.inhibits[1].fu_inc", "80 %", typed=4)
        await app.reveal("victim.pathways")
        await pilot.press("enter")  # add a pathway
        await pilot.pause()
        assert app.field("victim.trough_boundary").text == "0.5 to 2"
        await app.reveal("perpetrator.inhibits[0].ki")
        await pilot.press("ctrl+r")  # the second target moves up to the first place, with its text
        await pilot.pause()
        assert app.field("victim.trough_boundary").text == "0.5 to 2"
        assert app.field("perpetrator.inhibits[0].fu_inc").text == "80 %"
        await pilot.press("ctrl+z")
        await pilot.pause()
        assert app.field("perpetrator.inhibits[1].fu_inc").text == "80 %"
