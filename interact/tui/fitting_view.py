"""The fitting view: read an incubation CSV, fit every inhibition model in a worker, read the
comparison and the verdict, and carry the fitted Ki into a target of the scenario.

The fitting, its wording and the diagnostic plot are the core's and the report
module's (:func:`interact.kinetics.fit_inhibition`, :func:`interact.report.fit.fit_sections`,
:func:`interact.report.fit_plots.render_terminal`); this module only asks for
the file and shows the result.
"""

from __future__ import annotations

import copy
import time
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from textual import on, work
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.timer import Timer
from textual.widgets import Button, Input, Label, ProgressBar, Static
from textual.worker import get_current_worker

from ..errors import InteractError
from ..report.numbers import fmt
from .doc import Doc
from .document_view import DocumentView
from .form import get_path, set_path
from .text_box import TextBox

if TYPE_CHECKING:  # the fitting code loads only when a fit is run
    from ..kinetics.fitting import ModelComparison

__all__ = ["FitPane", "FittedKi", "ki_entry", "with_fitted_ki"]

STEPS = ("reading the file", "fitting the models (with profile intervals)", "drawing the double-reciprocal diagnostic")


class FitPane(Vertical):
    """File name, units, target; Fit and Use buttons; progress; the comparison.

    The fit runs in a worker thread; the pane reports upward with messages:
    :class:`Fitted` (the diagnostic plot, for the plots view) and :class:`KiChosen`
    (the app writes the Ki into the scenario through its one update path).
    """

    class Fitted(Message):
        """A fit finished: its double-reciprocal diagnostic as text."""

        def __init__(self, plot: str) -> None:
            super().__init__()
            self.plot = plot

    class KiChosen(Message):
        """ "Use the fitted Ki" was pressed: the fit, the target text and the data file it came from."""

        def __init__(self, pane: FitPane, fit: ModelComparison, target: str, source: str) -> None:
            super().__init__()
            self.pane = pane
            self.fit = fit
            self.target = target
            self.source = source

    def __init__(self, *, id: str, target: str = "") -> None:
        super().__init__(id=id)
        self._target = target
        #: the last fit and the file it read
        self.fit: ModelComparison | None = None
        self.source = ""
        self._started = 0.0
        self._step = ""
        self._timer: Timer | None = None

    def compose(self) -> ComposeResult:
        yield Static(
            "Incubation CSV with columns substrate, inhibitor, velocity (units in the header, e.g. 'substrate (uM)', "
            "or below). Enter runs the fits; Tab moves on.",
            classes="fit-help",
            markup=False,
        )
        with Horizontal(classes="fit-row"):
            yield Label("CSV file", classes="fit-label")
            yield TextBox(placeholder="path/to/incubation.csv", id="fit-path")
        with Horizontal(classes="fit-row"):
            yield Label("Units (if no header)", classes="fit-label")
            yield TextBox(placeholder="substrate and inhibitor unit, e.g. uM", id="fit-unit")
        with Horizontal(classes="fit-row"):
            yield Label("Ki goes to target", classes="fit-label")
            yield TextBox(self._target, placeholder="e.g. CYP3A", id="fit-target")
        with Horizontal(classes="fit-row"):
            yield Button("Fit", id="fit-run", compact=True)
            yield Button("Use the fitted Ki", id="fit-accept", compact=True, disabled=True)
        yield ProgressBar(total=len(STEPS), show_eta=False, id="fit-progress")
        yield Static("No fit yet.", id="fit-status", markup=False)
        yield DocumentView(id="fit-body")

    def status(self, text: str) -> None:
        self.query_one("#fit-status", Static).update(text)

    @on(Button.Pressed, "#fit-run")
    @on(Input.Submitted, "#fit-path, #fit-unit")
    def _fit_requested(self) -> None:
        path = self.query_one("#fit-path", Input).value.strip()
        if not path:
            self.status("error: give the CSV file name first")
            return
        unit = self.query_one("#fit-unit", Input).value.strip() or None
        self.query_one("#fit-accept", Button).disabled = True
        self.query_one("#fit-progress", ProgressBar).update(progress=0)
        self._started = time.monotonic()
        self._step = STEPS[0]
        self._timer = self.set_interval(0.2, lambda: self.status(f"{self._step} ... {time.monotonic() - self._started:.1f} s"))
        self.run_fit(path, unit)

    def _progress(self, step: int) -> None:
        self._step = STEPS[step] if step < len(STEPS) else "done"
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
            self.app.call_from_thread(self._progress, 1)
            comp = fit_inhibition(data, warn=False)
            if worker.is_cancelled:
                return
            self.app.call_from_thread(self._progress, 2)
            plot = render_terminal(double_reciprocal_data(comp), width=72, height=18)
        except InteractError as exc:
            self.app.call_from_thread(self._failed, str(exc))
            return
        self.app.call_from_thread(self._done, comp, plot, path)

    def _stop_timer(self) -> None:
        if self._timer is not None:
            self._timer.stop()

    def _failed(self, message: str) -> None:
        self._stop_timer()
        self.query_one("#fit-progress", ProgressBar).update(progress=0)
        self.status(f"error: {message}")

    def _done(self, comp: ModelComparison, plot: str, path: str) -> None:
        from ..report.fit import fit_sections
        from .results import STYLE, sections_doc

        self._stop_timer()
        self._progress(len(STEPS))
        self.fit, self.source = comp, path
        ki = comp.ki
        found = f"{ki.name} = {fmt(ki.value)} {ki.unit}" if ki is not None else "no inhibition constant"
        self.status(f"fitted in {time.monotonic() - self._started:.1f} s: {comp.verdict.model} model, {found}")
        doc = Doc().para((comp.verdict.text, STYLE["result"])).blank()
        doc.pre(plot).blank()
        self.query_one("#fit-body", DocumentView).show(doc.extend(sections_doc(fit_sections(comp))))
        self.query_one("#fit-accept", Button).disabled = ki is None
        self.post_message(self.Fitted(plot))

    @on(Button.Pressed, "#fit-accept")
    def accept(self) -> None:
        """Ask the app to write the fitted Ki into the chosen target (an unsaved edit, as any other)."""
        if self.fit is not None:
            self.post_message(self.KiChosen(self, self.fit, self.query_one("#fit-target", Input).value, self.source))


