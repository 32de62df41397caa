"""screen-batch to a terminal: a rounded table whose 'study' columns say which model they refer to and agree with the
full-precision CSV.  The tables are the invented examples in interact/examples (no real drug)."""

from __future__ import annotations

import csv
import io
import re
import sys
from pathlib import Path

import pytest

from interact.cli import main
from interact.tables import load_rules

EXAMPLES = Path(__file__).resolve().parents[2] / "interact" / "examples"
ARGS = ["screen-batch", str(EXAMPLES / "batch_perpetrators.csv"), str(EXAMPLES / "batch_victims.csv")]


def _csv(capsys: pytest.CaptureFixture[str]) -> list[dict[str, str]]:
    assert main([*ARGS, "--format", "csv"]) == 0
    return list(csv.DictReader(io.StringIO(capsys.readouterr().out)))


def test_a_terminal_gets_a_rounded_table_and_a_pipe_gets_csv(capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch) -> None:
    assert main(ARGS) == 0
    assert capsys.readouterr().out.startswith("rank,")  # not a terminal: CSV
    monkeypatch.setattr(sys.stdout, "isatty", lambda: True)
    assert main(ARGS) == 0
    out = capsys.readouterr().out
    assert out.count("study:") == 2 and "mechanistic" in out and "basic" in out and "not clinical advice" in out
    assert not out.startswith("rank,")


def test_table_rows_agree_with_the_csv_and_name_their_model(capsys: pytest.CaptureFixture[str]) -> None:
    full = _csv(capsys)
    assert main([*ARGS, "--format", "table"]) == 0
    out = capsys.readouterr().out
    cutoff = float(load_rules().aucr_inhibition_cutoff.value)
    induction = float(load_rules().aucr_induction_cutoff.value)
    lines = [ln for ln in out.splitlines() if re.match(r"^  \d+ ", ln)]
    assert len(lines) == len(full)
    for line, row in zip(lines, full, strict=True):
        cells = re.split(r"\s{2,}", line.strip())
        rank, aucr = cells[0], cells[3]
        assert rank == row["rank"]
        # rounded to the report's figures (3 significant, 4 decimals near 1)
        assert len(re.sub(r"[^0-9]", "", aucr).lstrip("0")) <= 5
        assert float(aucr) == pytest.approx(float(row["AUCR"]), rel=5e-3)
        mechanistic, basic = cells[5], cells[6]
        assert mechanistic == row["study indicated (mechanistic model)"]
        a = float(row["AUCR"])
        if not row["study indicated (mechanistic model)"] == "yes":
            assert induction < a < cutoff
        assert (basic == "yes") == ("STUDY" in row["basic models"]) == ("basic model flags a study" in row["flags"])
