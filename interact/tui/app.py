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
import tomllib
from pathlib import Path
from typing import Any

from rich.text import Text
from textual import on
from textual.app import App, ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.widget import Widget
from textual.widgets import Button, Footer, Header, Static, TabbedContent, TabPane

from ..assessment import Assessment, assess
from ..cautions import CAUTION_LINE
from ..errors import InputError, InteractError, Problem, ScenarioError
from ..scenario import Scenario, demo_path, save_scenario, scenario_from_dict
from . import plots
from .form import MISSING, FieldInput, FieldRow, ItemBox, ListBox, build_form, get_path, key_of, set_path, value_of
from .notes import field_note
from .results import Comparison, compare, render_answer, render_stale
from .screens import AskPath, CautionsScreen, ConfirmDiscard, HelpScreen, LoadProblems

__all__ = ["InteractApp", "read_scenario_file"]


def read_scenario_file(path: str | Path) -> tuple[dict[str, Any], Scenario]:
    """The file's data (as written, for the form) and its validated scenario.

    Raises
    ------
    InputError
        The file cannot be read or parsed, or the scenario has problems
        (:class:`~interact.errors.ScenarioError`, all of them listed).
    """
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError("scenario", str(p), f"could not be read ({getattr(exc, 'strerror', None) or exc.__class__.__name__})") from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(str(p), "TOML", f"could not be parsed: {exc}") from None
    scenario = scenario_from_dict(data, source=str(p), text=text)
    return data, scenario


