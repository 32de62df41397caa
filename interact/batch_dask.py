"""The batch screen on Dask: chunks of perpetrators evaluated by :func:`interact.batch.evaluate_pairs` on a cluster.

Nothing of the model is written here: each chunk (a slice of the perpetrator table against every victim) runs the
in-process :func:`~interact.batch.evaluate_pairs` (which calls :func:`~interact.batch.pair_ratios` and
:func:`interact.dosing.choose_regimens`), and the chunks' arrays are stacked back into one
:class:`~interact.batch.BatchResult`.  Every number of a pair depends only on its perpetrator row and its victim, so the
result equals the in-process run bit for bit (tests/batch/test_batch_dask.py checks it).  A probabilistic screen
(:func:`probabilities_dask`) is cut the same way; each chunk draws its own rows' random numbers
(:mod:`interact.batch_probability`), so it too equals the in-process run for the same seed.

Dask is an optional extra (``pip install "interact[dask]"``); it is imported only when asked for.
"""

from __future__ import annotations

import contextlib
import math
import os
from collections.abc import Callable, Iterator
from typing import Any

import numpy as np
from numpy.typing import NDArray

from .batch import (
    _PAIRS_PER_CHUNK,
    BatchResult,
    PerpetratorTable,
    VictimTable,
    check_pair_budget,
    evaluate_pairs,
    perpetrator_subset,
)
from .batch_probability import SEED_BLOCK, ProbabilityResult, Variation, screen_probabilities
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


_ARRAYS = ("gut", "liver", "kidney", "total", "exposure", "band", "action", "study", "flags")


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
    parts = _gather(distributed, futures, bounds, n_v, progress)
    ready = [p for p in parts if p is not None]
    for part in ready:  # the first bad pair in table order, as the in-process run names it
        if "error" in part:
            raise InputError(*part["error"])
    stacked: dict[str, Any] = {k: np.concatenate([p[k] for p in ready], axis=0) for k in _ARRAYS}
    return BatchResult(perpetrators=perpetrators, victims=victims, rules=rule_set, band_names=ready[0]["band_names"], **stacked)


@contextlib.contextmanager
def dask_client(scheduler: str | None = None) -> Iterator[Any]:
    """A client of ``scheduler`` (an address), or of a local cluster on this machine's cores, closed after.

    The local cluster runs one single-threaded worker process per core: parts of a chunk's work (the dose rule of
    rows near a change point, building tables) hold the GIL, so threads would share one core for them; processes do not.
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
            yield client
        return
    cores = os.cpu_count() or 1
    with (
        distributed.LocalCluster(n_workers=cores, threads_per_worker=1, processes=True, dashboard_address=":0") as cluster,
        distributed.Client(cluster) as client,
    ):
        yield client


def _gather(
    distributed: Any, futures: list[Any], bounds: list[tuple[int, int]], n_v: int, progress: Callable[[int, int], None] | None
) -> list[Any]:
    """The chunks' results in chunk order, reporting ``progress(done_pairs, all_pairs)`` as each arrives."""
    index = {f.key: k for k, f in enumerate(futures)}
    parts: list[Any] = [None] * len(bounds)
    total = (bounds[-1][1] if bounds else 0) * n_v
    done = 0
    for fut in distributed.as_completed(futures):
        k = index[fut.key]
        parts[k] = fut.result()
        done += (bounds[k][1] - bounds[k][0]) * n_v
        if progress is not None:
            progress(done, total)
    return parts


def run_on_dask(
    perpetrators: PerpetratorTable,
    victims: VictimTable,
    rules: RuleSet | str | None = None,
    *,
    scheduler: str | None = None,
    progress: Callable[[int, int], None] | None = None,
) -> BatchResult:
    """:func:`evaluate_pairs_dask` on ``scheduler``, or on a local cluster started for the run (:func:`dask_client`)."""
    with dask_client(scheduler) as client:
        return evaluate_pairs_dask(perpetrators, victims, rules, client=client, progress=progress)


def _probabilities_chunk(
    chunk: PerpetratorTable, victims: VictimTable, variation: Variation, rules: RuleSet, samples: int, seed: int, first_row: int
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    r = screen_probabilities(chunk, victims, variation, rules, samples=samples, seed=seed, first_row=first_row)
    return r.class_probability, r.change_probability


def probabilities_dask(
    perpetrators: PerpetratorTable,
    victims: VictimTable,
    variation: Variation,
    rules: RuleSet | str | None = None,
    *,
    samples: int,
    seed: int,
    client: Any,
    rows_per_chunk: int | None = None,
    progress: Callable[[int, int], None] | None = None,
) -> ProbabilityResult:
    """:func:`interact.batch_probability.screen_probabilities` on a ``dask.distributed.Client``, chunked over perpetrators.

    Chunks are whole blocks of :data:`~interact.batch_probability.SEED_BLOCK` rows and each draws its rows' own random
    numbers, so the probabilities equal the in-process run's for the same seed, number for number.
    """
    distributed = import_distributed()
    rule_set = rules if isinstance(rules, RuleSet) else load_rules(rules)
    n_p, n_v = len(perpetrators.rows), len(victims.rows)
    point = evaluate_pairs(perpetrators, victims, rule_set)
    threads = sum(client.nthreads().values()) or 1
    step = rows_per_chunk or math.ceil(n_p / max(1, 2 * threads))
    step = max(SEED_BLOCK, -(-step // SEED_BLOCK) * SEED_BLOCK)
    bounds = [(a, min(n_p, a + step)) for a in range(0, n_p, step)]
    victims_f, rules_f = client.scatter([victims, rule_set], broadcast=True, hash=False)
    futures = [
        client.submit(
            _probabilities_chunk, perpetrator_subset(perpetrators, slice(a, b)), victims_f, variation, rules_f, samples, seed, a, pure=False
        )
        for a, b in bounds
    ]
    parts = _gather(distributed, futures, bounds, n_v, progress)
    n_c = len(point.band_names)
    return ProbabilityResult(
        point=point,
        variation=variation,
        samples=samples,
        seed=seed,
        class_probability=np.concatenate([p[0] for p in parts], axis=0) if parts else np.zeros((0, n_v, n_c)),
        change_probability=np.concatenate([p[1] for p in parts], axis=0) if parts else np.zeros((0, n_v)),
    )
