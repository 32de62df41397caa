"""Screens beyond memory, streamed in chunks of perpetrators: the same rows as the screen held in memory.

- ``worst_pairs`` (``--top N`` beyond memory) keeps a running list of the worst pairs chunk by chunk; its ranked rows
  equal, row for row and value for value, the first N rows of the whole screen evaluated at once, whatever the chunk
  size, ties included (duplicated perpetrators make exact ties, ranked in table order);
- ``stream_chunks`` with ``write_parquet_chunks`` (``-o FILE.parquet`` beyond memory) writes every pair once; read back
  with pyarrow's Parquet reader (a general-purpose library from the registry) the rows equal the screen in memory;
- the command picks streaming by itself when the pairs do not fit (free memory made small here) and still refuses
  an unranked CSV of every pair.

Tables are random and small (hypothesis), invented compounds, not data about any drug.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import numpy as np
import pyarrow.parquet as pq
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from test_batch_columnar import tables

from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims, ranking, result_rows, stream_chunks, worst_pairs
from interact.cli import main
from interact.report.batch import result_batches, write_parquet_chunks

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")


def _with_duplicates(ptext: str, copies: int) -> str:
    """The perpetrator table with its first row repeated (renamed), so that pairs tie exactly."""
    rows = list(csv.reader(io.StringIO(ptext)))
    out = io.StringIO()
    csv.writer(out, lineterminator="\n").writerows([*rows, *([f"Copy{k}x", *rows[1][1:]] for k in range(copies))])
    return out.getvalue()


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(texts=tables(), copies=st.integers(0, 3), top=st.integers(1, 30), chunk=st.integers(1, 12))
def test_worst_pairs_by_chunks_equal_the_whole_screen(texts: tuple[str, str], copies: int, top: int, chunk: int) -> None:
    ptext, vtext = texts
    perps = loads_perpetrators(_with_duplicates(ptext, copies))
    victims = loads_victims(vtext)
    whole = evaluate_pairs(perps, victims)
    streamed = worst_pairs(perps, victims, top, pairs_per_chunk=chunk)
    assert streamed.pairs == whole.pairs
    assert list(result_rows(streamed, top)) == list(result_rows(whole, top))
    # ties at the cut are weighed too: the first `top` of the full ranking
    np.testing.assert_array_equal(ranking(whole, top), ranking(whole)[:top])


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(texts=tables(), chunk=st.integers(1, 12))
def test_streamed_parquet_holds_every_pair_once(tmp_path_factory: pytest.TempPathFactory, texts: tuple[str, str], chunk: int) -> None:
    ptext, vtext = texts
    perps, victims = loads_perpetrators(ptext), loads_victims(vtext)
    path = tmp_path_factory.mktemp("stream") / "out.parquet"
    with path.open("wb") as handle:
        rows = write_parquet_chunks(stream_chunks(perps, victims, pairs_per_chunk=chunk), handle)
    whole = evaluate_pairs(perps, victims)
    assert rows == whole.pairs
    back = pq.read_table(path)
    assert back.column("rank").null_count == rows  # unranked: rows in table order
    expected = next(result_batches(whole, ranked=False, block=whole.pairs))
    for name in back.column_names[1:]:
        assert back.column(name).to_pylist() == expected.column(name).to_pylist(), name


def _files(tmp_path: Path) -> tuple[str, str]:
    rng = np.random.default_rng(4)
    p = tmp_path / "p.csv"
    lines = ["name,dose (mg),molar mass (g/mol),cmax (ng/mL),fu_p,ki CYP3A (uM),ki CYP2D6 (uM)"]
    for k in range(40):
        lines.append(
            f"P{k},{rng.choice([50, 100])},{rng.uniform(300, 600):.1f},{10 ** rng.uniform(1, 3):.4g},0.1,{10 ** rng.uniform(-1, 2):.3g},"
        )
    lines.append("P0 again,50,400.0,500,0.1,1,")  # ties with P0 only if equal: kept to show table order
    p.write_text("\n".join(lines) + "\n", encoding="utf-8")
    v = tmp_path / "v.csv"
    v.write_text("name,dose (mg),interval (h),fg,strengths (mg),fm CYP3A,fm CYP2D6\nV1,10,24,0.5,2.5;5;10,0.8,0.1\nV2,5,12,,5,0.3,0.6\n")
    return str(p), str(v)


def test_the_command_streams_what_does_not_fit(tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]) -> None:
    import interact.batch as batch

    p, v = _files(tmp_path)
    in_memory, streamed = tmp_path / "a.csv", tmp_path / "b.csv"
    assert main(["screen-batch", p, v, "--top", "7", "-o", str(in_memory), "-q"]) == 0
    monkeypatch.setattr(batch, "_free_memory_bytes", lambda: 2000)  # room for about 15 pairs: 82 do not fit
    assert not batch.fits_in_memory(41, 2) and batch.fits_in_memory(7, 2)
    assert main(["screen-batch", p, v, "--top", "7", "-o", str(streamed), "-q"]) == 0
    assert streamed.read_bytes() == in_memory.read_bytes()
    out = tmp_path / "all.parquet"
    monkeypatch.setattr(batch, "STREAM_PAIRS", 10)  # several chunks
    assert main(["screen-batch", p, v, "-o", str(out)]) == 0
    assert "in table order" in capsys.readouterr().err
    assert pq.read_table(out).num_rows == 82
    assert main(["screen-batch", p, v, "-o", str(tmp_path / "all.csv")]) == 2  # every pair, ranked, as CSV: refused
    assert "--top N" in capsys.readouterr().err
