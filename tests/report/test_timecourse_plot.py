"""Readable time-course plot: round ticks, legends clear of the data, a reference line at 1, readable units.

The chart is drawn by matplotlib (interact.report.figures.timecourse_figure) for every format, SVG included.
The scenario is the invented example interact/examples/tdi_inducer.toml; ticks in weeks for days are common practice
for a time axis of several weeks.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg

from interact import assess, load_scenario
from interact.dynamic import simulate
from interact.report.figures import figure_bytes, timecourse_figure

# Scenarios here trigger model warnings (a pathway without a constant, kdeg from memory ...) as a side effect of
# what they test; the warnings themselves are checked in tests/api/test_warnings.py.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

EXAMPLE = Path(__file__).resolve().parents[2] / "interact" / "examples" / "tdi_inducer.toml"


def test_plot_legends_sit_above_the_panels_and_a_line_marks_1() -> None:
    a = assess(load_scenario(EXAMPLE))
    fig = timecourse_figure(simulate(a, days=30), title=a.scenario.title, terms=a.rules.terms)
    canvas = FigureCanvasAgg(fig)  # lays the figure out as a file would be drawn
    canvas.draw()
    renderer = canvas.get_renderer()
    top, bottom = fig.axes
    legend_texts = []
    for ax in (top, bottom):
        legend = ax.get_legend()
        assert legend is not None
        # each legend lies above the panel it labels, never inside it
        assert legend.get_window_extent(renderer).y0 >= ax.get_window_extent(renderer).y1 - 1e-6
        legend_texts += [t.get_text() for t in legend.get_texts()]
    assert sum("enzyme" in t or t.startswith(("with ", "without ")) for t in legend_texts) >= 3
    # day ticks in weeks
    assert {0.0, 7.0, 14.0, 21.0, 28.0} <= {float(t) for t in bottom.get_xticks()}
    # the dotted reference line at a ratio of 1
    assert any(line.get_linestyle() == ":" and set(line.get_ydata()) == {1.0} for line in bottom.get_lines())  # type: ignore[arg-type]
    # the ICH M12 words, everywhere the figure speaks
    words = " ".join([*legend_texts, fig.get_suptitle(), top.get_ylabel(), bottom.get_xlabel()])
    assert "precipitant" in words and "perpetrator" not in words
    # concentrations in a unit read as 1 to 1000
    assert re.search(r"\((?:[µunm]g|g)/L\)", top.get_ylabel())
    assert 1.0 <= top.get_ylim()[1] <= 1000.0
    svg = figure_bytes(fig, "svg").decode("utf-8")
    assert "not clinical advice" in svg and "<svg" in svg
