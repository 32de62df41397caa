"""The terminal app: edit a scenario on the left, read the assessment on the right.

A thin Textual App.  Each view is its own module and widget: the form
(:mod:`~interact.tui.form_view`), the answer (:mod:`~interact.tui.answer_view`),
the plots (:mod:`~interact.tui.plots_view`) and the fitting view
(:mod:`~interact.tui.fitting_view`).  Views report upward with messages (the
form's "add"/"remove", the fitting view's "use the fitted Ki"); the app holds
the current :class:`~interact.tui.state.Evaluation` as reactive state, which the
views watch (``data_bind``).  Every change of the scenario goes through
:meth:`InteractApp.update`; the form calls it directly on each keystroke (not by
a message), so that no queued key acts on rows that were rebuilt meanwhile.

The engine is imported after the first screen is painted; when the inputs are
invalid the last valid result stays on screen under a "NOT UPDATED" banner and
each problem is shown under its field.
"""

from __future__ import annotations

import copy
from pathlib import Path
from typing import TYPE_CHECKING, Any, ClassVar

from textual.app import App, ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal
from textual.reactive import var
from textual.widgets import Footer, Header, Input, Static, TabbedContent, TabPane

from ..cautions import CAUTION_LINE
from ..errors import InteractError
from .answer_view import AnswerView
from .form import get_path, key_of, set_path, shows, value_of
from .form_view import FieldState, FormPane, FormView
from .plots_view import PlotsPane
from .state import (
    DEMO_PATH,
    FORM_NAMES,
    Evaluation,
    History,
    Snapshot,
    core_loaded,
    evaluate,
    file_data,
    form_data,
    load_core,
    parse,
    read_scenario_data,
    read_text,
    texts_after_removal,
)

if TYPE_CHECKING:  # the fitting view and the pop-ups load when first used (a quicker first screen)
    from ..assessment import Assessment
    from ..errors import Problem
    from ..scenario import Scenario
    from .fitting_view import FitPane

