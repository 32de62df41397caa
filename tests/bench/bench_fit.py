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


def _best_of(fn, repeat: int) -> float:
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


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
    ours()  # warm up imports
    t_plain = _best_of(plain, 200)
    t_ours = _best_of(ours, 30)
    print(f"curve_fit competitive (finite-difference Jacobian, p0 = 20, 20, 20): {t_plain * 1e3:.3f} ms")
    print(f"fit_inhibition, 5 models + profile intervals:                       {t_ours * 1e3:.2f} ms")
    print(f"ratio: {t_ours / t_plain:.1f}x  (goal < 20x; best of repeated runs, same process)")


if __name__ == "__main__":
    main()
