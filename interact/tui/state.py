"""The app's state without Textual: the scenario file's data, its evaluation, and the undo history.

:class:`Evaluation` is what every view shows; the app holds the current one as
reactive state (``InteractApp.evaluation``) and the views watch it.
:func:`evaluate` builds one from the data: it runs
:func:`interact.scenario.scenario_from_dict` and :func:`interact.assess` (a
few ms) and the notes under the fields (:func:`interact.tui.notes.field_note`).
The engine is imported lazily, so the first screen does not wait for it.
"""

from __future__ import annotations

import copy
import sys
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any, Final

if TYPE_CHECKING:  # the engine loads after the first screen is painted (see InteractApp.on_mount)
    from ..assessment import Assessment
    from ..errors import Problem
    from ..scenario import Scenario
    from .form_view import FieldState

__all__ = [
    "DEMO_PATH",
    "FORM_NAMES",
    "Evaluation",
    "History",
    "Snapshot",
    "evaluate",
    "file_data",
    "form_data",
    "read_scenario_data",
    "texts_after_removal",
]

#: the built-in invented demo (the same file as interact.scenario.demo_path(), found without loading pint)
DEMO_PATH = Path(__file__).resolve().parents[1] / "demo.toml"

#: how many edits Ctrl+Z can take back
UNDO_DEPTH = 500

#: the engine modules; the app shows its first screen before they are imported
_CORE = ("interact.assessment", "interact.tui.notes", "interact.tui.results", "interact.tui.plots")

#: the ICH M12 table names a scenario file may use, and the form's names for them (interact.scenario.SPELLINGS,
#: inverted; kept here so that the first screen does not wait for the engine's import; a test keeps them equal)
FORM_NAMES: Final = {"precipitant": "perpetrator", "object": "victim"}


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


def read_text(path: str | Path) -> str:
    """The file's text through the shared reader (a byte-order mark is dropped there)."""
    from ..files import read_text as read

    return read(Path(path), "scenario")


def parse(text: str, path: str | Path) -> dict[str, Any]:
    from ..files import loads_toml

    return loads_toml(text, str(path))


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
    return form_data(parse(read_text(path), path))[0]


@dataclass(frozen=True, slots=True)
class Snapshot:
    """A state Ctrl+Z / Ctrl+Y returns to: the data, every field's exact text and the selected field."""

    data: dict[str, Any]
    texts: dict[str, str]
    selected: str


@dataclass(slots=True)
class History:
    """Earlier states for Ctrl+Z and later ones for Ctrl+Y."""

    undo: list[Snapshot] = field(default_factory=list)
    redo: list[Snapshot] = field(default_factory=list)

    def record(self, before: Snapshot) -> None:
        """A new edit: ``before`` can be returned to, and what was undone cannot be redone any more."""
        self.undo.append(before)
        del self.undo[:-UNDO_DEPTH]
        self.redo.clear()

    def step(self, back: bool, now: Snapshot) -> Snapshot | None:
        """Undo (``back``) or redo: the state to return to, with ``now`` kept for the opposite step."""
        source, other = (self.undo, self.redo) if back else (self.redo, self.undo)
        if not source:
            return None
        other.append(now)
        return source.pop()

    def clear(self) -> None:
        self.undo.clear()
        self.redo.clear()


@dataclass(frozen=True, slots=True, kw_only=True, eq=False)
class Evaluation:
    """The scenario's data and what the engine made of it: what every view shows.

    Compared by identity (``eq=False``): each evaluation is a new object, so the
    app's reactive calls the views' watchers for every one.
    """

    data: dict[str, Any]
    #: whether ``data`` is a valid scenario (otherwise the last valid result is shown as NOT UPDATED)
    valid: bool = False
    #: the last valid result, its scenario and its data
    assessment: Assessment | None = None
    scenario: Scenario | None = None
    valid_data: dict[str, Any] = field(default_factory=dict)
    problems: tuple[Problem, ...] = ()
    #: problems that name no field (an unreadable rule set)
    general: tuple[str, ...] = ()
    #: the line under each field, by key path: (text, is_error)
    notes: dict[str, tuple[str, bool]] = field(default_factory=dict)
    #: problems of lists and entries (the fm sum, both Ki and IC50 ...), by key path
    list_problems: dict[str, str] = field(default_factory=dict)
    #: every problem as a line (the banner over a stale answer)
    problem_lines: tuple[str, ...] = ()
    #: the result pinned with F3 and its data (later results show as differences from it)
    pinned: tuple[Assessment, dict[str, Any]] | None = None
    #: counts evaluations (tests and the benchmark tell one keystroke's redraw from the next)
    generation: int = 0


