"""The batch screen on Dask: chunks of perpetrators evaluated by :func:`interact.batch.evaluate_pairs` on a cluster.

Nothing of the model is written here: each chunk (a slice of the perpetrator table against every victim) runs the
in-process :func:`~interact.batch.evaluate_pairs` (which calls :func:`~interact.batch.pair_ratios` and
:func:`interact.dosing.choose_regimens`), and the chunks' arrays are stacked back into one
:class:`~interact.batch.BatchResult`.  Every number of a pair depends only on its perpetrator row and its victim, so the
result equals the in-process run bit for bit (tests/batch/test_batch_dask.py checks it).

Dask is an optional extra (``pip install "interact[dask]"``); it is imported only when asked for.
"""

from __future__ import annotations

import math
import os
from collections.abc import Callable
from typing import Any

import numpy as np

from .batch import (
    _PAIRS_PER_CHUNK,
    BatchResult,
    PerpetratorTable,
    VictimTable,
    check_pair_budget,
    evaluate_pairs,
    perpetrator_subset,
)
from .errors import InputError
from .tables import RuleSet, load_rules

#: how long to wait for a scheduler given with --scheduler
CONNECT_TIMEOUT = "10s"
#: the one-line message when dask is not installed
MISSING_DASK = 'needs Dask, which is not installed: pip install "interact[dask]" (or run without --engine dask)'


def import_distributed() -> Any:
    """``dask.distributed``, or an :class:`InputError` naming ``--engine`` and the extra to install."""
    try:
        import dask.distributed as distributed
    except ImportError:
        raise InputError("--engine", "dask", MISSING_DASK) from None
    return distributed


def perpetrator_slice(table: PerpetratorTable, a: int, b: int) -> PerpetratorTable:
    """Rows ``a:b`` of a perpetrator table, with their per-perpetrator arrays (:func:`interact.batch.perpetrator_subset`)."""
    return perpetrator_subset(table, slice(a, b))


def _evaluate_chunk(chunk: PerpetratorTable, victims: VictimTable, rules: RuleSet) -> dict[str, Any]:
    """One chunk on a worker: the in-process evaluation; a bad pair comes back as words (InputError does not pickle)."""
    try:
        r = evaluate_pairs(chunk, victims, rules)
    except InputError as exc:
        return {"error": (exc.field, exc.value, exc.expected)}
    return {k: getattr(r, k) for k in _ARRAYS} | {"band_names": r.band_names}


_ARRAYS = ("gut", "liver", "total", "exposure", "band", "action", "study", "flags")


def chunk_bounds(n_perpetrators: int, n_victims: int, workers: int) -> list[tuple[int, int]]:
    """Perpetrator ranges: at most the in-process chunk of pairs each, and at least two chunks per worker thread."""
    by_memory = max(1, _PAIRS_PER_CHUNK // max(n_victims, 1))
    by_workers = max(1, math.ceil(n_perpetrators / max(1, 2 * workers)))
    step = min(by_memory, by_workers)
    return [(a, min(n_perpetrators, a + step)) for a in range(0, n_perpetrators, step)]


def evaluate_pairs_dask(
    perpetrators: PerpetratorTable,
    victims: VictimTable,
    rules: RuleSet | str | None = None,
    *,
    client: Any,
    rows_per_chunk: int | None = None,
    progress: Callable[[int, int], None] | None = None,
) -> BatchResult:
    """:func:`interact.batch.evaluate_pairs` on a ``dask.distributed.Client``, chunked over perpetrators.

    Parameters
    ----------
    client
        A connected ``dask.distributed.Client`` (a local cluster or an existing scheduler).
    rows_per_chunk
        Perpetrators per task (default: see :func:`chunk_bounds`).
    progress
        ``progress(done_pairs, all_pairs)`` after each chunk arrives.

    Returns
    -------
    BatchResult
        The same arrays as the in-process run, bit for bit.
    """
    distributed = import_distributed()
    rule_set = rules if isinstance(rules, RuleSet) else load_rules(rules)
    n_p, n_v = len(perpetrators.rows), len(victims.rows)
    check_pair_budget(n_p, n_v)  # the gathered arrays live here, as in-process
    if rows_per_chunk is not None:
        bounds = [(a, min(n_p, a + rows_per_chunk)) for a in range(0, n_p, max(1, rows_per_chunk))]
    else:
        threads = sum(client.nthreads().values()) or 1
        bounds = chunk_bounds(n_p, n_v, threads)
    if not bounds:  # no perpetrators: nothing to send; the in-process run gives the empty result
        return evaluate_pairs(perpetrators, victims, rule_set)
    victims_f, rules_f = client.scatter([victims, rule_set], broadcast=True, hash=False)
    futures = [client.submit(_evaluate_chunk, perpetrator_slice(perpetrators, a, b), victims_f, rules_f, pure=False) for a, b in bounds]
    index = {f.key: k for k, f in enumerate(futures)}
    parts: list[dict[str, Any] | None] = [None] * len(bounds)
    done = 0
    for fut in distributed.as_completed(futures):
        k = index[fut.key]
        parts[k] = fut.result()
        done += (bounds[k][1] - bounds[k][0]) * n_v
        if progress is not None:
            progress(done, n_p * n_v)
    ready = [p for p in parts if p is not None]
    for part in ready:  # the first bad pair in table order, as the in-process run names it
        if "error" in part:
            raise InputError(*part["error"])
    stacked: dict[str, Any] = {k: np.concatenate([p[k] for p in ready], axis=0) for k in _ARRAYS}
    return BatchResult(perpetrators=perpetrators, victims=victims, rules=rule_set, band_names=ready[0]["band_names"], **stacked)


def run_on_dask(
    perpetrators: PerpetratorTable,
    victims: VictimTable,
    rules: RuleSet | str | None = None,
    *,
    scheduler: str | None = None,
    progress: Callable[[int, int], None] | None = None,
) -> BatchResult:
    """Connect to ``scheduler`` (an address), or start a local cluster on this machine's cores and close it after.

    The local cluster runs one single-threaded worker process per core: the per-victim dose rule loops in Python and
    holds the GIL, so threads would share one core for that part; processes do not.
    """
    distributed = import_distributed()
    if scheduler is not None:
        try:
            client = distributed.Client(scheduler, timeout=CONNECT_TIMEOUT)
        except (OSError, TimeoutError, ValueError) as exc:
            raise InputError(
                "--scheduler",
                scheduler,
                f"could not be reached ({exc.__class__.__name__}); expected a running Dask scheduler address, e.g. tcp://host:8786",
            ) from None
        with client:
            return evaluate_pairs_dask(perpetrators, victims, rules, client=client, progress=progress)
    cores = os.cpu_count() or 1
    with (
        distributed.LocalCluster(n_workers=cores, threads_per_worker=1, processes=True, dashboard_address=":0") as cluster,
        distributed.Client(cluster) as client,
    ):
        return evaluate_pairs_dask(perpetrators, victims, rules, client=client, progress=progress)
