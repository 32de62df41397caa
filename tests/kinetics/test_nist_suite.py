"""The whole NIST StRD nonlinear regression suite: 27 problems from both starting vectors.

Certified values and data: NIST/ITL Statistical Reference Datasets, nonlinear regression
(https://www.itl.nist.gov/div898/strd/nls/nls_main.shtml), read from the .dat files in tests/data/nist_strd.
The models get no Jacobian, so the engine's finite differences are tested too.  The mark is 6 correct
significant digits (log relative error, NIST practice) on every parameter and on the residual sum of squares.
For comparison (tests/bench/bench_nist.py, same finite-difference quality): scipy least_squares reaches 6 digits
on 49 (lm) and 50 (trf) of the 54 runs.
"""

from __future__ import annotations

import pytest

from interact.kinetics.engine import CurveModel, fit_curve

from . import nist

RUNS = [(name, k) for name in nist.MODELS for k in (0, 1)]


@pytest.mark.parametrize(("name", "start"), RUNS, ids=[f"{n}-start{k + 1}" for n, k in RUNS])
def test_certified_values_to_six_digits(name: str, start: int) -> None:
    p = nist.read(name)
    model = CurveModel(name=name, parameters=tuple(f"b{j + 1}" for j in range(len(p.certified))), function=nist.MODELS[name])
    fit = fit_curve(model, p.x, p.y, [p.starts[start]])  # no warnings escape (pytest turns them into errors)
    assert fit.success, fit.message
    for j, (value, certified) in enumerate(zip(fit.theta, p.certified, strict=True)):
        assert nist.lre(value, certified) >= 6.0, f"b{j + 1} = {value!r}, certified {certified!r}"
    if name != "Lanczos1":  # certified RSS 1.4e-25 is at rounding level: digits there are not meaningful
        assert nist.lre(fit.rss, p.certified_rss) >= 6.0
