"""Scenario schema for object drugs cleared by transporters: pathways by route, renal fraction, extended
clearance, given site concentrations, active-moiety molar mass and multiplier overrides.  Values here are
arbitrary test inputs (not checks)."""

from __future__ import annotations

from typing import Any

import pytest
from conftest import base_dict
from hypothesis import given, settings
from hypothesis import strategies as st

from interact.errors import ScenarioError
from interact.scenario import (
    METABOLISM,
    dumps_scenario,
    edit_scenario_text,
    loads_scenario,
    scenario_from_dict,
    scenario_to_dict,
)


def add(pathway: dict[str, Any]) -> Any:
    return lambda d: d["victim"]["pathways"].append(pathway)


def statin_like() -> dict[str, Any]:
    data = base_dict()
    data["perpetrator"]["inhibits"] = [
        {"target": "BCRP", "ic50": "2 uM"},
        {"target": "OATP1B1", "ic50": "3 uM"},
        {"target": "CYP2C9", "ki": "5 uM", "fu_inc": 1.0},
    ]
    data["victim"]["fg"] = 0.9
    data["victim"]["renal_fraction"] = 0.3
    data["victim"]["pathways"] = [
        {"transporter": "BCRP", "fraction": 0.5},
        {"transporter": "OATP1B1", "route": "hepatic uptake", "fraction": 0.4},
        {"enzyme": "CYP2C9", "fm": 0.1},
        {"transporter": "OAT3", "fraction": 0.6},
    ]
    return data


def problems(data: dict[str, Any]) -> dict[str, str]:
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(data)
    return {p.field: p.message for p in info.value.problems}


def test_routes_are_read_with_the_target_and_the_route_inferred() -> None:
    s = scenario_from_dict(statin_like())
    got = [(p.enzyme, p.route, p.organ, p.fm) for p in s.victim.pathways]
    assert got == [
        ("BCRP", "intestinal efflux", "gut", 0.5),
        ("OATP1B1", "hepatic uptake", "liver", 0.4),
        ("CYP2C9", METABOLISM, "liver", 0.1),
        ("OAT3", "renal secretion", "kidney", 0.6),
    ]
    assert s.victim.renal_fraction == 0.3


def test_round_trip_through_plain_data_and_toml() -> None:
    s = scenario_from_dict(statin_like())
    assert scenario_from_dict(scenario_to_dict(s)) == s
    assert loads_scenario(dumps_scenario(s)) == s


@pytest.mark.parametrize(
    ("edit", "field", "words"),
    [
        (
            lambda d: d["victim"]["pathways"].append({"transporter": "CYP3A", "fraction": 0.1}),
            "victim.pathways[4].transporter",
            "not a transporter",
        ),
        (
            lambda d: d["victim"]["pathways"].append({"enzyme": "OATP1B3", "fm": 0.1}),
            "victim.pathways[4].enzyme",
            'transporter = "OATP1B3"',
        ),
        (lambda d: d["victim"]["pathways"][0].update(route="renal secretion"), "victim.pathways[0].route", "not a route of BCRP"),
        (lambda d: d["victim"]["pathways"][0].update(route="biliary"), "victim.pathways[0].route", "is not one of"),
        (lambda d: d["victim"]["pathways"][0].update(fraction=1.5), "victim.pathways[0].fraction", "1.5"),
        (lambda d: d["victim"]["pathways"][0].update(fraction=-0.1), "victim.pathways[0].fraction", "-0.1"),
        (lambda d: d["victim"]["pathways"][2].update(fraction=0.1), "victim.pathways[2].fraction", "with an enzyme"),
        (
            lambda d: d["victim"]["pathways"].append({"transporter": "ABCG2", "fraction": 0.1}),
            "victim.pathways[4].transporter",
            "listed twice",
        ),
        (lambda d: d["victim"].update(renal_fraction=1.2), "victim.renal_fraction", "1.2"),
        (lambda d: d["victim"].pop("renal_fraction"), "victim.renal_fraction", "is missing"),
    ],
)
def test_errors_name_the_field(edit: Any, field: str, words: str) -> None:
    data = statin_like()
    edit(data)
    found = problems(data)
    assert field in found, found
    assert words in found[field]


