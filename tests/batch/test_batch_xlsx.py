"""Spreadsheet interchange: batch tables read from .xlsx (same column rules and row messages as CSV), results written
to .xlsx (results with units in the headers, inputs and provenance, cautions).

Inputs are the invented example tables shipped in interact/examples; the checks are invariants (a sheet holding the
same cells as a CSV gives the same results; the written workbook holds the numbers of BatchResult.columns).
"""

from __future__ import annotations

import csv
import io
import math
from pathlib import Path

import numpy as np
import pytest
from openpyxl import Workbook, load_workbook

from interact.batch import COLUMN_KEYS, OUTPUT_COLUMNS, BadRowsError, evaluate_pairs, loads_perpetrators, loads_victims
from interact.cautions import CAUTION_LINE
from interact.cli import main
from interact.errors import InputError

EXAMPLES = Path(__file__).resolve().parents[2] / "interact" / "examples"
PERPS = EXAMPLES / "batch_perpetrators.csv"
VICTIMS = EXAMPLES / "batch_victims.csv"


def _cell(text: str) -> object:
    try:
        return float(text) if text.strip() else None
    except ValueError:
        return text


def _sheet_from_csv(book: Workbook, title: str, path: Path, *, numbers: bool = True) -> None:
    """Copy a CSV into a sheet line for line (comment lines too), numbers as numbers: row k of the sheet = line k of the CSV."""
    ws = book.create_sheet(title)
    for line in path.read_text(encoding="utf-8").splitlines():
        if line.startswith("#"):
            ws.append([line])
            continue
        row = next(csv.reader([line]))
        ws.append([_cell(c) if numbers else (c or None) for c in row])


def _workbook(tmp_path: Path, name: str = "tables.xlsx", *, numbers: bool = True) -> Path:
    book = Workbook()
    book.remove(book.active)
    _sheet_from_csv(book, "precipitants", PERPS, numbers=numbers)
    _sheet_from_csv(book, "objects", VICTIMS, numbers=numbers)
    path = tmp_path / name
    book.save(path)
    return path


@pytest.mark.parametrize("numbers", [True, False])
def test_a_sheet_gives_the_same_results_as_the_csv(tmp_path: Path, numbers: bool) -> None:
    ref = evaluate_pairs(loads_perpetrators(PERPS.read_text(encoding="utf-8")), loads_victims(VICTIMS.read_text(encoding="utf-8")))
    data = _workbook(tmp_path, numbers=numbers).read_bytes()
    perps = loads_perpetrators(data, source="tables.xlsx")  # the first sheet
    victims = loads_victims(data, source="tables.xlsx", sheet="objects")
    got = evaluate_pairs(perps, victims)
    np.testing.assert_allclose(got.total, ref.total, rtol=1e-12)
    np.testing.assert_array_equal(got.action, ref.action)
    assert perps.lines == loads_perpetrators(PERPS.read_text(encoding="utf-8")).lines  # row numbers = CSV line numbers


def test_bad_rows_and_sheets_are_named_like_csv(tmp_path: Path) -> None:
    text = PERPS.read_text(encoding="utf-8").splitlines()
    bad_line = 4
    cells = next(csv.reader([text[bad_line - 1]]))
    cells[4] = "1.7"  # fu_p above 1
    text[bad_line - 1] = ",".join(cells)
    bad_csv = tmp_path / "bad.csv"
    bad_csv.write_text("\n".join(text) + "\n", encoding="utf-8")
    book = Workbook()
    book.remove(book.active)
    _sheet_from_csv(book, "precipitants", bad_csv)
    book.save(tmp_path / "bad.xlsx")
    with pytest.raises(BadRowsError) as from_csv:
        loads_perpetrators(bad_csv.read_text(encoding="utf-8"), source="t")
    with pytest.raises(BadRowsError) as from_xlsx:
        loads_perpetrators((tmp_path / "bad.xlsx").read_bytes(), source="t")
    assert [(p.line, p.message) for p in from_xlsx.value.problems] == [(p.line, p.message) for p in from_csv.value.problems]
    assert from_xlsx.value.problems[0].line == bad_line
    with pytest.raises(InputError, match="precipitants"):
        loads_perpetrators((tmp_path / "bad.xlsx").read_bytes(), source="t", sheet="nope")
    with pytest.raises(InputError, match="xlsx workbook"):
        loads_perpetrators(b"not a zip file", source="t.xlsx")


def test_cli_reads_sheets_and_writes_a_workbook(tmp_path: Path) -> None:
    tables = _workbook(tmp_path)
    out = tmp_path / "results.xlsx"
    argv = ["screen-batch", str(tables), str(tables), "--sheet", "precipitants", "--victim-sheet", "objects", "-o", str(out), "-q"]
    assert main(argv) == 0
    ref = evaluate_pairs(loads_perpetrators(PERPS.read_text(encoding="utf-8")), loads_victims(VICTIMS.read_text(encoding="utf-8")))
    cols = ref.columns()
    book = load_workbook(out, read_only=True)
    assert book.sheetnames == ["results", "inputs", "cautions"]
    rows = list(book["results"].iter_rows(values_only=True))
    assert list(rows[0]) == list(OUTPUT_COLUMNS)  # units in the headers, as in CSV
    assert len(rows) - 1 == ref.pairs
    for k, row in enumerate(rows[1:]):
        for key, value in zip(COLUMN_KEYS, row, strict=True):
            want = cols[key][k]
            if isinstance(want, (float, np.floating)):
                # openpyxl writes 16 significant digits ('%.16g'): the last bit of a double may round
                assert (value is None and not math.isfinite(want)) or value == pytest.approx(float(want), rel=2e-16), key
            elif isinstance(want, (bool, np.bool_)):
                assert value == ("yes" if want else "no")
            elif isinstance(want, np.integer):
                assert value == int(want)
            else:
                assert (value or "") == want, key
    inputs = [r for r in book["inputs"].iter_rows(values_only=True)]
    flat = [str(c) for r in inputs for c in r if c is not None]
    assert any("interact " in c for c in flat) and any("ich-m12-2024" in c for c in flat)
    assert any(c.startswith("Corvexazole") for c in flat)
    cautions = [r[0] for r in book["cautions"].iter_rows(values_only=True) if r and r[0]]
    assert CAUTION_LINE in cautions
    book.close()


def test_xlsx_to_standard_output_is_a_workbook(tmp_path: Path) -> None:
    import subprocess
    import sys

    done = subprocess.run(
        [sys.executable, "-m", "interact", "screen-batch", str(PERPS), str(VICTIMS), "--format", "xlsx", "-o", "-"],
        capture_output=True,
        timeout=120,
        check=False,
    )
    assert done.returncode == 0, done.stderr
    book = load_workbook(io.BytesIO(done.stdout), read_only=True)
    assert book.sheetnames == ["results", "inputs", "cautions"]
    book.close()


def test_path_loaders_read_csv_and_xlsx_alike(tmp_path: Path) -> None:
    from interact.batch import load_perpetrators, load_victims

    book = _workbook(tmp_path)
    a = evaluate_pairs(load_perpetrators(PERPS), load_victims(VICTIMS))
    b = evaluate_pairs(load_perpetrators(book), load_victims(book, sheet="objects"))
    np.testing.assert_allclose(b.total, a.total, rtol=1e-12)
    assert load_perpetrators(book).source == str(book)
    with pytest.raises(InputError, match="could not be read"):
        load_victims(tmp_path / "missing.csv")
