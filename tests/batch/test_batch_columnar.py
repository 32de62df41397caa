"""Batch output written column by column (pyarrow): what is read back equals the results in memory, value for value.

The outside reference is pyarrow's own CSV and Parquet readers and Python's json module (general-purpose
libraries from the registry): each written file is read back with them and compared, cell by cell and with
exact float equality (full precision), with the ranked results held in memory (:func:`interact.batch.ranking`
over :class:`interact.batch.BatchResult`), and with the rows of :func:`interact.batch.result_rows` (Python
``repr`` per number).  Tables are random and small (hypothesis); names carry commas, quotes, semicolons,
non-ASCII letters and a terminal escape, which CSV must quote and the terminal-safe names must drop.
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.csv as pa_csv
import pyarrow.parquet as pq
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from interact.batch import FLAGS, OUTPUT_COLUMNS, BatchResult, evaluate_pairs, loads_perpetrators, loads_victims, ranking, result_rows
from interact.cli import main
from interact.dosing import ACTIONS
from interact.report.batch import JSON_KEYS, result_batches, write_results
from interact.report.document import terminal_safe

ENZYMES = ("CYP3A", "CYP2D6")
pos = st.floats(min_value=1e-3, max_value=1e3, allow_nan=False, allow_infinity=False)
frac = st.floats(min_value=0.001, max_value=1.0, allow_nan=False)
NAME_CHARS = st.sampled_from([*"abcXYZ019 ,;\"'é-", "\x1b[8m"])


def _name(draw: st.DrawFn, prefix: str, k: int) -> str:
    return f"{prefix}{k}" + "".join(draw(st.lists(NAME_CHARS, max_size=6))) + "x"  # distinct, never blank


@st.composite
def tables(draw: st.DrawFn) -> tuple[str, str]:
    n_p, n_v = draw(st.integers(1, 5)), draw(st.integers(1, 5))
    perps = [["name", "dose (mg)", "molar mass (g/mol)", "cmax (ng/mL)", "fu_p", *(f"ki {e} (uM)" for e in ENZYMES)]]
    for k in range(n_p):
        kis = [draw(st.one_of(st.none(), pos)) for _ in ENZYMES]
        if all(x is None for x in kis):
            kis[0] = draw(pos)
        perps.append(
            [
                _name(draw, "P", k),
                repr(draw(pos)),
                repr(draw(st.floats(100, 900))),
                repr(draw(pos)),
                repr(draw(frac)),
                *("" if x is None else repr(x) for x in kis),
            ]
        )
    victims = [["name", "dose (mg)", "interval (h)", "fg", "nti", "phenotype CYP2D6", *(f"fm {e}" for e in ENZYMES)]]
    for k in range(n_v):
        victims.append(
            [
                _name(draw, "V", k),
                draw(st.sampled_from(["2.5", "5", "10"])),
                draw(st.sampled_from(["12", "24"])),
                draw(st.one_of(st.just(""), st.floats(0.05, 1.0).map(repr))),
                draw(st.sampled_from(["", "yes"])),
                draw(st.sampled_from(["", "poor", "intermediate", "0.5"])),
                *(repr(draw(st.floats(0.0, 0.49))) for _ in ENZYMES),
            ]
        )

    def text(rows: list[list[str]]) -> str:
        out = io.StringIO()
        csv.writer(out, lineterminator="\n").writerows(rows)
        return out.getvalue()

    return text(perps), text(victims)


def _expected(result: BatchResult, top: int | None, clean=str) -> dict[str, list[object]]:  # type: ignore[no-untyped-def]
    """The ranked results in memory, one list per output column (the reference the files are compared with)."""
    order = ranking(result, top)
    ii, jj = np.divmod(order, len(result.victims.rows))
    p, v = result.perpetrators, result.victims
    flat = lambda a: a.ravel()[order].tolist()  # noqa: E731
    return {
        "rank": list(range(1, order.size + 1)),
        "perpetrator": [clean(p.rows[i].name) for i in ii],
        "victim": [clean(v.rows[j].name) for j in jj],
        "Imax,u (uM)": p.imax_u_um[ii].tolist(),
        "Iin,max,u (uM)": p.inlet_um[ii].tolist(),
        "Igut (uM)": p.gut_lumen_um[ii].tolist(),
        "I,ent (uM)": p.enterocyte_um[ii].tolist(),
        "basic models": [p.basic[i] for i in ii],
        "AUCR gut": flat(result.gut),
        "AUCR liver": flat(result.liver),
        "AUCR kidney": flat(result.kidney),
        "AUCR": flat(result.total),
        "phenotype": [v.phenotype[j] for j in jj],
        "exposure vs normal": flat(result.exposure),
        "class": [result.band_names[b] for b in flat(result.band)],
        "study indicated (mechanistic model)": flat(result.study),
        "action": [ACTIONS[a] for a in flat(result.action)],
        "flags": ["; ".join(FLAGS[k] for k in range(len(FLAGS)) if bits >> k & 1) for bits in flat(result.flags)],
    }


NUMBERS = (
    *("Imax,u (uM)", "Iin,max,u (uM)", "Igut (uM)", "I,ent (uM)"),
    *("AUCR gut", "AUCR liver", "AUCR kidney", "AUCR", "exposure vs normal"),
)


def _read_csv(data: bytes) -> pa.Table:
    types = {c: pa.float64() for c in NUMBERS} | {c: pa.string() for c in OUTPUT_COLUMNS if c not in NUMBERS and c != "rank"}
    return pa_csv.read_csv(
        io.BytesIO(data),
        convert_options=pa_csv.ConvertOptions(column_types=types, strings_can_be_null=False, quoted_strings_can_be_null=False),
    )


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(texts=tables(), top=st.one_of(st.none(), st.integers(1, 30)), block=st.integers(1, 7))
def test_written_files_equal_the_results_in_memory(texts: tuple[str, str], top: int | None, block: int) -> None:
    result = evaluate_pairs(loads_perpetrators(texts[0]), loads_victims(texts[1]))
    want = _expected(result, top)
    n = len(want["rank"])
    assert n == (result.pairs if top is None else min(top, result.pairs))
    # blocks of any size give the same rows (the writers stream block by block)
    joined = pa.Table.from_batches(list(result_batches(result, top, block=block)))
    assert joined.column_names == list(OUTPUT_COLUMNS)
    assert joined.to_pydict() == want

    csv_out = io.BytesIO()
    assert write_results(result, csv_out, "csv", top=top) == n
    got = _read_csv(csv_out.getvalue())
    assert got.column_names == list(OUTPUT_COLUMNS)
    safe = _expected(result, top, terminal_safe)
    for name in OUTPUT_COLUMNS:
        column = got.column(name).to_pylist()
        if name == "study indicated (mechanistic model)":
            assert column == ["yes" if x else "no" for x in safe[name]]
        else:
            assert column == safe[name], name  # exact: full precision
    # the same numbers as Python's repr of each float (the rows of result_rows)
    for row, rank in zip(result_rows(result, top), got.column("rank").to_pylist(), strict=True):
        assert int(row[0]) == rank
        for name in NUMBERS:
            k = OUTPUT_COLUMNS.index(name)
            assert float(row[k]) == got.column(name)[rank - 1].as_py()

    pq_out = io.BytesIO()
    assert write_results(result, pq_out, "parquet", top=top) == n
    table = pq.read_table(io.BytesIO(pq_out.getvalue()))
    assert table.column_names == list(OUTPUT_COLUMNS)
    assert table.to_pydict() == want

    js_out = io.StringIO()
    assert write_results(result, js_out, "json", top=top) == n
    doc = json.loads(js_out.getvalue())
    assert len(doc["results"]) == n
    for k, (name, key) in enumerate(zip(OUTPUT_COLUMNS, JSON_KEYS, strict=True)):
        values = [r[key] for r in doc["results"]]
        expected = [[f for f in x.split("; ") if f] for x in want[name]] if name == "flags" else want[name]
        assert values == expected, (k, name)


def test_cli_writes_parquet_through_the_one_writer(tmp_path: Path) -> None:
    perps = tmp_path / "p.csv"
    perps.write_text("name,dose (mg),molar mass (g/mol),cmax (ng/mL),fu_p,ki CYP3A (uM)\nInvented A,100,400,400,0.1,1\n", encoding="utf-8")
    victims = tmp_path / "v.csv"
    victims.write_text("name,dose (mg),interval (h),fg,fm CYP3A\nInvented V,10,24,0.5,0.9\nInvented W,10,24,,0.5\n", encoding="utf-8")
    out = tmp_path / "out.parquet"
    assert main(["screen-batch", str(perps), str(victims), "-o", str(out), "-q"]) == 0
    table = pq.read_table(out)
    assert table.num_rows == 2 and table.column_names == list(OUTPUT_COLUMNS)
    assert not list(tmp_path.glob(".out.parquet.*"))  # the temporary file of the one writer is gone
    out.chmod(0o444)  # the one writer's rules hold for Parquet too: a read-only file is refused and left unchanged
    before = out.read_bytes()
    assert main(["screen-batch", str(perps), str(victims), "-o", str(out), "-q", "--top", "1"]) == 2
    assert out.read_bytes() == before


def test_parquet_to_a_text_only_handle_is_a_named_error() -> None:
    from interact.errors import InputError

    result = evaluate_pairs(
        loads_perpetrators("name,dose (umol),cmax (uM),fu_p,ki CYP3A (uM)\nA,100,1,0.1,1\n"),
        loads_victims("name,dose (mg),interval (h),fm CYP3A\nV,10,24,0.9\n"),
    )
    with pytest.raises(InputError, match="binary"):
        write_results(result, io.StringIO(), "parquet")
