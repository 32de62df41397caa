"""The input form as one widget: every field, heading and list action drawn line by line.

A form of some sixty fields built from separate Textual widgets (label, input,
note each) costs hundreds of widgets, and every keystroke then pays for a
layout of all of them.  This widget keeps the fields as plain state and draws
only the visible lines, so editing, adding entries and scrolling never lay out
the screen again.

Keys (when the form has the focus): Up/Down move between fields and actions,
PageUp/PageDown by a screen (F5/Shift+F5, bound by the app, jump to the next or
previous group); typing
edits the selected value (Left/Right, Home/End, Backspace/Delete, Ctrl+U,
Ctrl+K); Right at the end of a value accepts the greyed suggestion; Enter on
"add ..." or "remove ..." does it, on a field moves to the next one.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, ClassVar

from rich.segment import Segment
from rich.style import Style
from textual import events
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.geometry import Size
from textual.message import Message
from textual.reactive import var
from textual.scroll_view import ScrollView
from textual.strip import Strip
from textual.widgets import Static

from .form import SCHEMA, FieldSpec, Heading, ListSpec, Path, choices_for, get_path, key_of, shows, text_of

if TYPE_CHECKING:
    from .state import Evaluation

__all__ = ["FieldState", "FormPane", "FormView", "Row", "entry_keys"]


@dataclass(slots=True)
class FieldState:
    """One field as shown: the user's text, the cursor, and the line under it."""

    spec: FieldSpec
    path: Path
    key: str
    text: str
    cursor: int = 0
    note: str = ""
    error: bool = False

    @property
    def note_text(self) -> str:
        return ("error: " if self.error else "") + self.note

    @property
    def has_error(self) -> bool:
        return self.error

    def suggestion(self) -> str:
        """The rest of the first choice that starts with the text (choice and yes/no fields)."""
        options = choices_for(self.spec.kind)
        t = self.text
        if not options or not t or self.cursor != len(t):
            return ""
        low = t.lower()
        for o in options:
            if o.lower().startswith(low) and o.lower() != low:
                return o[len(t) :]
        return ""


@dataclass(slots=True)
class Row:
    """One line group of the form: a field (two lines), a title, an action or a problem line."""

    kind: str  # "group" | "heading" | "list" | "item" | "field" | "add" | "remove" | "problem" | "blank"
    text: str = ""
    state: FieldState | None = None
    path: Path = ()
    key: str = ""
    problem: str = ""
    depth: int = 0
    line: int = 0
    height: int = 1
    extra: dict[str, Any] = field(default_factory=dict)

    @property
    def selectable(self) -> bool:
        return self.kind in ("field", "add", "remove")


def _item_title(spec: ListSpec, index: int, entry: Any) -> str:
    label = ""
    if isinstance(entry, dict):
        label = str(entry.get("target") or entry.get("enzyme") or entry.get("name") or "")
    return f"{spec.noun.capitalize()} {index + 1}" + (f": {label}" if label else "")


def build_rows(data: dict[str, Any]) -> list[Row]:
    """The form's rows for the scenario data (groups, fields, list entries and their actions)."""
    rows: list[Row] = []

    def items(specs: tuple[Any, ...], base: Path, depth: int) -> None:
        for spec in specs:
            if isinstance(spec, Heading):
                rows.append(Row(kind="heading", text=spec.text, depth=depth))
            elif isinstance(spec, FieldSpec):
                path = (*base, spec.key)
                text = text_of(spec.kind, get_path(data, path))
                rows.append(
                    Row(
                        kind="field",
                        state=FieldState(spec, path, key_of(path), text, cursor=len(text)),
                        path=path,
                        key=key_of(path),
                        depth=depth,
                        height=2,
                    )
                )
            elif isinstance(spec, ListSpec):
                lpath = (*base, spec.key)
                rows.append(Row(kind="list", text=spec.title, path=lpath, key=key_of(lpath), depth=depth))
                entries = get_path(data, lpath, [])
                entries = entries if isinstance(entries, list) else []
                for i, entry in enumerate(entries):
                    ipath = (*lpath, i)
                    rows.append(
                        Row(
                            kind="item",
                            text=_item_title(spec, i, entry),
                            path=ipath,
                            key=key_of(ipath),
                            depth=depth + 1,
                            extra={"spec": spec},
                        )
                    )
                    items(spec.items, ipath, depth + 1)
                    rows.append(Row(kind="remove", text=f"remove {spec.noun} {i + 1}", path=ipath, key=key_of(ipath), depth=depth + 1))
                rows.append(Row(kind="add", text=f"add a {spec.noun}", path=lpath, key=key_of(lpath), depth=depth))

    for title, key, specs in SCHEMA:
        if rows:
            rows.append(Row(kind="blank"))
        rows.append(Row(kind="group", text=title, path=(key,) if key else ()))
        items(specs, (key,) if key else (), 0)
    return rows


