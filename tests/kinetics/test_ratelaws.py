"""Rate laws: analytic Jacobians against central differences, and the limits the equations state.

The equations are the standard forms listed in interact/kinetics/ratelaws.py
(type-by-type behaviour seen in S1 Lee et al. 2024 and S12): competitive
inhibition raises the apparent Km to Km (1 + I/Ki) with Vmax unchanged,
noncompetitive lowers Vmax to Vmax/(1 + I/Ki) with Km unchanged.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from interact.kinetics import inhibition_model
from interact.kinetics import ratelaws as rl

pos = st.floats(min_value=0.05, max_value=500.0, allow_nan=False, allow_infinity=False)
conc = st.floats(min_value=0.0, max_value=500.0, allow_nan=False, allow_infinity=False)


def _central(fn, params: list[float], k: int) -> np.ndarray:
    h = 1e-6 * max(abs(params[k]), 1e-3)
    up, down = list(params), list(params)
    up[k] += h
    down[k] -= h
    return (np.asarray(fn(*up)) - np.asarray(fn(*down))) / (2 * h)


LAWS = [
    ("michaelis_menten", 2, False),
    ("competitive", 3, True),
    ("noncompetitive", 3, True),
    ("uncompetitive", 3, True),
    ("mixed", 4, True),
    ("substrate_inhibition", 3, False),
]


@pytest.mark.parametrize(("name", "p", "with_i"), LAWS)
@settings(max_examples=40, deadline=None)
@given(s=pos, i=conc, a=pos, b=pos, c=pos, d=pos)
def test_jacobian_matches_central_differences(
    name: str, p: int, with_i: bool, s: float, i: float, a: float, b: float, c: float, d: float
) -> None:
    law, jac = getattr(rl, name), getattr(rl, f"{name}_jacobian")
    params = [a, b, c, d][:p]
    args = (np.array([s]), np.array([i])) if with_i else (np.array([s]),)
    analytic = jac(*args, *params)[0]
    for k in range(p):
        numeric = _central(lambda *q: law(*args, *q), params, k)[0]
        value = abs(float(law(*args, *params)[0]))
        h = 1e-6 * max(abs(params[k]), 1e-3)
        # rounding error of a central difference is about eps * |v| / h: allow 1000 times that
        tol = 1e-9 * max(1.0, value) + 1e3 * 2.2e-16 * value / h
        assert analytic[k] == pytest.approx(numeric, rel=1e-5, abs=tol)


@given(s=pos, i=conc, vmax=pos, km=pos, ki=pos, kiu=pos)
def test_special_cases_of_the_mixed_law(s: float, i: float, vmax: float, km: float, ki: float, kiu: float) -> None:
    assert rl.competitive(s, 0.0, vmax, km, ki) == pytest.approx(rl.michaelis_menten(s, vmax, km))
    assert rl.mixed(s, i, vmax, km, ki, math.inf) == pytest.approx(rl.competitive(s, i, vmax, km, ki))
    assert rl.mixed(s, i, vmax, km, math.inf, kiu) == pytest.approx(rl.uncompetitive(s, i, vmax, km, kiu))
    assert rl.mixed(s, i, vmax, km, ki, ki) == pytest.approx(rl.noncompetitive(s, i, vmax, km, ki))
    assert rl.substrate_inhibition(s, vmax, km, math.inf) == pytest.approx(rl.michaelis_menten(s, vmax, km))
    assert rl.mixed(s, i, vmax, km, ki, kiu) <= rl.michaelis_menten(s, vmax, km) * (1 + 1e-12)


@given(i=conc, vmax=pos, km=pos, ki=pos)
def test_apparent_constants(i: float, vmax: float, km: float, ki: float) -> None:
    km_app = km * (1 + i / ki)  # competitive: half of Vmax at S = Km (1 + I/Ki)
    assert rl.competitive(km_app, i, vmax, km, ki) == pytest.approx(vmax / 2)
    # noncompetitive: half of the apparent Vmax at S = Km
    assert rl.noncompetitive(km, i, vmax, km, ki) == pytest.approx(vmax / (1 + i / ki) / 2)


@pytest.mark.parametrize("name", ["none", "competitive", "noncompetitive", "uncompetitive", "mixed"])
def test_fitting_models_jacobian_in_reciprocal_constants(name: str) -> None:
    model = inhibition_model(name)
    rng = np.random.default_rng(1)
    x = np.vstack((rng.uniform(0.5, 100, 30), rng.uniform(0, 50, 30)))
    u = np.array([20.0, 15.0, 0.05, 0.02])[: len(model.parameters)]
    f_fused, j_fused = model.function_jacobian(u, x)
    assert np.allclose(f_fused, model.function(u, x)) and np.allclose(j_fused, model.jacobian(u, x))
    for k in range(len(u)):
        h = 1e-7 * max(abs(u[k]), 1e-3)
        up, down = u.copy(), u.copy()
        up[k] += h
        down[k] -= h
        numeric = (model.function(up, x) - model.function(down, x)) / (2 * h)
        assert np.allclose(j_fused[:, k], numeric, rtol=1e-5, atol=1e-8)


@pytest.mark.parametrize("size", [1, 2, 3, 4, 5])
def test_damped_solver_matches_numpy(size: int) -> None:
    # the engine's small closed-form / Cholesky solver against numpy.linalg.solve (general-purpose library)
    from interact.kinetics import engine

    rng = np.random.default_rng(size)
    for _ in range(50):
        b = rng.normal(size=(size, size))
        a = b @ b.T + 0.05 * np.eye(size)
        g = rng.normal(size=size)
        damping = rng.uniform(0.0, 1.0, size)
        h = engine._solve_damped(a.tolist(), g.tolist(), damping.tolist())
        assert h is not None
        assert np.allclose(h, np.linalg.solve(a + np.diag(damping), -g), rtol=1e-8, atol=1e-10)
    assert engine._solve_damped([[1.0, 2.0], [2.0, 1.0]], [1.0, 1.0], [0.0, 0.0]) is None  # indefinite
