"""The terminal app with an object drug cleared by transporters: the form's route fields and the answer's organ ratios,
compared with :func:`interact.assess` on the same scenario (the invented example serves only as an input)."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import pytest
from pilot_helpers import asynctest, replace_text, text_of

from interact import assess, load_scenario
from interact.report.numbers import fmt_ratio
from interact.scenario import demo_path
from interact.tui.app import InteractApp

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

SIZE = (120, 40)
EXAMPLE = demo_path().with_name("examples") / "transporter_victim.toml"


@asynctest
async def test_transporter_routes_in_the_form_give_the_cores_ratios(tmp_path: Path) -> None:
    path = tmp_path / "statin.toml"
    path.write_text(EXAMPLE.read_text(encoding="utf-8"), encoding="utf-8")
    s = load_scenario(path)
    app = InteractApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert await app.open_file(path)
        await pilot.pause()
        assert app.valid and app.assessment is not None
        expected = assess(s).prediction
        assert app.assessment.prediction.total == expected.total
        assert app.field("victim.pathways[0].transporter").text == "BCRP"
        assert app.field("victim.pathways[0].route").text == "intestinal efflux"
        assert app.field("victim.renal_fraction").text == "0.25"
        answer = text_of(app, "#answer-body")
        assert fmt_ratio(expected.total) in answer and "kidney" in answer
        # edit a transporter fraction through the form
        await replace_text(pilot, app, "victim.pathways[0].fraction", "0.3")
        pw = (dataclasses.replace(s.victim.pathways[0], fm=0.3), *s.victim.pathways[1:])
        edited = dataclasses.replace(s, victim=dataclasses.replace(s.victim, pathways=pw))
        assert app.valid and app.assessment is not None
        assert app.assessment.prediction.total == pytest.approx(assess(edited).prediction.total, rel=1e-12)
        # a fraction out of range is shown under its field, naming it
        await replace_text(pilot, app, "victim.pathways[0].fraction", "1.4")
        assert not app.valid
        assert "1.4" in app.field("victim.pathways[0].fraction").note_text
        await replace_text(pilot, app, "victim.pathways[0].fraction", "0.3")
        assert app.valid
        # save writes the edited fraction and keeps the file's comments
        await pilot.press("ctrl+s")
        await pilot.pause()
    saved = path.read_text(encoding="utf-8")
    assert "fraction = 0.3" in saved and "# of the oral dose returned to the gut lumen" in saved
    assert load_scenario(path) == dataclasses.replace(edited, folder=load_scenario(path).folder)


def test_plots_with_transporter_routes_follow_the_core() -> None:
    """The dose curve evaluates the same model with the routes: at a scale s it equals assess() with the precipitant's
    dose and Cmax times s; the liver-only fm curve is not drawn for a victim with transporter routes."""
    from interact.scenario import scenario_from_dict, scenario_to_dict
    from interact.tui import plots

    s = load_scenario(EXAMPLE)
    a = assess(s)
    chart = plots.dose_curve(a)
    assert chart is not None and plots.fm_curve(a) is None
    k = len(chart.curve.x) // 3
    scale = chart.curve.x[k] / float(s.perpetrator.dose.magnitude)
    data = scenario_to_dict(s)
    data["perpetrator"]["dose"] = f"{300 * scale!r} mg"
    data["perpetrator"]["cmax"] = f"{2.4 * scale!r} ug/mL"
    assert chart.curve.y[k] == pytest.approx(assess(scenario_from_dict(data)).prediction.total, rel=1e-9)
