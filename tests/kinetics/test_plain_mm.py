"""Plain Michaelis-Menten fits (substrate and velocity only) and the substrate-inhibition alternative.

Data: R datasets Puromycin, treated cells (Treloar 1974, published in Bates & Watts 1988, Appendix A1.3; the
substrate is in ppm there), tests/data/r_datasets_Puromycin.csv.  Published values: Vm 212.7, K 0.06412
(R datasets example, seen; tests/data/fit_reference_values.csv).  Other data here are simulated with invented
constants and are inputs only.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import numpy as np
import pytest

from interact import assess, demo_path, load_scenario
from interact.cli import main
from interact.kinetics import fit_inhibition, incubation_data
from interact.kinetics.ratelaws import michaelis_menten, substrate_inhibition

from .conftest import read_table


def _puromycin_csv(tmp_path: Path, unit: str) -> Path:
    rows = [r for r in read_table("r_datasets_Puromycin.csv") if r["state"] == "treated"]
    path = tmp_path / f"puromycin_{unit}.csv"
    path.write_text(f"substrate ({unit}),velocity (counts/min/min)\n" + "".join(f"{r['conc']},{r['rate']}\n" for r in rows))
    return path


def test_substrate_only_file_in_ppm_gives_km_in_ppm(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    data = _puromycin_csv(tmp_path, "ppm")
    assert main(["fit", str(data), "--format", "json"]) == 0
    out = json.loads(capsys.readouterr().out)
    fit = next(f for f in out["fits"] if f["model"] == "none")
    km = next(e for e in fit["estimates"] if e["name"] == "Km")
    vmax = next(e for e in fit["estimates"] if e["name"] == "Vmax")
    assert km["unit"] == "ppm" and km["value"] == pytest.approx(0.06412123, rel=1e-6)  # R-intro / Bates & Watts
    assert vmax["value"] == pytest.approx(212.68370711, rel=1e-6)
    assert km["ci_profile"][0] < km["value"] < km["ci_profile"][1]
    assert out["verdict"]["mechanism"] is None and "Michaelis-Menten fit only" in out["verdict"]["text"]
    assert "substrate-inhibition form" in out["verdict"]["text"]  # the alternative is compared and reported
    scenario = tmp_path / "scenario.toml"
    shutil.copy(demo_path(), scenario)
    before = scenario.read_bytes()
    assert main(["fit", str(data), "--into", str(scenario), "--target", "CYP2C9"]) == 2
    assert "molar Km" in capsys.readouterr().err and scenario.read_bytes() == before


def test_molar_km_goes_into_the_cheng_prusoff_conversion(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    data = _puromycin_csv(tmp_path, "uM")  # the published numbers relabelled: an input only
    scenario = tmp_path / "scenario.toml"
    shutil.copy(demo_path(), scenario)
    assert main(["fit", str(data), "--into", str(scenario), "--target", "CYP2C9", "--format", "json"]) == 0
    out = json.loads(capsys.readouterr().out)
    km = next(e for e in next(f for f in out["fits"] if f["model"] == "none")["estimates"] if e["name"] == "Km")
    entry = next(x for x in load_scenario(scenario).perpetrator.inhibits if x.target == "CYP2C9")
    assert entry.km.to("uM").magnitude == pytest.approx(km["value"], rel=1e-5)
    assert entry.km_ci is not None and entry.km_ci[0].to("uM").magnitude == pytest.approx(km["ci_profile"][0], rel=1e-5)
    assert "Michaelis-Menten fit of" in entry.origin and "km_ci 95% profile likelihood" in entry.origin
    assert 'was "5 uM"' in scenario.read_text(encoding="utf-8")
    const = next(c for c in assess(load_scenario(scenario)).constants if c.target == "CYP2C9")
    assert f"Km {km['value']:.4g} uM" in const.ki_route  # the new Km feeds Cheng-Prusoff


def test_one_inhibitor_level_is_an_apparent_fit_and_carries_nothing(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    s = np.repeat([2.5, 5.0, 10.0, 20.0, 40.0, 80.0], 2)
    v = michaelis_menten(s, 80.0, 20.0) + np.random.default_rng(1).normal(0, 1.0, s.size)  # invented
    comp = fit_inhibition(incubation_data(s, np.full(s.size, 5.0), v))
    assert comp.models == ("none",) and "apparent" in comp.verdict.text and comp.ki is None
    path = tmp_path / "one.csv"
    path.write_text("substrate (uM),inhibitor (uM),velocity\n" + "".join(f"{a},5,{b}\n" for a, b in zip(s, v, strict=True)))
    scenario = tmp_path / "scenario.toml"
    shutil.copy(demo_path(), scenario)
    before = scenario.read_bytes()
    assert main(["fit", str(path), "--into", str(scenario), "--target", "CYP3A", "--no-terminal-plot"]) == 2
    assert "was not updated" in capsys.readouterr().err and scenario.read_bytes() == before


def test_help_lists_every_model_choice(capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit):
        main(["fit", "--help"])
    text = " ".join(capsys.readouterr().out.split())
    assert "none,competitive,noncompetitive,uncompetitive,mixed" in text


def _control_curve(v: np.ndarray, s: np.ndarray) -> object:
    return incubation_data(np.tile(s, 2), np.zeros(2 * s.size), np.tile(v, 2), lines=range(2, 2 * s.size + 2))


S = np.array([1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0, 200.0])


def test_falling_velocities_name_substrate_inhibition_and_its_driving_row() -> None:
    v = substrate_inhibition(S, 100.0, 10.0, 80.0)  # invented constants: a clear fall at high S
    v = v * (1 + np.array([0.01, -0.01, 0.02, -0.02, 0.01, 0.0, -0.01, 0.01]))
    comp = fit_inhibition(_control_curve(v, S))
    (warning,) = [w for w in comp.warnings if "substrate" in w and "Ksi" in w]
    assert warning.startswith("Velocity falls at high substrate") and "The row that drives it most is line" in warning


def test_rising_data_are_called_sharper_saturation_not_substrate_inhibition() -> None:
    v = 100.0 * S**1.6 / (15.0**1.6 + S**1.6)  # invented: rises throughout, more steeply than a hyperbola
    v = v * (1 + np.array([0.01, -0.01, 0.01, -0.01, 0.01, -0.01, 0.01, -0.01]))
    comp = fit_inhibition(_control_curve(v, S))
    assert np.all(np.diff(v) > 0)
    (warning,) = [w for w in comp.warnings if "Ksi" in w]
    assert "sharper saturation than hyperbolic" in warning and "do not fall" in warning
    assert "The row that drives it most is line" in warning
    assert not warning.startswith("Velocity falls")
