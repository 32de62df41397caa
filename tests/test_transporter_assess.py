"""Object drugs cleared by transporters, end to end through ``assess``: the published rosuvastatin table
reproduced from a scenario file, the organ ratios and ceilings of a statin-like object drug, the extended
clearance option and its documented limits, the screens and the dose suggestion."""

from __future__ import annotations

import itertools
import math
from typing import Any

import numpy as np
import pytest
from conftest import base_dict, read_checks

from interact import assess
from interact.cautions import DOSE_CAUTIONS
from interact.errors import ScenarioError
from interact.report.assessment import format_assessment
from interact.scenario import load_scenario, loads_scenario, scenario_from_dict
from interact.transporters import METABOLISM_LIMITED, UPTAKE_LIMITED

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

ROWS = read_checks("elsby2016_rosuvastatin.csv")


def _elsby_text(row: dict[str, str]) -> str:
    """A scenario file holding one row of Elsby et al. 2016, Table 3, with rosuvastatin as Table 4 models it."""
    return f"""
title = "Rosuvastatin with {row["precipitant"]} {row["dose_mg"]} mg (Elsby et al. 2016, Tables 3 and 4)"
rules = "fda-2020"

[perpetrator]
name = "{row["precipitant"]}"
molar_mass = "{row["molar_mass_g_per_mol"]} g/mol"
dose = "{row["dose_mg"]} mg"
cmax = "{row["cmax_um"]} uM"
fu_plasma = {row["fu"]}

[perpetrator.site_concentrations]      # as printed in Table 3
ient = "{row["igut_max_um"]} uM"
iin_max_u = "{row["iinlet_max_u_um"]} uM"

[[perpetrator.inhibits]]
target = "BCRP"
ic50 = "{row["bcrp_ki_um"]} uM"

[[perpetrator.inhibits]]
target = "OATP1B1"
ic50 = "{row["oatp1b1_ki_um"]} uM"

[victim]
name = "rosuvastatin"
dose = "10 mg"
interval = "24 h"

[[victim.pathways]]
transporter = "BCRP"
route = "intestinal efflux"
fraction = 0.5

[[victim.pathways]]
transporter = "OATP1B1"
route = "hepatic uptake"
fraction = 0.38
"""


@pytest.mark.parametrize("row", ROWS, ids=lambda r: f"{r['precipitant']}-{r['dose_mg']}mg")
def test_elsby2016_table4_from_a_scenario_file(row: dict[str, str]) -> None:
    """Elsby et al. 2016, Table 4 (seen): BCRP and OATP1B1 ratios to two decimals; the table multiplies its rounded
    organ ratios into the overall one (see tests/test_transporters.py), and so does this check; maxima 2.0 and 1.6."""
    a = assess(loads_scenario(_elsby_text(row)))
    pr = a.prediction
    assert round(pr.gut, 2) == pytest.approx(float(row["aucr_bcrp_printed"]), abs=1e-9)
    assert round(pr.liver, 2) == pytest.approx(float(row["aucr_oatp1b1_printed"]), abs=1e-9)
    assert pr.kidney == 1.0 and pr.total == pytest.approx(pr.gut * pr.liver, rel=1e-15)
    assert round(round(pr.gut, 2) * round(pr.liver, 2), 2) == pytest.approx(float(row["aucr_overall_printed"]), abs=1e-9)
    assert (round(pr.ceiling_gut, 1), round(pr.ceiling_liver, 1)) == (2.0, 1.6)
    routes = {r.transporter: r for r in pr.routes}
    assert routes["BCRP"].route == "intestinal efflux" and routes["OATP1B1"].route == "hepatic uptake"
    assert routes["BCRP"].site.concentration_um[0][1] == float(row["igut_max_um"])


# ----------------------------------------------------------------- a statin-like object drug (the shipped example)

EXAMPLE = load_scenario(__import__("interact").scenario.demo_path().with_name("examples") / "transporter_victim.toml")


