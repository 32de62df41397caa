"""The terminal app as a state machine: whatever the user does, the screen shows what was computed.

Hypothesis drives the real app headless (``App.run_test`` and Pilot) through random
sequences of what a user does: typing valid and invalid values into any field
(key by key, or pasted), adding and removing entries, undo and redo, pinning,
switching views, carrying a fitted Ki into a target, and saving.  Beside the app
the test keeps its own model of the scenario (the file's data as the user edited
it) and, after every step, checks:

- every field's text holds the model's value (and, for fields the user typed
  into, is exactly the typed text), and the app's data is the model;
- the painted screen shows those texts (the form) and the answer for the model:
  the report layer's rendering of ``assess()`` of the model, or, when the model
  is not a valid scenario, the NOT UPDATED banner with the problems over the
  last valid answer;
- saving writes a file that reads back as the model and loads as the same
  scenario, and leaves the file alone when the inputs are invalid.

The starting file is a hand-written, invented scenario (``tests/data/handwritten_scenario.toml``).
The fitted Ki comes from the core's own fit of the nlstools 'vmkmki' data (source in the file).
"""

from __future__ import annotations

import asyncio
import copy
import shutil
import tempfile
import tomllib
from pathlib import Path
from typing import Any

import pytest
from hypothesis import HealthCheck, settings
from hypothesis import strategies as st
from hypothesis.stateful import RuleBasedStateMachine, initialize, invariant, precondition, rule
from textual import events
from textual.keys import _character_to_key

from interact import assess
from interact.errors import InteractError, ScenarioError
from interact.kinetics import fit_inhibition, read_incubation_csv
from interact.scenario import load_scenario, scenario_from_dict
from interact.tui.app import InteractApp
from interact.tui.document_view import DocumentView
from interact.tui.fitting_view import FitPane, ki_entry
from interact.tui.form import get_path, set_path, shows, text_of, value_of
from interact.tui.form_view import build_rows, entry_keys
from interact.tui.results import compare, render_answer

# The reference answers come from the API (assess, fit_inhibition), which also emits the model's warnings; the app
# passes warn=False. The warnings' emission is checked in tests/api/test_warnings.py.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

DATA = Path(__file__).resolve().parents[1] / "data"
HANDWRITTEN = DATA / "handwritten_scenario.toml"
FIT_DATA = DATA / "nlstools_vmkmki.csv"

#: what a user types, by kind of field: valid values in several spellings, and invalid ones
TEXTS: dict[str, list[str]] = {
    "concentration": ["4.2 uM", "71.978 uM", "0.35 µM", "900 ng/mL", "2 umol/L", "12 parsecs", "-1 uM", "5 uM/", "7", ""],
    "fraction": ["0.7", "0.82", "10 %", "1", "1.5", "abc", "0", ""],
    "fraction0": ["0.1", "0", "0.7", "50 %", "2", "x", ""],
    "number": ["0.8", "1", "2.5", "-3", "nan", "abc", ""],
    "dose": ["300 mg", "150 mg", "0.5 g", "10 parsecs", "mg", ""],
    "time": ["24 h", "12 h", "1 d", "3 mg", ""],
    "rate": ["0.03 1/min", "2 1/h", "fast", ""],
    "molar_mass": ["450 g/mol", "503.6 g/mol", "450", ""],
    "flow": ["97 L/h", "1.6 L/min", "9 L", ""],
    "volume": ["250 mL", "0.25 L", "250 mg", ""],
    "text": ["Compound A", "  spaced  ", ""],
    "flag": ["yes", "no", "y", "maybe", ""],
    "doses": ["2.5 mg, 5 mg", "10 mg", "5 mg, x", ""],
    "pair": ["0.8, 1.25", "0.5 to 2", "0.8", ""],
    "choice:target": ["CYP3A", "CYP3A4", "CYP2D6", "OATP1B1", "CYP9Z9", ""],
    "choice:enzyme": ["CYP3A", "CYP2C9", "CYP2D6", "OATP1B1", ""],
    "choice:mechanism": ["competitive", "mixed", "noncompetitive", "sticky", ""],
    "choice:route": ["oral", "intravenous", "nasal", ""],
    "choice:transporter": ["BCRP", "OATP1B1", "OAT3", "CYP3A", ""],
    "choice:victim_route": ["intestinal efflux", "hepatic uptake", "renal secretion", "biliary", ""],
    "choice:rules": ["ich-m12-2024", "no-such-rules", ""],
    "choice:polymorphic": ["CYP2D6", "CYP2C19", "CYP3A", ""],
    "choice:phenotype": ["poor", "normal", "all", "fast-ish", ""],
}

_FIT: list[Any] = []


