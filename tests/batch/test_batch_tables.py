"""Batch tables: columns with units, bad rows with line numbers (skip or fail), TOML input, outputs, CLI."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

from interact import assess
from interact.batch import BadRowsError, evaluate_pairs, loads_perpetrators, loads_victims, pair_scenario
from interact.cli import main
from interact.errors import InputError
from interact.report.batch import write_results

# invented test compounds (inputs, not check values)
PERPS = """# invented compounds
name,dose (mg),molar mass (g/mol),cmax (ng/mL),fu_p,ki CYP3A (uM),fu_inc CYP3A,ki_u CYP2C9 (uM)
Alpha,100,400,500,0.05,1.2,0.6,5
Beta,50,350,200,0.2,,,0.8
"""
VICTIMS = """name,dose (mg),interval (h),fg,strengths (mg),fm CYP3A,fm CYP2C9
VicA,10,24,0.4,2.5;5;10,0.9,
VicB,5,12,0.8,5,0.5,0.3
"""


def test_units_in_headers_match_units_in_cells() -> None:
    a = loads_perpetrators(PERPS)
    b = loads_perpetrators(
        "name,dose,molar mass,cmax,fu_p,ki CYP3A,fu_inc CYP3A,ki_u CYP2C9\n"
        "Alpha,100 mg,400 g/mol,0.5 ug/mL,0.05,1200 nM,0.6,5 uM\nBeta,50 mg,350 g/mol,200 ng/mL,0.2,,,0.8 uM\n"
    )
    assert a.inlet_um.tolist() == pytest.approx(b.inlet_um.tolist(), rel=1e-12)
    assert a.ki_u_um[0, 0] == pytest.approx(0.72, rel=1e-12)  # Ki,u = Ki x fu,inc = 1.2 x 0.6
    assert a.ki_u_um[1, 1] == 0.8


def test_bad_rows_fail_with_line_numbers() -> None:
    text = PERPS + "Gamma,abc,400,100,0.1,1,,\nDelta,100,400,100,1.5,1,,\n"
    with pytest.raises(BadRowsError) as info:
        loads_perpetrators(text)
    msg = str(info.value)
    assert "2 bad rows" in msg and "line 5" in msg and "line 6" in msg
    assert "dose (mg)" in msg and "fu_p" in msg


def test_bad_rows_skipped_and_listed_never_dropped_silently() -> None:
    text = PERPS + "Gamma,abc,400,100,0.1,1,,\n"
    table = loads_perpetrators(text, on_error="skip")
    assert [p.name for p in table.rows] == ["Alpha", "Beta"]
    assert [(s.line, "dose (mg)" in s.message) for s in table.skipped] == [(5, True)]
    result = evaluate_pairs(table, loads_victims(VICTIMS))
    out = io.StringIO()
    write_results(result, out, "json")
    assert json.loads(out.getvalue())["skipped_rows"] == [str(table.skipped[0])]
    md = io.StringIO()
    write_results(result, md, "markdown")
    assert "Rows left out" in md.getvalue() and "line 5" in md.getvalue()


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("name,dose (mg),cmax (uM),fu_p,colour\nA,1,1,0.1\n", "not a known perpetrator column"),
        ("name,dose (mg),cmax (uM),fu_p,ki CYP9Z9 (uM)\nA,1,1,0.1,1\n", "unknown target"),
        ("name,dose (h),cmax (uM),fu_p,ki CYP3A (uM)\nA,1,1,0.1,1\n", "unit"),
        ("name,dose (mg),fu_p,ki CYP3A (uM)\nA,1,0.1,1\n", 'required column "cmax"'),
        ("name,dose (mg),cmax (uM),fu_p,ki CYP3A (uM),ki CYP3A (nM)\nA,1,1,0.1,1,1\n", "repeats"),
        ("name,dose (mg),cmax (uM),fu_p (%),ki CYP3A (uM)\nA,1,1,0.1,1\n", "takes no unit"),
    ],
)
def test_bad_columns(text: str, words: str) -> None:
    with pytest.raises(InputError, match=words.replace("(", r"\(")):
        loads_perpetrators(text)


def test_row_level_conflicts() -> None:
    text = "name,dose (umol),cmax (uM),fu_p,ki CYP3A (uM),ki_u CYP3A (uM),fu_inc CYP2C9\nA,1,1,0.1,1,1,0.5\nB,1,1,0.1,,,\nC,1,1,0.1,1,,\n"
    table = loads_perpetrators(text, on_error="skip")
    assert [p.name for p in table.rows] == ["C"]
    msgs = {s.line: s.message for s in table.skipped}
    assert "both ki and ki_u" in msgs[2] and "without ki" in msgs[2]
    assert "no ki or ki_u" in msgs[3]


def test_toml_tables_equal_csv() -> None:
    ptoml = """
