"""The batch on Dask (interact.batch_dask) equals the in-process run bit for bit.

Outside reference: the in-process evaluation (interact.batch.evaluate_pairs) is itself checked against published
values in tests/batch/test_batch_published.py; here the check is that a dask.distributed LocalCluster (the registry's
``dask[distributed]``) running it in chunks gives the same bits, the same CSV bytes and the same named errors.
"""

from __future__ import annotations

import builtins
import dataclasses
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import interact
from interact.batch import BatchResult, evaluate_pairs, load_perpetrators, load_victims, loads_perpetrators, loads_victims
from interact.cli import main

distributed = pytest.importorskip("dask.distributed")  # the test extra installs it; CI runs these

from interact.batch_dask import chunk_bounds, evaluate_pairs_dask, perpetrator_slice  # noqa: E402

EXAMPLES = Path(interact.__file__).parent / "examples"
ARRAYS = ("gut", "liver", "total", "exposure", "band", "action", "study", "flags")


@pytest.fixture(scope="module")
def client() -> Iterator[Any]:
    with (
        distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=False, dashboard_address=":0") as cluster,
        distributed.Client(cluster) as c,
    ):
        yield c


def _same_bits(a: BatchResult, b: BatchResult) -> None:
    for name in ARRAYS:
        x, y = getattr(a, name), getattr(b, name)
        assert x.dtype == y.dtype and x.shape == y.shape, name
        assert x.tobytes() == y.tobytes(), name  # bit for bit, NaN and signed zero included
    assert a.band_names == b.band_names


@pytest.mark.parametrize("rows_per_chunk", [None, 1, 3])
def test_examples_equal_in_process_bit_for_bit(client: Any, rows_per_chunk: int | None) -> None:
    perps = load_perpetrators(EXAMPLES / "batch_perpetrators.csv")
    victims = load_victims(EXAMPLES / "batch_victims.csv")
    local = evaluate_pairs(perps, victims)
    seen: list[tuple[int, int]] = []
    remote = evaluate_pairs_dask(perps, victims, client=client, rows_per_chunk=rows_per_chunk, progress=lambda d, n: seen.append((d, n)))
    _same_bits(local, remote)
    assert remote.perpetrators is perps and remote.victims is victims
    n = len(perps.rows) * len(victims.rows)
    assert seen[-1] == (n, n) and len(seen) > 1  # more than one chunk, each reported


def _tables() -> Any:
    from test_batch_columnar import tables  # the columnar writer's generated tables: phenotypes, NTI, missing Fg

    return tables()


