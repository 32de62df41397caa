"""Benchmark (not a test): all five inhibition models with profile intervals on nlstools vmkmki.

Reports the time of ``fit_inhibition`` (five models, profile-likelihood
intervals for every inhibition constant, F tests, design checks) as a ratio
to one plain ``scipy.optimize.curve_fit`` of the competitive model on the
same 72 rows, measured in the same run.  Goal (issue 4): under 20x.

Run:  python tests/bench/bench_fit.py
"""

from __future__ import annotations

import time
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
    for _ in range(40):
        for _ in range(10):
            wall_plain.append(_clock(plain, time.perf_counter))
            cpu_plain.append(_clock(plain, time.process_time))
        wall_ours.append(_clock(ours, time.perf_counter))
        cpu_ours.append(_clock(ours, time.process_time))
    tp, to = min(wall_plain), min(wall_ours)
    cp, co = min(cpu_plain), min(cpu_ours)
    print(f"curve_fit competitive (finite-difference Jacobian, p0 = 20, 20, 20): wall {tp * 1e3:.3f} ms, cpu {cp * 1e3:.3f} ms")
    print(f"fit_inhibition, 5 models + profile intervals + checks:            wall {to * 1e3:.2f} ms, cpu {co * 1e3:.2f} ms")
    print(f"ratio: wall {to / tp:.1f}x, cpu {co / cp:.1f}x  (goal < 20x; minimum of 400 / 40 interleaved runs)")


if __name__ == "__main__":
    main()