def fitted() -> Any:
    """The core's fit of the vmkmki incubations (computed once)."""
    if not _FIT:
        _FIT.append(fit_inhibition(read_incubation_csv(FIT_DATA, substrate_unit="uM", inhibitor_unit="uM")))
    return _FIT[0]


def field_kinds(data: dict[str, Any]) -> dict[str, tuple[str, tuple[str | int, ...]]]:
    """Every field of the form for ``data``: key -> (kind, path), from the form's own schema."""
    return {r.key: (r.state.spec.kind, r.path) for r in build_rows(data) if r.state is not None}


def canonical(data: dict[str, Any]) -> dict[str, Any]:
    """``data`` with every form field's value as the text the field would show (0.7 and "0.70" alike)."""
    out = copy.deepcopy(data)
    for kind, path in field_kinds(data).values():
        value = get_path(data, path)
        if text_of(kind, value) != "":
            set_path(out, path, text_of(kind, value))
    return out


def pruned(data: Any) -> Any:
    """Without empty lists (a TOML file cannot tell an empty list of tables from none)."""
    if isinstance(data, dict):
        return {k: pruned(v) for k, v in data.items() if v != []}
    if isinstance(data, list):
        return [pruned(v) for v in data]
    return data


def evaluate(data: dict[str, Any]) -> tuple[Any, list[str]]:
    """(assessment, []) for a valid scenario, or (None, the problems) - computed by the core alone."""
    try:
        return assess(scenario_from_dict(copy.deepcopy(data), source="scenario")), []
    except ScenarioError as exc:
        return None, [str(p) for p in exc.problems]
    except InteractError as exc:
        return None, [str(exc)]


def lines_of(doc: Any, width: int) -> list[str]:
    return ["".join(seg.text for seg in line).rstrip() for line in doc.lines(width)]


def squash(text: str) -> str:
    """Without any white space (a long key path is broken across lines where the panel is narrow)."""
    return "".join(text.split())


