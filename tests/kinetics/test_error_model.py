"""The error structure as part of the model: variance model chosen by likelihood, weights by IRLS, warnings.

Data are simulated from the rate laws with invented constants (Vmax 100, Km 10 uM, Ki 5 uM); they are inputs.
Outside references: scipy.optimize.least_squares (the weighted fit at the IRLS fixed point) and
scipy.stats.spearmanr (the rank test behind the residual warning).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import least_squares

from interact.kinetics import fit_inhibition, incubation_data
from interact.kinetics.fitting import spearman
from interact.kinetics.ratelaws import competitive

from .recovery import _grid

S, INH = _grid()
MU = competitive(S, INH, 100.0, 10.0, 5.0)


def _data(seed: int, proportional: float = 0.0, constant: float = 0.0):  # type: ignore[no-untyped-def]
    rng = np.random.default_rng(seed)
    return incubation_data(S, INH, MU * (1 + proportional * rng.normal(size=MU.size)) + constant * MU.max() * rng.normal(size=MU.size))


def test_proportional_error_is_recognised_and_the_mechanism_read_right() -> None:
    """Issue 14: 4 % proportional error read as 'mixed' by the unweighted fit; the error model fixes it."""
    chosen, verdicts = [], []
    for seed in range(12):
        comp = fit_inhibition(_data(seed, proportional=0.04))
        assert comp.error_model is not None
        chosen.append(
            comp.error_model.name == "proportional" or (comp.error_model.name == "power" and 0.6 < comp.error_model.exponent < 1.4)
        )
        verdicts.append(comp.verdict.model)
    assert sum(chosen) >= 10, chosen
    assert verdicts.count("competitive") >= 11, verdicts


def test_constant_error_keeps_the_unweighted_fit() -> None:
    names = [fit_inhibition(_data(seed, constant=0.03)).error_model.name for seed in range(12)]  # type: ignore[union-attr]
    assert names.count("constant") >= 9, names


def test_irls_solution_is_the_weighted_least_squares_fixed_point() -> None:
    data = _data(7, proportional=0.06)
    comp = fit_inhibition(data)
    assert comp.error_model is not None and comp.error_model.name != "constant"
    fit = comp.fit("competitive")
    w = comp.error_model.weights
    vmax, km, ki = fit.value("Vmax"), fit.value("Km"), fit.value("Ki")
    v = np.asarray(data.velocity)
    ref = least_squares(
        lambda b: np.sqrt(w) * (competitive(S, INH, b[0], b[1], b[2]) - v),
        [vmax * 1.1, km * 0.9, ki * 1.2],
        xtol=1e-15,
        ftol=1e-15,
        gtol=1e-15,
    )
    assert ref.x == pytest.approx([vmax, km, ki], rel=1e-6)
    # and the weights are those of the variance model at the fitted values (geometric mean 1)
    theta = comp.error_model.exponent
    g = np.maximum(np.asarray(comp.fit(comp.error_model.model).fitted), 0.02 * max(comp.fit(comp.error_model.model).fitted)) ** theta
    expected = 1 / g**2
    assert w == pytest.approx(expected / np.exp(np.mean(np.log(expected))), rel=1e-6)


def test_forced_weights_are_kept_and_a_missed_structure_is_warned_about() -> None:
    data = _data(3, proportional=0.10)
    forced = fit_inhibition(data, weights="none")
    assert forced.error_model is None and forced.weights == "none"
    assert any("does not capture the error structure" in w for w in forced.warnings)
    auto = fit_inhibition(data)
    assert not any("does not capture the error structure" in w for w in auto.warnings)


@settings(max_examples=60, deadline=None)
@given(
    xs=st.lists(st.integers(-5, 5), min_size=5, max_size=40).map(lambda v: np.asarray(v, dtype=float)),
    seed=st.integers(0, 1000),
)
def test_spearman_matches_scipy(xs: np.ndarray, seed: int) -> None:
    from scipy.stats import spearmanr

    ys = np.random.default_rng(seed).integers(-3, 4, xs.size).astype(float)  # ties on both sides
    if np.ptp(xs) == 0 or np.ptp(ys) == 0:
        return
    rho, p = spearman(xs, ys)
    ref = spearmanr(xs, ys)
    assert rho == pytest.approx(float(ref.statistic), abs=1e-12)
    assert p == pytest.approx(float(ref.pvalue), rel=1e-9, abs=1e-15)