def entry_keys(data: dict[str, Any]) -> tuple[str, ...]:
    """The key paths of the list entries in ``data`` (the rows of the form change exactly when these do)."""
    keys: list[str] = []

    def walk(specs: tuple[Any, ...], base: Path) -> None:
        for spec in specs:
            if isinstance(spec, ListSpec):
                lpath = (*base, spec.key)
                entries = get_path(data, lpath, [])
                for i in range(len(entries) if isinstance(entries, list) else 0):
                    keys.append(key_of((*lpath, i)))
                    walk(spec.items, (*lpath, i))

    for _title, key, specs in SCHEMA:
        walk(specs, (key,) if key else ())
    return tuple(keys)


class FormView(ScrollView, can_focus=True):
    """All inputs of the scenario in one scrolling, keyboard-driven form."""

    COMPONENT_CLASSES: ClassVar[set[str]] = {
        "formview--group",
        "formview--heading",
        "formview--label",
        "formview--value",
        "formview--selected",
        "formview--cursor",
        "formview--note",
        "formview--error",
        "formview--action",
        "formview--suggestion",
    }
    DEFAULT_CSS = """
    FormView > .formview--group { text-style: bold; background: $primary 25%; }
    FormView > .formview--heading { text-style: bold underline; }
    FormView > .formview--value { background: $boost; }
    FormView > .formview--selected { background: $accent 35%; }
    FormView > .formview--cursor { text-style: reverse; }
    FormView > .formview--note { color: $text-muted; }
    FormView > .formview--error { color: $text-error; text-style: bold; }
    FormView > .formview--action { color: $text-accent; }
    FormView > .formview--suggestion { color: $text-muted; text-style: italic; }
    """
    #: keys the form handles itself, in on_key, so that fast typing (or pasted text) is applied in order:
    #: Textual runs bindings after the key handler, which would reorder "End, Backspace, 7" typed at once
    KEYS: ClassVar[dict[str, tuple[str, tuple[Any, ...]]]] = {
        "up": ("move", (-1,)),
        "down": ("move", (1,)),
        "pageup": ("page", (-1,)),
        "pagedown": ("page", (1,)),
        "left": ("cursor", (-1,)),
        "right": ("cursor", (1,)),
        "home": ("home", ()),
        "ctrl+a": ("home", ()),
        "end": ("end", ()),
        "ctrl+e": ("end", ()),
        "backspace": ("delete_left", ()),
        "ctrl+h": ("delete_left", ()),
        "delete": ("delete_right", ()),
        "ctrl+d": ("delete_right", ()),
        "ctrl+u": ("delete_to_start", ()),
        "ctrl+k": ("delete_to_end", ()),
        "enter": ("enter", ()),
    }
    LABEL_WIDTH: ClassVar[int] = 19

    class Edited(Message):
        """A field's text changed (posted only when no :attr:`FormView.edited` handler is set)."""

        def __init__(self, state: FieldState) -> None:
            super().__init__()
            self.state = state

    class ActionChosen(Message):
        """Enter on "add ..." or "remove ...": the app changes the data and rebuilds the rows."""

        def __init__(self, kind: str, path: Path) -> None:
            super().__init__()
            self.kind = kind
            self.path = path

    class Selected(Message):
        """The selection moved (the app shows the full note of the field)."""

    def __init__(self, data: dict[str, Any], *, id: str) -> None:
        super().__init__(id=id)
        self.rows: list[Row] = []
        self.fields: dict[str, FieldState] = {}
        #: how many times the selection was set (the app starts a new undo step when typing follows a move)
        self.moves = 0
        self._selected = 0
        self._styles: dict[str, Style] = {}
        #: called with the field on every change of its text, before the next key is handled (the app's update).
        #: A posted message would arrive after keys already queued (Ctrl+R, Ctrl+Z), so a change could be
        #: applied to an entry that had meanwhile been removed, or after an undo it should precede.
        self.edited: Callable[[FieldState], None] | None = None
        self.load(data)

    # ---------------------------------------------------------------- model
    def load(self, data: dict[str, Any], select_key: str | None = None, texts: dict[str, str] | None = None) -> None:
        """Rebuild the rows from the data (after opening a file or adding/removing an entry).

        ``texts`` gives fields their exact earlier text (undo), where it still holds the field's value.
        """
        self.rows = build_rows(data)
        self.fields = {r.key: r.state for r in self.rows if r.state is not None}
        if texts:
            for key, st in self.fields.items():
                old = texts.get(key)
                if old is not None and old != st.text and shows(st.spec.kind, old, get_path(data, st.path)):
                    st.text = old
                    st.cursor = len(old)
        line = 0
        for r in self.rows:
            r.line = line
            line += r.height
        self._lines = line
        self.virtual_size = Size(self.size.width or 40, line)
        target = next((i for i, r in enumerate(self.rows) if select_key and r.key.startswith(select_key) and r.selectable), None)
        if target is None:
            target = min(self.selected, len(self.rows) - 1) if self.rows else 0
            while target < len(self.rows) - 1 and not self.rows[target].selectable:
                target += 1
        self.selected = target
        self._show_selected()
        self.refresh()

    def sync(self, data: dict[str, Any]) -> None:
        """Give every field that does not hold its value in ``data`` the text of that value."""
        for st in self.fields.values():
            value = get_path(data, st.path)
            if not shows(st.spec.kind, st.text, value):
                st.text = text_of(st.spec.kind, value)
                st.cursor = len(st.text)
                self.refresh_field(st)

    def bring_to(self, data: dict[str, Any], select_key: str | None = None, texts: dict[str, str] | None = None) -> None:
        """Show ``data``: rebuilt when entries came or went (or a selection or texts are given), else :meth:`sync`."""
        if texts is not None or select_key is not None or entry_keys(data) != self.entry_keys():
            self.load(data, select_key=select_key, texts=texts)
        else:
            self.sync(data)

    def entry_keys(self) -> tuple[str, ...]:
        """The key paths of the list entries the rows show (see :func:`entry_keys`)."""
        return tuple(r.key for r in self.rows if r.kind == "item")

    def texts(self) -> dict[str, str]:
        """Every field's text, by key path."""
        return {key: st.text for key, st in self.fields.items()}

    @property
    def selected(self) -> int:
        """The index of the selected row."""
        return self._selected

    @selected.setter
    def selected(self, index: int) -> None:
        self._selected = index
        self.moves += 1

    @property
    def current(self) -> Row | None:
        return self.rows[self.selected] if 0 <= self.selected < len(self.rows) else None

    @property
    def current_field(self) -> FieldState | None:
        row = self.current
        return row.state if row is not None else None

    def select(self, key: str) -> FieldState:
        """Select the field with this key path and scroll it into view."""
        for i, r in enumerate(self.rows):
            if r.key == key and r.selectable:
                self.selected = i
                self._show_selected()
                self.refresh()
                self.post_message(self.Selected())
                return self.fields[key] if key in self.fields else r.state  # type: ignore[return-value]
        raise KeyError(key)

    def set_problems(self, problems: dict[str, str]) -> None:
        """List and entry problems (fm sum, both Ki and IC50 ...) shown on their title lines."""
        changed = False
        for r in self.rows:
            if r.kind in ("list", "item"):
                p = problems.get(r.key, "")
                if p != r.problem:
                    r.problem = p
                    changed = True
        if changed:
            self.refresh()

    def set_note(self, state: FieldState, note: str, error: bool) -> None:
        if state.note != note or state.error != error:
            state.note = note
            state.error = error
            self.refresh_field(state)

    def set_item_title(self, path: Path, data: dict[str, Any]) -> None:
        for r in self.rows:
            if r.kind == "item" and r.path == path:
                r.text = _item_title(r.extra["spec"], int(path[-1]), get_path(data, path))
                self.refresh()

    def refresh_field(self, state: FieldState) -> None:
        row = next((r for r in self.rows if r.state is state), None)
        if row is None:
            return
        # ScrollView.refresh_lines takes lines of the whole form (it subtracts the scroll offset itself):
        # passing screen lines repainted the wrong lines once the form was scrolled, so the field kept its old text
        self.refresh_lines(row.line, row.height)

    # ---------------------------------------------------------------- drawing
    def _style(self, name: str) -> Style:
        """A component style (cached: computing styles per line is the costly part of drawing)."""
        cache = self._styles
        if name not in cache:
            cache[name] = self.rich_style if name == "base" else self.get_component_rich_style(f"formview--{name}")
        return cache[name]

    def _restyle(self, *_: object) -> None:
        self._styles.clear()
        self.refresh()

    def on_mount(self) -> None:
        self.watch(self.app, "theme", self._restyle, init=False)

    def render_line(self, y: int) -> Strip:
        width = self.scrollable_content_region.width
        line = y + self.scroll_offset.y
        row, offset = self._row_at(line)
        base = self._style("base")
        if row is None:
            return Strip.blank(width, base)
        selected = row is self.current and self.has_focus
        sel = self._style("selected") if selected else Style()
        indent = "  " * row.depth
        segments: list[Segment] = []
        if row.kind == "field" and row.state is not None:
            st = row.state
            if offset == 0:
                label = f" {indent}{st.spec.label}"
                if len(label) > self.LABEL_WIDTH - 1:  # marked as cut; the strip under the form gives it in full
                    label = label[: self.LABEL_WIDTH - 2] + "…"
                label = label.ljust(self.LABEL_WIDTH)
                err = self._style("error") if st.error else Style()
                segments.append(Segment(label, base + err + sel))
                value_style = base + self._style("value") + sel
                text = st.text if st.text or selected else ""
                if not st.text and not selected:
                    segments.append(Segment(st.spec.hint, base + self._style("suggestion")))
                elif selected:
                    c = min(st.cursor, len(text))
                    segments.append(Segment(text[:c], value_style))
                    cursor_char = text[c] if c < len(text) else " "
                    segments.append(Segment(cursor_char, value_style + self._style("cursor")))
                    rest = text[c + 1 :]
                    if rest:
                        segments.append(Segment(rest, value_style))
                    hint = st.suggestion()
                    if hint:
                        segments.append(Segment(hint, base + self._style("suggestion")))
                else:
                    segments.append(Segment(text, value_style))
            else:
                style = self._style("error" if st.error else "note")
                note = st.note_text
                prefix = f"   {indent}"
                room = width - len(prefix)
                if len(note) > room:
                    note = note[: max(room - 1, 0)] + "…"
                segments.append(Segment(prefix + note, base + style))
        elif row.kind == "group":
            segments.append(Segment(f" {row.text}".ljust(width), base + self._style("group")))
        elif row.kind in ("heading", "list"):
            text = f" {indent}{row.text}"
            segments.append(Segment(text, base + self._style("heading")))
            if row.problem:
                segments.append(Segment(f"  error: {row.problem}", base + self._style("error")))
        elif row.kind == "item":
            segments.append(Segment(f" {indent}{row.text}", base + Style(bold=True)))
            if row.problem:
                segments.append(Segment(f"  error: {row.problem}", base + self._style("error")))
        elif row.kind in ("add", "remove"):
            mark = "+" if row.kind == "add" else "-"
            segments.append(Segment(f" {indent}  [{mark} {row.text}]", base + self._style("action") + sel))
        strip = Strip(segments)
        return strip.crop_extend(self.scroll_offset.x, self.scroll_offset.x + width, base)

    def _row_at(self, line: int) -> tuple[Row | None, int]:
        lo, hi = 0, len(self.rows) - 1
        while lo <= hi:
            mid = (lo + hi) // 2
            r = self.rows[mid]
            if line < r.line:
                hi = mid - 1
            elif line >= r.line + r.height:
                lo = mid + 1
            else:
                return r, line - r.line
        return None, 0

    def on_resize(self) -> None:
        self.virtual_size = Size(self.scrollable_content_region.width, self._lines)

    def on_focus(self) -> None:
        self._restyle()

    def on_blur(self) -> None:
        self._restyle()

    def on_click(self, event: events.Click) -> None:
        row, _ = self._row_at(event.y + self.scroll_offset.y)
        if row is not None and row.selectable:
            self.selected = self.rows.index(row)
            if row.state is not None:
                row.state.cursor = len(row.state.text)
            self.refresh()
            self.post_message(self.Selected())

    def _show_selected(self) -> None:
        row = self.current
        if row is None or not self.size.height:
            return
        top = self.scroll_offset.y
        if row.line < top + 1:
            self.scroll_to(y=max(row.line - 2, 0), animate=False, immediate=True)
        elif row.line + row.height > top + self.size.height:
            self.scroll_to(y=row.line + row.height - self.size.height + 1, animate=False, immediate=True)

    # ---------------------------------------------------------------- keys
    def _moved(self) -> None:
        st = self.current_field
        if st is not None:
            st.cursor = len(st.text)
        self._show_selected()
        self.refresh()
        self.post_message(self.Selected())

    def action_move(self, step: int) -> None:
        i = self.selected + step
        while 0 <= i < len(self.rows) and not self.rows[i].selectable:
            i += step
        if 0 <= i < len(self.rows):
            self.selected = i
            self._moved()

    def action_page(self, step: int) -> None:
        row = self.current
        if row is None:
            return
        goal = row.line + step * max(self.size.height - 2, 1)
        candidates = [i for i, r in enumerate(self.rows) if r.selectable]
        if not candidates:
            return
        self.selected = min(candidates, key=lambda i: abs(self.rows[i].line - goal))
        self._moved()

    def action_group(self, step: int) -> None:
        starts = [i for i, r in enumerate(self.rows) if r.kind in ("group", "list", "item")]  # every entry too
        ahead = [i for i in starts if (i > self.selected if step > 0 else i < self.selected - 1)]
        if not ahead:
            return
        i = ahead[0] if step > 0 else ahead[-1]
        while i < len(self.rows) and not self.rows[i].selectable:
            i += 1
        if i < len(self.rows):
            self.selected = i
            self._moved()

    def _edit(self, text: str, cursor: int) -> None:
        st = self.current_field
        if st is None:
            return
        st.text = text
        st.cursor = max(0, min(cursor, len(text)))
        self.refresh_field(st)
        if self.edited is not None:
            self.edited(st)
        else:
            self.post_message(self.Edited(st))

    def action_cursor(self, step: int) -> None:
        st = self.current_field
        if st is None:
            return
        if step > 0 and st.cursor >= len(st.text):
            hint = st.suggestion()
            if hint:
                self._edit(st.text + hint, len(st.text) + len(hint))
            return
        st.cursor = max(0, min(st.cursor + step, len(st.text)))
        self.refresh_field(st)

    def action_home(self) -> None:
        if (st := self.current_field) is not None:
            st.cursor = 0
            self.refresh_field(st)

    def action_end(self) -> None:
        if (st := self.current_field) is not None:
            st.cursor = len(st.text)
            self.refresh_field(st)

    def action_delete_left(self) -> None:
        st = self.current_field
        if st is not None and st.cursor > 0:
            self._edit(st.text[: st.cursor - 1] + st.text[st.cursor :], st.cursor - 1)

    def action_delete_right(self) -> None:
        st = self.current_field
        if st is not None and st.cursor < len(st.text):
            self._edit(st.text[: st.cursor] + st.text[st.cursor + 1 :], st.cursor)

    def action_delete_to_start(self) -> None:
        st = self.current_field
        if st is not None and st.cursor > 0:
            self._edit(st.text[st.cursor :], 0)

    def action_delete_to_end(self) -> None:
        st = self.current_field
        if st is not None and st.cursor < len(st.text):
            self._edit(st.text[: st.cursor], st.cursor)

    def action_enter(self) -> None:
        row = self.current
        if row is None:
            return
        if row.kind in ("add", "remove"):
            self.post_message(self.ActionChosen(row.kind, row.path))
        else:
            self.action_move(1)

    def on_paste(self, event: events.Paste) -> None:
        """Pasted text goes into the selected value at the cursor, as one edit (its first line only)."""
        st = self.current_field
        if st is None:
            return
        event.stop()
        lines = event.text.splitlines()
        text = "".join(c for c in (lines[0] if lines else "") if c.isprintable())
        room = max(200 - len(st.text), 0)
        text = text[:room]
        if text:
            self._edit(st.text[: st.cursor] + text + st.text[st.cursor :], st.cursor + len(text))

    def on_key(self, event: events.Key) -> None:
        known = self.KEYS.get(event.key)
        if known is not None:
            event.stop()
            event.prevent_default()
            name, args = known
            getattr(self, f"action_{name}")(*args)
            return
        st = self.current_field
        if st is None or not event.is_printable or not event.character:
            return
        event.stop()
        event.prevent_default()
        if len(st.text) < 200:
            self._edit(st.text[: st.cursor] + event.character + st.text[st.cursor :], st.cursor + 1)


