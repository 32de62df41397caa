"""Regression check: the hepatic inlet concentration with a blood-to-plasma ratio.

Outside reference: Drug Metab Dispos 2019;47:779, Table 8 (seen), which works the FDA (plasma) hepatic inlet
concentration through three blood-to-plasma ratios and shows that the EMA/PMDA blood approach gives the same
unbound value.  The rows and the source line are in ``tests/data/inlet_rb_dmd2019_table8.csv``.
"""

from __future__ import annotations

import math

import pytest
from conftest import base_dict, read_checks

from interact import assess
from interact.scenario import scenario_from_dict

ROWS = read_checks("inlet_rb_dmd2019_table8.csv")


def _two_significant(x: float) -> float:
    return round(x, 1 - math.floor(math.log10(abs(x))))


def _assess(rb: float, qh: str | None = "1.62 L/min"):  # type: ignore[no-untyped-def]
    data = base_dict()
    # the table's inputs, as printed (Drug Metab Dispos 2019;47:779, Table 8 heading)
    data["perpetrator"].update(dose="325 umol", cmax="4.0 uM", fu_plasma=0.2, blood_plasma_ratio=rb, ka="0.1 1/min", fa_fg=1.0)
    data["perpetrator"]["inhibits"] = [{"target": "OATP1B1", "ic50": "10 uM"}]
    if qh is not None:
        data["physiology"] = {"hepatic_blood_flow": qh}
    return assess(scenario_from_dict(data), rules="fda-2020")


@pytest.mark.parametrize("row", ROWS, ids=lambda r: r["drug"])
def test_unbound_inlet_concentration_as_printed(row: dict[str, str]) -> None:
    rb = float(row["Rb"])
    parent = _assess(rb).species[0]
    # printed to two significant figures: compare at that precision
    assert _two_significant(parent.unbound_inlet_um) == float(row["iin_max_u_uM"])
    total_plasma = parent.unbound_inlet_um / 0.2
    assert _two_significant(total_plasma) == float(row["iin_max_plasma_uM"])
    assert _two_significant(total_plasma - 4.0) == float(row["portal_plasma_uM"])


@pytest.mark.parametrize("row", ROWS, ids=lambda r: r["drug"])
def test_blood_approach_gives_the_same_unbound_value(row: dict[str, str]) -> None:
    # EMA/PMDA: blood Iin,max x fuB, with blood Iin,max = Rb x plasma Iin,max and fuB = fuP / Rb (Table 8, as printed)
    rb = float(row["Rb"])
    unbound = _assess(rb).species[0].unbound_inlet_um
    blood_total = rb * unbound / 0.2
    fu_blood = 0.2 / rb
    assert _two_significant(blood_total) == float(row["iin_max_blood_uM"])
    assert fu_blood == pytest.approx(float(row["fu_blood"]))
    assert blood_total * fu_blood == pytest.approx(unbound, rel=1e-12)


def test_rb_changes_only_the_portal_term() -> None:
    # Table 8: the portal term halves as Rb doubles; the systemic Cmax term does not move
    values = [_assess(float(r["Rb"])).species[0].unbound_inlet_um for r in ROWS]
    portal = [v / 0.2 - 4.0 for v in values]
    assert portal[0] == pytest.approx(2 * portal[1]) and portal[1] == pytest.approx(2 * portal[2])


@pytest.mark.parametrize("rules", ["fda-2020", "ich-m12-2024"])
def test_default_hepatic_blood_flow_reproduces_the_table(rules: str) -> None:
    # the shipped default Qh 97 L/h (1.617 L/min) gives Table 8's unbound values at its printed precision
    for row in ROWS:
        data = base_dict()
        data["perpetrator"].update(dose="325 umol", cmax="4.0 uM", fu_plasma=0.2, blood_plasma_ratio=float(row["Rb"]))
        data["perpetrator"]["inhibits"] = [{"target": "OATP1B1", "ic50": "10 uM"}]
        parent = assess(scenario_from_dict(data), rules=rules).species[0]
        assert _two_significant(parent.unbound_inlet_um) == float(row["iin_max_u_uM"])
