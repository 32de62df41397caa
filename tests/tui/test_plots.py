"""The plot curves against the core: each point must equal assess() on the scenario it stands for.

The demo scenario (invented) is only the input; the reference is interact.assess itself.
"""

from __future__ import annotations

import dataclasses

import pytest

from interact import assess, load_scenario
from interact.report.numbers import fmt
from interact.scenario import demo_path
from interact.tui import plots


def test_fm_curve_points_equal_assess_with_that_fm() -> None:
    s = load_scenario(demo_path())
    a = assess(s)
    chart = plots.fm_curve(a)
    assert chart is not None
    assert chart.point == (s.victim.pathways[0].fm, a.prediction.total)
    for k in (0, 25, 50, 75, len(chart.curve.x) - 1):
        fm = chart.curve.x[k]
        pw = (dataclasses.replace(s.victim.pathways[0], fm=fm), *s.victim.pathways[1:])
        expected = assess(dataclasses.replace(s, victim=dataclasses.replace(s.victim, pathways=pw))).prediction.total
        assert chart.curve.y[k] == pytest.approx(expected, rel=1e-9)


def test_dose_curve_points_equal_assess_with_scaled_exposure() -> None:
    s = load_scenario(demo_path())
    a = assess(s)
    chart = plots.dose_curve(a)
    assert chart is not None
    p = s.perpetrator
    for k in (0, 40, 60, 100, len(chart.curve.x) - 1):
        scale = chart.curve.x[k] / float(p.dose.magnitude)
        # concentrations proportional to dose: parent dose and Cmax, and the metabolite's Cmax
        mets = tuple(dataclasses.replace(m, cmax=m.cmax * scale) for m in p.metabolites)
        scaled = dataclasses.replace(p, dose=p.dose * scale, cmax=p.cmax * scale, metabolites=mets)
        expected = assess(dataclasses.replace(s, perpetrator=scaled)).prediction.total
        assert chart.curve.y[k] == pytest.approx(expected, rel=1e-9)
    # the no-effect boundary is drawn, and the dose ceiling where the curve crosses it
    assert (a.dose.boundary[1], f"no-effect boundary {a.dose.boundary[1]:g}") in chart.hlines
    lim = a.perpetrator_limit
    assert lim.dose is not None and chart.vlines[0][0] == lim.dose


def test_drawing_names_every_mark_in_words() -> None:
    a = assess(load_scenario(demo_path()))
    chart = plots.dose_curve(a)
    assert chart is not None
    lines = plots.draw(chart, 70, 16)
    assert len(lines) <= 16 and all(len(line) <= 70 for line in lines)
    assert any("◆" in line for line in lines) and any("╌" in line for line in lines)
    legend = plots.legend(chart)
    assert "◆ now" in legend and "no-effect boundary" in legend and "highest dose within the boundary" in legend


def test_fm_plot_keeps_the_ceiling_on_scale_and_labels_the_axis_to_the_end() -> None:
    a = assess(load_scenario(demo_path()))
    chart = plots.fm_curve(a)
    assert chart is not None and chart.extra
    lines = plots.draw(chart, 70, 18)
    assert all(len(line) <= 70 for line in lines)
    ticks = [float(line.split("┤")[0]) for line in lines if "┤" in line]
    top_curve, top_ceiling = max(chart.curve.y), max(chart.extra[0].y)
    # the y axis reaches up to the ceiling, or to 3x the curve's top when the ceiling runs higher
    assert max(ticks) >= 0.8 * min(top_ceiling, 3.0 * top_curve) > top_curve
    assert lines[-2].split()[-1] == fmt(max(chart.curve.x))  # the x axis is labelled to the data's end
