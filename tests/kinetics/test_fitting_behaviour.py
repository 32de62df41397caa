"""Behaviour of the global fit: design warnings, identifiability, errors and failures.

Data here are simulated from the rate laws with invented constants (stated
below); they test that a warning or refusal appears when it should, and are
not check values for any published result.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from interact.errors import FitError, InputError
from interact.kinetics import CurveModel, fit_curve, fit_inhibition, incubation_data
from interact.kinetics.diagnostics import dixon_data, double_reciprocal_data, residual_data
from interact.kinetics.ratelaws import competitive, substrate_inhibition

from .conftest import columns

S_LEVELS = np.array([2.5, 5.0, 10.0, 20.0, 40.0, 80.0])
I_LEVELS = np.array([0.0, 2.5, 5.0, 10.0, 20.0])


def _grid(s_levels: np.ndarray = S_LEVELS, i_levels: np.ndarray = I_LEVELS, reps: int = 2) -> tuple[np.ndarray, np.ndarray]:
    ss, ii = np.meshgrid(s_levels, i_levels)
    return np.repeat(ss.ravel(), reps), np.repeat(ii.ravel(), reps)


def _competitive_data(seed: int = 0, sd: float = 1.5, **kw: object):
    s, i = _grid(**kw)  # type: ignore[arg-type]
    v = competitive(s, i, 100.0, 10.0, 5.0) + np.random.default_rng(seed).normal(0, sd, s.size)
    return s, i, v


def test_competitive_data_give_a_competitive_verdict_and_a_bounded_ki() -> None:
    s, i, v = _competitive_data()
    comp = fit_inhibition(incubation_data(s, i, v))
    assert comp.verdict.model == "competitive"
    ki = comp.ki
    assert ki is not None and ki.profile_low < 5.0 < ki.profile_high
    assert ki.profile_high - ki.value != pytest.approx(ki.value - ki.profile_low, rel=1e-3)  # asymmetric


def test_substrate_range_below_km_is_flagged() -> None:
    s, i, v = _competitive_data(s_levels=np.array([0.5, 1.0, 1.5, 2.0, 3.0]), sd=0.3)
    comp = fit_inhibition(incubation_data(s, i, v))
    assert any("below Km" in w for w in comp.warnings)


def test_few_inhibitor_levels_and_missing_control_are_flagged() -> None:
    s, i, v = _competitive_data(i_levels=np.array([2.0, 8.0]))
    comp = fit_inhibition(incubation_data(s, i, v))
    assert any("inhibitor level" in w for w in comp.warnings)
    assert any("No control rows" in w for w in comp.warnings)


def test_depletion_above_ten_percent_names_the_lines() -> None:
    s, i, v = _competitive_data()
    depletion = np.full(s.size, 4.0)
    depletion[[3, 7]] = [14.0, 25.0]
    data = incubation_data(s, i, v, depletion_pct=depletion, lines=range(2, s.size + 2))
    warnings = " ".join(fit_inhibition(data).warnings)
    assert "lines 5, 9" in warnings and "20 % limit" in warnings


def test_an_outlier_is_flagged_by_its_line() -> None:
    s, i, v = _competitive_data(sd=0.8)
    v[11] *= 1.6
    data = incubation_data(s, i, v, lines=range(2, s.size + 2))
    assert any("outlier" in w and "line 13" in w for w in fit_inhibition(data).warnings)


def test_substrate_inhibition_on_the_control_curve_is_flagged() -> None:
    s, i = _grid(s_levels=np.array([2.5, 5.0, 10.0, 20.0, 40.0, 80.0, 160.0, 320.0]))
    v = substrate_inhibition(s, 100.0, 10.0, 60.0) / (1 + i / 5.0)  # invented constants
    v = v + np.random.default_rng(3).normal(0, 0.5, s.size)
    comp = fit_inhibition(incubation_data(s, i, v))
    assert comp.substrate_inhibition is not None
    assert any("substrate inhibition" in w for w in comp.warnings)
    # the competitive model degenerates on these data (Km and Ki run to zero together): it must stop on its
    # cap, converge and say so, not spin to the iteration limit or report a number as if it were a result
    competitive = comp.fit("competitive")
    assert competitive.success and competitive.estimate("Ki").at_bound and not competitive.estimate("Ki").identifiable


def test_weak_inhibition_leaves_ki_open_above() -> None:
    s, i = _grid(i_levels=np.array([0.0, 0.1, 0.2, 0.4]))
    v = competitive(s, i, 100.0, 10.0, 500.0) + np.random.default_rng(5).normal(0, 2.0, s.size)
    comp = fit_inhibition(incubation_data(s, i, v), models=("none", "competitive"))
    ki = comp.fit("competitive").estimate("Ki")
    assert ki.profile_high == math.inf and not ki.identifiable


def test_bad_designs_and_options_raise_named_errors() -> None:
    s, i, v = _competitive_data()
    data = incubation_data(s, i, v)
    with pytest.raises(InputError, match="models"):
        fit_inhibition(data, models=("allosteric",))
    with pytest.raises(InputError, match="weights"):
        fit_inhibition(data, weights="1/x")
    single = fit_inhibition(incubation_data(s, np.zeros_like(s), v))  # one level: plain Michaelis-Menten only
    assert single.models == ("none",) and single.ki is None and "Michaelis-Menten fit only" in single.verdict.text
    with pytest.raises(FitError, match="substrate"):
        fit_inhibition(incubation_data(np.full(s.size, 5.0), i, v))
    vmk = incubation_data(*columns("nlstools_vmkmki.csv", "S", "I", "v"))
    with pytest.raises(InputError, match="positive observations"):
        fit_inhibition(vmk, weights="1/y")


def test_non_convergence_is_reported_not_raised() -> None:
    def nowhere(u: np.ndarray, x: np.ndarray) -> np.ndarray:
        return np.full(x.size, np.nan)

    model = CurveModel(name="undefined", parameters=("a",), function=nowhere, jacobian=lambda u, x: np.ones((x.size, 1)))
    result = fit_curve(model, np.arange(5.0), np.arange(5.0), [[1.0]])
    assert result.success is False and "not finite" in result.message


def test_noise_free_data_do_not_produce_fake_intervals() -> None:
    s, i = _grid()
    comp = fit_inhibition(incubation_data(s, i, competitive(s, i, 100.0, 10.0, 5.0)))
    fit = comp.fit("competitive")
    assert fit.value("Ki") == pytest.approx(5.0, rel=1e-8)
    assert fit.estimate("Ki").std_error is None and any("exactly" in w for w in fit.warnings)


def test_diagnostic_lines_show_the_mechanism() -> None:
    s, i, v = _competitive_data()
    comp = fit_inhibition(incubation_data(s, i, v))
    fit = comp.fit("competitive")
    vmax, ki = fit.value("Vmax"), fit.value("Ki")
    lines = [x for x in double_reciprocal_data(comp, "competitive").series if x.kind == "line"]
    for line in lines:  # competitive: every line crosses the 1/v axis at 1/Vmax
        slope = (line.y[1] - line.y[0]) / (line.x[1] - line.x[0])
        assert line.y[0] - slope * line.x[0] == pytest.approx(1.0 / vmax, rel=1e-9)
    dixon = [x for x in dixon_data(comp, "competitive").series if x.kind == "line"]
    at = []
    for line in dixon:  # Dixon: all lines pass through I = -Ki at 1/v = 1/Vmax
        slope = (line.y[1] - line.y[0]) / (line.x[1] - line.x[0])
        at.append(line.y[0] + slope * (-ki - line.x[0]))
    assert np.allclose(at, 1.0 / vmax, rtol=1e-9)
    resid = residual_data(comp)
    assert sum(len(x.x) for x in resid.series if x.kind == "points") == s.size
    assert "uM" in double_reciprocal_data(comp).x_label
