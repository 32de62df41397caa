"""Benchmark (run by hand, not a test): batch screening of 1,000,000 perpetrator-victim pairs.

    python tests/bench/bench_batch.py [--perpetrators 1000 --victims 1000]

Reports, measured in the same run:

- reading and validating the two tables (per row, not per pair);
- ``evaluate_pairs`` (mechanistic model for every pair, class band, dose action,
  flags, ranking) as a ratio to the raw numpy floor: the same formula on
  prepared float arrays (no validation, no class, no action) - goal at most 2x;
- the same pairs through ``assess()`` one at a time (a sample of pairs timed,
  then extrapolated) as a speed-up factor - goal at least 100x;
- peak memory of reading plus evaluating (tracemalloc, which numpy reports
  its arrays to) and the process's maximum resident size - goal under 1 GB;
- writing the ranked CSV (for information).

The tables are generated with a seeded random generator: invented compounds
with plausible values, not data about any drug.
"""

from __future__ import annotations

import argparse
import io
import os
import resource
import sys
import time
import tracemalloc

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", ".."))

from interact import assess
from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims, pair_ratios, pair_scenario, ranking
from interact.report.batch import write_results
from interact.tables import load_rules

ENZYMES = ("CYP3A", "CYP2C9", "CYP2D6")


def tables(n_p: int, n_v: int, seed: int = 1) -> tuple[str, str]:
    rng = np.random.default_rng(seed)
    head = [
        "name",
        "dose (mg)",
        "molar mass (g/mol)",
        "cmax (ng/mL)",
        "fu_p",
        "ka (1/min)",
        *(f"ki {e} (uM)" for e in ENZYMES),
        *(f"fu_inc {e}" for e in ENZYMES),
    ]
    lines = [",".join(head)]
    for i in range(n_p):
        ki = [f"{x:.4g}" if rng.random() < 0.7 else "" for x in 10 ** rng.uniform(-1.5, 2, len(ENZYMES))]
        if not any(ki):
            ki[0] = "1"
        fu = [f"{rng.uniform(0.2, 1):.3g}" if k else "" for k in ki]
        lines.append(
            ",".join(
                [
                    f"Invented-P{i}",
                    f"{rng.choice([25, 50, 100, 200, 400])}",
                    f"{rng.uniform(250, 700):.1f}",
                    f"{10 ** rng.uniform(1, 3.5):.4g}",
                    f"{10 ** rng.uniform(-2.5, -0.1):.3g}",
                    "0.1",
                    *ki,
                    *fu,
                ]
            )
        )
    ptext = "\n".join(lines) + "\n"
    vhead = ["name", "dose (mg)", "interval (h)", "fg", "strengths (mg)", *(f"fm {e}" for e in ENZYMES)]
    vlines = [",".join(vhead)]
    for j in range(n_v):
        fm = rng.dirichlet(np.ones(len(ENZYMES) + 1))[: len(ENZYMES)]
        vlines.append(",".join([f"Invented-V{j}", "10", "24", f"{rng.uniform(0.2, 1):.3g}", "2.5;5;10", *(f"{x:.3f}" for x in fm)]))
    return ptext, "\n".join(vlines) + "\n"


def floor(inlet: np.ndarray, ent: np.ndarray, ki_u: np.ndarray, fm: np.ndarray, fg: np.ndarray) -> np.ndarray:
    """The same formula on prepared float arrays (missing Ki as +inf), written the plain numpy way:
    reversible terms per perpetrator, then liver (a sum over the enzyme axis), gut and total for every pair."""
    act = 1.0 / (1.0 + inlet[:, None] / ki_u)  # (n_p, E)
    act_g = 1.0 / (1.0 + ent / ki_u[:, 0])  # CYP3A is column 0
    liver = 1.0 / ((fm[None, :, :] * act[:, None, :]).sum(-1) + 1.0 - fm.sum(-1)[None, :])
    gut = 1.0 / (act_g[:, None] * (1.0 - fg[None, :]) + fg[None, :])
    return gut * liver


def floor_blas(inlet: np.ndarray, ent: np.ndarray, ki_u: np.ndarray, fm: np.ndarray, fg: np.ndarray) -> np.ndarray:
    """The fastest form found: the enzyme sum as a matrix product (BLAS; not bit-identical to assess())."""
    act = 1.0 / (1.0 + inlet[:, None] / ki_u)
    act_g = 1.0 / (1.0 + ent / ki_u[:, 0])
    liver = 1.0 / (act @ fm.T + (1.0 - fm.sum(-1))[None, :])
    gut = 1.0 / (act_g[:, None] * (1.0 - fg[None, :]) + fg[None, :])
    return gut * liver


