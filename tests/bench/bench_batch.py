"""Benchmark (run by hand, not a test): batch screening, end to end and model alone.

    python tests/bench/bench_batch.py [--pairs 1e4,1e6,1e7] [--runs 5] [--format csv|parquet]
    python tests/bench/bench_batch.py --model [--perpetrators 1000 --victims 1000]
    python tests/bench/bench_batch.py --probability [--perpetrators 100 --victims 100 --samples 1000]

End to end (the default): the whole command a user runs, ``interact screen-batch P.csv V.csv -o OUT -q`` in a
fresh process, against the floor ``tests/bench/batch_floor.py`` in a fresh process: a plain numpy script that
reads the same CSVs with numpy, evaluates the same equations, ranks, and writes the same columns with the same
writer (pyarrow's CSV writer) to a plain file (see its docstring for what it leaves out).  The two alternate,
``--runs`` times each; medians and their ratio are printed per size (goal at most 2x), with each side's peak
resident memory and the largest relative difference between the two AUCR columns read back.

With ``--model``, measured in the same run:

- reading and validating the two tables (per row, not per pair);
- ``evaluate_pairs`` (mechanistic model for every pair, class band, dose action,
  flags, ranking) as a ratio to the raw numpy floor: the same formula on
  prepared float arrays (no validation, no class, no action) - goal at most 2x;
- the same pairs through ``assess()`` one at a time (a sample of pairs timed,
  then extrapolated) as a speed-up factor - goal at least 100x;
- peak memory of reading plus evaluating (tracemalloc, which numpy reports
  its arrays to) and the process's maximum resident size - goal under 1 GB;
- writing the ranked CSV (for information).

With ``--probability``: the probabilistic screen (:func:`interact.batch_probability.screen_probabilities`, every
pair x every sample through evaluate_pairs, ki, conc, fm and fg varied) against a plain numpy floor of the same
arithmetic in the same run, alternated, medians: the same lognormal draws, the mechanistic static model on
(perpetrators, victims, samples) arrays, the class band by comparisons with the bounds, a dose change as the AUC
ratio outside the no-effect boundary, and the fractions per pair (goal at most 3x).

The tables are generated with a seeded random generator: invented compounds
with plausible values, not data about any drug.
"""

from __future__ import annotations

import argparse
import io
import os
import resource
import subprocess
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
        fm = np.floor(rng.dirichlet(np.ones(len(ENZYMES) + 1))[: len(ENZYMES)] * 1000) / 1000  # 3 decimals, sum at most 1
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


def floor_constants(rules_name: str | None = None) -> str:
    """The values the floor script needs, from interact's own tables (so both sides use the same numbers)."""
    import json

    from interact import units
    from interact.arrays import band_labels
    from interact.batch import FLAGS
    from interact.exposure import resolve_settings
    from interact.scenario import Scenario, Victim
    from interact.tables import load_classes

    rules = load_rules(rules_name)
    perps = loads_perpetrators(tables(1, 1)[0], rules)
    victim = Victim(name="-", dose=units.parse("1 mg", "dose", field="-"), interval=units.parse("24 h", "time", field="-"))
    settings = resolve_settings(Scenario(title="row", perpetrator=perps.rows[0], victim=victim), rules)
    classes = load_classes()
    cutoffs = {c.id: float(c.cutoff.value) for c in rules.criteria}
    return json.dumps(
        {
            "qh": settings["hepatic_blood_flow"].value,
            "qent": settings["enterocytic_blood_flow"].value,
            "gut_volume": settings["gut_volume"].value,
            "fu_gut": settings["fu_gut"].value,
            "fa_fg": settings["fa_fg"].value,
            "fa": settings["fraction_absorbed"].value,
            "rb": settings["blood_plasma_ratio"].value,
            "fu_floor": float(rules.fu_plasma_floor.value),
            "r1_cutoff": cutoffs["reversible-liver"],
            "r1_gut_cutoff": cutoffs["reversible-gut"],
            "aucr_inhibition": float(rules.aucr_inhibition_cutoff.value),
            "aucr_induction": float(rules.aucr_induction_cutoff.value),
            "no_effect_lower": classes.no_effect_lower,
            "no_effect_upper": classes.no_effect_upper,
            # class bands as interact.arrays.band_codes tests them: inhibition from the strongest down, then induction
            "inhibition": sorted((b.bound for b in classes.inhibition), reverse=True),
            "induction": sorted(b.bound for b in classes.induction),
            "band_names": list(band_labels(classes)),
            "flag_texts": ["; ".join(FLAGS[k] for k in range(len(FLAGS)) if bits >> k & 1) for bits in range(32)],
        }
    )


