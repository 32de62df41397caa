"""Benchmark (run by hand, not a test): the time course of one scenario over 30 days of dosing.

    python tests/bench/bench_dynamic.py

Times interact.dynamic.simulate() on the invented example
interact/examples/tdi_inducer.toml (time-dependent inhibition plus induction of
CYP3A, liver and gut wall, victim every 12 h, perpetrator every 24 h; 30 days of
dosing plus the follow-up until the effect fades) and reports the median of
several warm runs, for the default solver (scipy odeint, LSODA) and for
solve_ivp's LSODA and BDF.  Goal (issue 16): under 100 ms for 30 days with the
default solver, and time proportional to the simulated span: the same scenario
over 7, 30, 90 and 180 days (runs alternated), reported as ms per simulated day
(dosing plus follow-up).
"""

from __future__ import annotations

import statistics
import time
from pathlib import Path


def main() -> None:
    from interact import assess, load_scenario
    from interact.dynamic import simulate

    path = Path(__file__).resolve().parents[2] / "interact" / "examples" / "tdi_inducer.toml"
    a = assess(load_scenario(path))
    simulate(a)  # warm: scipy import, caches
    for method, runs in (("odeint", 9), ("LSODA", 5), ("BDF", 3)):
        times = []
        for _ in range(runs):
            t0 = time.perf_counter()
            tc = simulate(a, days=30, method=method)
            times.append(time.perf_counter() - t0)
        med = statistics.median(times)
        print(
            f"simulate 30 days ({method}): median {med * 1e3:.0f} ms over {runs} runs (min {min(times) * 1e3:.0f} ms); "
            f"{len(tc.time_h)} output points, {tc.nfev} right-hand-side calls, follow-up to day {tc.end_h / 24:.0f}; "
            f"goal 100 ms: {'met' if med < 0.1 else 'NOT met'}"
        )
    spans = (7, 30, 90, 180)
    per: dict[int, list[float]] = {d: [] for d in spans}
    ends: dict[int, float] = {}
    for _ in range(5):
        for d in spans:  # alternated, so drift in the shared machine's load falls on every span alike
            t0 = time.perf_counter()
            tc = simulate(a, days=d)
            per[d].append(time.perf_counter() - t0)
            ends[d] = tc.end_h / 24 + tc.window_h / 24
    for d in spans:
        med = statistics.median(per[d])
        per_day = med * 1e3 / ends[d]
        print(f"  {d:>3} days of dosing ({ends[d]:.0f} days simulated): median {med * 1e3:.0f} ms, {per_day:.2f} ms per simulated day")
    t0 = time.perf_counter()
    assess(a.scenario)
    print(f"static assess() for comparison: {(time.perf_counter() - t0) * 1e3:.2f} ms")


if __name__ == "__main__":
    main()