def _activity(conc: float, ki: float) -> float:
    return 1.0 / (1.0 + conc / ki)


def test_statin_like_example_organ_ratios_by_independent_arithmetic() -> None:
    """The example's gut, liver, kidney and total, recomputed here from its concentrations with plain arithmetic."""
    a = assess(EXAMPLE)
    parent = a.species[0]
    v = EXAMPLE.victim
    ki = {c.target: c.ki_u_um for c in a.constants}
    a_bcrp = _activity(parent.enterocyte_um, ki["BCRP"])
    a_oatp = _activity(parent.unbound_inlet_um, ki["OATP1B1"])
    a_cyp = _activity(parent.unbound_inlet_um, ki["CYP2C9"])
    a_oat3 = _activity(parent.unbound_cmax_um, ki["OAT3"])
    f = {pw.enzyme: pw.fm for pw in v.pathways}
    assert v.renal_fraction is not None and v.fg is not None
    renal = v.renal_fraction * f["OAT3"]
    gut = 1 / (f["BCRP"] * a_bcrp + 1 - f["BCRP"])  # CYP3A is not inhibited: no gut-wall metabolism term
    w_liver = f["OATP1B1"] * a_oatp + f["CYP2C9"] * a_cyp + 1 - f["OATP1B1"] - f["CYP2C9"]
    systemic = 1 / (w_liver - renal * (1 - a_oat3))
    pr = a.prediction
    assert pr.gut == pytest.approx(gut, rel=1e-12)
    assert pr.liver == pytest.approx(1 / w_liver, rel=1e-12)
    assert pr.liver * pr.kidney == pytest.approx(systemic, rel=1e-12)
    assert pr.total == pytest.approx(gut * systemic, rel=1e-12)
    # complete-inhibition ceilings: every inhibited route at zero activity
    assert pr.ceiling_gut == pytest.approx(1 / (1 - f["BCRP"]), rel=1e-12)
    assert pr.ceiling_liver == pytest.approx(1 / (1 - f["OATP1B1"] - f["CYP2C9"]), rel=1e-12)
    assert pr.ceiling_total == pytest.approx(1 / (1 - f["BCRP"]) / (1 - f["OATP1B1"] - f["CYP2C9"] - renal), rel=1e-12)
    for value, ceiling in (
        (pr.gut, pr.ceiling_gut),
        (pr.liver, pr.ceiling_liver),
        (pr.kidney, pr.ceiling_kidney),
        (pr.total, pr.ceiling_total),
    ):
        assert 1.0 < value < ceiling


def test_statin_like_example_screens_name_the_transporters_and_a_dose_is_suggested() -> None:
    a = assess(EXAMPLE)
    screened = {(r.target, r.label) for r in a.screen}
    assert {"BCRP", "OATP1B1", "OAT3", "CYP2C9"} <= {t for t, _ in screened}
    assert ("OATP1B1", "R (OATP)") in screened
    assert a.dose.action != "none" and a.dose.chosen is not None
    assert set(DOSE_CAUTIONS) <= set(a.dose.cautions)
    text = format_assessment(a)
    for words in ("BCRP (intestinal efflux)", "OAT3 (renal secretion)", "kidney", "x kidney", "Elsby et al. 2016"):
        assert words in text


def test_ratio_rises_with_the_precipitant_dose_and_the_dose_ceiling_holds() -> None:
    a = assess(EXAMPLE)
    lim = a.perpetrator_limit
    assert lim.scale is not None and 0 < lim.scale < 1
    totals = []
    scales = sorted((0.05, 0.25, 0.5, lim.scale, 1.0, 2.0))
    for scale in scales:
        d = _plain(EXAMPLE)
        d["perpetrator"]["dose"] = f"{300 * scale} mg"
        d["perpetrator"]["cmax"] = f"{2.4 * scale} ug/mL"
        totals.append(assess(scenario_from_dict(d)).prediction.total)
    assert all(x < y for x, y in itertools.pairwise(totals))
    assert totals[scales.index(lim.scale)] == pytest.approx(a.dose.boundary[1], rel=1e-6)


