"""The terminal app: edit a scenario on the left, read the assessment on the right.

The app holds the scenario as the plain data of its file (see
:mod:`interact.tui.form`); every edit rebuilds the scenario with
:func:`interact.scenario.scenario_from_dict` and assesses it with
:func:`interact.assess` (about 2 ms for the demo, so it runs on the spot).
When the inputs are invalid the last valid result stays on screen under a
"NOT UPDATED" banner and each problem is shown under its field.
"""

from __future__ import annotations

import copy
import sys
import time
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any, ClassVar, Final

from rich.text import Text
from textual import on, work
from textual.app import App, ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widget import Widget
from textual.widgets import Button, Footer, Header, Input, ProgressBar, Static, TabbedContent, TabPane
from textual.worker import get_current_worker

from ..cautions import CAUTION_LINE
from ..errors import InteractError, Problem, ScenarioError
from ..report.numbers import fmt
from .doc import Doc
from .document_view import DocumentView
from .fitting_view import STEPS, FitPane, ki_entry
from .form import get_path, key_of, set_path, shows, value_of
from .form_view import FieldState, FormView, entry_keys
from .screens import AskPath, CautionsScreen, ConfirmDiscard, HelpScreen, LoadProblems

if TYPE_CHECKING:  # the engine loads after the first screen is painted (see InteractApp.on_mount)
    from ..assessment import Assessment
    from ..scenario import Scenario
    from . import plots

__all__ = ["InteractApp", "read_scenario_data"]

#: the built-in invented demo (the same file as interact.scenario.demo_path(), found without loading pint)
DEMO_PATH = Path(__file__).resolve().parents[1] / "demo.toml"

#: how many edits Ctrl+Z can take back
UNDO_DEPTH = 500


@dataclass(frozen=True, slots=True)
class Snapshot:
    """A state Ctrl+Z / Ctrl+Y returns to: the data, every field's exact text and the selected field."""

    data: dict[str, Any]
    texts: dict[str, str]
    selected: str


#: the engine modules; the app shows its first screen before they are imported
_CORE = ("interact.assessment", "interact.tui.notes", "interact.tui.results", "interact.tui.plots")


def core_loaded() -> bool:
    return all(m in sys.modules for m in _CORE)


def load_core() -> None:
    """Import the engine and warm its caches (unit registry, reference tables) on the demo."""
    import importlib

    for m in _CORE:
        importlib.import_module(m)
    from ..assessment import assess
    from ..scenario import load_scenario

    assess(load_scenario(DEMO_PATH), warn=False)


def _read_text(path: str | Path) -> str:
    """The file's text through the shared reader (a byte-order mark is dropped there)."""
    from ..files import read_text

    return read_text(Path(path), "scenario")


def _parse(text: str, path: str | Path) -> dict[str, Any]:
    from ..files import loads_toml

    return loads_toml(text, str(path))


#: the ICH M12 table names a scenario file may use, and the form's names for them (interact.scenario.SPELLINGS,
#: inverted; kept here so that the first screen does not wait for the engine's import; a test keeps them equal)
FORM_NAMES: Final = {"precipitant": "perpetrator", "object": "victim"}


def form_data(data: dict[str, Any]) -> tuple[dict[str, Any], tuple[str, str]]:
    """The file's data with its drug tables under the form's names, and the names the file used (to save back)."""
    out = {FORM_NAMES.get(k, k) if FORM_NAMES.get(k, k) not in data else k: v for k, v in data.items()}
    spelling = (
        "precipitant" if "precipitant" in data and "perpetrator" not in data else "perpetrator",
        "object" if "object" in data and "victim" not in data else "victim",
    )
    return out, spelling


def file_data(data: dict[str, Any], spelling: tuple[str, str]) -> dict[str, Any]:
    """The form's data with its drug tables under the names the file used."""
    names = {"perpetrator": spelling[0], "victim": spelling[1]}
    return {names.get(k, k): v for k, v in data.items()}


