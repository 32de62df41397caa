"""Benchmark (not a test): all five inhibition models with profile intervals on nlstools vmkmki.

Reports the time of ``fit_inhibition`` (five models, profile-likelihood
intervals for every inhibition constant, F tests, design checks) as a ratio
to one plain ``scipy.optimize.curve_fit`` of the competitive model on the
same 72 rows, measured in the same run, alternated (ten curve_fit calls, then one
fit_inhibition, forty rounds).  The floor, curve_fit, does one least-squares fit of one
model with a finite-difference Jacobian and no statistics; fit_inhibition does the whole
command's work (error model, five models, profile intervals, F tests, checks).  Medians
are the figure reported; minima are printed beside them.  Goal (issues 4 and 16): under 20x.

Run:  python tests/bench/bench_fit.py [--rounds N]
"""

from __future__ import annotations

import argparse
import statistics
import time
import warnings
from pathlib import Path

import numpy as np
from scipy.optimize import curve_fit

from interact.kinetics import fit_inhibition, read_incubation_csv

DATA = Path(__file__).resolve().parents[1] / "data" / "nlstools_vmkmki.csv"


def _clock(fn, clock) -> float:
    t0 = clock()
    fn()
    return clock() - t0


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=40)
    rounds = parser.parse_args().rounds
    warnings.simplefilter("ignore")  # the data's design warnings are part of the work, not of the output here
    data = read_incubation_csv(DATA, substrate_unit="uM", inhibitor_unit="uM")
    s, i, v = data.arrays()

    def competitive(x: np.ndarray, vmax: float, km: float, ki: float) -> np.ndarray:
        return vmax * x[0] / (km * (1.0 + x[1] / ki) + x[0])

    def plain() -> None:
        curve_fit(competitive, np.vstack((s, i)), v, p0=(20.0, 20.0, 20.0))

    def ours() -> None:
        fit_inhibition(data)

    plain()
    ours()  # warm up imports and caches
    # interleaved, so both see the same machine load; the minimum of each is the least disturbed run
    wall_plain, wall_ours, cpu_plain, cpu_ours = [], [], [], []
    for _ in range(rounds):
        for _ in range(10):
            wall_plain.append(_clock(plain, time.perf_counter))
            cpu_plain.append(_clock(plain, time.process_time))
        wall_ours.append(_clock(ours, time.perf_counter))
        cpu_ours.append(_clock(ours, time.process_time))
    med = statistics.median
    tp, to = med(wall_plain), med(wall_ours)
    cp, co = med(cpu_plain), med(cpu_ours)
    print(f"curve_fit competitive (finite-difference Jacobian, p0 = 20, 20, 20): median wall {tp * 1e3:.3f} ms, cpu {cp * 1e3:.3f} ms")
    print(f"fit_inhibition, 5 models + profile intervals + checks:            median wall {to * 1e3:.2f} ms, cpu {co * 1e3:.2f} ms")
    print(f"ratio of medians: wall {to / tp:.1f}x, cpu {co / cp:.1f}x  (goal < 20x; {10 * rounds} / {rounds} interleaved runs)")
    print(f"ratio of minima:  wall {min(wall_ours) / min(wall_plain):.1f}x, cpu {min(cpu_ours) / min(cpu_plain):.1f}x")


if __name__ == "__main__":
    main()
