"""The time course keeps scalar forms of two things for speed inside the ODE's right-hand side: the perpetrator's
site concentrations (:meth:`PerpetratorCourse.forcing`) and each enzyme's three terms.  The vectorised forms use the
shared functions (:mod:`interact.exposure` for concentrations, :mod:`interact.prediction` for the terms); these
tests hold the scalar forms to them.

Inputs are arbitrary test values or invented scenarios, not check values: the check is the agreement of the forms.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from conftest import base_dict
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import assess
from interact.course.forcing import PerpetratorCourse
from interact.course.model import build
from interact.course.solve import right_hand_side
from interact.exposure import enterocyte_um, unbound_inlet_um
from interact.prediction import inactivation_term, induction_term, reversible_term
from interact.scenario import scenario_from_dict

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")


def _perp(mode: str, oral: bool) -> PerpetratorCourse:
    grid = np.linspace(-1.0, 400.0, 50)
    return PerpetratorCourse(
        mode=mode, oral=oral, dose=300.0, tau=24.0, n_doses=10, stop=240.0, ka=1.5, ke=0.1 if mode == "regimen" else 0.0,
        vf=80.0, fu=0.05, fa_fg=0.6, fa=0.9, fu_gut=0.5, qh=90.0, rb=1.1, qent=18.0, cmax=4.0, metabolites=((0.2, 0.4),),
        const_inlet=(0.2, 0.03), const_ent=(1.0, 0.03), profile_t=grid, profile_c=2.0 + np.sin(grid / 7.0),
    )  # fmt: skip


@pytest.mark.parametrize(("mode", "oral"), [("regimen", True), ("regimen", False), ("profile", True), ("constant", True)])
def test_scalar_and_vector_site_concentrations_agree(mode: str, oral: bool) -> None:
    perp = _perp(mode, oral)
    grid = np.concatenate((np.linspace(0.0, 239.0, 377), [23.999, 24.0, 240.0, 300.0]))
    inlet_v, ent_v, _ = perp.concentrations(grid)
    fast = perp.forcing()
    for k, t in enumerate(grid):
        inlet, ent = fast(float(t))
        assert inlet == pytest.approx(inlet_v[:, k], rel=1e-12, abs=1e-15)
        assert ent == pytest.approx(ent_v[:, k], rel=1e-12, abs=1e-15)


def test_site_concentrations_are_the_static_ones_with_the_gut_amount_in_place_of_the_dose() -> None:
    perp = _perp("regimen", True)
    t = np.array([0.5, 30.0, 100.0])
    c, g = perp.plasma(t)
    inlet, ent, _ = perp.concentrations(t)
    # per minute or per hour alike: only ka/Q enters (the exposure functions take 1/min and L/min)
    assert inlet[0] == pytest.approx(unbound_inlet_um(c, 0.05, g, 0.6, 1.5 / 60, 90.0 / 60, 1.1), rel=1e-12)
    assert ent[0] == pytest.approx(enterocyte_um(g, 0.9, 1.5 / 60, 18.0 / 60, 0.5), rel=1e-12)


def _model(fg: float):  # type: ignore[no-untyped-def]
    d = base_dict()
    d["perpetrator"].update({"interval": "24 h", "half_life": "10 h"})
    d["perpetrator"]["inhibits"] = [
        {"target": "CYP3A", "fu_inc": 1.0, "ki": "2 uM", "kinact": "0.02 1/min", "ki_inact": "3 uM", "emax": 3.0, "ec50": "2 uM"}
    ]
    d["victim"].update({"half_life": "6 h", "interval": "12 h", "fg": fg})
    return build(assess(scenario_from_dict(d)), days=10, washout_days=5, mode="regimen", profile=None)


@settings(max_examples=40, deadline=None)
@given(t=st.floats(-2.0, 400.0), amounts=st.lists(st.floats(0.05, 5.0), min_size=2, max_size=2), fg=st.sampled_from([0.3, 1.0]))
def test_right_hand_side_uses_the_shared_terms(t: float, amounts: list[float], fg: float) -> None:
    model = _model(fg)
    forcing = model.perp.forcing()
    rhs = right_hand_side(model, forcing)
    turn = [x for x in model.sites if x.turnover]
    y = np.array([3.0, 0.0, *amounts[: len(turn)]])
    got = rhs(t, y)
    inlet, ent = forcing(t)
    liver, gut_a, j = model.victim.other, 1.0, 0
    for x in model.sites:
        conc = np.array(inlet if x.site == "liver" else ent)[:, None]
        r, kobs, ind = (float(v[0]) for v in x.terms(conc))
        amount = y[2 + j] if x.turnover else ind
        if x.turnover:
            assert x.kdeg is not None
            # dE/dt = kdeg (induction - E) - kobs E, whose steady state is the static induction x inactivation
            steady = float(induction_term(ind - 1.0) * inactivation_term(kobs, x.kdeg))
            assert got[2 + j] == pytest.approx((x.kdeg + kobs) * (steady - amount), rel=1e-9, abs=1e-12)
            j += 1
        if x.site == "liver":
            liver += x.fm * amount * r
        else:
            gut_a = amount * r
    v = model.victim
    clint = v.clint0 * liver
    elim = v.qh * clint / (v.qh + clint) / v.vol * y[0]
    since = (t - model.t_start) % v.tau
    fg_t = 1.0 / (1.0 + v.gut_factor * gut_a) if any(x.site == "gut" for x in model.sites) else v.fg0
    absorb = v.ka * math.exp(-v.ka * since) / (1.0 - math.exp(-v.ka * v.tau)) * fg_t * v.qh / (v.qh + clint)
    assert got[0] == pytest.approx(absorb - elim, rel=1e-9, abs=1e-12)
    assert float(reversible_term(0.0)) == 1.0  # the shared term the sites use, at no inhibitor
