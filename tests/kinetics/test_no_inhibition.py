"""Fits refuse to carry what the data do not show (issue 11, item 1).

Inputs are invented (simulated from the rate laws with invented constants, or flat and rising curves made up
here); they are inputs only.  The checks are of behaviour: a fit without a demonstrated decline says so, writes
nothing into a scenario (exit status 2, file unchanged), and degenerate data get a named error.
"""

from __future__ import annotations

import itertools
import shutil
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import demo_path
from interact.cli import main
from interact.errors import InputError
from interact.kinetics import fit_inhibition, incubation_data
from interact.kinetics.ic50 import fit_ic50
from interact.kinetics.ratelaws import michaelis_menten

# Scenarios and designs here trigger model and fit warnings (fu,inc = 1, few levels, an unbounded constant ...) as a
# side effect of what they test; their emission is checked in tests/api/test_warnings.py.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

S_LEVELS = (2.5, 5.0, 10.0, 20.0, 40.0, 80.0)
I_LEVELS = (0.0, 2.5, 5.0, 10.0, 20.0)

FLAT = "inhibitor (uM),response\n0,100\n0,99\n0.1,101\n0.3,98\n1,100\n3,99\n10,101\n30,100\n"
RISING = "inhibitor (uM),response\n0,100\n0.1,102\n0.3,108\n1,120\n3,135\n10,150\n30,155\n"


def _grid_csv(velocity) -> str:  # type: ignore[no-untyped-def]
    rows = ["substrate (uM),inhibitor (uM),velocity"]
    for s, i in itertools.product(S_LEVELS, I_LEVELS):
        rows.append(f"{s},{i},{velocity(s, i)}")
    return "\n".join(rows) + "\n"


def _scenario(tmp_path: Path) -> Path:
    path = tmp_path / "scenario.toml"
    shutil.copy(demo_path(), path)
    return path


@pytest.mark.parametrize(
    ("text", "extra"),
    [
        (FLAT, ["--mechanism", "noncompetitive"]),  # was: Ki 1.58 uM written
        (RISING, ["--mechanism", "noncompetitive"]),  # was: Ki 0.195 uM written
    ],
    ids=["flat-ic50", "rising-ic50"],
)
def test_ic50_curve_without_a_decline_writes_nothing(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], text: str, extra: list[str]
) -> None:
    data = tmp_path / "curve.csv"
    data.write_text(text, encoding="utf-8")
    scenario = _scenario(tmp_path)
    before = scenario.read_bytes()
    assert main(["fit", str(data), *extra, "--into", str(scenario), "--target", "CYP3A", "--no-terminal-plot"]) == 2
    captured = capsys.readouterr()
    assert "No inhibition" in captured.out
    assert "was not updated" in captured.err and "no inhibition is shown" in captured.err
    assert scenario.read_bytes() == before


