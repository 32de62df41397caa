"""Batch basic-model values against published R values.

Source: Clin Pharmacol Ther 2015;98(3):321-327, Tables 2 and 3 (tests/data/cpt2015_*.csv, with their '#' source
lines), evaluated under that paper's rule set (tests/data/rules-cpt2015.toml: R >= 1.1, Qh 1500 mL/min).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from interact.batch import loads_perpetrators
from interact.tables import load_rules

DATA = Path(__file__).parent.parent / "data"
RULES = str(DATA / "rules-cpt2015.toml")


def _rows(name: str) -> list[dict[str, str]]:
    import csv

    lines = [ln for ln in (DATA / name).read_text(encoding="utf-8").splitlines() if not ln.startswith("#")]
    return list(csv.DictReader(lines))


def _basic(text: str, target: str) -> tuple[float, bool]:
    m = re.search(rf"R {re.escape(target)} ([0-9.eE+-]+)( STUDY)?", text)
    assert m, text
    return float(m.group(1)), bool(m.group(2))


def test_cyp_r1_values_table2() -> None:
    rows = [r for r in _rows("cpt2015_table2_cyp_r_values.csv") if r["row_usable_as_oracle"] == "yes"]
    targets = sorted({r["pathway"] for r in rows})
    head = [
        "name",
        "dose (mg)",
        "molar mass (g/mol)",
        "cmax (uM)",
        "fu_p",
        "route",
        *(f"ki {t} (uM)" for t in targets),
        *(f"fu_inc {t}" for t in targets),
    ]
    lines = [",".join(head)]
    for r in rows:
        ki = [r["Ki_uM"] if t == r["pathway"] else "" for t in targets]
        fu = [r["fu_inc"] if t == r["pathway"] else "" for t in targets]
        # the paper's method uses total Cmax: fu_p = 1, intravenous (no gut or portal term)
        lines.append(",".join([r["inhibitor"], "10", "400", r["I_uM_published"], "1", "intravenous", *ki, *fu]))
    table = loads_perpetrators("\n".join(lines) + "\n", load_rules(RULES))
    for k, r in enumerate(rows):
        value, flagged = _basic(table.basic[k], r["pathway"])
        assert value == pytest.approx(float(r["R_published"]), abs=0.005)  # printed to 2 decimals
        assert flagged == (r["flag_published"] == "yes")
