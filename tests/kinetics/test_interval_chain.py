"""The fitted Ki's interval carried from an incubation CSV to the spread of the AUC ratio, with no retyping.

Data: nlstools vmkmki (tests/data, source in its first line); the scenario is the built-in invented demo.
Check values come from the fit itself (its profile interval) and from scipy.stats.lognorm (the distribution
built from a 95 % interval); the AUC ratio at a given Ki comes from ``assess`` on an edited scenario.
"""

from __future__ import annotations

import dataclasses
import json
import shutil
from pathlib import Path

import numpy as np
import pytest
from scipy.stats import lognorm

from interact import assess, demo_path, load_scenario, loads_scenario, units
from interact.cli import main
from interact.errors import ScenarioError
from interact.kinetics import fit_inhibition, incubation_data
from interact.uncertainty import ScenarioModel, run_uncertainty, scenario_intervals

from .conftest import DATA, columns

VMKMKI = str(DATA / "nlstools_vmkmki.csv")
UNITS = ["--substrate-unit", "uM", "--inhibitor-unit", "uM"]


def _fitted_scenario(tmp_path: Path) -> Path:
    scenario = tmp_path / "scenario.toml"
    shutil.copy(demo_path(), scenario)
    assert main(["fit", VMKMKI, *UNITS, "--into", str(scenario), "--target", "CYP3A", "--no-terminal-plot"]) == 0
    return scenario


def test_fit_into_writes_the_profile_interval_and_its_method(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scenario = _fitted_scenario(tmp_path)
    capsys.readouterr()
    s, i, v = columns("nlstools_vmkmki.csv", "S", "I", "v")
    ki = fit_inhibition(incubation_data(s, i, v)).ki
    assert ki is not None
    entry = next(x for x in load_scenario(scenario).perpetrator.inhibits if x.target == "CYP3A")
    assert entry.ki_ci is not None
    low, high = (q.to("uM").magnitude for q in entry.ki_ci)
    assert low == pytest.approx(ki.profile_low, rel=1e-5) and high == pytest.approx(ki.profile_high, rel=1e-5)
    assert "ki_ci 95% profile likelihood" in entry.origin
    assert main(["assess", str(scenario), "--format", "markdown"]) == 0
    assert f"(interval {low:.3g}-{high:.3g} uM)" in capsys.readouterr().out  # assess shows it, with its unit


def test_uncertainty_uses_the_carried_interval_by_default(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scenario = _fitted_scenario(tmp_path)
    result = assess(load_scenario(scenario))
    model = ScenarioModel(result)
    ((inp, dist),) = scenario_intervals(model)
    entry = next(x for x in result.scenario.perpetrator.inhibits if x.target == "CYP3A")
    low, high = (q.to("uM").magnitude for q in entry.ki_ci)  # type: ignore[union-attr]
    # the interval is the 2.5th and 97.5th percentile of the log-normal (checked with scipy.stats.lognorm)
    ref = lognorm(s=dist.sigma, scale=dist.median)
    assert ref.ppf(0.025) == pytest.approx(low, rel=1e-9) and ref.ppf(0.975) == pytest.approx(high, rel=1e-9)
    spread = run_uncertainty(result, (), samples=20_000, seed=1)
    assert [vd.input.path for vd in spread.varied] == [inp.path]

    def aucr_at(ki_um: float) -> float:
        edited = dataclasses.replace(
            result.scenario,
            perpetrator=dataclasses.replace(
                result.scenario.perpetrator,
                inhibits=tuple(
                    dataclasses.replace(x, ki=units.parse(f"{ki_um!r} uM", "concentration", field="ki"), ki_ci=None)
                    if x.target == "CYP3A"
                    else x
                    for x in result.scenario.perpetrator.inhibits
                ),
            ),
        )
        return assess(edited).prediction.total

    # the AUC ratio falls as Ki rises: its 5th percentile sits at Ki's 95th, its 95th at Ki's 5th
    for pct, q in ((5.0, 0.95), (50.0, 0.5), (95.0, 0.05)):
        assert spread.percentile(pct) == pytest.approx(aucr_at(float(ref.ppf(q))), rel=2e-3)
    # a declared distribution overrides the carried interval
    fixed = run_uncertainty(result, ((inp.path, "fixed"),), samples=200, seed=1)
    assert np.all(fixed.total == fixed.total[0])
    capsys.readouterr()
    assert main(["uncertainty", str(scenario), "--format", "json", "--samples", "500"]) == 0
    assert "from ki_ci in the scenario" in json.dumps(json.loads(capsys.readouterr().out))
    # the full report runs the same uncertainty without being told to
    assert main(["report", str(scenario), "-o", str(tmp_path / "r.md"), "--samples", "500"]) == 0
    assert "from ki_ci in the scenario" in (tmp_path / "r.md").read_text(encoding="utf-8")


@pytest.mark.parametrize(
    ("ci", "needle"),
    [
        ('["1 uM", "2 uM"]', "does not contain ki"),
        ('["9 uM", "5 uM"]', "0 < lower <= upper"),
        ('["1 uM"]', "list of two values"),
        ('["1 h", "9 uM"]', "ki_ci"),
    ],
)
def test_bad_intervals_are_refused_with_the_field(ci: str, needle: str) -> None:
    text = demo_path().read_text(encoding="utf-8").replace('ki = "4.2 uM"', f'ki = "4.2 uM"\nki_ci = {ci}', 1)
    with pytest.raises(ScenarioError) as info:
        loads_scenario(text)
    assert "perpetrator.inhibits[0].ki_ci" in str(info.value) and needle in str(info.value)


def test_intervals_and_own_binding_survive_a_save_and_reload(tmp_path: Path) -> None:
    from interact.scenario import dumps_scenario, merge_scenario_text

    scenario = _fitted_scenario(tmp_path)
    example = Path(__file__).resolve().parents[2] / "interact" / "examples" / "tdi_inducer.toml"
    for text in (scenario.read_text(encoding="utf-8"), example.read_text(encoding="utf-8")):
        loaded = loads_scenario(text)
        assert loaded.perpetrator.inhibits[0].ki_ci is not None or loaded.perpetrator.inhibits[0].fu_inc_ec50 == 1.0
        assert loads_scenario(dumps_scenario(loaded)) == loaded
        merged = merge_scenario_text(text, loaded)
        assert merged is not None and loads_scenario(merged) == loaded
