"""Evaluations per second per core of the batch model, and the Dask engine against the in-process run.

    python tests/bench/bench_dask.py [--perpetrators 1000] [--victims 1000] [--runs 5]

Measured in the same run, alternated, medians reported:

- in process: ``interact.batch.evaluate_pairs`` on invented tables (tests/bench/bench_batch.py ``tables``) in this
  process, with BLAS held to one thread: pairs per second on one core (ratios, class, study verdict, dose rule, flags);
- dask: ``interact.batch_dask.evaluate_pairs_dask`` on a ``LocalCluster`` of one single-threaded worker process per
  core (what ``screen-batch --engine dask`` starts), the cluster started once outside the timing; its ratio to the
  in-process run (the floor: the same work in one process, no scheduling or transfer).

Not a test: run by hand. The machine may be shared with other work; say so with the figures.
"""

from __future__ import annotations

import os

os.environ.setdefault("OMP_NUM_THREADS", "1")
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

import argparse
import statistics
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).parent))
from bench_batch import tables

from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims
from interact.batch_dask import evaluate_pairs_dask


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--perpetrators", type=int, default=1000)
    ap.add_argument("--victims", type=int, default=1000)
    ap.add_argument("--runs", type=int, default=5)
    args = ap.parse_args()
    import dask.distributed as distributed

    ptext, vtext = tables(args.perpetrators, args.victims)
    perps, victims = loads_perpetrators(ptext), loads_victims(vtext)
    n = len(perps.rows) * len(victims.rows)
    cores = os.cpu_count() or 1
    local_t: list[float] = []
    dask_t: list[float] = []
    with (
        distributed.LocalCluster(n_workers=cores, threads_per_worker=1, processes=True, dashboard_address=":0") as cluster,
        distributed.Client(cluster) as client,
    ):
        evaluate_pairs_dask(perps, victims, client=client)  # warm the workers (imports, rule tables)
        for _ in range(args.runs):
            t = time.perf_counter()
            local = evaluate_pairs(perps, victims)
            local_t.append(time.perf_counter() - t)
            t = time.perf_counter()
            remote = evaluate_pairs_dask(perps, victims, client=client)
            dask_t.append(time.perf_counter() - t)
        assert local.total.tobytes() == remote.total.tobytes() and np.array_equal(local.action, remote.action)
    lo, da = statistics.median(local_t), statistics.median(dask_t)
    print(f"{n:,} pairs ({args.perpetrators} x {args.victims}), {args.runs} runs alternated, medians; {cores} cores (shared)")
    print(f"in process (one core): {lo * 1e3:.0f} ms = {n / lo:,.0f} pairs/s per core")
    print(f"dask LocalCluster ({cores} worker processes): {da * 1e3:.0f} ms = {n / da:,.0f} pairs/s; {da / lo:.2f}x the in-process run")


if __name__ == "__main__":
    main()
