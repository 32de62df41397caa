"""Regression tests for the edges of the input paths (issue 11): each reproduction is a named error or a right number.

Scenario values here are invented inputs, not check values; the expected numbers are the model's own algebra
(1 + [I]/Ki for fm = 1, ICH M12 2024 section 2.1 / Rowland and Matin 1973), stated beside each check.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from conftest import base_dict

from interact import assess
from interact.batch import check_pair_budget, evaluate_pairs, loads_perpetrators, loads_victims
from interact.cli import main
from interact.errors import InputError
from interact.scenario import scenario_from_dict
from interact.tables import load_rules


def _potent(ki: str, fm: float = 1.0) -> dict:
    d = base_dict()
    d["perpetrator"]["inhibits"][0]["ki"] = ki
    d["victim"]["pathways"][0]["fm"] = fm
    return d


@pytest.mark.parametrize("ki_um", [2e-16, 1e-15, 1e-12, 1e-6])
def test_fm_one_with_a_very_potent_inhibitor_is_exact(ki_um: float) -> None:
    """fm = 1: AUCR_h = 1/(a) = 1 + [I]/Ki exactly (the liver term of the mechanistic static model); no cancellation."""
    result = assess(scenario_from_dict(_potent(f"{ki_um:g} uM")))
    effect = result.prediction.effects[0]
    expected = 1.0 / effect.liver.activity
    assert result.prediction.liver == pytest.approx(expected, rel=1e-12)
    # and the scaling in Ki is kept: ten times less Ki, about ten times the ratio
    other = assess(scenario_from_dict(_potent(f"{ki_um / 10:g} uM")))
    if ki_um < 1e-9:
        assert other.prediction.liver / result.prediction.liver == pytest.approx(10.0, rel=1e-6)


def test_fm_one_uncertainty_prints_numbers_and_valid_json(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    import tomlkit

    scen = tmp_path / "s.toml"
    scen.write_text(tomlkit.dumps(_potent("2e-16 uM")), encoding="utf-8")
    for vary in ("perpetrator.inhibits[0].ki=cv:30%", "victim.pathways[0].fm=uniform:0.9,1"):
        assert main(["uncertainty", str(scen), "--vary", vary, "--samples", "300"]) == 0
        text = capsys.readouterr().out
        assert "not a number" not in text and "nan" not in text.lower().split()
        assert main(["uncertainty", str(scen), "--vary", vary, "--samples", "300", "--format", "json"]) == 0
        data = json.loads(capsys.readouterr().out)
        assert math.isfinite(data["point_auc_ratio"])


@pytest.mark.parametrize("spec", ["ci:1e-29 uM,1e29 uM", "ci:1e-6 uM,1e6 uM"])
def test_wide_ci_bounds_are_a_named_error(tmp_path: Path, spec: str, capsys: pytest.CaptureFixture[str]) -> None:
    import tomlkit

    scen = tmp_path / "s.toml"
    scen.write_text(tomlkit.dumps(base_dict()), encoding="utf-8")
    assert main(["uncertainty", str(scen), "--vary", f"perpetrator.cmax={spec}", "--samples", "100"]) == 2
    err = capsys.readouterr().err
    assert "perpetrator.cmax" in err and "spans a factor" in err and "Traceback" not in err


def test_samples_zero_in_a_spec_is_an_error(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    import tomlkit

    scen = tmp_path / "s.toml"
    scen.write_text(tomlkit.dumps(base_dict()), encoding="utf-8")
    spec = tmp_path / "spec.toml"
    spec.write_text('[vary]\n"victim.fg" = "uniform:0.3,0.6"\n[sampling]\nsamples = 0\n', encoding="utf-8")
    assert main(["uncertainty", str(scen), "--spec", str(spec)]) == 2
    assert "sampling.samples" in capsys.readouterr().err


P_HEAD = "name,dose (mg),molar mass (g/mol),cmax (ng/mL),fu_p,route,ki CYP3A (uM)\n"
V_TABLE = "name,dose (mg),interval (h),fg,fm CYP3A\nV,10,24,0.5,1\nW,10,24,0.5,0.5\n"


def test_batch_with_fm_one_and_potent_inhibitors_fills_every_ratio() -> None:
    rules = load_rules(None)
    perps = loads_perpetrators(P_HEAD + "A,100,400,400,0.1,oral,2e-16\nC,100,400,400,0.1,oral,1e-29\n", rules)
    victims = loads_victims(V_TABLE)
    result = evaluate_pairs(perps, victims, rules)
    assert all(math.isfinite(x) for x in result.total.ravel())
    # each pair equals assess() of the same pair (batch's stated contract), here at the fm = 1 edge
    from interact.batch import pair_scenario

    for i in range(2):
        point = assess(pair_scenario(perps, victims, i, 0), rules=rules, warn=False)  # the ratios are checked here, not the warnings
        assert result.total[i, 0] == pytest.approx(point.prediction.total, rel=1e-12)


def test_batch_beyond_memory_is_refused_before_starting(monkeypatch: pytest.MonkeyPatch) -> None:
    with pytest.raises(InputError) as info:
        check_pair_budget(100_000, 100_000)  # 1e10 pairs: MemoryError before issue 11
    assert info.value.field == "pairs" and "GiB" in str(info.value)
    import interact.batch as batch

    monkeypatch.setattr(batch, "_free_memory_bytes", lambda: 100)
    rules = load_rules(None)
    perps = loads_perpetrators(P_HEAD + "A,100,400,400,0.1,oral,1\n", rules)
    with pytest.raises(InputError, match="pairs"):
        evaluate_pairs(perps, loads_victims(V_TABLE), rules)


def test_a_batch_beyond_memory_is_refused_before_the_tables_are_read(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    """100,000 x 100,000 rows took minutes to read before the refusal; the rows are counted first."""
    import interact.batch as batch

    perps = tmp_path / "p.csv"
    perps.write_text(P_HEAD + "A,100,400,400,0.1,oral,1\n" * 50, encoding="utf-8")
    victims = tmp_path / "v.csv"
    victims.write_text(V_TABLE, encoding="utf-8")
    read: list[str] = []

    def reading(*args: object, **kwargs: object) -> None:
        read.append("a table was read")
        raise AssertionError("the tables were read before the refusal")

    monkeypatch.setattr(batch, "_free_memory_bytes", lambda: 1000)  # room for 7 pairs: 50 x 2 is refused
    monkeypatch.setattr(batch, "_parse_rows", reading)
    assert main(["screen-batch", str(perps), str(victims)]) == 2
    assert "pairs" in capsys.readouterr().err and not read


def test_skip_with_every_row_bad_shows_the_reasons(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    perps = tmp_path / "p.csv"
    perps.write_text(P_HEAD + "A,100,400,x,0.1,oral,1\nB,100,400,400,7,oral,1\n", encoding="utf-8")
    victims = tmp_path / "v.csv"
    victims.write_text(V_TABLE, encoding="utf-8")
    assert main(["screen-batch", str(perps), str(victims), "--on-error", "skip"]) == 2
    err = capsys.readouterr().err
    assert "line 2" in err and "cmax" in err and "line 3" in err and "fu_p" in err


# -- rule-set files (issue 11, item 4) ------------------------------------------------------------------------------

ICH = Path(__file__).resolve().parents[1] / "reference_tables" / "rules" / "ich-m12-2024.toml"


def _rules_with(tmp_path: Path, *edits: tuple[str, str], name: str = "rules.toml") -> Path:
    text = ICH.read_text(encoding="utf-8")
    for old, new in edits:
        assert old in text, old
        text = text.replace(old, new, 1)
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize(
    ("old", "new", "field"),
    [
        ("cutoff = { value = 1.02,", "cutoff = { value = nan,", "criteria[0].cutoff.value"),
        ("cutoff = { value = 1.02,", "cutoff = { value = -1,", "criteria[0].cutoff.value"),
        ("cutoff = { value = 1.02,", "cutoff = { value = [1, 2],", "criteria[0].cutoff.value"),
        ("[fu_plasma_floor]\nvalue = 0.01", "[fu_plasma_floor]\nvalue = 2", "fu_plasma_floor.value"),
        ("[aucr_inhibition_cutoff]\nvalue = 1.25", "[aucr_inhibition_cutoff]\nvalue = inf", "aucr_inhibition_cutoff.value"),
        ("[aucr_induction_cutoff]\nvalue = 0.8", '[aucr_induction_cutoff]\nvalue = "0.8"', "aucr_induction_cutoff.value"),
        (
            'table_version = "2026.12"',
            'table_version = "2026.12"\n[physiology.fu_gut]\nvalue = -0.5\nsource = "x"\nstatus = "from memory"',
            "physiology.fu_gut.value",
        ),
        ("oral_only = true", 'oral_only = "yes"', "criteria[1].oral_only"),
    ],
)
def test_rule_set_values_are_validated(tmp_path: Path, old: str, new: str, field: str) -> None:
    path = _rules_with(tmp_path, (old, new))
    with pytest.raises(InputError) as info:
        load_rules(path)
    assert field in str(info.value) and "line " in str(info.value)


def test_rule_set_problems_are_listed_all_at_once(tmp_path: Path) -> None:
    from interact.errors import ScenarioError

    path = _rules_with(
        tmp_path,
        ("cutoff = { value = 1.02,", "cutoff = { value = nan,"),
        ("[fu_plasma_floor]\nvalue = 0.01", "[fu_plasma_floor]\nvalue = 2"),
        ("[aucr_induction_cutoff]\nvalue = 0.8", "[aucr_induction_cutoff]\nvalue = -3"),
    )
    with pytest.raises(ScenarioError) as info:
        load_rules(path)
    fields = {p.field for p in info.value.problems}
    assert {"criteria[0].cutoff.value", "fu_plasma_floor.value", "aucr_induction_cutoff.value"} <= fields
    assert all(p.line for p in info.value.problems)


def test_a_nan_cutoff_cannot_reach_the_outputs(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    """Before issue 11 a nan cutoff crashed the JSON and read "below cutoff" in text; now the run stops first."""
    rules = _rules_with(tmp_path, ("cutoff = { value = 1.02,", "cutoff = { value = nan,"))
    from interact.scenario import demo_path

    assert main(["assess", str(demo_path()), "--rules", str(rules), "--format", "json"]) == 2
    assert "criteria[0].cutoff.value" in capsys.readouterr().err


def test_relative_rules_path_is_read_from_the_scenario_folder(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    import tomlkit

    folder = tmp_path / "project"
    folder.mkdir()
    _rules_with(folder, ('id = "ich-m12-2024"', 'id = "local-rules"'), name="local.toml")
    data = base_dict()
    data["rules"] = "local.toml"
    (folder / "s.toml").write_text(tomlkit.dumps(data), encoding="utf-8")
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    monkeypatch.chdir(elsewhere)
    from interact.scenario import load_scenario

    assert assess(load_scenario(folder / "s.toml")).rules.id == "local-rules"


# -- silent and crashing cases (issue 11, item 6) --------------------------------------------------------------------


def test_bom_is_accepted_by_scenarios_batch_tables_and_rule_sets(tmp_path: Path) -> None:
    import tomlkit

    from interact.scenario import load_scenario

    scen = tmp_path / "s.toml"
    scen.write_bytes(b"\xef\xbb\xbf" + tomlkit.dumps(base_dict()).encode("utf-8"))
    assert load_scenario(scen).title == "test scenario"
    rules = tmp_path / "r.toml"
    rules.write_bytes(b"\xef\xbb\xbf" + ICH.read_bytes())
    assert load_rules(rules).id == "ich-m12-2024"
    perps = tmp_path / "p.csv"
    perps.write_bytes(b"\xef\xbb\xbf" + (P_HEAD + "A,100,400,400,0.1,oral,1\n").encode("utf-8"))
    victims = tmp_path / "v.csv"
    victims.write_bytes(b"\xef\xbb\xbf" + V_TABLE.encode("utf-8"))
    assert main(["screen-batch", str(perps), str(victims), "-o", str(tmp_path / "out.csv"), "-q"]) == 0


@pytest.mark.parametrize(
    "text",
    [
        "title = " + "[" * 3000 + "]" * 3000,  # 3000-deep nesting: RecursionError before
        "title = " + "{a=" * 3000 + "1" + "}" * 3000,
        "x = " + "9" * 4400,  # beyond Python's integer conversion limit: ValueError before
        "x = " + "[" * 40 + "]" * 40,  # parses, but deeper than any scenario
    ],
)
def test_hostile_toml_is_a_named_error(tmp_path: Path, text: str, capsys: pytest.CaptureFixture[str]) -> None:
    scen = tmp_path / "s.toml"
    scen.write_text(text, encoding="utf-8")
    assert main(["assess", str(scen)]) == 2
    err = capsys.readouterr().err
    assert str(scen) in err and "Traceback" not in err


def test_tiny_blood_plasma_ratio_is_refused() -> None:
    from interact.errors import ScenarioError

    d = base_dict()
    d["perpetrator"]["blood_plasma_ratio"] = 5e-324
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(d)
    assert info.value.problems[0].field == "perpetrator.blood_plasma_ratio"


def test_duplicate_turnover_entries_are_refused() -> None:
    """The last entry used to win: the order of two entries moved the AUC ratio (2.83 to 9.29 in the issue)."""
    from interact.errors import ScenarioError

    d = base_dict()
    d["turnover"] = [{"enzyme": "CYP3A", "kdeg_liver": "0.02 1/h"}, {"enzyme": "cyp3a4", "kdeg_liver": "0.03 1/h"}]
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(d)
    assert [p.field for p in info.value.problems] == ["turnover[1].enzyme"]


def test_strengths_beyond_the_limit_and_below_a_nanogram_are_named() -> None:
    from interact.errors import ScenarioError

    d = base_dict()
    d["victim"]["strengths"] = ["5 mg"] * 201
    with pytest.raises(ScenarioError, match=r"victim\.strengths: has 201 entries"):
        scenario_from_dict(d)
    d["victim"]["strengths"] = ["1e-9 mg", "5 mg"]
    with pytest.raises(ScenarioError, match=r"victim\.strengths\[0\]"):
        scenario_from_dict(d)
    d["victim"]["strengths"] = ["0.25 ug", "5 mg"]  # a quarter of a microgram is a real strength size: accepted
    assert len(scenario_from_dict(d).victim.strengths) == 2


def test_fm_sum_message_shows_enough_digits() -> None:
    from interact.errors import ScenarioError

    d = base_dict()
    d["victim"]["pathways"] = [{"enzyme": "CYP3A", "fm": 0.6}, {"enzyme": "CYP2D6", "fm": 0.4003}]
    with pytest.raises(ScenarioError, match=r"sum to 1\.0003;"):
        scenario_from_dict(d)


@pytest.mark.parametrize("command", ["fit-tdi", "fit-induction"])
def test_bom_is_accepted_by_the_mechanism_fits(tmp_path: Path, command: str, capsys: pytest.CaptureFixture[str]) -> None:
    data = tmp_path / "d.csv"
    if command == "fit-tdi":  # invented inputs (a hyperbolic kobs pattern), not check values
        rows = ["inhibitor (uM),time (min),activity"] + [
            f"{c},{t},{100 * math.exp(-(0.05 * c / (2 + c)) * t):.6g}" for c in (0, 1, 3, 10, 30) for t in (0, 5, 10, 20)
        ]
    else:
        rows = ["concentration (uM),fold_change"] + [f"{c},{1 + 4 * c / (2 + c):.6g}" for c in (0, 0.3, 1, 3, 10, 30)]
    data.write_bytes(b"\xef\xbb\xbf" + ("\n".join(rows) + "\n").encode("utf-8"))
    assert main([command, str(data)]) == 0, capsys.readouterr().err


def test_fit_data_near_1e300_is_a_named_error(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    """A LinAlgError traceback in the fit before issue 11: now refused where the file is read."""
    data = tmp_path / "big.csv"
    rows = [f"{s},{i},{v}e299" for s, i, v in ((1, 0, 5), (2, 0, 8), (5, 0, 9), (1, 1, 3), (2, 1, 5), (5, 1, 7))]
    data.write_text("substrate (uM),inhibitor (uM),velocity\n" + "\n".join(rows) + "\n", encoding="utf-8")
    assert main(["fit", str(data)]) == 2
    err = capsys.readouterr().err
    assert "line 2, velocity" in err and "Traceback" not in err


@pytest.mark.parametrize("key", ["fu_plasma", "blood_plasma_ratio", "fa_fg"])
def test_a_400_digit_integer_is_a_named_error(key: str) -> None:
    """Found by the fuzz suite: an integer beyond the float range raised OverflowError while being checked."""
    from interact.errors import ScenarioError

    d = base_dict()
    d["perpetrator"][key] = 10**400
    with pytest.raises(ScenarioError) as info:
        scenario_from_dict(d)
    assert info.value.problems[0].field == f"perpetrator.{key}"


def test_induction_fit_with_a_late_rise_has_no_zero_over_zero() -> None:
    """Found by the fuzz suite: a trial EC50 of 0 with a zero concentration gave 0/0 (a RuntimeWarning, NaN)."""
    from interact.kinetics.carry import parse_fold_change_csv
    from interact.kinetics.induction import fit_induction

    c = parse_fold_change_csv("concentration (uM),fold_change\n0.0,1.0\n1.0,1.0\n2.0,1.0\n3.0,2.0\n").columns
    result = fit_induction(c["concentration"], c["fold_change"])  # pytest turns any warning into an error
    assert not result.emax.identifiable or math.isfinite(result.emax.value)


def test_text_parsers_drop_a_byte_order_mark() -> None:
    """Found by the fuzz suite: the file readers dropped a BOM, the text parsers (used by the app) did not."""
    from interact.kinetics.carry import parse_fold_change_csv
    from interact.kinetics.data import parse_incubation_csv

    data = parse_incubation_csv("\ufeffsubstrate (uM),inhibitor (uM),velocity\n1,0,5\n2,0,8\n")
    assert data.n == 2
    assert parse_fold_change_csv("\ufeffconcentration (uM),fold_change\n0,1\n1,2\n").n == 2
    assert len(loads_victims("\ufeff" + V_TABLE).rows) == 2


def test_uncertainty_refuses_to_summarise_a_non_finite_ratio(monkeypatch: pytest.MonkeyPatch) -> None:
    """The guard behind "never 'not a number'": should a model ever give NaN, the run stops with the inputs named."""
    import numpy as np

    import interact.uncertainty as unc

    result = assess(scenario_from_dict(base_dict()))
    original = unc.ScenarioModel.evaluate

    def with_a_hole(self, values=None):  # type: ignore[no-untyped-def]
        r = original(self, values)
        total = np.array(r.total, dtype=float, copy=True)
        total.flat[0] = np.nan
        return unc.Ratios(gut=r.gut, liver=r.liver, kidney=r.kidney, total=total)

    monkeypatch.setattr(unc.ScenarioModel, "evaluate", with_a_hole)
    with pytest.raises(InputError, match=r"perpetrator\.cmax.*not a finite number in 1 of 200"):
        unc.run_uncertainty(result, (("perpetrator.cmax", "cv:30%"),), samples=200)