class PlotView(Widget):
    """One terminal chart with its title and legend."""

    def __init__(self, *, id: str) -> None:  # noqa: A002 - Textual's name
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

    CSS_PATH = "app.tcss"
    TITLE = "interact"
    ENABLE_COMMAND_PALETTE = False
    BINDINGS = [
        Binding("f1", "help", "Help"),
        Binding("f2", "cautions", "Cautions"),
        Binding("f3", "pin", "Pin"),
        Binding("f4", "next_view", "Views"),
        Binding("ctrl+s", "save", "Save"),
        Binding("f6", "save_as", "Save as"),
        Binding("ctrl+o", "open", "Open"),
        Binding("ctrl+n", "add_entry", "Add entry", show=False),
        Binding("ctrl+r", "remove_entry", "Remove entry", show=False),
        Binding("ctrl+q", "quit", "Quit", priority=True),
    ]
    #: what each key does, for the help screen (Textual's own keys included)
    KEY_HELP = (
        ("F1", "this help: every key, and the equations behind each result with their sources"),
        ("F2", "the full cautions"),
        ("F3", "pin the current result; later edits show as differences from it (F3 again unpins)"),
        ("F4", "switch the right side between the answer and the plots"),
        ("Ctrl+S", "save (the built-in demo asks for a new file name)"),
        ("F6", "save as a new file"),
        ("Ctrl+O", "open another scenario file"),
        ("Ctrl+N", "add an entry to the list the cursor is in (target, metabolite, pathway)"),
        ("Ctrl+R", "remove the entry the cursor is in"),
        ("Ctrl+Q", "quit (asks first if there are unsaved edits)"),
        ("Escape", "close a pop-up"),
    )

    def __init__(self, path: str | Path | None = None, *, data: dict[str, Any] | None = None) -> None:
        super().__init__()
        if data is None:
            data, _ = read_scenario_file(path if path is not None else demo_path())
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

    # ------------------------------------------------------------------ layout
    def compose(self) -> ComposeResult:
        yield Header(show_clock=False)
        with Horizontal(id="main"):
            with VerticalScroll(id="form"):
                yield from build_form(self.data)
            with TabbedContent(id="views", initial="answer"):
                with TabPane("Answer", id="answer"):
                    with VerticalScroll(id="answer-scroll"):
                        yield Static("", id="stale")
                        yield Static("", id="answer-body")
                with TabPane("Plots", id="plots"):
                    with VerticalScroll(id="plot-scroll"):
                        yield PlotView(id="plot-fm")
                        yield PlotView(id="plot-dose")
        yield Static(f"{CAUTION_LINE}  (F2: cautions)", id="caution-line", markup=False)
        yield Footer()

    def on_mount(self) -> None:
        self.recompute()
        self._show_starts()
        first = self.query(FieldInput).first()
        first.focus()

    def _show_starts(self) -> None:
        """Show the start of each value (long names), not its end."""
        for inp in self.query(FieldInput):
            inp.cursor_position = 0

    def on_resize(self) -> None:
        if self.assessment is not None:
            self._show_results()

    # ------------------------------------------------------------------ state
    @property
    def dirty(self) -> bool:
        return self.data != self.saved_data

    @property
    def file_label(self) -> str:
        return "built-in demo (invented), not saved to a file" if self.path is None else str(self.path)

    def update_title(self) -> None:
        self.title = "interact"
        self.sub_title = self.file_label + ("  * unsaved edits" if self.dirty else "")

    def field(self, key: str) -> FieldRow:
        """The field for a dotted key path (for tests and the problem list)."""
        for row in self.query(FieldRow):
            if row.key == key:
                return row
        raise KeyError(key)

    def recompute(self) -> None:
        """Rebuild the scenario from the form data, assess it, refresh everything that shows it."""
        self.generation += 1
        self.problems = ()
        self.general = []
        try:
            scenario = scenario_from_dict(self.data, source=self.path.name if self.path else "scenario")
            result = assess(scenario)
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

    def _show_problems(self) -> None:
        by_key: dict[str, list[str]] = {}
        for p in self.problems:
            by_key.setdefault(p.field, []).append(p.message)
        current = self.assessment if self.valid else None
        shown: set[str] = set()
        for row in self.query(FieldRow):
            text, error = field_note(row.spec, row.path, row.key, row.input.value, self.data, current)
            if not error:
                own = by_key.get(row.key) or _indexed_problems(by_key, row.key)
                if own:
                    text, error = "; ".join(own), True
            if error:
                shown.add(row.key)
            row.show(text, error=error)
        for box in self.query(ItemBox).results():
            box.show_problem("; ".join(by_key.get(box.key, [])))
        for lst in self.query(ListBox).results():
            lst.show_problem("; ".join(by_key.get(lst.key, [])))

    def problem_lines(self) -> list[str]:
        lines = [str(p) for p in self.problems] + self.general
        for row in self.query(FieldRow):
            if row.has_error and row.key not in {p.field for p in self.problems}:
                lines.append(f"{row.key}: {row.note_text.removeprefix('error: ')}")
        return lines

    def _show_results(self) -> None:
        stale = self.query_one("#stale", Static)
        body = self.query_one("#answer-body", Static)
        problems = self.problem_lines() if not self.valid else []
        stale.display = bool(problems)
        if problems:
            stale.update(render_stale(problems))
        body.set_class(bool(problems), "stale")
        a = self.assessment
        if a is None:
            body.update("No valid result yet: fix the problems listed above.")
            for pid in ("#plot-fm", "#plot-dose"):
                self.query_one(pid, PlotView).show(None, stale=True, empty_text="No valid result yet.")
            return
        comparison: Comparison | None = None
        if self.pinned is not None:
            comparison = compare(self.pinned[0], self.pinned[1], a, self.valid_data)
        body.update(render_answer(a, comparison, narrow=self.size.width < 120))
        if self.valid:
            self.query_one("#plot-fm", PlotView).show(
                plots.fm_curve(a), stale=False, empty_text="No fm plot: the perpetrator acts on none of the victim's pathways."
            )
            self.query_one("#plot-dose", PlotView).show(plots.dose_curve(a), stale=False, empty_text="No dose plot: no inhibition constants.")
        else:
            for pid in ("#plot-fm", "#plot-dose"):
                view = self.query_one(pid, PlotView)
                view.show(view.chart, stale=True, empty_text=view.empty_text)

    # ------------------------------------------------------------------ editing
    def on_input_changed(self, event: FieldInput.Changed) -> None:
        inp = event.input
        if not isinstance(inp, FieldInput):
            return
        value = value_of(inp.spec.kind, event.value)
        current = get_path(self.data, inp.path)
        if type(value) is type(current) and value == current:
            return
        if value is MISSING and current is MISSING:
            return
        set_path(self.data, inp.path, value)
        if inp.path[-1] in ("target", "enzyme", "name"):
            for box in inp.ancestors:
                if isinstance(box, ItemBox) and box.path == inp.path[:-1]:
                    from .form import _item_title

                    box.query_one(".item-title", Static).update(_item_title(box.spec, int(box.path[-1]), get_path(self.data, box.path)))
                    break
        self.recompute()

    @on(Button.Pressed, ".add")
    async def _add_pressed(self, event: Button.Pressed) -> None:
        await self.add_entry(event.button.list_path)  # type: ignore[attr-defined]

    @on(Button.Pressed, ".remove")
    async def _remove_pressed(self, event: Button.Pressed) -> None:
        await self.remove_entry(event.button.item_path)  # type: ignore[attr-defined]

    async def add_entry(self, list_path: tuple[str | int, ...]) -> None:
        entries = get_path(self.data, list_path, None)
        if not isinstance(entries, list):
            entries = []
            set_path(self.data, list_path, entries)
        entries.append({})
        await self.rebuild_form(focus=key_of((*list_path, len(entries) - 1)))

    async def remove_entry(self, item_path: tuple[str | int, ...]) -> None:
        entries = get_path(self.data, item_path[:-1], None)
        index = int(item_path[-1])
        if isinstance(entries, list) and 0 <= index < len(entries):
            del entries[index]
        await self.rebuild_form(focus=key_of(item_path[:-1]))

    async def rebuild_form(self, focus: str | None = None) -> None:
        """Rebuild the form after entries were added or removed (the data keeps every value)."""
        form = self.query_one("#form", VerticalScroll)
        await form.remove_children()
        await form.mount_all(build_form(self.data))
        self.recompute()
        self._show_starts()
        if focus is not None:
            target = next((i for i in self.query(FieldInput) if i.key.startswith(focus + ".")), None)
            if target is None:
                target = next((b for b in self.query(".add").results(Button) if key_of(b.list_path) == focus), None)  # type: ignore[attr-defined]
            if target is not None:
                target.focus()
                target.scroll_visible(animate=False)

    def _focused_box(self, kind: type) -> Any:
        node = self.focused
        while node is not None:
            if isinstance(node, kind):
                return node
            node = node.parent  # type: ignore[assignment]
        return None

    async def action_add_entry(self) -> None:
        box = self._focused_box(ListBox)
        if box is None:
            self.notify("Move the cursor into a list (targets, metabolites, pathways) to add an entry.", severity="warning")
            return
        await self.add_entry(box.path)

    async def action_remove_entry(self) -> None:
        box = self._focused_box(ItemBox)
        if box is None:
            self.notify("Move the cursor into an entry (a target, metabolite or pathway) to remove it.", severity="warning")
            return
        await self.remove_entry(box.path)

    # ------------------------------------------------------------------ views
    def action_help(self) -> None:
        self.push_screen(HelpScreen(list(self.KEY_HELP)))

    def action_cautions(self) -> None:
        self.push_screen(CautionsScreen())

    def action_next_view(self) -> None:
        tabs = self.query_one("#views", TabbedContent)
        order = [p.id for p in tabs.query(TabPane) if p.id]
        tabs.active = order[(order.index(tabs.active) + 1) % len(order)] if tabs.active in order else order[0]

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
        self._show_results()

    # ------------------------------------------------------------------ files
    def _why_not_savable(self) -> str:
        n = len(self.problem_lines())
        return f"the inputs have {n} problem{'s' if n != 1 else ''}; fix them first (your text stays in the fields)"

    def save_to(self, path: Path) -> bool:
        if not self.valid or self.scenario is None:
            self.notify(f"Not saved: {self._why_not_savable()}.", severity="error", timeout=8)
            return False
        try:
            save_scenario(self.scenario, path)
        except InteractError as exc:
            self.notify(f"Not saved: {exc}", severity="error", timeout=8)
            return False
        self.path = path
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
        """Load ``path``; on any problem show it and change nothing."""
        try:
            data, _ = read_scenario_file(path)
        except InteractError as exc:
            self.push_screen(LoadProblems(str(path), str(exc)))
            return False
        self.path = path
        self.data = data
        self.saved_data = copy.deepcopy(data)
        self.assessment = None
        self.pinned = None
        await self.rebuild_form()
        self.notify(f"Opened {path}")
        first = self.query(FieldInput).first()
        first.focus()
        return True


def _indexed_problems(by_key: dict[str, list[str]], key: str) -> list[str]:
    """Problems of list elements (``victim.strengths[1]``) for the field holding the list."""
    return [m for k, msgs in by_key.items() if k.startswith(key + "[") for m in msgs]
