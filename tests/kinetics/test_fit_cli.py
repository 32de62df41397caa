"""`interact fit` in-process: report, JSON, plots, bad rows, and carrying the Ki into a scenario.

Data: nlstools vmkmki and drc ryegrass (tests/data, sources in their first
lines); the scenario is the built-in invented demo (its values are invented
and say so).
"""

from __future__ import annotations

import json
import shutil
from datetime import UTC, datetime
from pathlib import Path

import pytest

from interact import assess, demo_path, load_scenario
from interact.cli import main

from .conftest import DATA

# Scenarios here trigger model warnings (Fg not given, fu,inc = 1, kdeg from memory ...) as a side effect of
# what they test; the warnings themselves are checked in tests/api/test_warnings.py and where a test asks for one.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

VMKMKI = str(DATA / "nlstools_vmkmki.csv")
UNITS = ["--substrate-unit", "uM", "--inhibitor-unit", "uM"]


def test_fit_prints_comparison_verdict_interval_and_plot(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["fit", VMKMKI, *UNITS]) == 0
    out = capsys.readouterr().out
    # section titles as written (units and names keep their case)
    for heading in ("Model comparison", "Verdict", "Estimates: uncompetitive model", "F tests", "Diagnostic plot", "Caution"):
        assert heading in out
    assert "Uncompetitive inhibition" in out and "Kic unbounded" in out
    assert "Double reciprocal" in out and "not clinical advice" in out


