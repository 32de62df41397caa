"""Variance-based (Sobol') sensitivity: the wrapper of scipy.stats.sobol_indices against the Ishigami function's
analytical indices, and the scenario indices' invariants.

Outside reference: the Ishigami function (Ishigami T., Homma T. 1990, "An importance quantification technique in
uncertainty analysis for computer models", ISUMA '90) with a = 7, b = 0.1 on U(-pi, pi)^3; its variance
decomposition in closed form as given in Saltelli A. et al. (2008) Global Sensitivity Analysis: The Primer, Wiley
(S1 = 0.3139, S2 = 0.4424, S3 = 0, ST1 = 0.5576, ST2 = 0.4424, ST3 = 0.2437), computed below from the formulas.
The scenarios are invented test inputs (the invented demo), not check values.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from scipy import stats

from interact import assess, demo_path, load_scenario
from interact.errors import InputError
from interact.report.uncertainty import format_uncertainty
from interact.uncertainty import run_uncertainty, sensitivity, sobol_indices, variance_indices

A, B = 7.0, 0.1


def _ishigami(x: np.ndarray) -> np.ndarray:
    return (np.sin(x[0]) + A * np.sin(x[1]) ** 2 + B * x[2] ** 4 * np.sin(x[0]))[None, :]


def _ishigami_reference() -> tuple[list[float], list[float]]:
    pi = math.pi
    v = A**2 / 8 + B * pi**4 / 5 + B**2 * pi**8 / 18 + 0.5
    v1 = 0.5 * (1 + B * pi**4 / 5) ** 2
    v2 = A**2 / 8
    v13 = B**2 * pi**8 * (1 / 18 - 1 / 50)
    return [v1 / v, v2 / v, 0.0], [(v1 + v13) / v, v2 / v, v13 / v]


def test_reference_values_are_the_published_ones() -> None:
    first, total = _ishigami_reference()
    assert [round(x, 4) for x in first] == [0.3139, 0.4424, 0.0]
    assert [round(x, 4) for x in total] == [0.5576, 0.4424, 0.2437]


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_ishigami_indices_within_sampling_noise(seed: int) -> None:
    first, total = variance_indices(_ishigami, [stats.uniform(-math.pi, 2 * math.pi)] * 3, samples=2**13, seed=seed)
    ref_first, ref_total = _ishigami_reference()
    np.testing.assert_allclose(first[0], ref_first, atol=0.01)
    np.testing.assert_allclose(total[0], ref_total, atol=0.01)


def test_sample_size_must_be_a_power_of_two() -> None:
    with pytest.raises(InputError, match="power of 2"):
        variance_indices(_ishigami, [stats.uniform(-math.pi, 2 * math.pi)] * 3, samples=1000)


@pytest.fixture(scope="module")
def demo():  # type: ignore[no-untyped-def]
    return assess(load_scenario(demo_path()), warn=False)


def test_one_uncertain_input_explains_all_the_variance(demo) -> None:  # type: ignore[no-untyped-def]
    v = sobol_indices(demo, [("perpetrator.cmax", "cv:40%"), ("victim.fg", "fixed")], samples=1024)
    assert v is not None and [i.path for i in v.inputs] == ["perpetrator.cmax"]
    assert v.first_order[0] == pytest.approx(1.0, abs=0.02) and v.total_order[0] == pytest.approx(1.0, abs=0.02)
    assert sobol_indices(demo, [("victim.fg", "fixed")]) is None


def test_indices_agree_with_the_sampled_variance(demo) -> None:  # type: ignore[no-untyped-def]
    """The first-order index of an input is Var(E[Y|X]) / Var(Y): checked by binning an independent Monte Carlo run."""
    vary = [("victim.fg", "uniform:0.3,0.6"), ("perpetrator.cmax", "cv:30%"), ("perpetrator.inhibits[0].ki", "cv:50%")]
    v = sobol_indices(demo, vary, samples=4096, seed=3)
    assert v is not None
    r = run_uncertainty(demo, vary, samples=200_000, seed=5, method="mc")
    cols = r.sample_columns()
    y = cols["auc_ratio"]
    for k, inp in enumerate(v.inputs):
        x = cols[inp.path]
        edges = np.quantile(x, np.linspace(0, 1, 101))
        idx = np.clip(np.searchsorted(edges, x, side="right") - 1, 0, 99)
        means = np.bincount(idx, weights=y, minlength=100) / np.bincount(idx, minlength=100)
        s1 = float(np.var(means[idx]) / np.var(y))
        assert v.first_order[k] == pytest.approx(s1, abs=0.03), inp.path
        assert v.total_order[k] >= v.first_order[k] - 0.02
    assert sum(v.first_order) <= 1.03


def test_beside_the_tornado_in_text_and_json(demo) -> None:  # type: ignore[no-untyped-def]
    vary = [("victim.fg", "uniform:0.3,0.6"), ("perpetrator.cmax", "cv:30%")]
    s = sensitivity(demo, vary)
    assert s.variance is not None
    r = run_uncertainty(demo, vary, samples=500)
    data = json.loads(format_uncertainty(r, s, "json"))
    vb = data["sensitivity"]["variance_based"]
    assert [row["path"] for row in vb["indices"]] == [i.path for i in s.variance.inputs]
    assert [row["total"] for row in vb["indices"]] == list(s.variance.total_order)
    text = format_uncertainty(r, s, "text", width=160)
    assert "first-order index" in text and "Sobol" in text
    frame = s.variance.to_pandas()
    assert list(frame["input"]) == [i.path for i in s.variance.inputs]
    assert sensitivity(demo).variance is None  # default swing: no distributions, no indices


def test_reports_carry_the_indices(tmp_path) -> None:  # type: ignore[no-untyped-def]
    from pathlib import Path

    from interact.cli import main

    spread = Path(__file__).resolve().parents[2] / "interact" / "examples" / "demo_spread.toml"
    for name in ("r.html", "r.md"):
        out = tmp_path / name
        assert main(["report", str(demo_path()), "--spec", str(spread), "--samples", "500", "-o", str(out)]) == 0
        text = out.read_text(encoding="utf-8")
        assert "first-order index" in text and "Sobol" in text and "kidney ratio: first / total" in text


@pytest.fixture(scope="module")
def transporter():  # type: ignore[no-untyped-def]
    from pathlib import Path

    path = Path(__file__).resolve().parents[2] / "interact" / "examples" / "transporter_victim.toml"
    return assess(load_scenario(path), warn=False)  # the shipped invented example: inputs, not check values


@pytest.mark.parametrize("path", ["victim.renal_fraction", "victim.pathways[3].fraction"])
def test_one_renal_input_carries_the_kidney_variance(transporter, path: str) -> None:  # type: ignore[no-untyped-def]
    """One varied input alone explains all of an output's variance (S1 = ST = 1 by the definition of the indices,
    Saltelli et al. 2008, the Primer, ch. 4); an organ ratio it cannot move has no variance: flagged constant, indices 0
    (scipy.stats.sobol_indices: null variance means null indices)."""
    v = sobol_indices(transporter, [(path, "cv:20%")], samples=512)
    assert v is not None
    organs = {o.organ: o for o in v.organs}
    assert list(organs) == ["gut", "liver", "kidney"]
    kidney = organs["kidney"]
    assert not kidney.constant and all(math.isfinite(x) for x in (*kidney.first_order, *kidney.total_order))
    assert kidney.first_order[0] == pytest.approx(1.0, abs=0.02) and kidney.total_order[0] == pytest.approx(1.0, abs=0.02)
    for name in ("gut", "liver"):
        assert organs[name].constant and organs[name].first_order == (0.0,) and organs[name].total_order == (0.0,)


def test_an_input_that_cannot_move_an_organ_has_exactly_zero_indices_there(transporter) -> None:  # type: ignore[no-untyped-def]
    """Renal secretion does not enter the liver ratio: with the liver ratio moved by hepatic uptake, the secretion
    fraction's liver indices are exactly 0 (the Saltelli 2010 estimators difference outputs that are then equal)."""
    vary = [("victim.pathways[3].fraction", "cv:20%"), ("victim.pathways[1].fraction", "cv:20%")]
    v = sobol_indices(transporter, vary, samples=512)
    assert v is not None
    organs = {o.organ: o for o in v.organs}
    assert not organs["liver"].constant and not organs["kidney"].constant and organs["gut"].constant
    k = [i.path for i in v.inputs].index("victim.pathways[3].fraction")
    assert organs["liver"].first_order[k] == 0.0 and organs["liver"].total_order[k] == 0.0
    assert organs["kidney"].first_order[k] > 0.5
    s = sensitivity(transporter, vary)
    r = run_uncertainty(transporter, vary, samples=500)
    data = json.loads(format_uncertainty(r, s, "json"))
    by_organ = {o["organ"]: o for o in data["sensitivity"]["variance_based"]["organs"]}
    assert by_organ["gut"]["constant"] is True and by_organ["kidney"]["constant"] is False
    assert [row["path"] for row in by_organ["kidney"]["indices"]] == [i.path for i in v.inputs]
    text = format_uncertainty(r, s, "text", width=200)
    assert "kidney ratio: first / total" in text and "constant" in text
    assert s.variance is not None and "first_order_kidney" in s.variance.to_pandas().columns
