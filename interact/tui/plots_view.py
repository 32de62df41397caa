"""The plots view: the AUC ratio against fm and against the perpetrator's dose, and the last fit's diagnostic.

It watches the app's evaluation and the last fit's plot (bound to
``InteractApp.evaluation`` and ``InteractApp.fit_plot``).  The curves are the
core's (:mod:`interact.tui.plots`); they are computed only while the view is
shown, so typing with the answer on screen does not pay for them.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.reactive import var
from textual.widget import Widget
from textual.widgets import Static

if TYPE_CHECKING:
    from . import plots
    from .state import Evaluation

__all__ = ["PlotView", "PlotsPane"]


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


class PlotsPane(VerticalScroll):
    """The two model curves of the current evaluation, and the diagnostic plot of the last fit."""

    evaluation: var[Evaluation | None] = var(None, init=False)
    fit_plot: var[str] = var("", init=False)

    def __init__(self, *, id: str) -> None:
        super().__init__(id=id)
        self._drawn: Evaluation | None = None  # the evaluation the charts show

    def compose(self) -> ComposeResult:
        yield PlotView(id="plot-fm")
        yield PlotView(id="plot-dose")
        yield Static("", id="plot-fit", markup=False)

    def watch_evaluation(self) -> None:
        if self.is_on_screen:
            self._draw()

    def watch_fit_plot(self, plot: str) -> None:
        self.query_one("#plot-fit", Static).update(plot)

    def on_show(self) -> None:
        self._draw()

    @property
    def is_on_screen(self) -> bool:
        return self.display and self.size.width > 0 and self.parent is not None and self.parent.display

    def _draw(self) -> None:
        ev = self.evaluation
        if ev is None or ev is self._drawn:
            return
        self._drawn = ev
        fm_view, dose_view = self.query_one("#plot-fm", PlotView), self.query_one("#plot-dose", PlotView)
        if ev.assessment is None:
            for view in (fm_view, dose_view):
                view.show(None, stale=True, empty_text="No valid result yet.")
        elif ev.valid:
            from . import plots

            a = ev.assessment
            fm_view.show(
                plots.fm_curve(a),
                stale=False,
                empty_text="No fm plot: the perpetrator acts on none of the victim's enzyme pathways, or transporter routes are given.",
            )
            dose_view.show(plots.dose_curve(a), stale=False, empty_text="No dose plot: no inhibition constants.")
        else:
            for view in (fm_view, dose_view):
                view.show(view.chart, stale=True, empty_text=view.empty_text)
