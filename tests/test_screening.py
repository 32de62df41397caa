"""Basic static models and concentrations, checked against published tables.

Source: Clin Pharmacol Ther 2015;98(3):321-327 (doi:10.1002/cpt.150), Tables 2 and 3,
copied in tests/data/ with their source lines.  That paper uses total concentrations,
Qh = 1500 mL/min, ka = 0.1/min, Fa*Fg = 1 and R >= 1.1: tests/data/rules-cpt2015.toml
encodes that method as a custom rule set, so these checks also show that cutoffs and
physiology are inputs, not constants buried in the code.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from conftest import base_dict, read_checks

from interact import assess
from interact.scenario import scenario_from_dict
from interact.tables import load_rules

# Scenarios here trigger model warnings (Fg not given, fu,inc = 1, kdeg from memory ...) as a side effect of
# what they test; the warnings themselves are checked in tests/api/test_warnings.py and where a test asks for one.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

RULES = load_rules(Path(__file__).parent / "data" / "rules-cpt2015.toml")


@pytest.mark.parametrize("row", read_checks("cpt2015_table2_cyp_r_values.csv"), ids=lambda r: r["inhibitor"])
def test_cpt2015_table2_r_values(row: dict[str, str]) -> None:
    assert row["row_usable_as_oracle"] == "yes"
    data = base_dict()
    data["perpetrator"].update(cmax=f"{row['I_uM_published']} uM", fu_plasma=1.0, route="intravenous")
    data["perpetrator"]["inhibits"] = [{"target": row["pathway"], "ki": f"{row['Ki_uM']} uM", "fu_inc": float(row["fu_inc"])}]
    data["victim"]["pathways"] = []
    result = assess(scenario_from_dict(data), rules=RULES)
    (r1,) = [r for r in result.screen if r.criterion == "reversible-liver"]
    # the paper prints R to 2 decimals (seen in source)
    assert r1.value == pytest.approx(float(row["R_published"]), abs=0.005)
    assert r1.indicated == (row["flag_published"] == "yes")
    # Ki,u printed to 2 decimals from an fu,inc printed to 2 decimals: allow the rounding of both
    tol = 0.005 * float(row["Ki_uM"]) + 0.005
    assert r1.contributions[0].constant_um == pytest.approx(float(row["Ki_u_uM_published"]), abs=tol)


@pytest.mark.parametrize("row", read_checks("cpt2015_table3_oatp1b1_r_values.csv"), ids=lambda r: r["drug"])
def test_cpt2015_table3_oatp_inlet_and_r(row: dict[str, str]) -> None:
    data = base_dict()
    data["perpetrator"].update(
        molar_mass=f"{row['MW_g_per_mol']} g/mol",
        dose=f"{row['dose_mg']} mg",
        cmax=f"{row['Cmax_uM']} uM",
        fu_plasma=1.0,
        blood_plasma_ratio=1.0,
    )
    data["perpetrator"]["inhibits"] = [{"target": "OATP1B1", "ic50": f"{row['IC50_uM']} uM"}]
    result = assess(scenario_from_dict(data), rules=RULES)
    parent = result.species[0]
    # Iin,max printed to 3 decimals (seen in source)
    assert parent.unbound_inlet_um == pytest.approx(float(row["Iin_max_uM_published"]), abs=0.0015)
    (r,) = [r for r in result.screen if r.criterion == "hepatic-uptake"]
    assert r.value == pytest.approx(float(row["R_published"]), abs=0.005)
    assert r.indicated
    qh = next(s for s in result.settings if s.name == "hepatic_blood_flow")
    assert qh.value == pytest.approx(1.5) and qh.origin == "rule set"


def test_gut_criterion_only_for_oral_cyp3a(scenario_dict: dict) -> None:
    # S8: Igut/Ki >= 10 applies to orally given CYP3A inhibitors (seen in source)
    result = assess(scenario_from_dict(scenario_dict))
    labels = {(r.target, r.criterion) for r in result.screen}
    assert ("CYP3A", "reversible-gut") in labels
    scenario_dict["perpetrator"]["route"] = "intravenous"
    result = assess(scenario_from_dict(scenario_dict))
    assert ("CYP3A", "reversible-gut") not in {(r.target, r.criterion) for r in result.screen}


def test_igut_is_dose_over_250_ml(scenario_dict: dict) -> None:
    # S7, S8: Igut = dose / 250 mL (seen in source). 100 mg of 400 g/mol = 250 umol -> 1000 uM
    result = assess(scenario_from_dict(scenario_dict))
    assert result.species[0].gut_lumen_um == pytest.approx(1000.0)
    (gut,) = [r for r in result.screen if r.criterion == "reversible-gut"]
    assert gut.value == pytest.approx(1 + 1000.0 / 1.0)


def test_fu_floor_applies_unless_measured_and_allowed(scenario_dict: dict) -> None:
    # S7: fu,p floor 0.01 in the basic models (FDA); S5: M12 may use a reliably measured value below 1%
    scenario_dict["perpetrator"]["fu_plasma"] = 0.002
    fda = assess(scenario_from_dict(scenario_dict), rules="fda-2020")
    assert fda.species[0].fu_plasma_used == 0.01
    scenario_dict["perpetrator"]["fu_plasma_measured"] = True
    assert assess(scenario_from_dict(scenario_dict), rules="fda-2020").species[0].fu_plasma_used == 0.01
    m12 = assess(scenario_from_dict(scenario_dict), rules="ich-m12-2024")
    assert m12.species[0].fu_plasma_used == 0.002
    del scenario_dict["perpetrator"]["fu_plasma_measured"]
    assert assess(scenario_from_dict(scenario_dict), rules="ich-m12-2024").species[0].fu_plasma_used == 0.01


def test_metabolite_ratios_add_to_parent(scenario_dict: dict) -> None:
    # S8: sum the [I]/Ki ratios of parent and metabolites (seen in source)
    scenario_dict["perpetrator"]["metabolites"] = [
        {"name": "M1", "cmax": "2 uM", "fu_plasma": 0.5, "inhibits": [{"target": "CYP3A", "ki": "4 uM", "fu_inc": 1.0}]}
    ]
    result = assess(scenario_from_dict(scenario_dict))
    (r1,) = [r for r in result.screen if r.criterion == "reversible-liver"]
    assert r1.value == pytest.approx(1 + 0.1 * 1.0 / 1.0 + 0.5 * 2.0 / 4.0)
    (gut,) = [r for r in result.screen if r.criterion == "reversible-gut"]
    assert len(gut.contributions) == 1  # the gut lumen sees the parent only


def test_transporter_criteria(scenario_dict: dict) -> None:
    scenario_dict["perpetrator"]["inhibits"] = [
        {"target": "P-gp", "ic50": "10 uM"},
        {"target": "OCT2", "ic50": "0.5 uM"},
        {"target": "MATE1", "ic50": "10 uM"},
    ]
    scenario_dict["victim"]["pathways"] = []
    result = assess(scenario_from_dict(scenario_dict), rules="fda-2020")
    by = {(r.target, r.criterion): r for r in result.screen}
    # total Cmax 1 uM / 10 = 0.1 -> flagged at >= 0.1 (FDA 2020, S8)
    assert by[("P-gp", "efflux-systemic")].value == pytest.approx(0.1)
    assert by[("P-gp", "efflux-systemic")].indicated
    assert by[("P-gp", "efflux-gut")].value == pytest.approx(1000.0 / 10.0)
    assert by[("OCT2", "renal-uptake")].value == pytest.approx(0.1 / 0.5)
    assert by[("MATE1", "renal-efflux")].value == pytest.approx(0.01)
    assert not by[("MATE1", "renal-efflux")].indicated


def test_fu_floor_override(scenario_dict: dict) -> None:
    scenario_dict["perpetrator"]["fu_plasma"] = 0.002
    scenario_dict["physiology"] = {"fu_plasma_floor": 0.005}
    a = assess(scenario_from_dict(scenario_dict), rules="fda-2020")
    assert a.species[0].fu_plasma_used == 0.005
    fu = next(s for s in a.settings if s.name == "fu_plasma")
    assert fu.origin == "floor" and "physiology" in fu.source