class FormPane(Vertical):
    """The form and, under it, the selected field in full (its key path and whole note).

    It watches the app's evaluation (bound to ``InteractApp.evaluation``) and
    puts each field's note and each list's problems under them.
    """

    evaluation: var[Evaluation | None] = var(None, init=False)

    def __init__(self, data: dict[str, Any], *, id: str) -> None:
        super().__init__(id=id)
        self._data = data

    def compose(self) -> ComposeResult:
        yield FormView(self._data, id="form")
        yield Static("", id="detail", markup=False)

    @property
    def form(self) -> FormView:
        return self.query_one("#form", FormView)

    def watch_evaluation(self, evaluation: Evaluation | None) -> None:
        if evaluation is None:
            return
        form = self.form
        notes = evaluation.notes
        for key, st in form.fields.items():
            note = notes.get(key)
            if note is not None:
                form.set_note(st, *note)
        form.set_problems(evaluation.list_problems)
        self.show_detail()

    def on_form_view_selected(self) -> None:
        self.show_detail()

    def show_detail(self) -> None:
        """The selected field in full: its key path and the whole note (the line under it may be cut)."""
        form = self.form
        st = form.current_field
        row = form.current
        if st is not None:
            # the hint is an example ("e.g. Compound A"): beside a value it would read as the value's meaning
            hint = f"empty ({st.spec.hint})" if not st.text.strip() else st.text
            text = f"{st.spec.label} [{st.key}]: {st.note_text or hint}"
        elif row is not None and row.kind in ("add", "remove"):
            text = f"Enter: {row.text}."
        else:
            text = "Up/Down move between fields; type values with units; F1 lists every key."
        detail = self.query_one("#detail", Static)
        if str(detail.content) != text:
            detail.update(text, layout=False)