def test_systemic_fractions_above_one_name_the_parts() -> None:
    data = statin_like()
    data["victim"]["renal_fraction"] = 0.6  # 0.4 uptake + 0.1 fm + 0.6 renal = 1.1
    msg = problems(data)["victim.pathways"]
    assert "sum to 1.1" in msg and "hepatic uptake 0.4" in msg and "renal_fraction 0.6" in msg


def test_gut_losses_above_one_count_gut_wall_metabolism() -> None:
    data = statin_like()
    data["victim"]["fg"] = 0.4  # 0.6 lost to CYP3A + 0.5 to efflux
    msg = problems(data)["victim.pathways"]
    assert "intestinal fractions sum to 1.1" in msg and "1 - fg = 0.6" in msg


def test_renal_secretion_fractions_above_one() -> None:
    data = statin_like()
    data["victim"]["pathways"].append({"transporter": "MATE1", "fraction": 0.5})
    assert "renal secretion fractions sum to 1.1" in problems(data)["victim.pathways"]


def test_metabolism_only_keeps_its_message() -> None:
    data = base_dict()
    data["victim"]["pathways"] = [{"enzyme": "CYP3A", "fm": 0.8}, {"enzyme": "CYP2C9", "fm": 0.5}]
    assert "fm values sum to 1.3; expected a total of at most 1" in problems(data)["victim.pathways"]


@settings(max_examples=60, deadline=None)
@given(parts=st.lists(st.floats(min_value=0.0, max_value=1.0), min_size=3, max_size=3), renal=st.floats(0.0, 1.0))
def test_a_systemic_sum_is_accepted_exactly_when_it_is_at_most_one(parts: list[float], renal: float) -> None:
    data = statin_like()
    data["victim"]["pathways"] = [
        {"enzyme": "CYP2C9", "fm": parts[0]},
        {"transporter": "OATP1B1", "fraction": parts[1]},
        {"transporter": "OATP1B3", "fraction": parts[2]},
    ]
    data["victim"]["renal_fraction"] = renal
    total = sum(parts) + renal
    if total <= 1.0:
        scenario_from_dict(data)
    elif total > 1.0 + 1e-9:
        assert "victim.pathways" in problems(data)


# ----------------------------------------------------------------- extended clearance


def with_ecm(**ecm: Any) -> dict[str, Any]:
    data = statin_like()
    data["victim"]["extended_clearance"] = ecm
    return data


def test_extended_clearance_reads_flows_or_ratios() -> None:
    s = scenario_from_dict(
        with_ecm(ps_inf="300 mL/min", ps_eff="30 mL/min", cl_met="60 mL/min", cl_bile="0.03 L/min", hepatic_fraction=0.7)
    )
    ecm = s.victim.extended_clearance
    assert ecm is not None and ecm.hepatic_fraction == 0.7
    assert ecm.relative() == pytest.approx((0.3, 0.03, 0.06, 0.03))
    r = scenario_from_dict(with_ecm(ps_inf=10, ps_eff=1, cl_met=2)).victim.extended_clearance
    assert r is not None and r.relative() == (10.0, 1.0, 2.0, 0.0)
    assert scenario_from_dict(scenario_to_dict(s)) == s


@pytest.mark.parametrize(
    ("ecm", "field", "words"),
    [
        ({"ps_inf": 10, "ps_eff": 1}, "victim.extended_clearance.cl_met", "is missing"),
        ({"ps_inf": 10, "ps_eff": "1 mL/min", "cl_met": 2}, "victim.extended_clearance", "mixes flows and plain numbers"),
        ({"ps_inf": 0, "ps_eff": 1, "cl_met": 2}, "victim.extended_clearance.ps_inf", "outside"),
        ({"ps_inf": 10, "ps_eff": -1, "cl_met": 2}, "victim.extended_clearance.ps_eff", "outside"),
        ({"ps_inf": "10 mg", "ps_eff": 1, "cl_met": 2}, "victim.extended_clearance.ps_inf", "flow"),
        ({"ps_inf": 10, "ps_eff": 1, "cl_met": 0, "cl_bile": 0}, "victim.extended_clearance.cl_met", "both zero"),
        ({"ps_inf": 10, "ps_eff": 1, "cl_met": 2, "hepatic_fraction": 0.8}, "victim.extended_clearance.hepatic_fraction", "sums to 1.1"),
        ({"ps_inf": 10, "ps_eff": 1, "cl_met": 2, "passive": 1}, "victim.extended_clearance.passive", "not a known key"),
    ],
)
def test_extended_clearance_errors_name_the_field(ecm: dict[str, Any], field: str, words: str) -> None:
    found = problems(with_ecm(**ecm))
    assert field in found, found
    assert words in found[field]


