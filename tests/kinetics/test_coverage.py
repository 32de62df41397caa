"""Simulate and recover: the Ki profile interval covers the true Ki at about its stated rate.

Data are generated from the competitive law itself (Michaelis & Menten form,
algebra in interact.kinetics.ratelaws) with known constants and Gaussian
noise, so the check asks only whether the stated 95 % interval is honest:
over 200 seeds the share of intervals containing the true Ki must lie within
three binomial standard deviations of 0.95 (sd = sqrt(0.95 x 0.05 / 200)).
The design (6 substrate levels bracketing Km, 5 inhibitor levels spanning Ki,
duplicates) is the usual one (common practice); the constants are invented
for the simulation and are not check values.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from interact.kinetics import fit_inhibition, incubation_data
from interact.kinetics.ratelaws import competitive, uncompetitive

# The designs here trigger fit warnings (few levels, depletion, an unbounded constant ...) as a side effect; the
# texts are checked on ModelComparison.warnings, their emission as FitWarning in tests/api/test_warnings.py.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.FitWarning")

SEEDS = 200
TOLERANCE = 3.0 * math.sqrt(0.95 * 0.05 / SEEDS)


def _grid() -> tuple[np.ndarray, np.ndarray]:
    s = np.array([2.5, 5.0, 10.0, 20.0, 40.0, 80.0])
    i = np.array([0.0, 2.5, 5.0, 10.0, 20.0])
    ss, ii = np.meshgrid(s, i)
    return np.repeat(ss.ravel(), 2), np.repeat(ii.ravel(), 2)


def _coverage(law, model: str, noise: str) -> tuple[float, float, int]:
    s, i = _grid()
    vmax, km, ki = 100.0, 10.0, 5.0
    truth = law(s, i, vmax, km, ki)
    inside_profile = inside_wald = chosen = 0
    for seed in range(SEEDS):
        rng = np.random.default_rng(seed)
        if noise == "constant":
            v = truth + rng.normal(0.0, 2.5, truth.size)
            weights = "none"
        else:
            v = truth * (1.0 + rng.normal(0.0, 0.05, truth.size))
            weights = "1/y2"
        comp = fit_inhibition(incubation_data(s, i, v), models=("none", model), weights=weights)
        est = comp.fit(model).estimate("Ki")
        inside_profile += est.profile_low <= ki <= est.profile_high
        inside_wald += est.ci_low <= ki <= est.ci_high
        chosen += comp.verdict.model == model
    return inside_profile / SEEDS, inside_wald / SEEDS, chosen


def test_competitive_ki_profile_interval_covers_at_95_percent() -> None:
    profile, wald, chosen = _coverage(competitive, "competitive", "constant")
    assert abs(profile - 0.95) <= TOLERANCE, profile
    assert abs(wald - 0.95) <= TOLERANCE + 0.02, wald  # Wald intervals are looser in nonlinear models
    assert chosen == SEEDS  # inhibition is always detected on this design


def test_uncompetitive_ki_with_relative_error_and_weights() -> None:
    profile, _, _ = _coverage(uncompetitive, "uncompetitive", "relative")
    assert abs(profile - 0.95) <= TOLERANCE, profile
