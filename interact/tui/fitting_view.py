"""The fitting view: read an incubation CSV, fit every inhibition model in a worker, read the
comparison and the verdict, and carry the fitted Ki into a target of the scenario.

The fitting, its wording and the diagnostic plot are the core's and the report
module's (:func:`interact.kinetics.fit_inhibition`, :func:`interact.report.fit.fit_sections`,
:func:`interact.report.fit_plots.render_terminal`); this module only asks for
the file and shows the result.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import Button, Input, Label, ProgressBar, Static

from ..report.numbers import fmt
from ..tables import resolve_target
from .document_view import DocumentView
from .form import get_path

if TYPE_CHECKING:  # the fitting code loads only when a fit is run
    from ..kinetics.fitting import ModelComparison

__all__ = ["FitPane", "FittedKi", "ki_entry"]

STEPS = ("reading the file", "fitting the models (with profile intervals)", "drawing the double-reciprocal diagnostic")


class FitPane(Vertical):
    """File name, units, target; Fit and Use buttons; progress; the comparison."""

    def compose(self) -> ComposeResult:
        yield Static(
            "Incubation CSV with columns substrate, inhibitor, velocity (units in the header, e.g. 'substrate (uM)', "
            "or below). Enter runs the fits; Tab moves on.",
            classes="fit-help",
            markup=False,
        )
        with Horizontal(classes="fit-row"):
            yield Label("CSV file", classes="fit-label")
            yield Input(placeholder="path/to/incubation.csv", id="fit-path")
        with Horizontal(classes="fit-row"):
            yield Label("Units (if no header)", classes="fit-label")
            yield Input(placeholder="substrate and inhibitor unit, e.g. uM", id="fit-unit")
        with Horizontal(classes="fit-row"):
            yield Label("Ki goes to target", classes="fit-label")
            yield Input(placeholder="e.g. CYP3A", id="fit-target")
        with Horizontal(classes="fit-row"):
            yield Button("Fit", id="fit-run", compact=True)
            yield Button("Use the fitted Ki", id="fit-accept", compact=True, disabled=True)
        yield ProgressBar(total=len(STEPS), show_eta=False, id="fit-progress")
        yield Static("No fit yet.", id="fit-status", markup=False)
        yield DocumentView(id="fit-body")


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