def test_all_zero_velocities_are_refused_and_write_nothing(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    data = tmp_path / "zero.csv"
    data.write_text(_grid_csv(lambda s, i: 0), encoding="utf-8")  # was: "mixed inhibition, strong support", Ki 25 uM
    scenario = _scenario(tmp_path)
    before = scenario.read_bytes()
    assert main(["fit", str(data), "--into", str(scenario), "--target", "CYP3A"]) == 2
    err = capsys.readouterr().err
    assert "velocity" in err and "every value is 0" in err and "Traceback" not in err
    assert scenario.read_bytes() == before


@pytest.mark.parametrize(
    ("velocity", "needle"),
    [(lambda s, i: 0.0, "every value is 0"), (lambda s, i: 3.5, "every value is 3.5"), (lambda s, i: -1.0, "no value above 0")],
    ids=["all-zero", "constant", "all-negative"],
)
def test_degenerate_grids_get_a_named_error(velocity, needle: str) -> None:  # type: ignore[no-untyped-def]
    s, i = np.array(list(itertools.product(S_LEVELS, I_LEVELS))).T
    v = np.array([velocity(a, b) for a, b in zip(s, i, strict=True)])
    with pytest.raises(InputError, match=needle):
        fit_inhibition(incubation_data(s, i, v))


@pytest.mark.parametrize("response", [[0.0] * 8, [42.0] * 8], ids=["all-zero", "constant"])
def test_degenerate_ic50_curves_get_a_named_error(response: list[float]) -> None:
    with pytest.raises(InputError, match="response"):
        fit_ic50([0, 0.1, 0.3, 1, 3, 10, 30, 100], response)


def test_grid_without_inhibition_writes_nothing(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    rng = np.random.default_rng(3)
    data = tmp_path / "none.csv"
    data.write_text(_grid_csv(lambda s, i: float(michaelis_menten(s, 100.0, 10.0)) + rng.normal(0, 2.0)), encoding="utf-8")
    scenario = _scenario(tmp_path)
    before = scenario.read_bytes()
    assert main(["fit", str(data), "--into", str(scenario), "--target", "CYP3A", "--no-terminal-plot"]) == 2
    captured = capsys.readouterr()
    assert "No inhibition shown" in captured.out and "was not updated" in captured.err
    assert scenario.read_bytes() == before


@settings(max_examples=25, deadline=None)
@given(seed=st.integers(0, 2**32 - 1), sd=st.floats(0.5, 8.0))
def test_inhibition_is_reported_only_when_the_model_without_it_is_rejected(seed: int, sd: float) -> None:
    """Invariant: a verdict with a mechanism always comes with a significant F test against no inhibition."""
    s, i = np.array(list(itertools.product(S_LEVELS, I_LEVELS))).T
    v = michaelis_menten(s, 100.0, 10.0) + np.random.default_rng(seed).normal(0, sd, s.size)
    comp = fit_inhibition(incubation_data(s, i, v))
    if comp.verdict.mechanism is None:
        assert comp.ki is None and not comp.verdict.inhibition_shown
    else:
        test = next(t for t in comp.f_tests if t.reduced == "none" and t.full == comp.verdict.model)
        assert test.p_value < 0.05 and comp.verdict.inhibition_shown
        # issue 14: the weight printed for the model is its own, never a sum
        own = next(r.weight for r in comp.ranking if r.model == comp.verdict.model)
        assert comp.verdict.support == own and f"Akaike weight {own:.2f} for the" in comp.verdict.text


def _example(tmp_path: Path) -> Path:
    path = tmp_path / "tdi.toml"
    shutil.copy(Path(__file__).resolve().parents[2] / "interact" / "examples" / "tdi_inducer.toml", path)
    return path


def test_flat_preincubation_and_fold_change_data_write_nothing(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    rng = np.random.default_rng(0)
    tdi = ["inhibitor (uM),time (min),activity"]  # activity falls with the vehicle only: no inactivation
    for c in (0.0, 0.5, 1.0, 2.5, 5.0, 10.0, 25.0):
        tdi += [f"{c},{t},{100 * np.exp(-0.003 * t) * (1 + 0.02 * rng.normal()):.4f}" for t in (0, 3, 6, 10, 15)]
    fold = ["concentration (uM),fold_change"]  # fold change 1 with noise: no induction
    for c in (0.1, 0.3, 1.0, 3.0, 10.0, 30.0):
        fold += [f"{c},{1 + 0.05 * rng.normal():.4f}" for _ in range(3)]
    for command, rows in (("fit-tdi", tdi), ("fit-induction", fold)):
        data = tmp_path / f"{command}.csv"
        data.write_text("\n".join(rows) + "\n", encoding="utf-8")
        scenario = _example(tmp_path)
        before = scenario.read_bytes()
        assert main([command, str(data), "--into", str(scenario), "--target", "CYP3A"]) == 2, command
        err = capsys.readouterr().err
        assert "nothing was written" in err or "was not updated" in err, err
        assert scenario.read_bytes() == before


def test_one_substrate_level_is_a_named_error(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    data = tmp_path / "one.csv"
    data.write_text("substrate (uM),inhibitor (uM),velocity\n" + "".join(f"10,{i},{50 / (1 + i)}\n" for i in (0, 1, 2, 5)))
    assert main(["fit", str(data)]) == 2
    err = capsys.readouterr().err
    assert "1 substrate level" in err and "Traceback" not in err


@settings(max_examples=15, deadline=None)
@given(seed=st.integers(0, 2**32 - 1), sd=st.floats(0.5, 6.0), ki=st.sampled_from([2.0, 5.0, 20.0]))
def test_the_printed_weight_is_the_models_own_and_a_group_is_labelled(seed: int, sd: float, ki: float) -> None:
    from interact.kinetics.ratelaws import competitive

    s, i = np.array(list(itertools.product(S_LEVELS, I_LEVELS))).T
    v = competitive(s, i, 100.0, 10.0, ki) + np.random.default_rng(seed).normal(0, sd, s.size)
    comp = fit_inhibition(incubation_data(s, i, v))
    weights = {r.model: r.weight for r in comp.ranking}
    if comp.verdict.mechanism is None:
        return
    assert comp.verdict.support == weights[comp.verdict.model]
    assert f"Akaike weight {comp.verdict.support:.2f} for the {comp.verdict.model} model itself" in comp.verdict.text
    if comp.verdict.group:
        assert comp.verdict.group_support == pytest.approx(sum(weights[m] for m in comp.verdict.group), abs=1e-12)
        assert "together" in comp.verdict.text and "for the group" in comp.verdict.text


def test_rows_at_substrate_zero_with_a_trial_km_of_zero_give_no_zero_division() -> None:
    # the rate law v = Vmax [S] / (Km (1 + [I]/Ki) + [S]) is 0 at [S] = 0 for any Km; with Km = 0 the denominator is 0
    # too, which once gave numpy's "invalid value" warning (an error under pytest's filterwarnings = error)
    import numpy as np

    from interact.kinetics.fitting import inhibition_model

    model = inhibition_model("competitive")
    x = np.array([[0.0, 0.0, 2.0], [0.0, 1.0, 0.0]])  # rows: substrate, inhibitor
    u = np.array([10.0, 0.0, 0.5])  # Vmax, a trial Km of 0, 1/Ki
    v = model.function(u, x)
    assert v.tolist() == [0.0, 0.0, 10.0]
    assert model.jacobian is not None and np.all(np.isfinite(model.jacobian(u, x)))