class AppMachine(RuleBasedStateMachine):
    """The app and, beside it, the model of what the user did."""

    def __init__(self) -> None:
        super().__init__()
        self.folder = Path(tempfile.mkdtemp(prefix="interact-stateful-"))
        self.path = self.folder / "pair.toml"
        shutil.copy(HANDWRITTEN, self.path)
        self.loop = asyncio.new_event_loop()
        self.app = InteractApp(self.path)
        self.app.animation_level = "none"  # the tab underline's animation costs Pilot half a second a switch
        # the app runs in one task for the whole example (it keeps itself in context variables set when it
        # starts); each step hands that task a coroutine or function and waits for it
        self.requests: asyncio.Queue[tuple[Any, asyncio.Future[Any]] | None] = asyncio.Queue()
        started: asyncio.Future[Any] = self.loop.create_future()
        self.session = self.loop.create_task(self._session(started))
        self.pilot = self.loop.run_until_complete(started)
        # the model: the file's data as read by tomllib (not by the app), and what the user did since
        self.model: dict[str, Any] = tomllib.loads(HANDWRITTEN.read_text(encoding="utf-8"))
        self.typed: dict[str, str] = {}  # fields the user typed into: their exact text
        self.history: list[tuple[dict[str, Any], dict[str, str]]] = []
        self.future: list[tuple[dict[str, Any], dict[str, str]]] = []
        self.pinned: tuple[Any, dict[str, Any]] | None = None
        self.last_valid: tuple[Any, dict[str, Any]] | None = None
        self.saved_text = self.path.read_text(encoding="utf-8")
        self._note_valid()

    async def _session(self, started: asyncio.Future[Any]) -> None:
        async with self.app.run_test(size=(100, 30)) as pilot:
            await pilot.pause()
            started.set_result(pilot)
            while (request := await self.requests.get()) is not None:
                job, done = request
                try:
                    result = await job if asyncio.iscoroutine(job) else job()
                except BaseException as exc:  # handed back to the step that asked (an assertion, usually)
                    done.set_exception(exc)
                else:
                    done.set_result(result)

    def run(self, job: Any) -> Any:
        """Run a coroutine (or a plain function) inside the app's task and return its result."""
        done: asyncio.Future[Any] = self.loop.create_future()
        self.requests.put_nowait((job, done))
        return self.loop.run_until_complete(done)

    def check(self, fn: Any) -> None:
        self.run(fn)

    def teardown(self) -> None:
        self.requests.put_nowait(None)
        self.loop.run_until_complete(self.session)
        self.loop.close()
        shutil.rmtree(self.folder, ignore_errors=True)

    # ------------------------------------------------------------ model helpers
    def _note_valid(self) -> None:
        a, _ = evaluate(self.model)
        if a is not None:
            self.last_valid = (a, copy.deepcopy(self.model))

    def _remember(self) -> None:
        self.history.append((copy.deepcopy(self.model), dict(self.typed)))
        self.future.clear()

    def _select(self, key: str) -> None:
        self.app.form.focus()
        self.app.form.select(key)

    async def _burst(self, *keys: str, paste: str | None = None) -> None:
        """Keys sent as a fast typist (or a terminal pasting as keys) sends them: all queued, then one wait.

        (Pilot.press waits for the app to go idle after every key, about 40 ms each.)
        """
        for key in keys:
            name = _character_to_key(key) if len(key) == 1 and not key.isalnum() else key
            self.app.post_message(events.Key(name, key if len(key) == 1 else None))
        if paste is not None:
            self.app.post_message(events.Paste(paste))
        await self.pilot.pause()

    async def _select_and_press(self, key: str, *keys: str) -> None:
        self._select(key)
        await self._burst(*keys)

    # ------------------------------------------------------------ rules
    @initialize()
    def start(self) -> None:
        assert self.app.valid, "the hand-written file is a valid scenario"

    @rule(data=st.data(), paste=st.booleans())
    def type_value(self, data: st.DataObject, paste: bool) -> None:
        fields = field_kinds(self.model)
        key = data.draw(st.sampled_from(sorted(fields)), label="field")
        kind, path = fields[key]
        text = data.draw(st.sampled_from(TEXTS[kind]), label="text")
        state = self.app.field(key)  # read only: the app is idle between steps
        # the model: the field is cleared, then the text arrives key by key (or at once, pasted);
        # each change of text that no longer holds the current value changes the data
        before = copy.deepcopy(self.model)
        steps = [""] + ([text] if paste else [text[: i + 1] for i in range(len(text))])
        if state.text == "":
            steps = steps[1:]
        changed = False
        for step in steps:
            if not shows(kind, step, get_path(self.model, path)):
                set_path(self.model, path, value_of(kind, step))
                changed = True
                self._note_valid()  # the app assesses every change: a valid state on the way is the last valid one
        if changed:
            self.history.append((before, dict(self.typed)))
            self.future.clear()
        self.typed[key] = text

        async def act() -> None:
            self._select(key)
            await self.pilot.pause()  # the selected field is painted before the user types into it
            await self._burst("end", "ctrl+u", *([] if paste else text), paste=text if paste else None)

        self.run(act())
        self._note_valid()

    @rule(data=st.data())
    def add_entry(self, data: st.DataObject) -> None:
        rows = [r for r in self.app.form.rows if r.kind == "add"]
        row = data.draw(st.sampled_from(rows), label="list")
        self._remember()
        entries = get_path(self.model, row.path, None)
        if not isinstance(entries, list):
            entries = []
            set_path(self.model, row.path, entries)
        entries.append({})
        self.run(self._select_and_press(row.key, "enter"))
        self._note_valid()

    @precondition(lambda self: any(r.kind == "remove" for r in self.app.form.rows))
    @rule(data=st.data())
    def remove_entry(self, data: st.DataObject) -> None:
        rows = [r for r in self.app.form.rows if r.kind == "remove"]
        row = data.draw(st.sampled_from(rows), label="entry")
        self._remember()
        del get_path(self.model, row.path[:-1])[int(row.path[-1])]
        self.typed = {}  # later entries moved up: their keys changed
        self.run(self._select_and_press(row.key, "ctrl+r"))
        self._note_valid()

    @rule()
    def undo(self) -> None:
        if self.history:
            self.future.append((copy.deepcopy(self.model), dict(self.typed)))
            self.model, self.typed = self.history.pop()
        self.run(self._burst("ctrl+z"))
        self._note_valid()

    @rule()
    def redo(self) -> None:
        if self.future:
            self.history.append((copy.deepcopy(self.model), dict(self.typed)))
            self.model, self.typed = self.future.pop()
        self.run(self._burst("ctrl+y"))
        self._note_valid()

    @rule()
    def pin(self) -> None:
        if self.pinned is not None:
            self.pinned = None
        elif self.last_valid is not None:
            self.pinned = self.last_valid
        self.run(self._burst("f3"))

    @rule()
    def next_view(self) -> None:
        self.run(self._burst("f4"))

    @rule(target_text=st.sampled_from(["CYP3A", "CYP2D6", "OATP1B1", "CYP2C9", "nothing"]))
    def use_fitted_ki(self, target_text: str) -> None:
        comp = fitted()
        try:
            carried = ki_entry(comp, self.model, target_text, str(FIT_DATA))
        except ValueError:
            carried = None
        if carried is not None:
            self._remember()
            entries = get_path(self.model, ("perpetrator", "inhibits"), None)
            if not isinstance(entries, list):
                entries = []
                set_path(self.model, ("perpetrator", "inhibits"), entries)
            if carried.index is None:
                entries.append(carried.entry)
            else:
                entries[carried.index] = carried.entry
                self.typed = {k: v for k, v in self.typed.items() if not k.startswith(f"perpetrator.inhibits[{carried.index}].")}
        app = self.app

        async def act() -> None:
            pane = app.query_one(FitPane)
            pane.fit, pane.source = comp, str(FIT_DATA)
            app.query_one("#fit-target").value = target_text  # type: ignore[attr-defined]
            button = app.query_one("#fit-accept")
            button.disabled = False
            button.press()  # type: ignore[attr-defined]
            await self.pilot.pause()

        self.run(act())
        self._note_valid()

    @rule()
    def save(self) -> None:
        a, _ = evaluate(self.model)
        self.run(self._burst("ctrl+s"))
        text = self.path.read_text(encoding="utf-8")
        if a is None:
            assert text == self.saved_text, "a file was written from invalid inputs"
            return
        back = tomllib.loads(text)
        assert canonical(pruned(back)) == canonical(pruned(self.model))
        assert load_scenario(self.path) == scenario_from_dict(copy.deepcopy(self.model))
        self.saved_text = text

    # ------------------------------------------------------------ what must always hold
    @invariant()
    def fields_hold_the_model(self) -> None:
        self.check(self._fields_hold_the_model)

    def _fields_hold_the_model(self) -> None:
        app = self.app
        assert app.form.entry_keys() == entry_keys(self.model)
        assert canonical(app.data) == canonical(self.model)
        for key, state in app.form.fields.items():
            assert shows(state.spec.kind, state.text, get_path(self.model, state.path)), (key, state.text)
        for key, text in self.typed.items():
            if key in app.form.fields:
                assert app.field(key).text == text, (key, app.field(key).text, text)

    @invariant()
    def screen_shows_the_fields(self) -> None:
        self.check(self._screen_shows_the_fields)

    def _screen_shows_the_fields(self) -> None:
        """The painted form: each visible field's line shows its text (as far as the line is wide)."""
        app = self.app
        form = app.form
        region = form.scrollable_content_region
        painted = [strip.text for strip in app.screen._compositor.render_strips()]  # the screen as painted
        top = form.scroll_offset.y
        for row in form.rows:
            if row.state is None or not (top <= row.line < top + region.height):
                continue
            line = painted[region.y + row.line - top][region.x : region.x + form.scrollable_content_region.width]
            room = len(line) - form.LABEL_WIDTH
            shown = row.state.text if row.state.text or row is form.current else row.state.spec.hint
            assert line[form.LABEL_WIDTH :].startswith(shown[:room]), (row.key, line, shown)

    @invariant()
    def answer_is_assess_of_the_model(self) -> None:
        self.check(self._answer_is_assess_of_the_model)

    def _answer_is_assess_of_the_model(self) -> None:
        app = self.app
        view = app.query_one("#answer-body", DocumentView)
        a, problems = evaluate(self.model)
        width = view.scrollable_content_region.width or view._width
        narrow = app.size.width < 120
        shown = lines_of(view.document, width) if width else []
        if a is not None:
            comparison = compare(self.pinned[0], self.pinned[1], a, self.model) if self.pinned else None
            assert shown == lines_of(render_answer(a, comparison, narrow=narrow), width)
        else:
            text = squash("\n".join(shown))
            assert squash("NOT UPDATED:") in text
            for p in problems[:6]:
                assert squash(p) in text, p
            if self.last_valid is not None:
                last = self.last_valid[0]
                comparison = compare(self.pinned[0], self.pinned[1], last, self.last_valid[1]) if self.pinned else None
                tail = lines_of(render_answer(last, comparison, narrow=narrow, stale=True), width)
                assert shown[-len(tail) :] == tail
            else:
                assert squash("No valid result yet") in text
        if view.display and app.query_one("#views").active == "answer":  # type: ignore[attr-defined]
            # the painted answer: the visible lines of that document, nothing cut by a scrollbar
            region = view.scrollable_content_region
            painted = [strip.text for strip in app.screen._compositor.render_strips()]
            top = view.scroll_offset.y
            for y in range(region.height):
                want = shown[top + y] if top + y < len(shown) else ""
                got = painted[region.y + y][region.x : region.x + region.width].rstrip()
                assert got == want, (y, got, want)


AppMachine.TestCase.settings = settings(
    max_examples=8,
    stateful_step_count=30,
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much],
    derandomize=True,
)
TestAppMachine = AppMachine.TestCase