def texts_after_removal(texts: dict[str, str], list_key: str, index: int) -> dict[str, str]:
    """Fields' texts by key path after entry ``index`` of the list ``list_key`` is removed (later entries move up)."""
    head = list_key + "["
    out: dict[str, str] = {}
    for key, text in texts.items():
        if key.startswith(head) and "]" in key[len(head) :]:
            number, rest = key[len(head) :].split("]", 1)
            if number.isdigit() and int(number) >= index:
                if int(number) > index:
                    out[f"{head}{int(number) - 1}]{rest}"] = text
                continue
        out[key] = text
    return out


def _indexed_problems(by_key: dict[str, list[str]], key: str) -> list[str]:
    """Problems of list elements (``victim.strengths[1]``) for the field holding the list."""
    return [m for k, msgs in by_key.items() if k.startswith(key + "[") for m in msgs]


def _assess(data: dict[str, Any], source: str) -> tuple[Any, Any, tuple[Problem, ...], tuple[str, ...]]:
    """(scenario, assessment, (), ()) or (None, None, problems, general problems)."""
    from ..assessment import assess
    from ..errors import InteractError, ScenarioError
    from ..scenario import scenario_from_dict

    try:
        scenario = scenario_from_dict(data, source=source)
        return scenario, assess(scenario, warn=False), (), ()
    except ScenarioError as exc:
        return None, None, exc.problems, ()
    except InteractError as exc:
        return None, None, (), (str(exc),)


def _notes(
    fields: Iterable[FieldState], data: dict[str, Any], current: Assessment | None, problems: tuple[Problem, ...]
) -> tuple[dict[str, tuple[str, bool]], dict[str, str], tuple[str, ...]]:
    """The note under each field, the problems of lists and entries, and every problem as a line."""
    from .notes import field_note

    by_key: dict[str, list[str]] = {}
    for p in problems:
        by_key.setdefault(p.field, []).append(p.message)
    notes: dict[str, tuple[str, bool]] = {}
    lines = [str(p) for p in problems]
    for st in fields:
        text, error = field_note(st.spec, st.path, st.key, st.text, data, current)
        own = by_key.get(st.key) or _indexed_problems(by_key, st.key)
        if not error and own:
            text, error = "; ".join(own), True
        elif error and not own:  # a problem of the field's own text that the engine did not report
            lines.append(f"{st.key}: {text}")
        notes[st.key] = (text, error)
    return notes, {k: "; ".join(v) for k, v in by_key.items()}, tuple(lines)


def evaluate(
    data: dict[str, Any],
    fields: Iterable[FieldState],
    *,
    previous: Evaluation | None,
    pinned: tuple[Assessment, dict[str, Any]] | None,
    source: str,
    generation: int,
) -> Evaluation:
    """Assess ``data`` (or keep ``previous``'s result when its data are the same) and note every field.

    ``fields`` are the form's fields for ``data`` (their text is what the notes
    read); ``previous`` gives the last valid result, kept on screen when ``data``
    is invalid (None after opening a file).
    """
    problems: tuple[Problem, ...]
    general: tuple[str, ...]
    if previous is not None and previous.valid and data == previous.valid_data:
        scenario, result, problems, general = previous.scenario, previous.assessment, (), ()
    else:
        scenario, result, problems, general = _assess(data, source)
    valid = result is not None
    if not valid and previous is not None:
        scenario, result = previous.scenario, previous.assessment
    notes, list_problems, lines = _notes(fields, data, result if valid else None, problems)
    return Evaluation(
        data=data,
        valid=valid,
        assessment=result,
        scenario=scenario,
        valid_data=copy.deepcopy(data) if valid else (previous.valid_data if previous is not None else {}),
        problems=problems,
        general=general,
        notes=notes,
        list_problems=list_problems,
        problem_lines=(*lines[: len(problems)], *general, *lines[len(problems) :]),
        pinned=pinned,
        generation=generation,
    )
