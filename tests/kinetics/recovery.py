"""Mechanism recovery on simulated designs: the rate of a correct verdict and the coverage of the 95 % Ki interval.

Design (issue 14): 6 substrate x 5 inhibitor levels in duplicate (60 rows); each of the four mechanisms; constant
and proportional noise at 5 and 10 % (constant: SD = level x the largest true velocity; proportional: SD = level x
the true velocity); data sets per cell as asked.  The true constants are invented (Vmax 100, Km 10 uM, Ki 5 uM,
Kiu 20 uM for mixed); they are inputs of the simulation, not check values.  The check values are statistical: a
95 % interval should cover the true Ki in about 95 % of data sets (the definition of a confidence interval).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from interact.kinetics import fit_inhibition, incubation_data
from interact.kinetics.ratelaws import competitive, mixed, noncompetitive, uncompetitive

S_LEVELS = np.array([2.5, 5.0, 10.0, 20.0, 40.0, 80.0])
I_LEVELS = np.array([0.0, 2.5, 5.0, 10.0, 20.0])
KI = 5.0
MECHANISMS = ("competitive", "noncompetitive", "uncompetitive", "mixed")
NOISE = (("constant", 0.05), ("constant", 0.10), ("proportional", 0.05), ("proportional", 0.10))


@dataclass(frozen=True)
class Cell:
    mechanism: str
    noise: str
    level: float
    n: int
    correct: int
    covered: int
    error_model_right: int


def _grid() -> tuple[np.ndarray, np.ndarray]:
    ss, ii = np.meshgrid(S_LEVELS, I_LEVELS)
    return np.repeat(ss.ravel(), 2), np.repeat(ii.ravel(), 2)


def _truth(mechanism: str, s: np.ndarray, i: np.ndarray) -> np.ndarray:
    if mechanism == "competitive":
        return competitive(s, i, 100.0, 10.0, KI)
    if mechanism == "noncompetitive":
        return noncompetitive(s, i, 100.0, 10.0, KI)
    if mechanism == "uncompetitive":
        return uncompetitive(s, i, 100.0, 10.0, KI)
    return mixed(s, i, 100.0, 10.0, KI, 4 * KI)


def simulate(n: int, seed: int = 20261202, weights: str = "auto") -> list[Cell]:
    s, i = _grid()
    cells = []
    for m_index, mechanism in enumerate(MECHANISMS):
        mu = _truth(mechanism, s, i)
        for n_index, (noise, level) in enumerate(NOISE):
            rng = np.random.default_rng([seed, m_index, n_index])
            sd = level * (mu if noise == "proportional" else np.full_like(mu, mu.max()))
            correct = covered = right = 0
            for _ in range(n):
                v = mu + rng.normal(0.0, 1.0, mu.size) * sd
                comp = fit_inhibition(incubation_data(s, i, v), weights=weights)
                correct += comp.verdict.model == mechanism
                ki = comp.fit(mechanism).estimate("Kic" if mechanism == "mixed" else "Ki")
                lo = ki.profile_low if ki.profile_low is not None else 0.0
                hi = ki.profile_high if ki.profile_high is not None else 0.0
                covered += lo <= KI <= hi
                e = comp.error_model
                theta = None if e is None else e.exponent
                right += theta is not None and (theta < 0.5 if noise == "constant" else 0.5 <= theta <= 1.5)
            cells.append(Cell(mechanism, noise, level, n, correct, covered, right))
    return cells


def table(cells: list[Cell]) -> str:
    lines = ["mechanism       noise         level  n   correct verdict  95% Ki interval covers  error model matches (theta <0.5 / 0.5-1.5)"]
    for c in cells:
        lines.append(
            f"{c.mechanism:15s} {c.noise:13s} {c.level:4.0%}  {c.n:3d} {c.correct / c.n:8.0%}  {c.covered / c.n:14.0%}"
            f"  {c.error_model_right / c.n:12.0%}"
        )
    n = sum(c.n for c in cells)
    lines.append(
        f"pooled: correct verdict {sum(c.correct for c in cells) / n:.1%}, coverage {sum(c.covered for c in cells) / n:.1%} "
        f"over {n} data sets"
    )
    return "\n".join(lines)


if __name__ == "__main__":
    import sys
    import time

    t0 = time.perf_counter()
    result = simulate(int(sys.argv[1]) if len(sys.argv) > 1 else 50, weights=sys.argv[2] if len(sys.argv) > 2 else "auto")
    print(table(result))
    print(f"{time.perf_counter() - t0:.1f} s")