__all__ = ["FORM_NAMES", "InteractApp", "read_scenario_data"]

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
    KEY_HELP = KEY_HELP

    #: the current data and what the engine made of it; the views watch it (None until the engine is in)
    evaluation: var[Evaluation | None] = var(None, init=False)
    #: the last fit's double-reciprocal diagnostic (the plots view shows it)
    fit_plot: var[str] = var("", init=False)

    def __init__(self, path: str | Path | None = None, *, data: dict[str, Any] | None = None) -> None:
        super().__init__()
        self.path: Path | None = None if path is None else Path(path)
        #: the text of the file the data came from (the demo's own text for the demo): saving edits this text
        self.source_text: str = read_text(self.path or DEMO_PATH)
        file, spelling = form_data(parse(self.source_text, self.path or DEMO_PATH))
        self.data: dict[str, Any] = file if data is None else data  # problems show in the form
        #: the drug tables' names in the file ([perpetrator]/[victim] or [precipitant]/[object]), kept on saving
        self.spelling: tuple[str, str] = spelling
        self.saved_data: dict[str, Any] = copy.deepcopy(self.data)
        self.pinned: tuple[Assessment, dict[str, Any]] | None = None
        self.generation = 0
        self.core_ready = False
        self.history = History()
        self._texts: dict[str, str] = {}  # every field's text as of the last update (what an undo restores)
        #: the field a run of keystrokes is typed into, with the form's selection count (one undo step per run)
        self._typing: tuple[str, int] | None = None
        self._fresh = True  # no result to keep on screen (start, or a file just opened)

    # ------------------------------------------------------------------ layout
    def compose(self) -> ComposeResult:
        yield Header(show_clock=False)
        with Horizontal(id="main"):
            yield FormPane(self.data, id="left").data_bind(InteractApp.evaluation)
            with TabbedContent(id="views", initial="answer"):
                with TabPane("Answer", id="answer"):
                    yield AnswerView(id="answer-body").data_bind(InteractApp.evaluation)
                with TabPane("Plots", id="plots"):
                    yield PlotsPane(id="plot-scroll").data_bind(InteractApp.evaluation, InteractApp.fit_plot)
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
            self._core_loaded()
        else:  # first screen now (the form with its values); the engine loads in a thread, then the answer appears
            self.call_after_refresh(lambda: self.run_worker(self._load_core, thread=True, exclusive=True, group="core"))

    def _load_core(self) -> None:
        load_core()
        self.call_from_thread(self._core_loaded)

    def _core_loaded(self) -> None:
        from .fitting_view import FitPane

        target = get_path(self.data, ("perpetrator", "inhibits", 0, "target"), "")
        self.query_one("#fitting", TabPane).mount(FitPane(id="fit-pane", target=target if isinstance(target, str) else ""))
        self.core_ready = True
        self.recompute()

    # ------------------------------------------------------------------ state
    @property
    def valid(self) -> bool:
        return self.evaluation is not None and self.evaluation.valid

    @property
    def assessment(self) -> Assessment | None:
        """The last valid result (still shown, marked NOT UPDATED, while the inputs are invalid)."""
        return None if self.evaluation is None else self.evaluation.assessment

    @property
    def scenario(self) -> Scenario | None:
        return None if self.evaluation is None else self.evaluation.scenario

    @property
    def problems(self) -> tuple[Problem, ...]:
        return () if self.evaluation is None else self.evaluation.problems

    def problem_lines(self) -> list[str]:
        return [] if self.evaluation is None else list(self.evaluation.problem_lines)

    @property
    def dirty(self) -> bool:
        return self.data != self.saved_data

    def update_title(self) -> None:
        sub = ("built-in demo (invented, no file)" if self.path is None else str(self.path)) + (" * unsaved" if self.dirty else "")
        if self.sub_title != sub:
            self.sub_title = sub

    def field(self, key: str) -> FieldState:
        """The field for a dotted key path (for tests and the problem list)."""
        return self.form.fields[key]

    async def reveal(self, key: str) -> FieldState:
        """Select the field ``key`` in the form and scroll it into view."""
        return self.form.select(key)

    def recompute(self) -> None:
        """Evaluate the data (assess it, note every field) and hand the evaluation to the views."""
        if not self.core_ready:
            self.update_title()
            return  # the engine is still loading; it recomputes from the latest data when it is in
        self.generation += 1
        source = self.path.name if self.path else "scenario"
        previous = None if self._fresh else self.evaluation
        with self.batch_update():
            self.evaluation = evaluate(
                self.data, self.form.fields.values(), previous=previous, pinned=self.pinned, source=source, generation=self.generation
            )
            self._fresh = False
            self.update_title()

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
        value is given that value's text), then the scenario is evaluated and
        the views redraw from the new evaluation.  ``undo`` names the edit when
        it is one the user can undo (the state before it is kept); ``texts``
        restores the fields' exact text (undo and redo).
        """
        if undo is not None:
            self.history.record(self._snapshot())
            self._typing = None
        self.data = data
        self.form.bring_to(data, select_key=select_key, texts=texts)
        self._texts = self.form.texts()
        self.recompute()

    def _snapshot(self) -> Snapshot:
        row = self.form.current
        return Snapshot(copy.deepcopy(self.data), dict(self._texts), row.key if row is not None else "")

    def _typed(self, st: FieldState) -> None:
        """A field's text changed (called by the form on each keystroke or paste)."""
        if self.form.fields.get(st.key) is not st:
            return  # a field of rows since rebuilt (cannot happen: the form calls this at once); keep the data
        if shows(st.spec.kind, st.text, get_path(self.data, st.path)):
            # the text holds the value already ("0.70" for 0.7): keep the data as it is spelled in the file
            self._texts[st.key] = st.text
            self.query_one(FormPane).show_detail()
            return
        data = copy.deepcopy(self.data)
        set_path(data, st.path, value_of(st.spec.kind, st.text))
        run = (st.key, self.form.moves)
        self.update(data, undo=None if self._typing == run else f"type {st.key}")
        self._typing = run
        if st.path[-1] in ("target", "enzyme", "name") and len(st.path) > 2:
            self.form.set_item_title(st.path[:-1], self.data)

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
        # the other fields keep their exact text ("0.5 to 2" stays, not rewritten as "0.5, 2")
        select = key_of((*list_path, len(entries) - 1)) + "."
        self.update(data, undo=f"add to {key_of(list_path)}", select_key=select, texts=dict(self._texts))

    def remove_entry(self, item_path: tuple[str | int, ...]) -> None:
        data = copy.deepcopy(self.data)
        entries = get_path(data, item_path[:-1], None)
        index = int(item_path[-1])
        if not (isinstance(entries, list) and 0 <= index < len(entries)):
            return
        del entries[index]
        texts = texts_after_removal(self._texts, key_of(item_path[:-1]), index)  # the others keep their exact text
        self.update(data, undo=f"remove {key_of(item_path)}", select_key=key_of(item_path[:-1]), texts=texts)
        self.notify(f"Removed {key_of(item_path)} (Ctrl+Z brings it back).")

    def action_undo(self) -> None:
        self._step_history(back=True)

    def action_redo(self) -> None:
        self._step_history(back=False)

    def _step_history(self, *, back: bool) -> None:
        snap = self.history.step(back, self._snapshot())
        if snap is None:
            self.notify(f"Nothing to {'undo' if back else 'redo'}.", severity="warning")
            return
        self.update(copy.deepcopy(snap.data), texts=snap.texts, select_key=snap.selected or None)

    def _list_path(self, items_only: bool) -> tuple[str | int, ...] | None:
        """The list (or, with ``items_only``, the entry) the form's selection is in."""
        row = self.form.current
        if row is None:
            return None
        if row.kind == "add":
            return None if items_only else row.path
        ints = [i for i, p in enumerate(row.path) if isinstance(p, int)]
        if not ints:
            return None
        return row.path[: ints[-1] + 1] if items_only else row.path[: ints[-1]]

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

    def on_fit_pane_ki_chosen(self, event: FitPane.KiChosen) -> None:
        """Write the fitted Ki into the chosen target of the scenario (an unsaved edit, as any other)."""
        from .fitting_view import ki_entry, with_fitted_ki

        try:
            fitted = ki_entry(event.fit, self.data, event.target, event.source)
        except ValueError as exc:
            event.pane.status(f"error: {exc}")
            return
        data, index = with_fitted_ki(self.data, fitted)
        self.update(data, undo="use the fitted Ki", select_key=f"perpetrator.inhibits[{index}].ki", texts=dict(self._texts))
        text = f"{fitted.entry['ki']} ({fitted.entry['mechanism']}) written into target {fitted.target}; Ctrl+S saves it."
        if fitted.caution:
            text += f" Caution: {fitted.caution}"
        event.pane.status(text)
        self.notify(text, severity="warning" if fitted.caution else "information", timeout=8)

    def on_fit_pane_fitted(self, event: FitPane.Fitted) -> None:
        self.fit_plot = event.plot

    # ------------------------------------------------------------------ views
    def action_help(self) -> None:
        from .screens import HelpScreen

        self.push_screen(HelpScreen(list(self.KEY_HELP)))

    def action_cautions(self) -> None:
        from .screens import CautionsScreen

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
        elif self.assessment is None or self.evaluation is None:
            self.notify("Nothing to pin yet: no valid result.", severity="warning")
            return
        else:
            self.pinned = (self.assessment, copy.deepcopy(self.evaluation.valid_data))
            self.notify("Pinned: later edits show as differences from this result (F3 unpins).")
        self.update(self.data)

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
        from .screens import AskPath

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
        from .screens import ConfirmDiscard

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
        from .screens import AskPath

        def chosen(result: object) -> None:
            if isinstance(result, str):
                self.run_worker(self.open_file(Path(result)), exclusive=True, group="open")

        self.push_screen(AskPath("Open a scenario file", str(self.path.parent) + "/" if self.path else ""), chosen)

    async def open_file(self, path: Path) -> bool:
        """Load ``path`` into the form; a file that cannot be read or is not TOML changes nothing.

        A scenario with problems opens too, with each problem under its field,
        so it can be fixed here (it cannot be saved until it loads).
        """
        from .screens import LoadProblems

        try:
            text = read_text(path)
            data, spelling = form_data(parse(text, path))
        except InteractError as exc:
            self.push_screen(LoadProblems(str(path), str(exc)))
            return False
        self.path, self.source_text, self.spelling = path, text, spelling
        self.saved_data = copy.deepcopy(data)
        self.pinned = None
        self._fresh = True  # the last file's result is not this file's
        self.history.clear()
        self.form.selected = 0
        self.update(data, select_key="")
        if self.valid or not self.core_ready:
            self.notify(f"Opened {path}")
        else:
            n = len(self.problem_lines())
            text = f"Opened {path} with {n} problem{'s' if n != 1 else ''}: each is shown under its field."
            self.notify(text, severity="warning", timeout=8)
        self.form.focus()
        return True