[[perpetrator]]
name = "Alpha"
"dose (mg)" = 100
"molar mass (g/mol)" = 400
"cmax (ng/mL)" = 500
fu_p = 0.05
"ki CYP3A (uM)" = 1.2
"fu_inc CYP3A" = 0.6
"ki_u CYP2C9 (uM)" = 5

[[perpetrator]]
name = "Beta"
"dose (mg)" = 50
"molar mass (g/mol)" = 350
"cmax (ng/mL)" = 200
fu_p = 0.2
"ki_u CYP2C9 (uM)" = 0.8
"""
    a = loads_perpetrators(ptoml, source="p.toml")
    b = loads_perpetrators(PERPS)
    assert a.inlet_um.tolist() == b.inlet_um.tolist()
    bad = ptoml.replace("fu_p = 0.2", "fu_p = 2.0")
    with pytest.raises(BadRowsError, match="line 12"):
        loads_perpetrators(bad, source="p.toml")


def test_csv_output_ranked_and_complete() -> None:
    result = evaluate_pairs(loads_perpetrators(PERPS), loads_victims(VICTIMS))
    out = io.StringIO()
    assert write_results(result, out, "csv") == 4
    rows = list(csv.DictReader(io.StringIO(out.getvalue())))
    assert [int(r["rank"]) for r in rows] == [1, 2, 3, 4]
    aucr = [float(r["AUCR"]) for r in rows]
    assert aucr == sorted(aucr, reverse=True)  # all inhibition here: worst = largest
    first = rows[0]
    assert (first["perpetrator"], first["victim"]) == ("Alpha", "VicA")
    a = assess(pair_scenario(result.perpetrators, result.victims, 0, 0))
    assert float(first["AUCR"]) == a.prediction.total  # full precision in CSV
    assert first["action"] == a.dose.action
    top = io.StringIO()
    assert write_results(result, top, "csv", top=2) == 2


def test_markdown_renders_a_table() -> None:
    result = evaluate_pairs(loads_perpetrators(PERPS), loads_victims(VICTIMS))
    out = io.StringIO()
    write_results(result, out, "markdown")
    text = out.getvalue()
    # a document for reading speaks the default rule set's words (ICH M12: precipitant, object drug)
    assert "| rank | precipitant | object drug |" in text and "|---|" in text and "not clinical advice" in text


def test_cli_writes_file_and_reports(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    p = tmp_path / "perps.csv"
    v = tmp_path / "victims.csv"
    p.write_text(PERPS + "Gamma,abc,400,100,0.1,1,,\n", encoding="utf-8")
    v.write_text(VICTIMS, encoding="utf-8")
    out = tmp_path / "results.csv"
    assert main(["screen-batch", str(p), str(v), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "line 5" in err and not out.exists()
    assert main(["screen-batch", str(p), str(v), "-o", str(out), "--on-error", "skip"]) == 0
    err = capsys.readouterr().err
    assert "skipped" in err and "line 5" in err and "4 pairs screened" in err
    assert out.read_text(encoding="utf-8").startswith("rank,perpetrator,victim")
    js = tmp_path / "results.json"
    assert main(["screen-batch", str(p), str(v), "-o", str(js), "--on-error", "skip", "-q"]) == 0
    assert json.loads(js.read_text(encoding="utf-8"))["results"][0]["rank"] == 1
    assert main(["screen-batch", str(tmp_path / "none.csv"), str(v)]) == 2