def _plain(s: Any) -> dict[str, Any]:
    from interact.scenario import scenario_to_dict

    return scenario_to_dict(s)


# ----------------------------------------------------------------- extended clearance through assess


def _ecm(ps_inf: float, ps_eff: float, cl_met: float, cl_bile: float = 0.0, *, cyp_ki: str = "0.5 uM", oatp_ic50: str = "1 uM") -> Any:
    data = base_dict()
    data["perpetrator"]["inhibits"] = [
        {"target": "CYP2C9", "ki": cyp_ki, "fu_inc": 1.0},
        {"target": "OATP1B1", "ic50": oatp_ic50},
    ]
    data["victim"].pop("fg")
    data["victim"]["renal_fraction"] = 0.2
    data["victim"]["pathways"] = [{"enzyme": "CYP2C9", "fm": 0.9}, {"transporter": "OATP1B1", "fraction": 0.8}]
    data["victim"]["extended_clearance"] = {"ps_inf": ps_inf, "ps_eff": ps_eff, "cl_met": cl_met, "cl_bile": cl_bile}
    return assess(scenario_from_dict(data))


def test_uptake_limited_victim_follows_uptake_inhibition_only() -> None:
    """CLmet + CLbile >> PS_eff: CLint,all = PS_inf, so the liver ratio is the uptake term alone (the documented limit)."""
    a = _ecm(10.0, 1e-6, 100.0)
    pr = a.prediction
    assert (pr.regime, pr.regime_with) == (UPTAKE_LIMITED, UPTAKE_LIMITED)
    oatp = next(r for r in pr.routes if r.transporter == "OATP1B1").site.activity
    uptake_left = 0.8 * oatp + 0.2
    assert pr.liver == pytest.approx(1 / (0.8 * uptake_left + 0.2), rel=1e-6)  # hepatic fraction 1 - renal 0.2
    no_cyp = _ecm(10.0, 1e-6, 100.0, cyp_ki="1e9 uM")
    assert no_cyp.prediction.liver == pytest.approx(pr.liver, rel=1e-6)


def test_metabolism_limited_victim_follows_both_steps() -> None:
    """PS_eff >> CLmet + CLbile: CLint,all = PS_inf/PS_eff x CLmet, so uptake and metabolism inhibition multiply."""
    a = _ecm(1.0, 1e6, 1.0)
    pr = a.prediction
    assert pr.regime == METABOLISM_LIMITED
    oatp = next(r for r in pr.routes if r.transporter == "OATP1B1").site.activity
    cyp = next(e for e in pr.effects if e.enzyme == "CYP2C9").liver.activity
    product = (0.8 * oatp + 0.2) * (0.9 * cyp + 0.1)
    assert pr.liver == pytest.approx(1 / (0.8 * product + 0.2), rel=1e-5)
    assert pr.liver <= pr.ceiling_liver == pytest.approx(1 / (0.8 * (0.2 * 0.1) + 0.2), rel=1e-5)  # PS_eff finite: ~1e-6 off


def test_a_regime_switch_is_reported() -> None:
    """Strong metabolic inhibition can move a victim out of the uptake-limited regime (Patilea-Vrana and Unadkat 2018)."""
    a = _ecm(10.0, 1.0, 12.0, cyp_ki="0.001 uM")
    assert a.prediction.regime == UPTAKE_LIMITED and a.prediction.regime_with != UPTAKE_LIMITED
    assert any("moves the victim's hepatic clearance" in w for w in a.warnings)


def test_ratio_is_monotone_in_the_precipitant_concentration_with_extended_clearance() -> None:
    totals = [_ecm(3.0, 2.0, 1.0, cyp_ki=f"{k} uM", oatp_ic50=f"{k} uM").prediction.total for k in (1e3, 10, 1, 0.1, 0.01)]
    assert np.all(np.diff(totals) > 0)
    a = _ecm(3.0, 2.0, 1.0, cyp_ki="1e-6 uM", oatp_ic50="1e-6 uM").prediction
    assert a.total <= a.ceiling_total * (1 + 1e-9) and math.isfinite(a.ceiling_total)


