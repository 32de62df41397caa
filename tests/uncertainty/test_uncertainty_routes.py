"""Uncertainty analysis of an object drug with transporter routes: the route fractions and the renal fraction are
inputs ``--vary`` can vary.  Invariants: at the point values the model equals ``assess()`` bit for bit (kidney
ratio included); a route fraction moves only the ratio of its organ (the kidney factor shares the liver's systemic
clearance, so a liver fraction may move it too, never the other way round); sampled fractions stay within the
organ sums the scenario reader enforces.  The scenario is the shipped invented example (values are inputs, not
check values)."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import assess
from interact.scenario import demo_path, load_scenario, loads_scenario
from interact.uncertainty import ScenarioModel, run_uncertainty

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

EXAMPLE = load_scenario(demo_path().with_name("examples") / "transporter_victim.toml")
ASSESSED = assess(EXAMPLE)
MODEL = ScenarioModel(ASSESSED)
# the example's pathways: [0] efflux BCRP 0.45, [1] uptake OATP1B1 0.5, [2] fm CYP2C9 0.1, [3] secretion OAT3 0.6
EFFLUX, UPTAKE, FM, SECRETION, RENAL = (
    "victim.pathways[0].fraction",
    "victim.pathways[1].fraction",
    "victim.pathways[2].fm",
    "victim.pathways[3].fraction",
    "victim.renal_fraction",
)


def test_route_fractions_and_renal_fraction_are_inputs_at_their_point_values() -> None:
    paths = {i.path: i.value for i in MODEL.inputs(relevant_only=True)}
    assert paths[EFFLUX] == 0.45 and paths[UPTAKE] == 0.5 and paths[SECRETION] == 0.6 and paths[RENAL] == 0.25
    assert all(MODEL.input(p).is_fraction for p in (EFFLUX, UPTAKE, SECRETION, RENAL))


def test_point_values_equal_assess_to_the_last_bit() -> None:
    pr = ASSESSED.prediction
    r = MODEL.evaluate()
    assert (float(r.gut), float(r.liver), float(r.kidney), float(r.total)) == (pr.gut, pr.liver, pr.kidney, pr.total)
    assert pr.kidney != 1.0  # the example's secretion route is inhibited: the kidney term is exercised
    arrays = {i.path: np.full(4, i.value) for i in MODEL.inputs()}
    again = MODEL.evaluate(arrays)
    assert np.all(again.kidney == pr.kidney) and np.all(again.total == pr.total)


fraction = st.floats(min_value=0.0, max_value=1.0, allow_nan=False)


@settings(max_examples=60, deadline=None)
@given(efflux=fraction, uptake=fraction, secretion=fraction, renal=fraction)
def test_a_route_fraction_moves_only_its_own_organ(efflux: float, uptake: float, secretion: float, renal: float) -> None:
    base = MODEL.evaluate()
    gut = MODEL.evaluate({EFFLUX: efflux})
    assert (gut.liver, gut.kidney) == (base.liver, base.kidney)
    assert gut.gut == base.gut or efflux != 0.45
    liver = MODEL.evaluate({UPTAKE: uptake})
    assert liver.gut == base.gut  # the kidney factor is relative to the liver's ratio (one systemic clearance)
    for values in ({SECRETION: secretion}, {RENAL: renal}):
        kidney = MODEL.evaluate(values)
        assert (kidney.gut, kidney.liver) == (base.gut, base.liver)
    for r in (gut, liver, kidney):
        assert float(r.total) == float(r.gut) * float(r.liver) * float(r.kidney)


def test_each_route_moves_its_organ_ratio_the_way_inhibition_does() -> None:
    """More of the clearance through an inhibited route gives a larger organ ratio (monotonic in the fraction)."""
    x = np.linspace(0.0, 0.5, 6)
    assert np.all(np.diff(MODEL.evaluate({EFFLUX: x}).gut) > 0)
    assert np.all(np.diff(MODEL.evaluate({UPTAKE: np.linspace(0.0, 0.6, 6)}).liver) > 0)
    assert np.all(np.diff(MODEL.evaluate({SECRETION: x}).kidney) > 0)
    assert np.all(np.diff(MODEL.evaluate({RENAL: np.linspace(0.0, 0.3, 6)}).kidney) > 0)
    assert MODEL.evaluate({SECRETION: 0.0}).kidney == 1.0 and MODEL.evaluate({RENAL: 0.0}).kidney == 1.0


@pytest.mark.parametrize("method", ["mc", "lhs"])
def test_sampled_route_fractions_keep_the_readers_organ_sums(method: str) -> None:
    vary = [(EFFLUX, "cv:80%"), (UPTAKE, "uniform:0.1,0.9"), (FM, "cv:60%"), (SECRETION, "cv:80%"), (RENAL, "uniform:0,0.6")]
    res = run_uncertainty(ASSESSED, vary, samples=2000, seed=11, method=method)
    x = res.inputs
    for path in (EFFLUX, UPTAKE, FM, SECRETION, RENAL):
        assert np.all((x[path] >= 0.0) & (x[path] <= 1.0)), path
    # systemic clearance: fm + hepatic uptake + renal fraction at most 1; gut: efflux + (1 - Fg) at most 1;
    # kidney: secretion fractions of renal clearance at most 1 (interact.scenario's checks)
    assert np.all(x[FM] + x[UPTAKE] + x[RENAL] <= 1.0 + 1e-12)
    assert np.all(x[EFFLUX] + (1.0 - EXAMPLE.victim.fg) <= 1.0 + 1e-12)
    assert res.fm_scaled > 0  # uniform uptake up to 0.9 beside renal up to 0.6 cannot always fit
    # every kept sample equals the model at the kept inputs, and the kidney column is their kidney ratio
    again = MODEL.evaluate({p: v for p, v in x.items()})
    assert np.array_equal(again.kidney, res.kidney) and np.array_equal(again.total, res.total)
    assert np.allclose(res.gut * res.liver * res.kidney, res.total, rtol=1e-12, atol=0.0)
    pct = {q: (g, h, k, t) for q, g, h, k, t in res.percentiles}
    assert pct[50.0][2] == pytest.approx(float(np.percentile(res.kidney, 50.0)), rel=0, abs=0)
    cols = res.sample_columns()
    assert np.array_equal(cols["auc_ratio_kidney"], res.kidney)


def test_the_renal_fraction_is_relevant_only_with_a_secretion_route() -> None:
    text = (demo_path().with_name("examples") / "transporter_victim.toml").read_text(encoding="utf-8")
    without = loads_scenario(text[: text.rindex("[[victim.pathways]]")])  # the OAT3 secretion route left out
    model = ScenarioModel(assess(without))
    assert RENAL in {i.path for i in model.inputs()} and RENAL not in {i.path for i in model.inputs(relevant_only=True)}
    moved = np.broadcast_to(model.evaluate({RENAL: np.linspace(0.0, 0.4, 5)}).total, (5,))  # does not enter: a scalar
    assert moved.tolist() == [float(model.evaluate().total)] * 5
    assert RENAL in {i.path for i in MODEL.inputs(relevant_only=True)}