@settings(max_examples=8, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(texts=st.deferred(_tables), rows=st.integers(1, 3))
def test_generated_tables_equal_in_process_bit_for_bit(client: Any, texts: tuple[str, str], rows: int) -> None:
    perps, victims = loads_perpetrators(texts[0]), loads_victims(texts[1])
    _same_bits(evaluate_pairs(perps, victims), evaluate_pairs_dask(perps, victims, client=client, rows_per_chunk=rows))


def test_chunks_cover_every_perpetrator_once() -> None:
    for n_p, n_v, workers in [(1, 1, 2), (7, 6, 2), (1000, 1000, 2), (10, 10**6, 4), (5, 0, 2)]:
        bounds = chunk_bounds(n_p, n_v, workers)
        assert [a for a, _ in bounds] == [0, *(b for _, b in bounds[:-1])] and bounds[-1][1] == n_p
        assert all(b > a for a, b in bounds)


def test_slice_keeps_rows_and_arrays_together() -> None:
    perps = load_perpetrators(EXAMPLES / "batch_perpetrators.csv")
    part = perpetrator_slice(perps, 1, 3)
    assert part.rows == perps.rows[1:3] and part.basic == perps.basic[1:3]
    assert np.array_equal(part.ki_u_um, perps.ki_u_um[1:3], equal_nan=True)
    assert part.targets == perps.targets


def test_a_bad_pair_is_named_as_in_process(client: Any) -> None:
    perps = load_perpetrators(EXAMPLES / "batch_perpetrators.csv")
    victims = load_victims(EXAMPLES / "batch_victims.csv")
    bad = perps.inlet_um.copy()
    bad[2] = np.nan  # not reachable from a table; forces the finite-ratio check on the third perpetrator
    perps_bad = dataclasses.replace(perps, inlet_um=bad)
    with pytest.raises(interact.errors.InputError) as local:
        evaluate_pairs(perps_bad, victims)
    with pytest.raises(interact.errors.InputError) as remote:
        evaluate_pairs_dask(perps_bad, victims, client=client, rows_per_chunk=1)
    assert str(remote.value) == str(local.value)


def test_cli_dask_writes_the_same_csv_bytes(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """End to end through the command; the local cluster is made small (2 thread workers) to keep the test fast."""
    real = distributed.LocalCluster
    made: list[dict[str, Any]] = []
    clusters: list[Any] = []

    def small_cluster(**kw: Any) -> Any:
        made.append(kw)
        clusters.append(real(**{**kw, "n_workers": 2, "processes": False}))
        return clusters[-1]

    monkeypatch.setattr(distributed, "LocalCluster", small_cluster)
    p, v = str(EXAMPLES / "batch_perpetrators.csv"), str(EXAMPLES / "batch_victims.csv")
    assert main(["screen-batch", p, v, "-o", str(tmp_path / "local.csv"), "-q"]) == 0
    assert main(["screen-batch", p, v, "-o", str(tmp_path / "dask.csv"), "-q", "--engine", "dask"]) == 0
    assert made and made[0]["threads_per_worker"] == 1 and made[0]["processes"] is True  # the command started its own cluster
    assert clusters[0].status.name == "closed"  # and closed it
    local, remote = (tmp_path / "local.csv").read_bytes(), (tmp_path / "dask.csv").read_bytes()
    assert local == remote and local.count(b"\n") == 1 + 4 * 4


def test_cli_dask_with_a_scheduler_address(tmp_path: Path, client: Any) -> None:
    p, v = str(EXAMPLES / "batch_perpetrators.csv"), str(EXAMPLES / "batch_victims.csv")
    address = client.scheduler.address
    assert main(["screen-batch", p, v, "-o", str(tmp_path / "local.csv"), "-q"]) == 0
    assert main(["screen-batch", p, v, "-o", str(tmp_path / "dask.csv"), "-q", "--engine", "dask", "--scheduler", address]) == 0
    assert (tmp_path / "local.csv").read_bytes() == (tmp_path / "dask.csv").read_bytes()


def test_missing_dask_is_one_line_naming_engine_and_extra(monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]) -> None:
    real_import = builtins.__import__

    def no_dask(name: str, *args: Any, **kw: Any) -> Any:
        if name == "dask" or name.startswith("dask."):
            raise ImportError(f"No module named {name!r}")
        return real_import(name, *args, **kw)

    monkeypatch.setattr(builtins, "__import__", no_dask)
    p, v = str(EXAMPLES / "batch_perpetrators.csv"), str(EXAMPLES / "batch_victims.csv")
    assert main(["screen-batch", p, v, "-q", "--engine", "dask"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Traceback" not in err
    assert "--engine" in err and 'pip install "interact[dask]"' in err


def test_scheduler_without_dask_engine_is_refused(capsys: pytest.CaptureFixture[str]) -> None:
    p, v = str(EXAMPLES / "batch_perpetrators.csv"), str(EXAMPLES / "batch_victims.csv")
    assert main(["screen-batch", p, v, "-q", "--scheduler", "tcp://127.0.0.1:1"]) == 2
    assert "--scheduler" in capsys.readouterr().err


def test_unreachable_scheduler_is_a_named_error(capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch) -> None:
    import interact.batch_dask as engine

    monkeypatch.setattr(engine, "CONNECT_TIMEOUT", "1s")
    p, v = str(EXAMPLES / "batch_perpetrators.csv"), str(EXAMPLES / "batch_victims.csv")
    assert main(["screen-batch", p, v, "-q", "--engine", "dask", "--scheduler", "tcp://127.0.0.1:9"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "--scheduler" in err and "Traceback" not in err