def test_phenotypes_with_transporter_routes_are_refused_by_name() -> None:
    data = _plain(EXAMPLE)
    data["victim"]["phenotypes"] = [{"enzyme": "CYP2C9", "phenotype": "poor"}]
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(data)
    assert "victim.phenotypes" in {p.field for p in info.value.problems}


def test_the_time_course_refuses_transporter_routes_by_name() -> None:
    """The time course would count a transporter as an enzyme: it refuses instead."""
    from interact.dynamic import simulate

    with pytest.raises(ValueError, match=r"victim\.pathways\[0\].*the time course"):
        simulate(assess(EXAMPLE))


def test_uncertainty_model_takes_the_routes_and_equals_assess_at_point_values() -> None:
    """The uncertainty analysis evaluates the same model with the routes (fractions at their point values)."""
    import numpy as np

    from interact.uncertainty import ScenarioModel, run_uncertainty

    a = assess(EXAMPLE)
    model = ScenarioModel(a)
    r = model.evaluate()
    assert float(r.total) == a.prediction.total
    assert float(r.gut) == a.prediction.gut and float(r.liver) == a.prediction.liver
    arrays = {i.path: np.full(3, i.value) for i in model.inputs()}
    assert np.all(model.evaluate(arrays).total == a.prediction.total)
    res = run_uncertainty(a, [("perpetrator.cmax", "cv:30%"), ("victim.pathways[2].fm", "uniform:0.05,0.5")], samples=256, seed=3)
    assert np.all(res.total >= 1.0) and np.all(res.total <= a.prediction.ceiling_total)
    assert res.fm_scaled > 0  # fm above 0.25 does not fit beside uptake 0.5 and renal fraction 0.25 (the reader's sum): scaled down


@pytest.mark.parametrize("which", ["elsby-given-sites", "extended-clearance", "active-moiety"])
def test_uncertainty_model_with_given_sites_clearances_and_active_moiety_equals_assess(which: str) -> None:
    """Given site concentrations stay fixed, the hepatic clearances give the extended liver form, an active moiety's
    molar mass scales the absorbed amount: at point values the uncertainty model equals assess()."""
    import numpy as np

    from interact.uncertainty import ScenarioModel, run_uncertainty

    if which == "elsby-given-sites":
        scenario = loads_scenario(_elsby_text(ROWS[0]))
    elif which == "extended-clearance":
        scenario = _ecm(3.0, 2.0, 1.0).scenario
    else:
        data = _plain(EXAMPLE)
        data["perpetrator"]["active_molar_mass"] = "390 g/mol"
        scenario = scenario_from_dict(data)
    a = assess(scenario)
    model = ScenarioModel(a)
    assert float(model.evaluate().total) == pytest.approx(a.prediction.total, rel=1e-12)
    # every input as an array at its point value (route and renal fractions too: with the hepatic clearances and
    # no hepatic_fraction, the hepatic share follows the renal fraction)
    arrays = {i.path: np.full(3, i.value) for i in model.inputs()}
    assert np.all(model.evaluate(arrays).total == pytest.approx(a.prediction.total, rel=1e-12))
    if which == "extended-clearance" and a.scenario.victim.renal_fraction:
        assert model.evaluate({"victim.renal_fraction": 0.0}).liver != model.evaluate().liver
    res = run_uncertainty(a, [("perpetrator.cmax", "cv:30%")], samples=128, seed=1)
    assert np.all(res.total >= 1.0 - 1e-12) and np.all(res.total <= a.prediction.ceiling_total * (1 + 1e-12))
    if which == "elsby-given-sites":  # Cmax does not move the given Iin,max,u or I,ent: the ratio stays put
        assert np.all(res.total == pytest.approx(a.prediction.total, rel=1e-12))