def test_with_extended_clearance_fractions_are_shares_of_each_clearance() -> None:
    """fm of CLmet and uptake fractions of PS_inf: each sums to at most 1 on its own, not together."""
    data = with_ecm(ps_inf=10, ps_eff=1, cl_met=2)
    data["victim"]["pathways"] = [{"transporter": "OATP1B1", "fraction": 0.9}, {"enzyme": "CYP2C9", "fm": 0.9}]
    scenario_from_dict(data)
    data["victim"]["pathways"].append({"transporter": "OATP1B3", "fraction": 0.2})
    assert "fractions of PS_inf" in problems(data)["victim.pathways"]


# ----------------------------------------------------------------- site concentrations, active moiety, multipliers


def test_site_concentrations_and_active_molar_mass() -> None:
    data = statin_like()
    data["perpetrator"]["site_concentrations"] = {"ient": "29 uM", "iin_max_u": "0.236 uM"}
    data["perpetrator"]["active_molar_mass"] = "470 g/mol"
    s = scenario_from_dict(data)
    sites = s.perpetrator.site_concentrations
    assert sites is not None and sites.igut is None and float(sites.ient.magnitude) == 29.0  # type: ignore[union-attr]
    assert scenario_from_dict(scenario_to_dict(s)) == s
    assert loads_scenario(dumps_scenario(s)) == s


@pytest.mark.parametrize(
    ("sites", "field", "words"),
    [
        ({"ient": "0 uM"}, "perpetrator.site_concentrations.ient", "zero"),
        ({"ient": "5 ng/mL"}, "perpetrator.site_concentrations.ient", "molar"),
        ({"imax": "1 uM"}, "perpetrator.site_concentrations.imax", "not a known key"),
    ],
)
def test_site_concentration_errors(sites: dict[str, Any], field: str, words: str) -> None:
    data = statin_like()
    data["perpetrator"]["site_concentrations"] = sites
    found = problems(data)
    assert field in found, found
    assert words in found[field]


def test_multipliers_are_read_and_checked() -> None:
    data = statin_like()
    data["multipliers"] = {"tdi-liver": 50}
    assert scenario_from_dict(data).multipliers == (("tdi-liver", 50.0),)
    data["multipliers"] = {"tdi-liver": 0}
    assert "multipliers.tdi-liver" in problems(data)
    data["multipliers"] = 5
    assert "multipliers" in problems(data)


# ----------------------------------------------------------------- faithful save with the new keys

TEXT = """\
title = "invented transporter scenario"  # a test input
invented = true

[perpetrator]
name = "P"
molar_mass = "400 g/mol"
dose = "100 mg"
cmax = "1 uM"
fu_plasma = 0.1
active_molar_mass = "350 g/mol"  # the active form

[perpetrator.site_concentrations]
ient = "29 uM"  # as printed

[[perpetrator.inhibits]]
target = "BCRP"
ic50 = "2 uM"

[victim]
name = "V"
dose = "10 mg"
interval = "24 h"
fg = 0.9
renal_fraction = 0.3  # urine recovery

[victim.extended_clearance]
ps_inf = "300 mL/min"   # uptake
ps_eff = "30 mL/min"
cl_met = "60 mL/min"

[[victim.pathways]]
transporter = "BCRP"  # intestinal efflux
fraction = 0.5

[[victim.pathways]]
transporter = "OATP1B1"
route = "hepatic uptake"
fraction = 0.8  # of PS_inf

[multipliers]
tdi-liver = 50  # as the older guidance
"""


def test_faithful_edit_keeps_comments_and_changes_only_the_edited_value() -> None:
    import tomllib

    data = tomllib.loads(TEXT)
    data["victim"]["extended_clearance"]["ps_eff"] = "45 mL/min"
    data["victim"]["pathways"][1]["fraction"] = 0.7
    out = edit_scenario_text(TEXT, data)
    assert 'ps_eff = "45 mL/min"' in out and "fraction = 0.7  # of PS_inf" in out
    assert out.replace('"45 mL/min"', '"30 mL/min"').replace("0.7  # of PS_inf", "0.8  # of PS_inf") == TEXT
    assert loads_scenario(out).victim.pathways[1].fm == 0.7
