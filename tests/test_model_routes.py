"""Transporter routes as data of the one interaction model (interact.model): the kidney organ that shares the
liver's systemic clearance, parallel gut losses, the extended-clearance liver form and the ceilings, each against
independent plain-float arithmetic written here.  Input values drawn by hypothesis are arbitrary test inputs."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import model
from interact.model import Acting, Pathway

positive = st.floats(1e-3, 1e3)
share = st.floats(0.0, 0.45)  # two shares of one organ sum to at most 0.9


def _activity(conc: float, ki: float) -> float:
    return 1.0 / (1.0 + conc / ki)


@settings(max_examples=200)
@given(
    ki=st.lists(positive, min_size=5, max_size=5),
    conc=st.lists(st.floats(0.0, 100.0), min_size=3, max_size=3),
    fg=st.floats(0.55, 1.0),
    fe=share,
    fm=share,
    fu=share,
    fr=st.floats(0.0, 0.1),
)
def test_routes_against_plain_arithmetic(ki: list[float], conc: list[float], fg: float, fe: float, fm: float, fu: float, fr: float) -> None:
    """Targets: 0 CYP3A (gut and liver), 1 an efflux transporter, 2 an uptake transporter, 3 a renal transporter."""
    acting = [Acting(target=t, species=0, ki_u=ki[t]) for t in range(4)]
    pathways = [
        Pathway(target=0, organ="gut", fraction=fg),
        Pathway(target=1, organ="gut", fraction=1.0 - fe),
        Pathway(target=0, organ="liver", fraction=fm),
        Pathway(target=2, organ="liver", fraction=fu),
        Pathway(target=3, organ="kidney", fraction=fr),
    ]
    sites = {"gut": [conc[0]], "liver": [conc[1]], "kidney": [conc[2]]}
    r = model.evaluate(acting, pathways, sites, {})
    a_gut, a_eff = _activity(conc[0], ki[0]), _activity(conc[0], ki[1])
    a_met, a_up, a_ren = _activity(conc[1], ki[0]), _activity(conc[1], ki[2]), _activity(conc[2], ki[3])
    losses = (1 - fg, fe)
    gut = 1 / (losses[0] * a_gut + losses[1] * a_eff + 1 - sum(losses))  # parallel losses of one dose
    liver = 1 / (fm * a_met + fu * a_up + 1 - fm - fu)
    systemic = 1 / (fm * a_met + fu * a_up + fr * a_ren + 1 - fm - fu - fr)  # liver and kidney share one clearance
    assert float(r.gut) == pytest.approx(gut, rel=1e-12)
    assert float(r.liver) == pytest.approx(liver, rel=1e-12)
    assert float(r.liver * r.kidney) == pytest.approx(systemic, rel=1e-12)
    assert float(r.total) == pytest.approx(gut * systemic, rel=1e-12)
    # ceilings: the inhibited targets at activity 0, from the same forms
    organs, total = model.Model(acting, pathways).ceilings({0, 1, 2, 3})
    assert float(organs["gut"]) == pytest.approx(1 / (1 - sum(losses)), rel=1e-12)
    assert float(organs["liver"]) == pytest.approx(1 / (1 - fm - fu), rel=1e-12)
    assert float(total) == pytest.approx(float(organs["gut"]) / (1 - fm - fu - fr), rel=1e-12)
    for name in ("gut", "liver", "kidney"):
        assert 1.0 - 1e-12 <= float(r.organs[name]) <= float(organs[name]) * (1 + 1e-12)


def test_one_gut_pathway_keeps_the_availability_form_to_the_last_bit() -> None:
    """A single gut pathway (gut-wall CYP3A alone) is 1/(a (1 - Fg) + Fg) exactly, as before the routes came."""
    fg, a = 0.56, 0.3
    out = model.organ_ratio("availability", [Pathway(target=0, organ="gut", fraction=fg)], [a])
    assert out == 1.0 / (a * (1.0 - fg) + fg)


def test_no_kidney_pathway_leaves_the_total_unchanged_to_the_last_bit() -> None:
    acting = [Acting(target=0, species=0, ki_u=0.7)]
    pathways = [Pathway(target=0, organ="gut", fraction=0.5), Pathway(target=0, organ="liver", fraction=0.8)]
    r = model.evaluate(acting, pathways, {"gut": [3.0], "liver": [0.4]}, {})
    assert r.kidney == 1.0 and r.total == r.gut * r.liver


@given(ps_inf=positive, ps_eff=positive, cl_met=positive, fh=st.floats(0.0, 0.95), fm=st.floats(0.0, 1.0), fu=st.floats(0.0, 1.0))
def test_extended_liver_form_against_the_written_equation(
    ps_inf: float, ps_eff: float, cl_met: float, fh: float, fm: float, fu: float
) -> None:
    """CLint,all = PS_inf CLmet / (PS_eff + CLmet), uptake share fu of PS_inf and enzyme share fm of CLmet inhibited."""
    acting = [Acting(target=0, species=0, ki_u=1.0), Acting(target=1, species=0, ki_u=2.0)]
    liver = model.Organ(site="liver", form="extended", clearances=(ps_inf, ps_eff, cl_met, 0.0), fraction=fh)
    organs = {**model.ORGANS, "liver": liver}
    pathways = [Pathway(target=0, organ="liver", fraction=fm), Pathway(target=1, organ="liver", fraction=fu, role="uptake")]
    r = model.Model(acting, pathways, organs).evaluate({"liver": [3.0]}, {})
    a_met, a_up = _activity(3.0, 1.0), _activity(3.0, 2.0)

    def clint(p_in: float, met: float) -> float:
        return p_in * met / (ps_eff + met)

    act = clint(ps_inf * (fu * a_up + 1 - fu), cl_met * (fm * a_met + 1 - fm)) / clint(ps_inf, cl_met)
    assert float(r.liver) == pytest.approx(1 / (fh * act + 1 - fh), rel=1e-10)


def test_unknown_form_and_missing_clearances_are_refused() -> None:
    with pytest.raises(ValueError, match="organ form"):
        model.organ_ratio("bile", [Pathway(target=0, organ="liver", fraction=0.5)], [0.5])
    with pytest.raises(ValueError, match="clearances"):
        model.organ_ratio("extended", [Pathway(target=0, organ="liver", fraction=0.5)], [0.5])
    assert math.isfinite(model.organ_ratio("shared", [Pathway(target=0, organ="kidney", fraction=0.2)], [0.5], base=2.0))
