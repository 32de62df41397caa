"""The app's rooms: one module per view, reactives down, and no long functions.

The reference for the plots is the core (``assess`` of the data the app holds,
drawn by :mod:`interact.tui.plots`); the demo is an invented input.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest
from pilot_helpers import asynctest, replace_text

from interact import assess
from interact.scenario import scenario_from_dict
from interact.tui import plots
from interact.tui.app import InteractApp
from interact.tui.plots_view import PlotView

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

TUI = Path(__file__).resolve().parents[2] / "interact" / "tui"


def test_no_function_of_the_terminal_app_is_100_lines_or_longer() -> None:
    long = []
    for path in sorted(TUI.glob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and node.end_lineno is not None:
                if node.end_lineno - node.lineno + 1 >= 100:
                    long.append(f"{path.name}:{node.lineno} {node.name}")
    assert long == []


@asynctest
async def test_the_plots_follow_edits_made_while_they_were_hidden() -> None:
    app = InteractApp()
    app.animation_level = "none"
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "perpetrator.dose", "300 mg")
        await pilot.press("f4")  # the plots: drawn for the evaluation now, not the one at start
        await pilot.pause()
        expected = assess(scenario_from_dict(app.data), warn=False)
        assert app.query_one("#plot-fm", PlotView).chart == plots.fm_curve(expected)
        assert app.query_one("#plot-dose", PlotView).chart == plots.dose_curve(expected)
        await replace_text(pilot, app, "perpetrator.dose", "100 mg")  # while they show
        expected = assess(scenario_from_dict(app.data), warn=False)
        assert app.query_one("#plot-dose", PlotView).chart == plots.dose_curve(expected)


@asynctest
async def test_a_cheng_prusoff_input_beside_a_ki_says_it_is_not_used() -> None:
    # found by hand in tmux: [S] typed into a target that gives Ki was accepted without a word. Cheng-Prusoff
    # (Ki = IC50 / (1 + [S]/Km), common practice) needs an IC50; the demo's first target gives a Ki
    app = InteractApp()
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await replace_text(pilot, app, "perpetrator.inhibits[0].substrate_conc", "3 uM")
        assert "ic50" not in app.data["perpetrator"]["inhibits"][0]
        assert "not used" in app.field("perpetrator.inhibits[0].substrate_conc").note
        assert "not used" in str(app.query_one("#detail").content)  # type: ignore[attr-defined]
