"""Profile-likelihood intervals held to an outside reference: lmfit's ``conf_interval``.

lmfit (Newville et al., https://lmfit.github.io/lmfit-py/confidence.html) finds, for each parameter, the values
where the F test of the refitted (profiled) chi-square against the best chi-square reaches the stated level, the
same threshold as the engine (RSS_min (1 + F(1, n - p)/(n - p))).  Data: R datasets Puromycin (treated cells,
Bates & Watts 1988, Appendix A1.3) and nlstools vmkmki (tests/data, sources in their first lines).
"""

from __future__ import annotations

import lmfit  # in the test extra; a missing install fails here rather than skipping
import numpy as np
import pytest

from interact.kinetics import fit_inhibition, incubation_data

from .conftest import columns, read_table


def _lmfit_interval(residual, params: lmfit.Parameters, name: str, level: float = 0.95) -> tuple[float, float]:  # type: ignore[no-untyped-def]
    mini = lmfit.Minimizer(residual, params)
    out = mini.minimize(method="leastsq", xtol=1e-14, ftol=1e-14)
    ci = lmfit.conf_interval(mini, out, p_names=[name], sigmas=[level], maxiter=400)
    values = [v for p, v in ci[name] if abs(p - level) < 1e-9]
    return min(values), max(values)


def test_puromycin_profile_intervals_match_lmfit() -> None:
    rows = [r for r in read_table("r_datasets_Puromycin.csv") if r["state"] == "treated"]
    s = np.array([float(r["conc"]) for r in rows])
    v = np.array([float(r["rate"]) for r in rows])
    comp = fit_inhibition(incubation_data(s, np.zeros_like(s), v), models=("none",))
    fit = comp.fit("none")
    params = lmfit.Parameters()
    params.add("vmax", value=200.0)
    params.add("km", value=0.1)

    def residual(p):  # type: ignore[no-untyped-def]
        return p["vmax"] * s / (p["km"] + s) - v

    for name, ours in (("vmax", fit.estimate("Vmax")), ("km", fit.estimate("Km"))):
        low, high = _lmfit_interval(residual, params, name)
        assert ours.profile_low == pytest.approx(low, rel=1e-4), name
        assert ours.profile_high == pytest.approx(high, rel=1e-4), name


def test_vmkmki_uncompetitive_ki_profile_matches_lmfit() -> None:
    s, i, v = columns("nlstools_vmkmki.csv", "S", "I", "v")
    ki = fit_inhibition(incubation_data(s, i, v), models=("none", "uncompetitive"), weights="none").fit("uncompetitive").estimate("Ki")
    params = lmfit.Parameters()
    params.add("vmax", value=20.0)
    params.add("km", value=30.0)
    params.add("ki", value=50.0, min=0.0)

    def residual(p):  # type: ignore[no-untyped-def]
        return p["vmax"] * s / (p["km"] + s * (1 + i / p["ki"])) - v

    low, high = _lmfit_interval(residual, params, "ki")
    assert ki.profile_low == pytest.approx(low, rel=1e-4)
    assert ki.profile_high == pytest.approx(high, rel=1e-4)