def read_scenario_data(path: str | Path) -> dict[str, Any]:
    """The file's TOML data under the form's table names, not yet validated (the demo at start-up; a file opened to fix it)."""
    return form_data(_parse(_read_text(path), path))[0]


class PlotView(Widget):
    """One terminal chart with its title and legend."""

    def __init__(self, *, id: str) -> None:
        super().__init__(id=id)
        self.chart: plots.Chart | None = None
        self.stale = False
        self.empty_text = ""

    def show(self, chart: plots.Chart | None, *, stale: bool, empty_text: str = "") -> None:
        self.chart = chart
        self.stale = stale
        self.empty_text = empty_text
        self.refresh()

    def render(self) -> Text:
        width, height = self.content_size.width, self.content_size.height
        if self.chart is None:
            return Text(self.empty_text or "nothing to plot")
        c = self.chart
        out = Text()
        out.append(c.title, style="bold")
        if self.stale:
            out.append("  NOT UPDATED: inputs invalid", style="bold reverse")
        out.append("\n")
        from . import plots

        legend = plots.legend(c)
        legend_rows = max(1, -(-len(legend) // max(width, 1)))
        for line in plots.draw(c, width, height - 2 - legend_rows - len(c.notes)):
            out.append(line + "\n")
        out.append(legend + "\n", style="italic")
        for n in c.notes:
            out.append(n + "\n", style="dim")
        return out


class InteractApp(App[int]):
    """Scenario editor with live assessment, plots, pinning, files and cautions."""

    CSS_PATH = Path(__file__).with_name("app.tcss")
    TITLE = "interact"
    ENABLE_COMMAND_PALETTE = False
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("f1", "help", "Help"),
        Binding("f2", "cautions", "Cautions"),
        Binding("f3", "pin", "Pin"),
        Binding("f4", "next_view", "Views"),
        Binding("f5", "group(1)", "Group"),
        Binding("shift+f5", "group(-1)", "Previous group", show=False),
        Binding("ctrl+s", "save", "Save"),
        Binding("f6", "save_as", "Save as"),
        Binding("ctrl+o", "open", "Open"),
        Binding("ctrl+n", "add_entry", "Add entry", show=False),
        Binding("ctrl+r", "remove_entry", "Remove entry", show=False),
        Binding("ctrl+z", "undo", "Undo", show=False),
        Binding("ctrl+y", "redo", "Redo", show=False),
        Binding("ctrl+q", "quit", "Quit", priority=True),
    ]
    #: what each key does, for the help screen (Textual's own keys included)
    KEY_HELP = (
        ("F1", "this help: every key, and the equations behind each result with their sources"),
        ("F2", "the full cautions"),
        ("F3", "pin the current result; later edits show as differences from it (F3 again unpins)"),
        ("F4", "switch the right side between the answer, the plots and the fitting view"),
        ("F5", "next group of inputs (each target, metabolite and pathway, the victim, ...)"),
        ("Shift+F5", "previous group of inputs"),
        ("Up / Down", "in the form: previous / next field; PageUp / PageDown by a screen"),
        ("Enter", "in the form: next field, or do the selected 'add ...' / 'remove ...'"),
        ("Right", "at the end of a value: accept the greyed suggestion (targets, mechanisms, yes/no)"),
        ("Ctrl+U / Ctrl+K", "in a value: delete to its start / end (Home, End, Backspace, Delete as usual)"),
        ("Tab", "move between the form and the answer (scroll the answer with the arrows)"),
        ("Ctrl+S", "save (the built-in demo asks for a new file name)"),
        ("F6", "save as a new file"),
        ("Ctrl+O", "open another scenario file"),
        ("Ctrl+N", "add an entry to the list the cursor is in (target, metabolite, pathway)"),
        ("Ctrl+R", "remove the entry the cursor is in (Ctrl+Z brings it back)"),
        ("Ctrl+Z", "undo the last edit (typing, paste, add, remove, use the fitted Ki)"),
        ("Ctrl+Y", "redo the edit last undone"),
        ("Ctrl+Q", "quit (asks first if there are unsaved edits)"),
        ("Escape", "close a pop-up"),
    )

    def __init__(self, path: str | Path | None = None, *, data: dict[str, Any] | None = None) -> None:
        super().__init__()
        if data is None:
            data = read_scenario_data(path if path is not None else DEMO_PATH)  # problems show in the form
        self.path: Path | None = None if path is None else Path(path)
        self.data: dict[str, Any] = data
        self.saved_data: dict[str, Any] = copy.deepcopy(data)
        self.assessment: Assessment | None = None
        self.scenario: Scenario | None = None
        self.valid_data: dict[str, Any] = copy.deepcopy(data)
        self.valid = False
        self.problems: tuple[Problem, ...] = ()
        self.general: list[str] = []
        self.pinned: tuple[Assessment, dict[str, Any]] | None = None
        self.generation = 0
        self.core_ready = False
        self.fit: Any = None  # the last ModelComparison
        self._fit_started = 0.0
        self._fit_step = ""
        #: the text of the file the data came from (the demo's own text for the demo): saving edits this text
        self.source_text: str = _read_text(self.path or DEMO_PATH)
        #: the drug tables' names in the file ([perpetrator]/[victim] or [precipitant]/[object]), kept on saving
        self.spelling: tuple[str, str] = form_data(_parse(self.source_text, self.path or DEMO_PATH))[1]
        #: earlier states for Ctrl+Z and later ones for Ctrl+Y: (data, every field's text, selected key)
        self.undo_stack: list[Snapshot] = []
        self.redo_stack: list[Snapshot] = []
        self._texts: dict[str, str] = {}  # every field's text as of the last update (what an undo restores)
        #: the field a run of keystrokes is typed into, with the form's selection count (one undo step per run)
        self._typing: tuple[str, int] | None = None

    # ------------------------------------------------------------------ layout
    def compose(self) -> ComposeResult:
        yield Header(show_clock=False)
        with Horizontal(id="main"):
            with Vertical(id="left"):
                yield FormView(self.data, id="form")
                yield Static("", id="detail", markup=False)
            with TabbedContent(id="views", initial="answer"):
                with TabPane("Answer", id="answer"):
                    yield DocumentView(id="answer-body")
                with TabPane("Plots", id="plots"):
                    with VerticalScroll(id="plot-scroll"):
                        yield PlotView(id="plot-fm")
                        yield PlotView(id="plot-dose")
                        yield Static("", id="plot-fit", markup=False)
                yield TabPane("Fitting", id="fitting")  # filled once the engine is in (keeps the first screen quick)
        yield Static(f"{CAUTION_LINE}  (F2: cautions)", id="caution-line", markup=False)
        yield Footer()

    @property
    def form(self) -> FormView:
        return self.query_one("#form", FormView)

    def on_mount(self) -> None:
        self.form.edited = self._typed
        self._texts = self.form.texts()
        self.form.focus()
        if core_loaded():
            self._mount_fit_pane()
            self.core_ready = True
            self.recompute()
        else:
            # first screen now (the form with its values); the engine loads in a thread, then the answer appears
            loading = Doc().para("Loading the models ... (the answer appears in a moment)")
            self.query_one("#answer-body", DocumentView).show(loading)
            self.call_after_refresh(lambda: self.run_worker(self._load_core, thread=True, exclusive=True, group="core"))

    def _load_core(self) -> None:
        load_core()
        self.call_from_thread(self._core_loaded)

    def _core_loaded(self) -> None:
        self._mount_fit_pane()
        self.core_ready = True
        self.recompute()

    def _mount_fit_pane(self) -> None:
        self.query_one("#fitting", TabPane).mount(FitPane(id="fit-pane"))
        self.call_after_refresh(self.on_mount_fit_defaults)

    def on_resize(self) -> None:
        if self.assessment is not None:
            self._show_results()

    # ------------------------------------------------------------------ state
    @property
    def dirty(self) -> bool:
        return self.data != self.saved_data

    @property
    def file_label(self) -> str:
        return "built-in demo (invented, no file)" if self.path is None else str(self.path)

    def update_title(self) -> None:
        sub = self.file_label + (" * unsaved" if self.dirty else "")
        if self.sub_title != sub:
            self.sub_title = sub

    def field(self, key: str) -> FieldState:
        """The field for a dotted key path (for tests and the problem list)."""
        return self.form.fields[key]

    def recompute(self) -> None:
        """Rebuild the scenario from the form data, assess it, refresh everything that shows it."""
        if not self.core_ready:
            self.update_title()
            return  # the engine is still loading; it recomputes from the latest data when it is in
        self.generation += 1
        with self.batch_update():
            self._recompute()

    def _recompute(self) -> None:
        if self.valid and self.assessment is not None and self.data == self.valid_data:
            # nothing changed since the last valid result (a section switch): just redraw
            self._show_problems()
            self._show_results()
            self.update_title()
            return
        self.problems = ()
        self.general = []
        from ..assessment import assess
        from ..scenario import scenario_from_dict

        try:
            scenario = scenario_from_dict(self.data, source=self.path.name if self.path else "scenario")
            result = assess(scenario, warn=False)
        except ScenarioError as exc:
            self.problems = exc.problems
            self.valid = False
        except InteractError as exc:
            self.general = [str(exc)]
            self.valid = False
        else:
            self.scenario = scenario
            self.assessment = result
            self.valid_data = copy.deepcopy(self.data)
            self.valid = True
        self._show_problems()
        self._show_results()
        self.update_title()

    async def reveal(self, key: str) -> FieldState:
        """Select the field ``key`` in the form and scroll it into view."""
        return self.form.select(key)

    def _show_problems(self) -> None:
        from .notes import field_note

        by_key: dict[str, list[str]] = {}
        for p in self.problems:
            by_key.setdefault(p.field, []).append(p.message)
        current = self.assessment if self.valid else None
        form = self.form
        for st in form.fields.values():
            text, error = field_note(st.spec, st.path, st.key, st.text, self.data, current)
            if not error:
                own = by_key.get(st.key) or _indexed_problems(by_key, st.key)
                if own:
                    text, error = "; ".join(own), True
            form.set_note(st, text, error)
        form.set_problems({k: "; ".join(v) for k, v in by_key.items()})
        self.show_detail()

    def show_detail(self) -> None:
        """The selected field in full: its key path and the whole note (the line under it may be cut)."""
        st = self.form.current_field
        row = self.form.current
        if st is not None:
            text = f"{st.spec.label} [{st.key}]: {st.note_text or st.spec.hint}"
        elif row is not None and row.kind in ("add", "remove"):
            text = f"Enter: {row.text}."
        else:
            text = "Up/Down move between fields; type values with units; F1 lists every key."
        detail = self.query_one("#detail", Static)
        if str(detail.content) != text:
            detail.update(text, layout=False)

    def problem_lines(self) -> list[str]:
        lines = [str(p) for p in self.problems] + self.general
        known = {p.field for p in self.problems}
        for st in self.form.fields.values():
            if st.error and st.key not in known and not _indexed_problems({p.field: [p.message] for p in self.problems}, st.key):
                lines.append(f"{st.key}: {st.note}")
        return lines

    def _show_results(self) -> None:
        from . import plots
        from .results import compare as compare_results
        from .results import render_answer, render_stale

        body = self.query_one("#answer-body", DocumentView)
        problems = self.problem_lines() if not self.valid else []
        a = self.assessment
        doc = render_stale(problems) if problems else Doc()
        if a is None:
            body.show(doc.para("No valid result yet: fix the problems listed above."))
            for pid in ("#plot-fm", "#plot-dose"):
                self.query_one(pid, PlotView).show(None, stale=True, empty_text="No valid result yet.")
            return
        comparison = None
        if self.pinned is not None:
            comparison = compare_results(self.pinned[0], self.pinned[1], a, self.valid_data)
        body.show(doc.extend(render_answer(a, comparison, narrow=self.size.width < 120, stale=bool(problems))))
        if self.valid:
            self.query_one("#plot-fm", PlotView).show(
                plots.fm_curve(a),
                stale=False,
                empty_text="No fm plot: the perpetrator acts on none of the victim's enzyme pathways, or transporter routes are given.",
            )
            self.query_one("#plot-dose", PlotView).show(
                plots.dose_curve(a), stale=False, empty_text="No dose plot: no inhibition constants."
            )
        else:
            for pid in ("#plot-fm", "#plot-dose"):
                view = self.query_one(pid, PlotView)
                view.show(view.chart, stale=True, empty_text=view.empty_text)

    # ------------------------------------------------------------------ editing
    def update(
        self,
        data: dict[str, Any],
        *,
        undo: str | None = None,
        select_key: str | None = None,
        texts: dict[str, str] | None = None,
    ) -> None:
        """The one way the scenario changes: typing, paste, add/remove, undo/redo, fitted Ki, open, pin.

        ``data`` becomes the scenario's data; the form is brought to it (rebuilt
        when entries came or went, otherwise each field that does not hold its
        value is given that value's text), then the scenario is assessed and
        every view redrawn.  ``undo`` names the edit when it is one the user
        can undo (the state before it is kept); ``texts`` restores the fields'
        exact text (undo and redo).
        """
        if undo is not None:
            self.undo_stack.append(Snapshot(copy.deepcopy(self.data), dict(self._texts), self._selected_key()))
            del self.undo_stack[:-UNDO_DEPTH]
            self.redo_stack.clear()
        if undo is not None:
            self._typing = None
        self.data = data
        form = self.form
        if texts is not None or select_key is not None or entry_keys(data) != form.entry_keys():
            form.load(data, select_key=select_key, texts=texts)
        else:
            form.sync(data)
        self._texts = form.texts()
        self.recompute()

    def _selected_key(self) -> str:
        row = self.form.current
        return row.key if row is not None else ""

    def _typed(self, st: FieldState) -> None:
        """A field's text changed (called by the form on each keystroke or paste)."""
        if self.form.fields.get(st.key) is not st:
            return  # a field of rows since rebuilt (cannot happen: the form calls this at once); keep the data
        current = get_path(self.data, st.path)
        if shows(st.spec.kind, st.text, current):
            # the text holds the value already ("0.70" for 0.7): keep the data as it is spelled in the file
            self._texts[st.key] = st.text
            self.show_detail()
            return
        data = copy.deepcopy(self.data)
        set_path(data, st.path, value_of(st.spec.kind, st.text))
        run = (st.key, self.form.moves)
        self.update(data, undo=None if self._typing == run else f"type {st.key}")
        self._typing = run
        if st.path[-1] in ("target", "enzyme", "name") and len(st.path) > 2:
            self.form.set_item_title(st.path[:-1], self.data)

    def on_form_view_selected(self) -> None:
        self.show_detail()

    def on_form_view_action_chosen(self, event: FormView.ActionChosen) -> None:
        if event.kind == "add":
            self.add_entry(event.path)
        else:
            self.remove_entry(event.path)

    def add_entry(self, list_path: tuple[str | int, ...]) -> None:
        data = copy.deepcopy(self.data)
        entries = get_path(data, list_path, None)
        if not isinstance(entries, list):
            entries = []
            set_path(data, list_path, entries)
        entries.append({})
        self.update(data, undo=f"add to {key_of(list_path)}", select_key=key_of((*list_path, len(entries) - 1)) + ".")

    def remove_entry(self, item_path: tuple[str | int, ...]) -> None:
        data = copy.deepcopy(self.data)
        entries = get_path(data, item_path[:-1], None)
        index = int(item_path[-1])
        if not (isinstance(entries, list) and 0 <= index < len(entries)):
            return
        del entries[index]
        self.update(data, undo=f"remove {key_of(item_path)}", select_key=key_of(item_path[:-1]))
        self.notify(f"Removed {key_of(item_path)} (Ctrl+Z brings it back).")

    def action_undo(self) -> None:
        self._step_history(self.undo_stack, self.redo_stack, "undo")

    def action_redo(self) -> None:
        self._step_history(self.redo_stack, self.undo_stack, "redo")

    def _step_history(self, source: list[Snapshot], other: list[Snapshot], word: str) -> None:
        if not source:
            self.notify(f"Nothing to {word}.", severity="warning")
            return
        snap = source.pop()
        other.append(Snapshot(copy.deepcopy(self.data), dict(self._texts), self._selected_key()))
        self.update(copy.deepcopy(snap.data), texts=snap.texts, select_key=snap.selected or None)

    def _list_path(self, items_only: bool) -> tuple[str | int, ...] | None:
        """The list (or, with ``items_only``, the entry) the form's selection is in."""
        row = self.form.current
        if row is None:
            return None
        path = row.path
        if row.kind == "add":
            return None if items_only else path
        ints = [i for i, p in enumerate(path) if isinstance(p, int)]
        if not ints:
            return None
        return path[: ints[-1] + 1] if items_only else path[: ints[-1]]

    def action_add_entry(self) -> None:
        path = self._list_path(items_only=False)
        if path is None:
            self.notify("Select a field of a list (targets, metabolites, pathways) to add an entry to it.", severity="warning")
            return
        self.add_entry(path)

    def action_remove_entry(self) -> None:
        path = self._list_path(items_only=True)
        if path is None:
            self.notify("Select a field of an entry (a target, metabolite or pathway) to remove it.", severity="warning")
            return
        self.remove_entry(path)

    # ------------------------------------------------------------------ views
    def action_help(self) -> None:
        self.push_screen(HelpScreen(list(self.KEY_HELP)))

    def action_cautions(self) -> None:
        self.push_screen(CautionsScreen())

    def action_group(self, step: int) -> None:
        self.form.focus()
        self.form.action_group(step)

    def action_next_view(self) -> None:
        tabs = self.query_one("#views", TabbedContent)
        order = [p.id for p in tabs.query(TabPane) if p.id]
        tabs.active = order[(order.index(tabs.active) + 1) % len(order)] if tabs.active in order else order[0]
        if tabs.active == "fitting":
            self.query_one("#fit-path", Input).focus()
        else:  # a control of a hidden view must not keep the focus (nothing would show it): back to the form
            self.form.focus()

    def action_pin(self) -> None:
        if self.pinned is not None:
            self.pinned = None
            self.notify("Unpinned: the answer shows the current result only.")
        elif self.assessment is None:
            self.notify("Nothing to pin yet: no valid result.", severity="warning")
            return
        else:
            self.pinned = (self.assessment, copy.deepcopy(self.valid_data))
            self.notify("Pinned: later edits show as differences from this result (F3 unpins).")
        self.update(self.data)

    # ------------------------------------------------------------------ fitting
    def on_mount_fit_defaults(self, tries: int = 0) -> None:
        boxes = self.query("#fit-target")
        if not boxes:  # the pane's inputs are not composed yet (a busy machine): try after the next refresh
            if tries < 50:
                self.call_after_refresh(self.on_mount_fit_defaults, tries + 1)
            return
        target = get_path(self.data, ("perpetrator", "inhibits", 0, "target"), "")
        box = boxes.first(Input)
        if not box.value and isinstance(target, str):
            box.value = target

    @on(Button.Pressed, "#fit-run")
    @on(Input.Submitted, "#fit-path, #fit-unit")
    def _fit_requested(self) -> None:
        path = self.query_one("#fit-path", Input).value.strip()
        if not path:
            self._fit_status("error: give the CSV file name first")
            return
        unit = self.query_one("#fit-unit", Input).value.strip() or None
        self.query_one("#fit-accept", Button).disabled = True
        self.query_one("#fit-progress", ProgressBar).update(progress=0)
        self._fit_started = time.monotonic()
        self._fit_step = STEPS[0]
        self._fit_timer = self.set_interval(0.2, self._fit_tick)
        self.run_fit(path, unit)

    def _fit_tick(self) -> None:
        self._fit_status(f"{self._fit_step} ... {time.monotonic() - self._fit_started:.1f} s")

    def _fit_status(self, text: str) -> None:
        self.query_one("#fit-status", Static).update(text)

    def _fit_progress(self, step: int) -> None:
        self._fit_step = STEPS[step] if step < len(STEPS) else "done"
        self.query_one("#fit-progress", ProgressBar).update(progress=step)

    @work(thread=True, exclusive=True, group="fit")
    def run_fit(self, path: str, unit: str | None) -> None:
        """Read and fit in a worker thread; the screen keeps answering keys meanwhile."""
        from ..kinetics.data import read_incubation_csv
        from ..kinetics.diagnostics import double_reciprocal_data
        from ..kinetics.fitting import fit_inhibition
        from ..report.fit_plots import render_terminal

        worker = get_current_worker()
        try:
            data = read_incubation_csv(path, substrate_unit=unit, inhibitor_unit=unit)
            self.call_from_thread(self._fit_progress, 1)
            comp = fit_inhibition(data, warn=False)
            if worker.is_cancelled:
                return
            self.call_from_thread(self._fit_progress, 2)
            plot = render_terminal(double_reciprocal_data(comp), width=72, height=18)
        except InteractError as exc:
            self.call_from_thread(self._fit_failed, str(exc))
            return
        self.call_from_thread(self._fit_done, comp, plot, path)

    def _fit_failed(self, message: str) -> None:
        self._fit_timer.stop()
        self.query_one("#fit-progress", ProgressBar).update(progress=0)
        self._fit_status(f"error: {message}")

    def _fit_done(self, comp: Any, plot: str, path: str) -> None:
        from ..report.fit import fit_sections
        from .results import STYLE, sections_doc

        self._fit_timer.stop()
        self._fit_progress(len(STEPS))
        self.fit = comp
        self._fit_source = path
        elapsed = time.monotonic() - self._fit_started
        ki = comp.ki
        found = f"{ki.name} = {fmt(ki.value)} {ki.unit}" if ki is not None else "no inhibition constant"
        self._fit_status(f"fitted in {elapsed:.1f} s: {comp.verdict.model} model, {found}")
        doc = Doc().para((comp.verdict.text, STYLE["result"])).blank()
        doc.pre(plot).blank()
        self.query_one("#fit-body", DocumentView).show(doc.extend(sections_doc(fit_sections(comp))))
        self.query_one("#plot-fit", Static).update(plot)
        self.query_one("#fit-accept", Button).disabled = ki is None

    @on(Button.Pressed, "#fit-accept")
    def accept_fit(self) -> None:
        """Write the fitted Ki into the chosen target of the scenario (an unsaved edit, as any other)."""
        if self.fit is None:
            return
        target = self.query_one("#fit-target", Input).value
        try:
            fitted = ki_entry(self.fit, self.data, target, self._fit_source)
        except ValueError as exc:
            self._fit_status(f"error: {exc}")
            return
        data = copy.deepcopy(self.data)
        entries = get_path(data, ("perpetrator", "inhibits"), None)
        if not isinstance(entries, list):
            entries = []
            set_path(data, ("perpetrator", "inhibits"), entries)
        if fitted.index is None:
            entries.append(fitted.entry)
            index = len(entries) - 1
        else:
            entries[fitted.index] = fitted.entry
            index = fitted.index
        self.update(data, undo="use the fitted Ki", select_key=f"perpetrator.inhibits[{index}].ki")
        text = f"{fitted.entry['ki']} ({fitted.entry['mechanism']}) written into target {fitted.target}; Ctrl+S saves it."
        if fitted.caution:
            text += f" Caution: {fitted.caution}"
        self._fit_status(text)
        self.notify(text, severity="warning" if fitted.caution else "information", timeout=8)

    # ------------------------------------------------------------------ files
    def _why_not_savable(self) -> str:
        if not self.core_ready:
            return "the models are still loading; try again in a moment"
        n = len(self.problem_lines())
        return f"the inputs have {n} problem{'s' if n != 1 else ''}; fix them first (your text stays in the fields)"

    def save_to(self, path: Path) -> bool:
        """Write the scenario as an edit of the text it was read from (comments, order and spelling kept).

        Only the values the user changed are rewritten; the edited text is read
        back before it is written and must give the same data and load as a
        scenario, so a file that would not open again is never written.
        """
        if not self.valid or self.scenario is None:
            self.notify(f"Not saved: {self._why_not_savable()}.", severity="error", timeout=8)
            return False
        from ..scenario import edit_scenario_text, write_text_atomic

        try:
            text = edit_scenario_text(self.source_text, file_data(self.data, self.spelling), source=str(path))
            write_text_atomic(path, text)
        except InteractError as exc:
            self.notify(f"Not saved: {exc}", severity="error", timeout=8)
            return False
        self.path = path
        self.source_text = text
        self.saved_data = copy.deepcopy(self.data)
        self.update_title()
        self.notify(f"Saved to {path}")
        return True

    def action_save(self) -> None:
        if self.path is None:
            self.action_save_as()
        else:
            self.save_to(self.path)

    def action_save_as(self, then: Any = None) -> None:
        if not self.valid:
            self.notify(f"Not saved: {self._why_not_savable()}.", severity="error", timeout=8)
            return

        def chosen(result: object) -> None:
            if isinstance(result, str) and self.save_to(Path(result)) and then is not None:
                then()

        start = str(self.path) if self.path is not None else "scenario.toml"
        self.push_screen(AskPath("Save as", start, confirm_existing=self.path), chosen)

    def _guard(self, doing: str, proceed: Any) -> None:
        """Run ``proceed`` now, or after asking when there are unsaved edits."""
        if not self.dirty:
            proceed()
            return

        def answered(choice: str | None) -> None:
            if choice == "discard":
                proceed()
            elif choice == "save":
                if self.path is None:
                    self.action_save_as(then=proceed)
                elif self.save_to(self.path):
                    proceed()

        self.push_screen(ConfirmDiscard(doing, can_save=self.valid, why_not=self._why_not_savable()), answered)

    async def action_quit(self) -> None:
        self._guard("quit", lambda: self.exit(0))

    def action_open(self) -> None:
        self._guard("open another file", self._ask_open)

    def _ask_open(self) -> None:
        def chosen(result: object) -> None:
            if isinstance(result, str):
                self.run_worker(self.open_file(Path(result)), exclusive=True, group="open")

        self.push_screen(AskPath("Open a scenario file", str(self.path.parent) + "/" if self.path else ""), chosen)

    async def open_file(self, path: Path) -> bool:
        """Load ``path`` into the form; a file that cannot be read or is not TOML changes nothing.

        A scenario with problems opens too, with each problem under its field,
        so it can be fixed here (it cannot be saved until it loads).
        """
        try:
            text = _read_text(path)
            data, spelling = form_data(_parse(text, path))
        except InteractError as exc:
            self.push_screen(LoadProblems(str(path), str(exc)))
            return False
        self.path = path
        self.source_text = text
        self.spelling = spelling
        self.saved_data = copy.deepcopy(data)
        self.assessment = None
        self.scenario = None
        self.valid = False
        self.pinned = None
        self.undo_stack.clear()
        self.redo_stack.clear()
        self.form.selected = 0
        self.update(data, select_key="")
        if self.valid or not self.core_ready:
            self.notify(f"Opened {path}")
        else:
            n = len(self.problem_lines())
            self.notify(
                f"Opened {path} with {n} problem{'s' if n != 1 else ''}: each is shown under its field.",
                severity="warning",
                timeout=8,
            )
        self.form.focus()
        return True


def _indexed_problems(by_key: dict[str, list[str]], key: str) -> list[str]:
    """Problems of list elements (``victim.strengths[1]``) for the field holding the list."""
    return [m for k, msgs in by_key.items() if k.startswith(key + "[") for m in msgs]