def _run(cmd: list[str]) -> tuple[float, float]:
    """Wall time (s) and peak resident memory (MiB) of one child process."""
    t0 = time.perf_counter()
    proc = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(proc.pid, 0)
    elapsed = time.perf_counter() - t0
    proc.returncode = os.waitstatus_to_exitcode(status)
    err = proc.stderr.read().decode() if proc.stderr else ""
    if proc.returncode != 0:
        raise SystemExit(f"{' '.join(cmd)} failed ({proc.returncode}): {err}")
    return elapsed, usage.ru_maxrss / 1024


def end_to_end(sizes: list[int], runs: int, fmt: str) -> None:
    import statistics
    import tempfile

    import pyarrow.csv as pa_csv
    import pyarrow.parquet as pq

    interact_cmd = [sys.executable, "-m", "interact"]
    floor_script = os.path.join(os.path.dirname(os.path.abspath(__file__)), "batch_floor.py")
    constants = floor_constants()
    print(f"end to end, {os.cpu_count()} cores (shared with other work: figures vary with the load); median of {runs} alternated runs")
    print("  command: python -m interact screen-batch P.csv V.csv -o OUT -q   floor: python tests/bench/batch_floor.py (numpy + pyarrow)")
    with tempfile.TemporaryDirectory() as folder:
        for pairs in sizes:
            n_v = min(1000, round(pairs**0.5))
            n_p = pairs // n_v
            ptext, vtext = tables(n_p, n_v)
            pf, vf = os.path.join(folder, "p.csv"), os.path.join(folder, "v.csv")
            with open(pf, "w", encoding="utf-8") as f:
                f.write(ptext)
            with open(vf, "w", encoding="utf-8") as f:
                f.write(vtext)
            out_cmd = os.path.join(folder, f"out.{fmt}")
            out_floor = os.path.join(folder, "floor.parquet" if fmt == "parquet" else "floor.csv")
            cmd = [*interact_cmd, "screen-batch", pf, vf, "-o", out_cmd, "-q"]
            floor_cmd = [sys.executable, floor_script, pf, vf, out_floor, constants]
            t_cmd, t_floor, m_cmd, m_floor = [], [], 0.0, 0.0
            for _ in range(runs):
                t, m = _run(cmd)
                t_cmd.append(t)
                m_cmd = max(m_cmd, m)
                t, m = _run(floor_cmd)
                t_floor.append(t)
                m_floor = max(m_floor, m)
            if fmt == "parquet":
                a_floor = pq.read_table(out_floor, columns=["AUCR"]).column("AUCR").to_numpy()
                a_cmd = pq.read_table(out_cmd, columns=["AUCR"]).column("AUCR").to_numpy()
            else:
                a_floor = pa_csv.read_csv(out_floor).column("AUCR").to_numpy()
                a_cmd = pa_csv.read_csv(out_cmd).column("AUCR").to_numpy() if fmt == "csv" else a_floor
            diff = float(np.max(np.abs(a_cmd - a_floor) / a_floor))
            mc, mf = statistics.median(t_cmd), statistics.median(t_floor)
            print(
                f"{pairs:>12,} pairs ({n_p:,} x {n_v:,}), {fmt}: command {mc:.3f} s, floor {mf:.3f} s, ratio {mc / mf:.2f}x (goal <= 2x); "
                f"peak RSS {m_cmd:.0f} / {m_floor:.0f} MiB; AUCR columns (ranked) differ by at most {diff:.1e} relative"
            )


