"""assess(): provenance, defaults reported with sources, warnings, cautions."""

from __future__ import annotations

import pytest

from interact import assess, load_scenario
from interact.cautions import CAUTIONS
from interact.errors import ScenarioError
from interact.kinetics.conversion import ki_from_ic50
from interact.scenario import demo_path, scenario_from_dict


def test_demo_assessment_is_complete() -> None:
    a = assess(load_scenario(demo_path()))
    assert a.rules.id == "ich-m12-2024"
    assert a.prediction.total > 1
    assert a.screen and a.dose.cautions and a.cautions == CAUTIONS
    origins = {s.name: s.origin for s in a.settings}
    assert origins["hepatic_blood_flow"] == "default"
    assert origins["absorption_rate"] == "given"
    # Qh 97 L/h is now seen in Drug Metab Dispos 2019;47:779, Table 8; Qent 18 L/h is still from memory
    assert not any("Hepatic blood flow" in m for m in a.memory_values)
    assert any("Enterocytic blood flow" in m for m in a.memory_values)


def test_override_marks_origin(scenario_dict: dict) -> None:
    scenario_dict["physiology"] = {"hepatic_blood_flow": "1.5 L/min"}
    a = assess(scenario_from_dict(scenario_dict))
    qh = next(s for s in a.settings if s.name == "hepatic_blood_flow")
    assert qh.origin == "override" and qh.value == 1.5


def test_rules_argument_overrides_scenario(scenario_dict: dict) -> None:
    scenario_dict["rules"] = "fda-2020"
    assert assess(scenario_from_dict(scenario_dict)).rules.id == "fda-2020"
    assert assess(scenario_from_dict(scenario_dict), rules="ich-m12-2024").rules.id == "ich-m12-2024"


@pytest.mark.parametrize(
    ("mechanism", "extra", "expected"),
    [
        # Cheng-Prusoff (Biochem Pharmacol 1973;22:3099): competitive Ki = IC50/(1 + S/Km), seen in S10/S12
        ("competitive", {}, 2.0 / (1 + 5.0 / 5.0)),
        ("noncompetitive", {}, 2.0),  # from memory
        ("uncompetitive", {}, 2.0 / (1 + 5.0 / 5.0)),  # at S = Km, Ki = IC50/2 (S12, seen)
        ("mixed", {"alpha": 1.0}, 2.0),  # alpha = 1 is noncompetitive (algebra)
    ],
)
def test_cheng_prusoff_route(scenario_dict: dict, mechanism: str, extra: dict, expected: float) -> None:
    scenario_dict["perpetrator"]["inhibits"] = [
        {"target": "CYP3A", "ic50": "2 uM", "substrate_conc": "5 uM", "km": "5 uM", "mechanism": mechanism, **extra}
    ]
    a = assess(scenario_from_dict(scenario_dict))
    assert a.constants[0].ki_um == pytest.approx(expected)
    assert "Cheng-Prusoff" in a.constants[0].ki_route


def test_mixed_limits_match_pure_forms() -> None:
    # alpha -> infinity reduces mixed to competitive (algebra of the Cheng-Prusoff mixed form)
    assert float(ki_from_ic50(2.0, "mixed", 5.0, 2.5, 1e12)) == pytest.approx(float(ki_from_ic50(2.0, "competitive", 5.0, 2.5)))


def test_uncompetitive_warns(scenario_dict: dict) -> None:
    scenario_dict["perpetrator"]["inhibits"][0]["mechanism"] = "uncompetitive"
    a = assess(scenario_from_dict(scenario_dict))
    assert any("uncompetitive" in w for w in a.warnings)


def test_missing_fg_warns(scenario_dict: dict) -> None:
    del scenario_dict["victim"]["fg"]
    a = assess(scenario_from_dict(scenario_dict))
    assert a.prediction.gut == 1.0
    assert any("victim.fg not given" in w for w in a.warnings)


def test_assess_is_fast_enough_for_live_recompute() -> None:
    """Not a benchmark: a loose guard that assess() stays well under 20 ms (goal: < 1 ms median)."""
    import time

    s = load_scenario(demo_path())
    assess(s)
    t0 = time.perf_counter()
    for _ in range(20):
        assess(s)
    assert (time.perf_counter() - t0) / 20 < 0.02


def test_extreme_constants_give_an_error_not_infinity(scenario_dict: dict) -> None:
    """Found by the fuzz test: fu_inc = 2.2e-308 made Ki,u so small that R1,gut overflowed to inf.

    The scenario reader refuses such a fraction; assess() also refuses an overflowing
    ratio from a scenario built in code, past the reader."""
    import dataclasses

    from interact.errors import InputError

    scenario_dict["perpetrator"]["inhibits"][0]["fu_inc"] = 2.2250738585072014e-308
    with pytest.raises(ScenarioError, match=r"perpetrator\.inhibits\[0\]\.fu_inc.*below 1e-09"):
        scenario_from_dict(scenario_dict)
    scenario_dict["perpetrator"]["inhibits"][0]["fu_inc"] = 0.5
    s = scenario_from_dict(scenario_dict)
    tiny = dataclasses.replace(s.perpetrator.inhibits[0], fu_inc=2.2250738585072014e-308)
    s = dataclasses.replace(s, perpetrator=dataclasses.replace(s.perpetrator, inhibits=(tiny,)))
    with pytest.raises(InputError, match=r"^perpetrator\.inhibits \(CYP3A\): .*floating-point range"):
        assess(s)
