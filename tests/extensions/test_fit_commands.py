"""'interact fit-tdi' / 'fit-induction', CSV reading and carrying fitted constants into a scenario.

Outside reference: the Puromycin treated-cell fit (R nls: Vm 212.7, K 0.06412;
Bates & Watts 1988 data, tests/data/r_datasets_Puromycin.csv) through the
command line, with the rate shifted by +1 so that it reads as a fold change
(fold = 1 + Emax C/(EC50 + C) then has Emax = Vm, EC50 = K).  Other data here
are generated from the model itself (recovery checks) or are malformed inputs.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from conftest import read_checks

from interact import assess, load_scenario
from interact.cli import main
from interact.errors import InputError
from interact.kinetics.carry import parse_fold_change_csv, parse_preincubation_csv
from interact.kinetics.inactivation import kobs_hyperbola
from interact.kinetics.scenario_update import carry_constants_text

# Scenarios and designs here trigger model and fit warnings (fu,inc = 1, few levels, an unbounded constant ...) as a
# side effect of what they test; their emission is checked in tests/api/test_warnings.py.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

EXAMPLE = Path(__file__).resolve().parents[2] / "interact" / "examples" / "tdi_inducer.toml"


def test_headers_carry_units() -> None:
    data = parse_preincubation_csv("# comment\ninhibitor (nM),Time (h),activity\n500,0.5,80\n1000,1,60\n")
    assert data.columns["inhibitor"] == pytest.approx((0.5, 1.0))
    assert data.columns["time"] == pytest.approx((30.0, 60.0))
    assert data.n == 2
    fold = parse_fold_change_csv("conc,fold\n1,2\n")
    assert fold.columns["concentration"] == (1.0,) and fold.units["concentration"] == "uM"


def test_bad_csv_names_row_and_column() -> None:
    with pytest.raises(InputError, match="lacks the column time"):
        parse_preincubation_csv("inhibitor,activity\n1,2\n")
    with pytest.raises(InputError, match=r"line 3, activity"):
        parse_preincubation_csv("inhibitor,time,activity\n1,0,100\n1,5,abc\n")
    with pytest.raises(InputError, match="a molar concentration"):
        parse_preincubation_csv("inhibitor (mg),time,activity\n1,0,100\n")
    with pytest.raises(InputError, match="no data rows"):
        parse_fold_change_csv("# only a comment\n")


def test_carry_keeps_comments_and_validates() -> None:
    text = EXAMPLE.read_text(encoding="utf-8")
    new = carry_constants_text(text, target="CYP3A4", values={"kinact": "0.05 1/min", "ki_inact": "2 uM"}, origin="test fit")
    assert '# fit: was "0.006 1/min"; time-dependent part' in new  # one writer for every fit: stamp, old value, old comment
    assert "INVENTED" in new and "reversible part, invented microsomal incubation" in new
    s = load_scenario_text(new)
    assert s.perpetrator.inhibits[0].origin == "test fit"
    created = carry_constants_text(text, target="CYP2C9", values={"emax": 2.0, "ec50": "3 uM"}, origin="o")
    assert len(load_scenario_text(created).perpetrator.inhibits) == 2
    with pytest.raises(InputError):
        carry_constants_text(text, target="CYP3A", values={"kinact": "-1 1/min"}, origin="o")
    with pytest.raises(InputError, match="not a known enzyme"):
        carry_constants_text(text, target="CYP9Z9", values={"emax": 1.0}, origin="o")


def load_scenario_text(text: str):  # type: ignore[no-untyped-def]
    from interact.scenario import loads_scenario

    return loads_scenario(text)


def test_fit_tdi_command_recovers_and_carries(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    rows = ["inhibitor (uM),time (min),activity"]
    for c in (0.0, 0.5, 1.0, 2.5, 5.0, 10.0, 25.0):
        for t in (0.0, 3.0, 6.0, 10.0, 15.0):
            rows.append(f"{c},{t},{100 * np.exp(-(0.003 + kobs_hyperbola(c, 0.08, 2.5)) * t):.12g}")
    data = tmp_path / "tdi.csv"
    data.write_text("\n".join(rows) + "\n", encoding="utf-8")
    scen = tmp_path / "s.toml"
    scen.write_text(EXAMPLE.read_text(encoding="utf-8"), encoding="utf-8")
    assert main(["fit-tdi", str(data), "--format", "json", "--into", str(scen), "--target", "CYP3A", "--fu-inc", "0.5"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["kinact_per_min"]["value"] == pytest.approx(0.08, rel=1e-6)
    assert out["ki_um"]["value"] == pytest.approx(2.5, rel=1e-6)
    s = load_scenario(scen)
    inh = s.perpetrator.inhibits[0]
    assert inh.kinact.to("1/min").magnitude == pytest.approx(0.08, rel=1e-5)
    # issue 14: the in vitro KI goes in as fitted, with its own binding beside it; the unbound KI is their product
    assert inh.ki_inact.to("uM").magnitude == pytest.approx(2.5, rel=1e-5)
    assert inh.fu_inc_ki_inact == 0.5 and inh.fu_inc == 0.8  # the entry's fu_inc (for Ki) is left alone
    const = next(c for c in assess(s).constants if c.target == "CYP3A" and c.species_index == 0)
    assert const.ki_inact_u_um == pytest.approx(1.25, rel=1e-5) and const.ki_inact_fu_origin == "fu_inc_ki_inact (given)"
    assert inh.ki_inact_ci is not None and inh.kinact_ci is not None
    assert "fit of tdi.csv" in inh.origin


def test_fit_induction_command_matches_puromycin(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    rows = [r for r in read_checks("r_datasets_Puromycin.csv") if r["state"] == "treated"]
    data = tmp_path / "fold.csv"
    data.write_text("concentration (uM),fold_change\n" + "".join(f"{r['conc']},{1 + float(r['rate'])}\n" for r in rows), encoding="utf-8")
    assert main(["fit-induction", str(data), "--format", "json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["emax"]["value"] == pytest.approx(212.68370711, rel=1e-6)
    assert out["emax"]["std_error"] == pytest.approx(6.947, rel=5e-4)
    assert out["ec50_um"]["value"] == pytest.approx(0.06412123, rel=1e-5)
    assert main(["fit-induction", str(data)]) == 0
    assert "Emax" in capsys.readouterr().out


def test_fit_commands_refuse_bad_requests(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    data = tmp_path / "fold.csv"
    c = np.array([0.1, 0.3, 1, 3, 10, 30.0])
    data.write_text("conc,fold\n" + "".join(f"{x},{1 + 4 * x**2 / (1 + x**2)}\n" for x in c), encoding="utf-8")
    scen = tmp_path / "s.toml"
    original = EXAMPLE.read_text(encoding="utf-8")
    scen.write_text(original, encoding="utf-8")
    assert main(["fit-induction", str(data), "--into", str(scen)]) == 2  # no --target
    assert main(["fit-induction", str(data), "--hill", "--into", str(scen), "--target", "CYP3A"]) == 2  # h = 2 not carried
    assert scen.read_text(encoding="utf-8") == original  # nothing written
    assert main(["fit-tdi", str(tmp_path / "missing.csv")]) == 2
    err = capsys.readouterr().err
    assert "--target" in err and "h = 1" in err and "missing.csv" in err