def probability_floor(
    inlet: np.ndarray,
    ki_u: np.ndarray,
    ent: np.ndarray,
    fm: np.ndarray,
    fg: np.ndarray,
    cv: dict[str, float],
    samples: int,
    inhibition: list[float],
    induction: list[float],
    boundary: tuple[float, float],
    seed: int = 0,
) -> tuple[np.ndarray, np.ndarray]:
    """The floor of the probabilistic screen: the same draws and arithmetic in plain numpy, chunks of 16 perpetrators.

    Missing Ki as +inf; CYP3A (the gut-wall enzyme) is column 0.  Returns (class probabilities, dose-change probability).
    """
    rng = np.random.default_rng(seed)
    sig = {k: np.sqrt(np.log1p(v**2)) for k, v in cv.items()}
    n_p, n_e = ki_u.shape
    n_v = fm.shape[0]
    fmf = np.minimum(fm[:, None, :] * np.exp(sig["fm"] * rng.standard_normal((n_v, samples, n_e))), 1.0)
    tot = fmf.sum(-1, keepdims=True)
    fmf = np.where(tot > 1.0, fmf / tot, fmf)
    fgf = np.minimum(fg[:, None] * np.exp(sig["fg"] * rng.standard_normal((n_v, samples))), 1.0)
    rest = 1.0 - fmf.sum(-1)
    n_c = 1 + len(inhibition) + len(induction)
    probs = np.empty((n_p, n_v, n_c))
    change = np.empty((n_p, n_v))
    for a in range(0, n_p, 16):
        b = min(n_p, a + 16)
        conc = np.exp(sig["conc"] * rng.standard_normal((b - a, samples)))
        kif = np.exp(sig["ki"] * rng.standard_normal((b - a, samples, n_e)))
        act = 1.0 / (1.0 + inlet[a:b, None, None] * conc[:, :, None] / (ki_u[a:b, None, :] * kif))
        act_g = 1.0 / (1.0 + ent[a:b, None] * conc / (ki_u[a:b, None, 0] * kif[:, :, 0]))
        liver = 1.0 / (np.einsum("pse,vse->pvs", act, fmf) + rest[None])
        gut = 1.0 / (act_g[:, None, :] * (1.0 - fgf[None]) + fgf[None])
        total = gut * liver
        tests = [total >= x for x in inhibition] + [total <= x for x in induction]
        band = np.select(tests, list(range(1, len(tests) + 1)), default=0)
        for k in range(n_c):
            probs[a:b, :, k] = (band == k).mean(-1)
        change[a:b] = ((total < boundary[0]) | (total > boundary[1])).mean(-1)
    return probs, change


def probability(n_p: int, n_v: int, samples: int, runs: int) -> None:
    import statistics

    from interact.batch_probability import Variation, screen_probabilities
    from interact.tables import load_classes

    ptext, vtext = tables(n_p, n_v)
    rules = load_rules(None)
    perps, victims = loads_perpetrators(ptext, rules), loads_victims(vtext)
    cv = {"ki": 0.3, "conc": 0.2, "fm": 0.1, "fg": 0.1}
    variation = Variation(**cv)
    ki = np.where(np.isnan(perps.ki_u_um), np.inf, perps.ki_u_um)[:, [perps.targets.index(e) for e in ENZYMES]]
    fm = victims.fm[:, [victims.enzymes.index(e) for e in ENZYMES]]
    classes = load_classes()
    inh = sorted((b.bound for b in classes.inhibition), reverse=True)
    ind = sorted(b.bound for b in classes.induction)
    t_cmd, t_floor = [], []
    for _ in range(runs):
        t0 = time.perf_counter()
        result = screen_probabilities(perps, victims, variation, rules, samples=samples, seed=1)
        t_cmd.append(time.perf_counter() - t0)
        t0 = time.perf_counter()
        _, change = probability_floor(
            perps.inlet_um,
            ki,
            perps.enterocyte_um,
            fm,
            victims.fg,
            cv,
            samples,
            inh,
            ind,
            (classes.no_effect_lower, classes.no_effect_upper),
        )
        t_floor.append(time.perf_counter() - t0)
    mc, mf = statistics.median(t_cmd), statistics.median(t_floor)
    print(
        f"probabilistic screen: {n_p * n_v:,} pairs x {samples:,} samples; median of {runs} alternated runs; "
        f"{os.cpu_count()} cores (shared)"
    )
    print(
        f"screen_probabilities {mc:.3f} s, numpy floor of the same arithmetic {mf:.3f} s: ratio {mc / mf:.2f}x (goal <= 3x); "
        f"{n_p * n_v * samples / mc / 1e6:.1f} million pair-samples per second"
    )
    print(
        f"  mean dose-change probability: screen {result.change_probability.mean():.3f}, floor {change.mean():.3f} "
        f"(independent draws: they agree in distribution, not number for number)"
    )


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--model", action="store_true", help="the model-level figures instead of end to end")
    ap.add_argument("--probability", action="store_true", help="the probabilistic screen against its numpy floor")
    ap.add_argument("--samples", type=int, default=1000)
    ap.add_argument("--pairs", default="1e4,1e6", help="end to end: comma-separated pair counts")
    ap.add_argument("--format", default="csv", choices=("csv", "parquet"), help="end to end: output format of the command")
    ap.add_argument("--perpetrators", type=int, default=1000)
    ap.add_argument("--victims", type=int, default=1000)
    ap.add_argument("--runs", type=int, default=5)
    ap.add_argument("--assess-sample", type=int, default=300)
    args = ap.parse_args()
    if args.probability:
        probability(
            args.perpetrators if args.perpetrators != 1000 else 100, args.victims if args.victims != 1000 else 100, args.samples, args.runs
        )
        return
    if not args.model:
        end_to_end([int(float(x)) for x in args.pairs.split(",")], args.runs, args.format)
        return
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