def test_fit_json_and_files(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    svg = tmp_path / "diag.svg"
    assert main(["fit", VMKMKI, *UNITS, "--format", "json", "--plot", str(svg), "--fu-inc", "0.5"]) == 0
    text = capsys.readouterr().out
    assert "Infinity" not in text and "NaN" not in text  # strict JSON: unbounded values are null with a flag
    data = json.loads(text)
    assert data["verdict"]["model"] == "uncompetitive" and data["verdict"]["unidentifiable"] == ["Kic"]
    mixed = next(f for f in data["fits"] if f["model"] == "mixed")
    kic = next(e for e in mixed["estimates"] if e["name"] == "Kic")
    assert kic["unbounded"] and kic["value"] is None and kic["profile_open_above"]
    assert data["unbound"]["ki_u_um"] == pytest.approx(0.5 * data["unbound"]["ki_um"])
    assert "<svg" in svg.read_text(encoding="utf-8")


def test_bad_row_is_one_line_with_its_number(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    bad = tmp_path / "bad.csv"
    bad.write_text("substrate (uM),inhibitor (uM),velocity\n1,0,2\n2,0,3\n5,0,oops\n", encoding="utf-8")
    assert main(["fit", str(bad)]) == 2
    err = capsys.readouterr().err
    assert "line 4" in err and "velocity" in err and "Traceback" not in err


def test_into_updates_the_scenario_keeps_comments_and_assess_uses_it(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scenario = tmp_path / "scenario.toml"
    shutil.copy(demo_path(), scenario)
    before = scenario.read_text(encoding="utf-8")
    assert main(["fit", VMKMKI, *UNITS, "--into", str(scenario), "--target", "CYP3A4", "--fu-inc", "0.5", "--format", "json"]) == 0
    fitted = json.loads(capsys.readouterr().out)["unbound"]["ki_um"]
    after = scenario.read_text(encoding="utf-8")
    for line in before.splitlines():  # every comment line the user wrote is still there
        if line.lstrip().startswith("#"):
            assert line in after
    assert 'was "4.2 uM"' in after  # the replaced value stays visible
    loaded = load_scenario(scenario)
    cyp3a = next(i for i in loaded.perpetrator.inhibits if i.target == "CYP3A")
    assert cyp3a.ki.to("uM").magnitude == pytest.approx(fitted, rel=1e-5)
    assert cyp3a.mechanism == "uncompetitive" and cyp3a.fu_inc == 0.5
    today = datetime.now(UTC).date().isoformat()
    assert cyp3a.origin == f"fit of nlstools_vmkmki.csv, uncompetitive model (constant error model); ki_ci 95% profile likelihood, {today}"
    result = assess(loaded)
    const = next(c for c in result.constants if c.target == "CYP3A" and c.species_index == 0)
    assert const.ki_u_um == pytest.approx(0.5 * fitted, rel=1e-5)
    assert main(["assess", str(scenario)]) == 0


def test_into_creates_a_missing_entry_and_replaces_ic50(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scenario = tmp_path / "scenario.toml"
    shutil.copy(demo_path(), scenario)
    assert main(["fit", VMKMKI, *UNITS, "--into", str(scenario), "--target", "CYP2D6", "--no-terminal-plot"]) == 0
    assert main(["fit", VMKMKI, *UNITS, "--into", str(scenario), "--target", "CYP2C9", "--no-terminal-plot"]) == 0
    capsys.readouterr()
    text = scenario.read_text(encoding="utf-8")
    assert "replaced by the new fit" in text and 'ic50 = "14 uM"' in text  # kept as a comment
    loaded = load_scenario(scenario)
    targets = {i.target: i for i in loaded.perpetrator.inhibits}
    assert targets["CYP2D6"].ki is not None and targets["CYP2C9"].ic50 is None


def test_into_refuses_without_target_and_leaves_the_file(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scenario = tmp_path / "scenario.toml"
    shutil.copy(demo_path(), scenario)
    before = scenario.read_bytes()
    assert main(["fit", VMKMKI, *UNITS, "--into", str(scenario)]) == 2
    assert "--target" in capsys.readouterr().err
    assert scenario.read_bytes() == before


def test_ic50_mode_with_cheng_prusoff(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    rows = (DATA / "drc_ryegrass.csv").read_text(encoding="utf-8").splitlines()[2:]
    curve = tmp_path / "curve.csv"
    curve.write_text("inhibitor (uM),response (cm)\n" + "\n".join(rows) + "\n", encoding="utf-8")
    args = ["fit", str(curve), "--mechanism", "competitive", "--substrate-conc", "5 uM", "--km", "5 uM", "--format", "json"]
    assert main(args) == 0
    data = json.loads(capsys.readouterr().out)
    ic50 = next(e for e in data["fit"]["estimates"] if e["name"] == "IC50")["value"]
    assert ic50 == pytest.approx(3.058, abs=5e-4)  # drc ryegrass LL.4 (auto-detected: no substrate column)
    assert data["cheng_prusoff"]["ki_um"] == pytest.approx(ic50 / 2)


def test_markdown_weights_models_and_predicted_binding(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    lines = (DATA / "nlstools_vmkmki.csv").read_text(encoding="utf-8").splitlines()
    positive = tmp_path / "positive.csv"  # the blank rows (S = 0, v = 0) cannot carry weights
    positive.write_text("\n".join([lines[1], *(r for r in lines[2:] if not r.startswith("0,"))]) + "\n", encoding="utf-8")
    args = ["fit", str(positive), *UNITS, "--format", "markdown", "--models", "competitive,uncompetitive", "--weights", "poisson"]
    assert main([*args, "--logp", "2.0", "--protein", "0.5 mg/mL"]) == 0
    out = capsys.readouterr().out
    assert out.startswith("# Incubation fit") and "| uncompetitive |" in out
    assert "Hallifax & Houston 2006" in out and "seen in a secondary source" in out
    assert "## References" in out and "httk documentation, calc_hep_fu" in out and "[@" not in out
    assert "Poisson-like weights" in out


def test_option_errors_are_one_line(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    assert main(["fit", VMKMKI, *UNITS, "--logp", "2", "--fu-inc", "0.5"]) == 2
    assert "both" in capsys.readouterr().err
    assert main(["fit", VMKMKI, *UNITS, "--logp", "2"]) == 2
    assert "--protein" in capsys.readouterr().err
    assert main(["fit", VMKMKI, *UNITS, "--plot", str(tmp_path / "plot.gif")]) == 2
    assert "suffix" in capsys.readouterr().err
    assert main(["fit", str(tmp_path / "absent.csv")]) == 2
    assert "could not be read" in capsys.readouterr().err


def test_ic50_into_writes_the_cheng_prusoff_ki(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    rows = (DATA / "drc_ryegrass.csv").read_text(encoding="utf-8").splitlines()[2:]
    curve = tmp_path / "curve.csv"
    curve.write_text("inhibitor (uM),activity\n" + "\n".join(rows) + "\n", encoding="utf-8")
    scenario = tmp_path / "scenario.toml"
    shutil.copy(demo_path(), scenario)
    args = ["fit", str(curve), "--mechanism", "noncompetitive", "--into", str(scenario), "--target", "CYP2C9", "--fu-inc", "0.7"]
    assert main(args) == 0
    out = capsys.readouterr().out
    assert "IC50 curve (4PL)" in out and "Ki -> Ki,u" in out
    inh = next(i for i in load_scenario(scenario).perpetrator.inhibits if i.target == "CYP2C9")
    assert inh.ki.to("uM").magnitude == pytest.approx(3.058, abs=5e-4)  # noncompetitive: Ki = IC50
    assert inh.origin.startswith("Cheng-Prusoff from 4PL IC50 fit of curve.csv")
