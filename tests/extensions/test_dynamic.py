"""The time course (interact.dynamic) against the static model and closed-form solutions.

Outside references and limits (no published time-course table was available):
- the limit the issue names: with the perpetrator's concentrations held constant
  (a constant infusion), the dynamic steady-state AUC ratio equals the static
  mechanistic ratio (Fahmi et al. 2008 net-effect structure, seen in S14; terms
  from memory), for every mechanism, with and without the gut wall, for any
  victim extraction ratio (algebra: well-stirred oral AUC = Fa Fg Dose / CLint);
- closed-form solutions of the enzyme turnover equation dE/dt = kdeg (ind - E) - kobs E
  with constant inputs (first-order approach to kdeg x ind/(kdeg + kobs), recovery
  with rate kdeg after stopping) - standard linear ODE algebra;
- one-compartment multiple-dose pharmacokinetics (superposition, common practice):
  the model's steady-state peak equals the scenario's Cmax,ss;
- kinact -> 0 and Emax -> 0 reduce the course to the reversible one;
- solvers cross-checked: scipy odeint (LSODA) against solve_ivp BDF and LSODA.
Scenario values are arbitrary test inputs (invented), never check values.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from conftest import base_dict

from interact import assess
from interact.dynamic import simulate, time_course_arrays
from interact.errors import InputError
from interact.scenario import scenario_from_dict

# Scenarios here trigger model warnings (Fg not given, fu,inc = 1, kdeg from memory ...) as a side effect of
# what they test; the warnings themselves are checked in tests/api/test_warnings.py and where a test asks for one.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")


def _assess(inhibits: dict, *, victim: dict | None = None, perp: dict | None = None, turnover: list | None = None):  # type: ignore[no-untyped-def]
    d = base_dict()
    d["perpetrator"].update({"interval": "24 h", "half_life": "10 h", **(perp or {})})
    d["perpetrator"]["inhibits"] = [{"target": "CYP3A", "fu_inc": 1.0, **inhibits}]
    d["victim"].update({"half_life": "6 h", "interval": "12 h", **(victim or {})})
    if turnover:
        d["turnover"] = turnover
    return assess(scenario_from_dict(d))


REV = {"ki": "2 uM"}
TDI = {"kinact": "0.02 1/min", "ki_inact": "3 uM"}
IND = {"emax": 3.0, "ec50": "2 uM"}


@pytest.mark.parametrize(
    ("inhibits", "victim"),
    [
        (REV, {}),
        (TDI, {}),
        (IND, {}),
        ({**REV, **TDI, **IND}, {}),
        ({**REV, **TDI, **IND}, {"hepatic_extraction": 0.85}),
        ({**REV, **TDI}, {"fg": 1.0}),
    ],
    ids=["reversible", "tdi", "induction", "mixed", "mixed-high-extraction", "no-gut"],
)
def test_constant_infusion_converges_to_the_static_ratio(inhibits: dict, victim: dict) -> None:
    a = _assess(inhibits, victim=victim)
    tc = simulate(a, mode="constant", days=40, washout_days=2, rtol=1e-9, atol=1e-12)
    assert tc.steady
    assert tc.steady_state_ratio == pytest.approx(a.prediction.total, rel=1e-6)
    assert tc.static_ratio == a.prediction.total


def test_intravenous_victim_matches_static_only_at_low_extraction() -> None:
    # IV victim, well-stirred liver: AUC = Dose / CL_h, so the ratio CL_h0/CL_h equals the static
    # 1/(fm a + 1 - fm) only when extraction is low (CL_h ~ CLint); at high extraction flow limits the change
    mixed = {**REV, **TDI, **IND}
    low = _assess(mixed, victim={"route": "intravenous", "hepatic_extraction": 1e-4})
    tc = simulate(low, mode="constant", days=40, washout_days=2, rtol=1e-9, atol=1e-12)
    assert tc.steady_state_ratio == pytest.approx(low.prediction.total, rel=1e-3)
    high = _assess(mixed, victim={"route": "intravenous", "hepatic_extraction": 0.8})
    tch = simulate(high, mode="constant", days=40, washout_days=2)
    assert 1.0 < tch.steady_state_ratio < high.prediction.total
    assert any("extraction" in n for n in tch.notes)


def test_enzyme_follows_the_closed_form_solution_under_constant_concentrations() -> None:
    # dE/dt = kdeg (ind - E) - kobs E with constant ind, kobs: E = Ess + (1 - Ess) exp(-(kdeg + kobs) t);
    # after stopping: E = 1 + (E_stop - 1) exp(-kdeg (t - stop))
    a = _assess({**TDI, **IND}, victim={"fg": 1.0}, turnover=[{"enzyme": "CYP3A", "kdeg_liver": "0.04 1/h"}])
    tc = simulate(a, mode="constant", days=10, washout_days=10, rtol=1e-10, atol=1e-13)
    e = next(x for x in tc.enzymes if x.site == "liver")
    c = a.species[0].unbound_inlet_um
    kdeg, kobs = 0.04, 1.2 * c / (3.0 + c)
    ind = 1.0 + 3.0 * c / (2.0 + c)
    rate = kdeg + kobs
    ess = ind * kdeg / rate
    t = np.asarray(tc.time_h)
    amount = np.asarray(e.amount)
    during = t <= tc.stop_h
    expect = ess + (1.0 - ess) * np.exp(-rate * t[during])
    assert amount[during] == pytest.approx(expect, rel=1e-6, abs=1e-9)
    e_stop = ess + (1.0 - ess) * math.exp(-rate * tc.stop_h)
    after = t > tc.stop_h
    assert amount[after] == pytest.approx(1.0 + (e_stop - 1.0) * np.exp(-kdeg * (t[after] - tc.stop_h)), rel=1e-6)
    assert e.amount_static == pytest.approx(ess, rel=1e-12)


def test_recovery_after_tdi_is_governed_by_kdeg_and_reversible_offset_is_fast() -> None:
    # mild TDI, short perpetrator half-life: enzyme recovery ~ ln(10)/kdeg (first-order resynthesis)
    mild = {"kinact": "0.001 1/min", "ki_inact": "3 uM"}
    times = {}
    for kdeg in (0.02, 0.04):
        a = _assess(mild, perp={"half_life": "3 h"}, victim={"fg": 1.0}, turnover=[{"enzyme": "CYP3A", "kdeg_liver": f"{kdeg} 1/h"}])
        tc = simulate(a, days=20)
        e = tc.enzymes[0]
        assert e.recovery_h == pytest.approx(math.log(10) / kdeg, rel=0.2)
        times[kdeg] = tc.offset_h
    assert times[0.02] / times[0.04] == pytest.approx(2.0, rel=0.25)
    rev = simulate(_assess({"ki": "0.5 uM"}, perp={"half_life": "3 h"}, victim={"fg": 1.0}), days=5)
    assert rev.offset_h is not None and rev.offset_h < 48.0 < times[0.02]
    assert rev.enzymes == ()


def test_kinact_and_emax_to_zero_reduce_to_the_reversible_course() -> None:
    base = simulate(_assess(REV), days=10, washout_days=3, rtol=1e-10, atol=1e-13)
    tiny = simulate(
        _assess({**REV, "kinact": "1e-12 1/min", "ki_inact": "3 uM", "emax": 1e-12, "ec50": "2 uM"}),
        days=10,
        washout_days=3,
        rtol=1e-10,
        atol=1e-13,
    )
    assert tiny.steady_state_ratio == pytest.approx(base.steady_state_ratio, rel=1e-6)
    assert np.asarray(tiny.victim_with) == pytest.approx(np.asarray(base.victim_with), rel=1e-6)


def test_perpetrator_model_reproduces_cmax_and_fast_forcing_matches() -> None:
    a = _assess(REV, perp={"ka": "0.02 1/min"})
    tc = simulate(a, days=15)
    from interact.course.forcing import ss_shape

    # the steady-state peak of the fitted one-compartment model is the scenario's Cmax (1 uM), by superposition on a fine grid
    ka, ke, tau = 1.2, math.log(2) / 10.0, 24.0
    shape, tmax = ss_shape(ka, ke, tau)
    grid = np.linspace(0, tau, 20001)
    n = 60
    conc = sum(ka / (ka - ke) * (np.exp(-ke * (grid + i * tau)) - np.exp(-ka * (grid + i * tau))) for i in range(n))
    assert conc.max() == pytest.approx(shape, rel=1e-7)
    assert grid[conc.argmax()] == pytest.approx(tmax, abs=2e-3)
    assert max(tc.perpetrator_um) == pytest.approx(1.0, rel=2e-3)  # grid of 0.5 h around the peak
    assert max(tc.perpetrator_um) <= 1.0 + 1e-9


def test_solvers_agree() -> None:
    a = _assess({**REV, **TDI, **IND})
    ref = simulate(a, days=12)
    for method in ("LSODA", "BDF"):
        other = simulate(a, days=12, method=method)
        assert other.steady_state_ratio == pytest.approx(ref.steady_state_ratio, rel=1e-4)
        assert other.onset_h == pytest.approx(ref.onset_h, abs=1.0)


def test_dynamic_ratio_does_not_exceed_the_static_peak_based_one_for_inhibition() -> None:
    # the static model uses peak concentrations (Cmax plus the portal peak); the course fluctuates below them
    for inhibits in (REV, {**REV, **TDI}):
        a = _assess(inhibits)
        tc = simulate(a, days=20)
        assert 1.0 < tc.steady_state_ratio <= a.prediction.total


def test_baseline_curve_and_outputs_are_consistent() -> None:
    a = _assess({**TDI, **IND})
    tc = simulate(a, days=10)
    t = np.asarray(tc.time_h)
    base = np.asarray(tc.victim_without)
    # AUC of the baseline over one interval equals F x Dose / CL (a victim at steady state)
    sel = (t >= 24.0) & (t <= 36.0)
    auc = np.trapezoid(base[sel], t[sel]) if hasattr(np, "trapezoid") else np.trapz(base[sel], t[sel])
    ratio_window = np.asarray(tc.exposure_ratio)
    assert ratio_window[0] == pytest.approx(1.0, rel=1e-6)
    assert tc.victim_with[0] == pytest.approx(tc.victim_without[0], rel=1e-6)
    assert auc > 0
    arrays = time_course_arrays(tc)
    assert set(arrays) >= {
        "time_day",
        "victim_with",
        "victim_without",
        "exposure_ratio",
        "perpetrator_um",
        "enzyme:CYP3A:liver",
        "enzyme:CYP3A:gut",
    }
    assert all(len(v) == len(t) for v in arrays.values())
    assert all(np.all(np.isfinite(v)) for v in arrays.values())
    assert {s.label for s in tc.kdeg_used} == {"kdeg CYP3A (liver)", "kdeg CYP3A (gut)"}
    assert any("from memory" in w for w in tc.warnings)


def test_profile_mode_reproduces_the_regimen() -> None:
    a = _assess({**REV, **TDI})
    reg = simulate(a, days=8, washout_days=6)
    grid = np.linspace(0.0, reg.end_h + 1.0, 40001)
    t = np.asarray(reg.time_h)
    # rebuild the plasma profile on a fine grid from the regimen's analytic model via the public arrays' model
    fine = np.interp(grid, t, np.asarray(reg.perpetrator_um))
    prof = simulate(a, days=8, washout_days=6, mode="profile", profile=(grid, fine))
    assert prof.steady_state_ratio == pytest.approx(reg.steady_state_ratio, rel=5e-3)


def test_missing_inputs_name_the_field() -> None:
    d = base_dict()
    a = assess(scenario_from_dict(d))
    with pytest.raises(InputError, match=r"perpetrator\.interval"):
        simulate(a)
    d["perpetrator"]["interval"] = "24 h"
    with pytest.raises(InputError, match=r"perpetrator\.half_life"):
        simulate(assess(scenario_from_dict(d)))
    d["perpetrator"]["half_life"] = "10 h"
    with pytest.raises(InputError, match=r"victim\.half_life"):
        simulate(assess(scenario_from_dict(d)))
    d["victim"]["half_life"] = "5 h"
    ok = assess(scenario_from_dict(d))
    with pytest.raises(InputError, match="days"):
        simulate(ok, days=0)
    with pytest.raises(InputError, match="mode"):
        simulate(ok, mode="sometimes")
    with pytest.raises(InputError, match="profile"):
        simulate(ok, mode="profile")


def test_constant_infusion_with_an_inhibitory_metabolite() -> None:
    d = base_dict()
    d["perpetrator"].update({"interval": "24 h", "half_life": "10 h"})
    d["perpetrator"]["inhibits"] = [{"target": "CYP3A", "fu_inc": 1.0, **TDI}]
    d["perpetrator"]["metabolites"] = [
        {
            "name": "M1",
            "cmax": "0.5 uM",
            "fu_plasma": 0.2,
            "inhibits": [{"target": "CYP3A", "ki": "1 uM", "emax": 2.0, "ec50": "1 uM"}],
        }
    ]
    d["victim"].update({"half_life": "6 h"})
    a = assess(scenario_from_dict(d))
    tc = simulate(a, mode="constant", days=40, washout_days=2, rtol=1e-9, atol=1e-12)
    assert tc.steady_state_ratio == pytest.approx(a.prediction.total, rel=1e-6)
    reg = simulate(a, days=20)
    assert any("metabolite" in n for n in reg.notes)


def test_intravenous_perpetrator_reproduces_cmax() -> None:
    a = _assess(REV, perp={"route": "intravenous"})
    tc = simulate(a, days=10, points_per_interval=96)
    # bolus model: the peak right after each dose equals Cmax,ss (1 uM) at steady state
    assert max(tc.perpetrator_um) == pytest.approx(1.0, rel=1e-6)
    assert tc.steady_state_ratio <= a.prediction.total


def test_window_spans_both_dosing_intervals() -> None:
    from interact.course.model import lcm_window

    assert lcm_window(12.0, 24.0) == 24.0
    assert lcm_window(8.0, 12.0) == 24.0
    assert lcm_window(24.0, 24.0) == 24.0
    assert lcm_window(24.0, 7 * 24.0 + 1 / 60) == 192.0  # no common multiple within a week: next victim multiple


def test_rebound_below_baseline_after_stopping_a_reversible_inhibitor_that_induces() -> None:
    # algebra of the model: after stopping, the reversible term returns to 1 as the perpetrator is eliminated,
    # while induced enzyme (E > 1) decays only with kdeg, so exposure falls below baseline for a while
    a = _assess({"ki": "0.05 uM", "emax": 4.0, "ec50": "1 uM"}, perp={"half_life": "3 h"}, victim={"fg": 1.0})
    tc = simulate(a, days=20)
    assert tc.steady_state_ratio > 1.25
    assert tc.enzymes[0].amount_at_stop > 1.0
    assert tc.after_stop_ratio < 1.0
    assert any("After stopping" in w for w in tc.warnings)
    assert tc.half_offset_h is not None and tc.half_offset_h <= tc.offset_h