@dataclass(frozen=True, slots=True, kw_only=True)
class FittedKi:
    """What accepting a fit writes into the scenario, and the caution that goes with it."""

    target: str
    index: int | None
    entry: dict[str, Any]
    caution: str


def ki_entry(comp: ModelComparison, data: dict[str, Any], target_text: str, source: str) -> FittedKi:
    """The inhibition entry for ``target_text`` with the fitted constant (Ki, or Kic and alpha for mixed).

    An IC50 route of that entry is replaced by the fitted Ki; the values it held
    are kept in the entry's ``origin`` text, so nothing the user entered is lost.

    Raises
    ------
    ValueError
        The verdict is "no inhibition", or the target is unknown.
    """
    from ..tables import resolve_target

    ki = comp.ki
    mechanism = comp.verdict.mechanism
    if ki is None or mechanism is None:
        raise ValueError("the data support no inhibition: there is no Ki to carry forward")
    t = resolve_target(target_text.strip())
    if t is None:
        raise ValueError(f'"{target_text}" is not a known enzyme or transporter')
    entries = get_path(data, ("perpetrator", "inhibits"), [])
    entries = entries if isinstance(entries, list) else []
    index = None
    for i, e in enumerate(entries):
        if isinstance(e, dict) and isinstance(e.get("target"), str):
            rt = resolve_target(e["target"])
            if rt is not None and rt.name == t.name:
                index = i
                break
    entry: dict[str, Any] = dict(entries[index]) if index is not None else {"target": t.name}
    replaced = [f"{k} = {entry.pop(k)}" for k in ("ic50", "substrate_conc", "km", "ki", "alpha", "ki_ci", "km_ci") if k in entry]
    unit = ki.unit or "uM"
    entry["ki"] = f"{ki.value:.6g} {unit}"
    ci = ki.interval()
    if ci is not None:  # carried like `fit --into` does: the uncertainty command uses it
        entry["ki_ci"] = [f"{ci[0]:.6g} {unit}", f"{ci[1]:.6g} {unit}"]
    entry["mechanism"] = mechanism
    if comp.alpha is not None:
        entry["alpha"] = float(f"{comp.alpha:.6g}")
    interval = ""
    if ki.profile_low is not None and ki.profile_high is not None:
        interval = f", {comp.level:.0%} profile interval {fmt(ki.profile_low)}-{fmt(ki.profile_high)} {unit}"
    origin = f"fitted: {comp.verdict.model} model, {source}{interval}"
    if replaced:
        origin += f"; replaced {', '.join(replaced)}"
    entry["origin"] = origin
    caution = ""
    if not ki.identifiable or ki.at_bound:
        caution = f"{ki.name} is poorly determined by these data ({ki.note or 'at a bound or not identifiable'}); check it first."
    return FittedKi(target=t.name, index=index, entry=entry, caution=caution)


def with_fitted_ki(data: dict[str, Any], fitted: FittedKi) -> tuple[dict[str, Any], int]:
    """A copy of ``data`` with the fitted entry in place (or appended), and the entry's index."""
    data = copy.deepcopy(data)
    entries = get_path(data, ("perpetrator", "inhibits"), None)
    if not isinstance(entries, list):
        entries = []
        set_path(data, ("perpetrator", "inhibits"), entries)
    if fitted.index is None:
        entries.append(fitted.entry)
        return data, len(entries) - 1
    entries[fitted.index] = fitted.entry
    return data, fitted.index
