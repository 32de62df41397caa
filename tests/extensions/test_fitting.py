"""Fitting kobs, kinact/KI and Emax/EC50, checked against certified and published fits.

Outside references:
- NIST StRD nonlinear regression, dataset Misra1d (certified values, tests/data/
  nist_strd_Misra1d.csv and nist_strd_certified.csv / nist_strd_summary.csv).  Its
  model b1*b2*x/(1 + b2*x) is the hyperbola kobs = kinact x I/(KI + I) with
  kinact = b1 and KI = 1/b2; SE(KI) = SE(b2)/b2^2 exactly for the asymptotic
  standard error of a reparameterised fit (delta method on a one-to-one map).
- R datasets Puromycin, treated cells (Treloar 1974, in Bates & Watts 1988,
  Appendix A1.3): R's nls fit Vm 212.7 (SE 6.947), K 0.06412 (SE 0.008281),
  residual SE 10.93 on 10 df, RSS 1195.449 (seen, per /work/shared/checks/
  fit_reference_values.csv).  The same hyperbola.  For the induction model
  fold = 1 + Emax C/(EC50 + C) the data are shifted by +1 (fold = 1 + rate), which
  leaves every residual, and so Emax = Vm, EC50 = K and their SEs, unchanged.
- scipy.stats.linregress (a general-purpose library from the registry) for the
  log-linear kobs regression and its slope standard error.

Recovery of known parameters from noise-free curves is a property check of
self-consistency, not an outside reference.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from conftest import read_checks

from interact.errors import FitError, InputError
from interact.kinetics.inactivation import fit_inactivation, fit_inactivation_raw, fit_kobs, fit_kobs_series, kobs_hyperbola
from interact.kinetics.induction import _hill, _hill_jac, fit_induction, fold_change_model


def _digits(value: float, certified: float) -> float:
    """Log relative error, as NIST StRD counts matching significant digits."""
    if value == certified:
        return 15.0
    return -math.log10(abs(value - certified) / abs(certified))


def _misra1d() -> tuple[np.ndarray, np.ndarray]:
    rows = read_checks("nist_strd_Misra1d.csv")
    return np.array([float(r["x"]) for r in rows]), np.array([float(r["y"]) for r in rows])


def _certified(dataset: str) -> dict[str, tuple[float, float]]:
    return {
        r["param"]: (float(r["certified_value"]), float(r["certified_sd"]))
        for r in read_checks("nist_strd_certified.csv")
        if r["dataset"] == dataset
    }


def _summary(dataset: str) -> dict[str, str]:
    return next(r for r in read_checks("nist_strd_summary.csv") if r["dataset"] == dataset)


def _puromycin_treated() -> tuple[np.ndarray, np.ndarray]:
    rows = [r for r in read_checks("r_datasets_Puromycin.csv") if r["state"] == "treated"]
    return np.array([float(r["conc"]) for r in rows]), np.array([float(r["rate"]) for r in rows])


# --------------------------------------------------------------------------- kinact, KI


def test_hyperbola_matches_nist_misra1d_certified_values() -> None:
    x, y = _misra1d()
    cert = _certified("Misra1d")
    summ = _summary("Misra1d")
    b1, sd1 = cert["b1"]
    b2, sd2 = cert["b2"]
    fit = fit_inactivation(x, y)
    assert fit.success
    # NIST StRD: a good solver agrees with the certified values to 6 or more digits
    assert _digits(fit.kinact.value, b1) >= 8
    assert _digits(fit.ki.value, 1.0 / b2) >= 8
    assert _digits(fit.kinact.std_error, sd1) >= 6
    assert _digits(fit.ki.std_error, sd2 / b2**2) >= 6
    assert _digits(fit.fit.rss, float(summ["certified_rss"])) >= 8
    assert _digits(fit.fit.residual_sd, float(summ["certified_residual_sd"])) >= 8
    assert fit.fit.df == int(summ["dof"])


@pytest.mark.parametrize("start", [(500.0, 1.0 / 0.0001), (450.0, 1.0 / 0.0003)])
def test_misra1d_from_nist_start_values(start: tuple[float, float]) -> None:
    # NIST start vectors 1 and 2 (b1, b2), mapped to (kinact, KI = 1/b2)
    x, y = _misra1d()
    fit = fit_inactivation(x, y, start=start)
    assert _digits(fit.kinact.value, _certified("Misra1d")["b1"][0]) >= 7


def test_hyperbola_matches_puromycin_published_fit() -> None:
    c, v = _puromycin_treated()
    fit = fit_inactivation(c, v)
    # R nls, Puromycin treated: Vm 212.7 (SE 6.947), K 0.06412 (SE 0.008281), sigma 10.93, RSS 1195.449
    assert fit.kinact.value == pytest.approx(212.68370711, rel=1e-6)
    assert fit.kinact.std_error == pytest.approx(6.947, rel=5e-4)
    assert fit.ki.value == pytest.approx(0.06412123, rel=1e-5)
    assert fit.ki.std_error == pytest.approx(0.008281, rel=5e-4)
    assert fit.fit.residual_sd == pytest.approx(10.93, rel=5e-4)
    assert fit.fit.rss == pytest.approx(1195.449, rel=1e-6)
    # Wald 95% interval with t(10); t(0.975, 10) = 2.228 in printed Student-t tables (handbook value)
    from scipy.stats import t

    assert t.ppf(0.975, 10) == pytest.approx(2.228, abs=5e-4)
    assert fit.ki.ci_high - fit.ki.value == pytest.approx(t.ppf(0.975, 10) * fit.ki.std_error, rel=1e-12)
    assert fit.ki.value - fit.ki.ci_low == pytest.approx(fit.ki.ci_high - fit.ki.value, rel=1e-12)


def test_efficiency_delta_method() -> None:
    c, v = _puromycin_treated()
    fit = fit_inactivation(c, v)
    cov = np.asarray(fit.fit.covariance)
    g = np.array([1 / fit.ki.value, -fit.kinact.value / fit.ki.value**2])
    assert fit.efficiency.value == pytest.approx(fit.kinact.value / fit.ki.value, rel=1e-12)
    assert fit.efficiency.std_error == pytest.approx(math.sqrt(g @ cov @ g), rel=1e-12)


def test_linear_kobs_is_not_identifiable_and_says_so() -> None:
    c = np.array([1.0, 2.0, 4.0, 8.0, 16.0])
    fit = fit_inactivation(c, 0.01 * c)  # exactly linear: KI -> infinity
    assert any("poorly defined" in n for n in fit.notes)
    unbounded = fit.ki.profile_high is None or not math.isfinite(fit.ki.profile_high)
    assert (not fit.success) or unbounded or (fit.ki.std_error or 0) > fit.ki.value
    # the ratio kinact/KI is what such data define: 0.01 /min/uM
    assert fit.efficiency.value == pytest.approx(0.01, rel=1e-3)


# --------------------------------------------------------------------------- kobs


def test_kobs_slope_and_se_match_scipy_linregress() -> None:
    from scipy.stats import linregress

    t = np.array([0.0, 5.0, 10.0, 15.0, 20.0, 30.0])
    act = np.array([100.0, 81.0, 66.5, 55.0, 44.0, 30.5])
    ref = linregress(t, np.log(act))
    k = fit_kobs(t, act, concentration_um=3.0)
    assert k.kobs_per_min == pytest.approx(-ref.slope, rel=1e-12)
    assert k.std_error == pytest.approx(ref.stderr, rel=1e-10)
    assert k.intercept == pytest.approx(ref.intercept, rel=1e-12)
    assert k.r_squared == pytest.approx(ref.rvalue**2, rel=1e-12)
    # scale of activity (percent vs fraction) does not change kobs
    assert fit_kobs(t, act / 100.0).kobs_per_min == pytest.approx(k.kobs_per_min, rel=1e-12)
    # first-order loss A = A0 exp(-kobs t) (the model's own algebra) gives kobs back exactly, r^2 = 1
    exact = fit_kobs(t, 80.0 * np.exp(-0.037 * t))
    assert exact.kobs_per_min == pytest.approx(0.037, rel=1e-12) and exact.r_squared == pytest.approx(1.0, abs=1e-12)
    two = fit_kobs(t[:2], act[:2])  # two points: a line, but no standard error
    assert two.std_error is None and two.kobs_per_min == pytest.approx(math.log(act[0] / act[1]) / 5.0, rel=1e-12)


def test_two_step_recovers_known_constants_and_subtracts_vehicle() -> None:
    # property: noise-free data made from the model come back exactly
    kinact, ki, vehicle = 0.08, 2.5, 0.004
    conc = np.repeat([0.0, 0.5, 1.0, 2.5, 5.0, 10.0, 25.0], 5)
    time = np.tile([0.0, 3.0, 6.0, 10.0, 15.0], 7)
    act = 100.0 * np.exp(-(vehicle + kobs_hyperbola(conc, kinact, ki)) * time)
    fit = fit_inactivation_raw(conc, time, act)
    assert fit.success
    assert fit.kinact.value == pytest.approx(kinact, rel=1e-8)
    assert fit.ki.value == pytest.approx(ki, rel=1e-8)
    assert fit.vehicle_kobs_per_min == pytest.approx(vehicle, rel=1e-10)
    assert fit.kinact_per_h == pytest.approx(60 * kinact, rel=1e-8)
    assert len(fit.kobs_fits) == 7
    unsub = fit_inactivation_raw(conc, time, act, subtract_vehicle=False)
    assert unsub.kinact.value != pytest.approx(kinact, rel=1e-3)


def test_weighted_two_step_runs_with_kobs_standard_errors() -> None:
    rng = np.random.default_rng(7)
    conc = np.repeat([0.5, 1.0, 2.5, 5.0, 10.0, 25.0], 5)
    time = np.tile([0.0, 3.0, 6.0, 10.0, 15.0], 6)
    act = 100.0 * np.exp(-kobs_hyperbola(conc, 0.08, 2.5) * time) * np.exp(rng.normal(0, 0.02, conc.size))
    fit = fit_inactivation_raw(conc, time, act, weighted=True)
    assert fit.success and fit.kinact.ci_low < 0.08 < fit.kinact.ci_high


def test_bad_inputs_name_the_field() -> None:
    with pytest.raises(InputError, match=r"activity\[2\]"):
        fit_kobs([0, 5, 10], [100, 50, -1])
    with pytest.raises(InputError, match=r"concentration_um\[0\]"):
        fit_inactivation([0.0, 1.0, 2.0], [0.0, 0.1, 0.2])
    with pytest.raises(FitError, match="three or more"):
        fit_inactivation([1.0, 2.0], [0.1, 0.2])
    with pytest.raises(FitError, match="distinct"):
        fit_kobs([5, 5, 5], [90, 80, 70])
    with pytest.raises(FitError, match="differ in length"):
        fit_kobs_series([1, 1], [0, 5, 10], [100, 90, 80])
    with pytest.raises(InputError, match=r"fold_change\[1\]"):
        fit_induction([1, 2, 3, 4], [1.5, float("nan"), 2, 3])


# --------------------------------------------------------------------------- induction


def test_emax_model_matches_puromycin_fit_shifted_by_one() -> None:
    c, v = _puromycin_treated()
    fit = fit_induction(c, 1.0 + v)
    assert fit.success and fit.hill is None
    assert fit.emax.value == pytest.approx(212.68370711, rel=1e-6)
    assert fit.emax.std_error == pytest.approx(6.947, rel=5e-4)
    assert fit.ec50.value == pytest.approx(0.06412123, rel=1e-5)
    assert fit.ec50.std_error == pytest.approx(0.008281, rel=5e-4)
    assert fit.fit.rss == pytest.approx(1195.449, rel=1e-6)
    assert fit.max_fold_change == pytest.approx(1.0 + fit.emax.value)


def test_hill_jacobian_matches_finite_differences() -> None:
    x = np.array([0.0, 0.1, 0.5, 1.0, 3.0, 10.0, 30.0])
    th = np.array([6.0, 2.0, 1.6])
    jac = _hill_jac(th, x)
    for i in range(3):
        step = np.zeros(3)
        step[i] = 1e-6 * th[i]
        fd = (_hill(th + step, x) - _hill(th - step, x)) / (2 * step[i])
        assert jac[:, i] == pytest.approx(fd, rel=1e-6, abs=1e-9)


def test_hill_fit_recovers_known_parameters_and_warns_static_models() -> None:
    conc = np.repeat([0.0, 0.1, 0.3, 1.0, 3.0, 10.0, 30.0, 100.0], 3)
    fold = fold_change_model(conc, 8.0, 2.0, 1.7)
    fit = fit_induction(conc, fold, hill=True)
    assert fit.success
    assert (fit.emax.value, fit.ec50.value, fit.hill.value) == pytest.approx((8.0, 2.0, 1.7), rel=1e-7)
    assert any("h = 1" in n for n in fit.notes)
    h1 = fit_induction(conc, fold_change_model(conc, 8.0, 2.0))
    assert (h1.emax.value, h1.ec50.value) == pytest.approx((8.0, 2.0), rel=1e-8)
    assert not h1.notes


def test_emax_below_tested_range_is_flagged() -> None:
    conc = np.array([0.1, 0.2, 0.4, 0.8, 1.6])
    fit = fit_induction(conc, fold_change_model(conc, 10.0, 20.0))
    assert any("extrapolation" in n for n in fit.notes)