def best(fn, runs: int) -> float:  # type: ignore[no-untyped-def]
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--perpetrators", type=int, default=1000)
    ap.add_argument("--victims", type=int, default=1000)
    ap.add_argument("--runs", type=int, default=5)
    ap.add_argument("--assess-sample", type=int, default=300)
    args = ap.parse_args()
    n_p, n_v = args.perpetrators, args.victims
    pairs = n_p * n_v
    ptext, vtext = tables(n_p, n_v)
    rules = load_rules(None)

    tracemalloc.start()
    t0 = time.perf_counter()
    perps = loads_perpetrators(ptext, rules)
    victims = loads_victims(vtext)
    t_read = time.perf_counter() - t0
    t0 = time.perf_counter()
    result = evaluate_pairs(perps, victims, rules)
    t_first = time.perf_counter() - t0
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()

    ki = np.where(np.isnan(perps.ki_u_um), np.inf, perps.ki_u_um)
    cols = [perps.targets.index(e) for e in ENZYMES]
    ki = ki[:, cols]
    fm = victims.fm[:, [victims.enzymes.index(e) for e in ENZYMES]]
    # alternate the measurements so that a change in machine load affects all alike; keep the best of each
    t_eval = t_model = t_floor = t_blas = float("inf")
    for _ in range(args.runs):
        t_floor = min(t_floor, best(lambda: floor(perps.inlet_um, perps.enterocyte_um, ki, fm, victims.fg), 1))
        t_model = min(t_model, best(lambda: pair_ratios(perps, victims), 1))
        t_blas = min(t_blas, best(lambda: floor_blas(perps.inlet_um, perps.enterocyte_um, ki, fm, victims.fg), 1))
        t_eval = min(t_eval, best(lambda: evaluate_pairs(perps, victims, rules), 1))
    t_rank = best(lambda: ranking(result), args.runs)
    t0 = time.perf_counter()
    loads_perpetrators(ptext, rules)
    loads_victims(vtext)
    t_read_plain = time.perf_counter() - t0
    check = floor(perps.inlet_um, perps.enterocyte_um, ki, fm, victims.fg)
    max_diff = float(np.max(np.abs(check - result.total) / result.total))

    rng = np.random.default_rng(7)
    sample = [(int(rng.integers(n_p)), int(rng.integers(n_v))) for _ in range(args.assess_sample)]
    scenarios = [pair_scenario(perps, victims, i, j) for i, j in sample]
    t0 = time.perf_counter()
    for s in scenarios:
        assess(s, rules=rules)
    per_pair = (time.perf_counter() - t0) / len(scenarios)
    t_assess = per_pair * pairs

    sink = io.StringIO()
    t0 = time.perf_counter()
    rows = write_results(result, sink, "csv")
    t_write = time.perf_counter() - t0
    rss_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024

    print(f"pairs: {pairs:,} ({n_p} perpetrators x {n_v} victims); best of {args.runs} runs; {os.cpu_count()} cores")
    print(
        f"read + validate tables: {t_read_plain:.3f} s ({(t_read_plain / (n_p + n_v)) * 1e6:.0f} us per row; "
        f"{t_read:.3f} s under tracemalloc)"
    )
    print(
        f"numpy floor (same formula on prepared arrays, plain numpy): {t_floor * 1e3:.1f} ms; "
        f"with the enzyme sum as a BLAS matrix product: {t_blas * 1e3:.1f} ms"
    )
    print(
        f"pair_ratios (mechanistic model, gut/liver/total for every pair): {t_model * 1e3:.1f} ms; "
        f"ratio {t_model / t_floor:.2f}x the plain floor (goal <= 2x), {t_model / t_blas:.2f}x the BLAS floor"
    )
    print(
        f"evaluate_pairs (model + class band, study verdict, dose action, flags): {t_eval * 1e3:.1f} ms "
        f"(first run {t_first * 1e3:.1f} ms); ratio {t_eval / t_floor:.2f}x the floor"
    )
    print(f"ranking all pairs worst first: {t_rank * 1e3:.1f} ms")
    print(f"  floor vs evaluate_pairs: largest relative difference {max_diff:.1e}")
    print(
        f"assess() per pair: {per_pair * 1e6:.0f} us (mean of {len(sample)} pairs) -> {t_assess:.0f} s for all pairs; "
        f"batch is {t_assess / t_eval:.0f}x faster (goal >= 100x)"
    )
    print(f"peak traced memory (read + evaluate): {peak / 2**20:.0f} MiB; max resident size {rss_mb:.0f} MiB (goal < 1024 MiB)")
    print(f"write ranked CSV ({rows:,} rows, in memory): {t_write:.2f} s")


if __name__ == "__main__":
    main()
