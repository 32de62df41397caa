"""Sampling: zero-width distributions give the point estimate, seeds reproduce, percentiles converge.

Outside references: scipy.stats.lognorm (a general-purpose library) for the
log-normal quantiles, moments and tail probabilities that the sampled AUC
ratio must approach.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pytest
from conftest import base_dict
from scipy import stats

from interact import assess, load_scenario
from interact.errors import InputError
from interact.scenario import demo_path, scenario_from_dict
from interact.uncertainty import (
    ScenarioModel,
    interval_distribution,
    loads_spec,
    parse_distribution,
    parse_vary,
    run_uncertainty,
)

# Scenarios here trigger model warnings (Fg not given, fu,inc = 1, kdeg from memory ...) as a side effect of
# what they test; the warnings themselves are checked in tests/api/test_warnings.py and where a test asks for one.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")


def _iv_dict(ki: str = "2 uM", cmax: str = "1 uM", fu: float = 0.5) -> dict[str, Any]:
    """Intravenous perpetrator, intravenous victim, fm = 1: total AUCR = 1 + Imax,u / Ki,u exactly.

    (Test inputs, not check values: the check values come from scipy.stats.)
    """
    return {
        "title": "iv test pair",
        "perpetrator": {
            "name": "P",
            "molar_mass": "400 g/mol",
            "dose": "100 mg",
            "route": "intravenous",
            "cmax": cmax,
            "fu_plasma": fu,
            "inhibits": [{"target": "CYP3A", "ki": ki, "fu_inc": 1.0}],
        },
        "victim": {
            "name": "V",
            "dose": "10 mg",
            "interval": "24 h",
            "route": "intravenous",
            "pathways": [{"enzyme": "CYP3A", "fm": 1.0}],
        },
    }


def _rich_dict() -> dict[str, Any]:
    """A scenario touching every branch: metabolite, IC50 routes, TDI, induction, several pathways."""
    return {
        "title": "every branch",
        "perpetrator": {
            "name": "P",
            "molar_mass": "450 g/mol",
            "dose": "200 mg",
            "cmax": "900 ng/mL",
            "fu_plasma": 0.005,
            "blood_plasma_ratio": 0.9,
            "ka": "0.05 1/min",
            "fa_fg": 0.8,
            "fa": 0.9,
            "inhibits": [
                {"target": "CYP3A", "ki": "1.5 uM", "fu_inc": 0.7, "kinact": "2 1/h", "ki_inact": "3 uM"},
                {"target": "CYP2C9", "ic50": "9 uM", "substrate_conc": "4 uM", "km": "6 uM", "mechanism": "mixed", "alpha": 3.0},
                {"target": "CYP2D6", "ic50": "4 uM", "mechanism": "noncompetitive"},
                {"target": "CYP1A2", "emax": 4.0, "ec50": "2 uM", "calibration": 0.6},
            ],
            "metabolites": [
                {
                    "name": "M",
                    "molar_mass": "466 g/mol",
                    "cmax": "0.3 uM",
                    "fu_plasma": 0.2,
                    "inhibits": [{"target": "CYP3A", "ki": "2 uM"}, {"target": "CYP2C9", "ki": "5 uM", "fu_inc": 0.9}],
                },
            ],
        },
        "victim": {
            "name": "V",
            "dose": "20 mg",
            "interval": "12 h",
            "fg": 0.4,
            "strengths": ["5 mg", "10 mg"],
            "pathways": [
                {"enzyme": "CYP3A", "fm": 0.5},
                {"enzyme": "CYP2C9", "fm": 0.2},
                {"enzyme": "CYP2D6", "fm": 0.1},
                {"enzyme": "CYP1A2", "fm": 0.1},
            ],
        },
    }


@pytest.mark.parametrize("build", ["demo", "rich", "iv"])
def test_model_at_point_values_equals_assess_exactly(build: str) -> None:
    scenario = load_scenario(demo_path()) if build == "demo" else scenario_from_dict(_rich_dict() if build == "rich" else _iv_dict())
    a = assess(scenario)
    model = ScenarioModel(a)
    r = model.evaluate()
    assert float(r.total) == a.prediction.total
    assert float(r.gut) == a.prediction.gut
    assert float(r.liver) == a.prediction.liver
    # every input given as an array of its point value: still bit for bit
    arrays = {i.path: np.full(3, i.value) for i in model.inputs()}
    assert np.all(model.evaluate(arrays).total == a.prediction.total)


@pytest.mark.parametrize("spec", ["cv:0%", "fixed"])
@pytest.mark.parametrize("method", ["mc", "lhs"])
def test_zero_width_distributions_reproduce_point_estimate(spec: str, method: str) -> None:
    a = assess(scenario_from_dict(_rich_dict()))
    model = ScenarioModel(a)
    vary = [(i.path, spec) for i in model.inputs()]
    res = run_uncertainty(a, vary, samples=64, seed=5, method=method)
    assert np.all(res.total == a.prediction.total)
    assert all(p[4] == a.prediction.total for p in res.percentiles)
    assert res.action_change_probability == 0.0
    assert res.point_action == a.dose.action


def test_zero_width_interval_and_range_reproduce_point_estimate() -> None:
    a = assess(scenario_from_dict(_iv_dict()))
    res = run_uncertainty(
        a, [("perpetrator.inhibits[0].ki", "ci:2 uM,2 uM"), ("perpetrator.fu_plasma", "uniform:0.5,0.5")], samples=50, seed=1
    )
    assert np.all(res.total == a.prediction.total)


def test_same_seed_same_numbers_other_seed_other_numbers() -> None:
    a = assess(load_scenario(demo_path()))
    vary = [("perpetrator.inhibits[0].ki", "cv:40%"), ("victim.fg", "uniform:0.3,0.6")]
    for method in ("mc", "lhs"):
        one = run_uncertainty(a, vary, samples=2000, seed=11, method=method)
        two = run_uncertainty(a, vary, samples=2000, seed=11, method=method)
        other = run_uncertainty(a, vary, samples=2000, seed=12, method=method)
        assert np.array_equal(one.total, two.total)
        assert one.percentiles == two.percentiles and one.classes == two.classes
        assert not np.array_equal(one.total, other.total)


def test_lognormal_from_cv_and_from_interval_match_scipy() -> None:
    a = assess(scenario_from_dict(_iv_dict()))
    inp = ScenarioModel(a).input("perpetrator.inhibits[0].ki")
    d = parse_distribution("cv:30%", inp)
    ln = stats.lognorm(s=d.sigma, scale=d.median)  # scipy.stats.lognorm: shape = sigma of ln X, scale = median
    assert ln.std() / ln.mean() == pytest.approx(0.30, rel=1e-12)
    assert d.median == inp.value
    d2 = parse_distribution("ci:0.5 uM,8 uM", inp)
    ln2 = stats.lognorm(s=d2.sigma, scale=d2.median)
    assert ln2.ppf(0.025) == pytest.approx(0.5, rel=1e-9)
    assert ln2.ppf(0.975) == pytest.approx(8.0, rel=1e-9)
    # bounds in another unit: 200 ng/mL at 400 g/mol = 0.5 uM
    d3 = parse_distribution("ci:200 ng/mL, 3200 ng/mL", inp)
    assert d3.median == pytest.approx(d2.median, rel=1e-12) and d3.sigma == pytest.approx(d2.sigma, rel=1e-12)
    # a fitted interval in canonical units gives the same distribution
    d4 = interval_distribution(0.5, 8.0)
    assert d4.median == pytest.approx(d2.median) and d4.sigma == pytest.approx(d2.sigma)


@pytest.mark.parametrize("method", ["mc", "lhs"])
def test_percentiles_converge_to_scipy_lognormal(method: str) -> None:
    # AUCR = 1 + I/Ki,u with Ki,u log-normal: the AUCR q-quantile is 1 + I / Ki_(1-q)
    imax_u = 0.5  # uM: cmax 1 uM x fu 0.5
    a = assess(scenario_from_dict(_iv_dict()))
    assert a.prediction.total == pytest.approx(1.25)
    spec = [("perpetrator.inhibits[0].ki", "cv:60%")]
    d = parse_distribution("cv:60%", ScenarioModel(a).input("perpetrator.inhibits[0].ki"))
    ki = stats.lognorm(s=d.sigma, scale=d.median)
    errors = []
    for n in (1_000, 10_000, 200_000):
        res = run_uncertainty(a, spec, samples=n, seed=2024, method=method)
        err = 0.0
        for q in (5.0, 50.0, 95.0):
            exact = 1.0 + imax_u / ki.ppf(1 - q / 100)
            # asymptotic standard error of a sample quantile: sqrt(p(1-p)/n) / density at the quantile
            x = ki.ppf(1 - q / 100)
            density = ki.pdf(x) * x * x / imax_u  # density of 1 + I/Ki at its quantile (change of variable)
            se = math.sqrt(q / 100 * (1 - q / 100) / n) / density
            got = res.percentile(q)
            assert abs(got - exact) < 5 * se + 1e-12, (n, q, got, exact, se)
            err = max(err, abs(got - exact) / exact)
        errors.append(err)
        # P(AUCR >= 2) = P(Ki,u <= I)
        p2 = next(p for op, b, p in res.exceedance if op == ">=" and b == 2.0)
        assert abs(p2 - ki.cdf(imax_u)) < 5 * math.sqrt(ki.cdf(imax_u) * (1 - ki.cdf(imax_u)) / n) + 1e-9
    assert errors[-1] < errors[0]
    assert errors[-1] < 0.005


def test_most_probable_class_and_action_change() -> None:
    # point AUCR 1.25 sits on the weak / no-change edge: half the samples fall either side
    a = assess(scenario_from_dict(_iv_dict()))
    res = run_uncertainty(a, [("perpetrator.inhibits[0].ki", "cv:50%")], samples=20_000, seed=3)
    probs = dict(res.classes)
    assert probs["weak inhibition"] + probs["no class"] + probs["moderate inhibition"] + probs["strong inhibition"] == pytest.approx(1.0)
    assert 0.4 < probs["no class"] < 0.6
    # 1.25 is inside the no-effect boundary (0.8-1.25, ends included): the action changes exactly when a sample rises above it
    assert a.dose.action == "no change"
    assert res.action_change_probability == pytest.approx(float(np.mean(res.total > 1.25)), abs=1e-12)
    assert res.most_probable_class in ("no class", "weak inhibition")


def test_fractions_are_kept_in_range_and_counted() -> None:
    a = assess(scenario_from_dict(_iv_dict(fu=0.9)))
    res = run_uncertainty(a, [("perpetrator.fu_plasma", "cv:50%")], samples=5000, seed=1, method="mc")
    moved = res.varied[0].adjusted
    assert moved > 0
    assert np.max(res.total) <= 1.0 + 1.0 / 2.0 + 1e-12  # fu capped at 1: AUCR <= 1 + 1 x 1 / 2


def test_fm_over_one_is_scaled_down() -> None:
    d = _rich_dict()
    a = assess(scenario_from_dict(d))
    res = run_uncertainty(a, [("victim.pathways[0].fm", "uniform:0.5,0.9")], samples=4000, seed=1, method="mc")
    # the other pathways sum to 0.4, so every draw above 0.6 pushes the total over 1
    assert 0 < res.fm_scaled < 4000
    assert np.all(np.isfinite(res.total)) and np.all(res.total > 0)


@pytest.mark.parametrize(
    ("spec", "words"),
    [
        ("cv:abc", "cv:"),
        ("ci:1 uM", "two bounds"),
        ("ci:2 uM,1 uM", "above upper"),
        ("uniform:1 uM,2 h", "concentration"),
        ("normal:1,2", "expected cv"),
        ("fixed:3", "takes no value"),
    ],
)
def test_bad_specs_name_path_value_and_expectation(spec: str, words: str) -> None:
    a = assess(scenario_from_dict(_iv_dict()))
    with pytest.raises(InputError) as info:
        run_uncertainty(a, [("perpetrator.inhibits[0].ki", spec)], samples=10)
    text = str(info.value)
    assert "perpetrator.inhibits[0].ki" in text and words in text


def test_unknown_path_lists_known_ones() -> None:
    a = assess(scenario_from_dict(_iv_dict()))
    with pytest.raises(InputError, match=r"perpetrator\.cmax"):
        run_uncertainty(a, [("perpetrator.inhibits[7].ki", "cv:10%")], samples=10)
    with pytest.raises(InputError, match="declares no uncertain input"):
        run_uncertainty(a, [], samples=10)
    with pytest.raises(InputError, match="samples"):
        run_uncertainty(a, [("perpetrator.cmax", "cv:10%")], samples=0)


def test_fraction_bounds_outside_zero_one_rejected() -> None:
    a = assess(scenario_from_dict(_iv_dict()))
    with pytest.raises(InputError, match=r"outside \[0, 1\]"):
        run_uncertainty(a, [("victim.pathways[0].fm", "uniform:0.5,1.2")], samples=10)


def test_spec_file_and_vary_option() -> None:
    spec = loads_spec('[vary]\n"perpetrator.inhibits[0].ki" = "ci:1 uM, 4 uM"\n[sampling]\nsamples = 500\nseed = 9\nmethod = "mc"\n')
    assert spec.vary == (("perpetrator.inhibits[0].ki", "ci:1 uM, 4 uM"),)
    assert (spec.samples, spec.seed, spec.method) == (500, 9, "mc")
    assert parse_vary("victim.pathways[0].fm=uniform:0.5,0.9") == ("victim.pathways[0].fm", "uniform:0.5,0.9")
    with pytest.raises(InputError, match="PATH=SPEC"):
        parse_vary("perpetrator.cmax")
    with pytest.raises(InputError, match=r"sampling\.method"):
        loads_spec('[sampling]\nmethod = "sobol"\n')
    with pytest.raises(InputError, match="not a known table"):
        loads_spec('[varry]\n"a" = "b"\n')


def test_unit_on_the_upper_bound_applies_to_both() -> None:
    a = assess(scenario_from_dict(_iv_dict()))
    inp = ScenarioModel(a).input("perpetrator.inhibits[0].ki")
    one, both = parse_distribution("ci:0.5, 8 uM", inp), parse_distribution("ci:0.5 uM,8 uM", inp)
    assert (one.median, one.sigma) == (both.median, both.sigma)
    with pytest.raises(InputError, match="concentration"):
        parse_distribution("ci:0.5,8", inp)  # a Ki bound needs a unit


def test_induction_thresholds_reported_when_the_ratio_can_fall() -> None:
    d = _rich_dict()
    a = assess(scenario_from_dict(d))
    assert "induction" in a.prediction.mechanisms
    res = run_uncertainty(a, [("perpetrator.inhibits[3].emax", "uniform:0,40")], samples=2000, seed=2)
    lows = [(b, p) for op, b, p in res.exceedance if op == "<="]
    assert [b for b, _ in lows] == [0.8, 0.5, 0.2]
    assert all(p == pytest.approx(float(np.mean(res.total <= b)), abs=1e-12) for b, p in lows)


def test_probability_inside_the_boundary_per_regimen_counts_the_samples() -> None:
    # linear kinetics (common practice): a dose d at the usual interval gives exposure AUCR x d / usual dose, so the
    # probability that a regimen stays inside 0.8-1.25 is the share of sampled AUC ratios with 0.8 <= AUCR x factor <= 1.25
    data = base_dict()
    a = assess(scenario_from_dict(data))
    res = run_uncertainty(a, [("perpetrator.inhibits[0].ki", "cv:60%")], samples=20_000, seed=5)
    lo, hi = a.dose.boundary
    usual = a.regimens.usual_dose
    assert res.regimen_probabilities, "no regimen probabilities"
    for e in res.regimen_probabilities:
        factor = 1.0 if e.regimen is None else (e.regimen.dose / usual if e.regimen.kind == "dose" else 24.0 / e.regimen.interval_h)
        x = res.total * factor
        assert e.probability == pytest.approx(float(np.mean((x >= lo) & (x <= hi))), abs=1e-12), e.label
    # every option the point suggestion offers is listed, and the best is the most probable of all candidates
    assert {e.regimen for e in res.regimen_probabilities if e.feasible_at_point and e.regimen is not None} == {
        o.regimen for o in a.dose.options
    }
    for reg in a.regimens.candidates:
        factor = reg.dose / usual if reg.kind == "dose" else 24.0 / reg.interval_h
        x = res.total * factor
        assert float(np.mean((x >= lo) & (x <= hi))) <= res.best_regimen.probability + 1e-12
    assert res.point_regimen is not None and a.dose.chosen is not None and res.point_regimen.regimen == a.dose.chosen.regimen
