"""Sensitivity: tornado ranking, AUCR-versus-fm curves, boundary crossings.

The crossing checks use the closed form of the liver-only reversible model
(AUCR = 1 + [I]/Ki,u for fm = 1; Fahmi et al. 2008 net-effect model, liver term),
solved by hand.
"""

from __future__ import annotations

import numpy as np
import pytest
from test_uncertainty_sampling import _iv_dict  # same folder

from interact import assess, load_scenario
from interact.scenario import demo_path, scenario_from_dict
from interact.uncertainty import ScenarioModel, crossing_points, fm_curves, sensitivity, tornado


def test_tornado_ranks_by_effect_and_moves_the_right_way() -> None:
    a = assess(load_scenario(demo_path()))
    model = ScenarioModel(a)
    bars, default = tornado(
        model,
        [("perpetrator.inhibits[0].ki", "ci:2 uM,8 uM"), ("perpetrator.cmax", "cv:20%"), ("victim.pathways[1].fm", "fixed")],
    )
    assert not default
    assert [b.input.path for b in bars] == ["perpetrator.inhibits[0].ki", "perpetrator.cmax"]
    ki = bars[0]
    assert ki.low == pytest.approx(2.0) and ki.high == pytest.approx(8.0)
    assert ki.aucr_low > a.prediction.total > ki.aucr_high  # a lower Ki means a larger interaction
    assert bars[0].effect >= bars[1].effect
    # each bar is the model re-run with only that input changed
    assert ki.aucr_low == float(model.evaluate({"perpetrator.inhibits[0].ki": np.asarray(2.0)}).total)


def test_default_swing_when_nothing_declared() -> None:
    a = assess(load_scenario(demo_path()))
    bars, default = tornado(ScenarioModel(a))
    assert default and bars
    effects = [b.effect for b in bars]
    assert effects == sorted(effects, reverse=True)
    fm = next(b for b in bars if b.input.path == "victim.pathways[0].fm")
    assert fm.high <= 1.0 - 0.08 + 1e-12  # capped so the fm values still add up to at most 1


def test_fm_curves_closed_form() -> None:
    curves = fm_curves(ratios=(1.0, 9.0), points=11)
    # fm = 0.5, [I]/Ki,u = 1: 1/(0.5/2 + 0.5) = 4/3; fm = 1, [I]/Ki,u = 9: 10
    assert curves[0].aucr[5] == pytest.approx(4 / 3, rel=1e-12)
    assert curves[1].aucr[-1] == pytest.approx(10.0, rel=1e-12)
    assert all(c.aucr[0] == 1.0 for c in curves)


def test_ki_crossing_matches_closed_form() -> None:
    # AUCR = 1 + Imax,u/Ki,u; Imax,u = 0.5 uM; reaches 1.25 at Ki,u = 0.5/0.25 = 2 uM; with fu,inc 0.5, Ki = 4 uM
    d = _iv_dict(ki="10 uM")
    d["perpetrator"]["inhibits"][0]["fu_inc"] = 0.5
    a = assess(scenario_from_dict(d))
    cross = crossing_points(ScenarioModel(a))
    ki = next(c for c in cross if c.input.path.endswith(".ki"))
    assert ki.value == pytest.approx(4.0, rel=1e-8)
    assert "stays below 1.25 as long as the Ki" in ki.sentence and "Ki,u 2" in ki.sentence
    # fm crossing: 1/(fm/(1 + 0.5/5) + 1 - fm) = 1.25  ->  fm = 0.2 / (1 - 1/1.1) = 2.2; beyond 1, so none
    fm = next(c for c in cross if c.input.path.endswith(".fm"))
    assert fm.value is None


def test_fm_crossing_matches_closed_form() -> None:
    # Imax,u/Ki,u = 0.5/0.5 = 1: AUCR = 1/(fm/2 + 1 - fm) = 1.25 at fm = 0.4
    a = assess(scenario_from_dict(_iv_dict(ki="0.5 uM")))
    fm = next(c for c in crossing_points(ScenarioModel(a)) if c.input.path.endswith(".fm"))
    assert fm.value == pytest.approx(0.4, rel=1e-9)


def test_sensitivity_bundle() -> None:
    a = assess(load_scenario(demo_path()))
    s = sensitivity(a)
    assert s.point_total == a.prediction.total
    assert s.curves[-1].label.startswith("this scenario")
    assert s.scenario_fm == 0.82
    assert s.scenario_ratio is not None and s.scenario_ratio > 0
