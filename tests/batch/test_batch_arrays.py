"""A partial ranking equals the start of the full one."""

from __future__ import annotations

import numpy as np

from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims, ranking


def test_partial_ranking_is_prefix_of_full() -> None:
    rng = np.random.default_rng(3)
    lines = ["name,dose (mg),molar mass (g/mol),cmax (uM),fu_p,ki CYP3A (uM)"]
    lines += [f"P{i},100,400,{rng.uniform(0.1, 5):.3f},0.1,{rng.uniform(0.05, 5):.3f}" for i in range(30)]
    vlines = ["name,dose (mg),interval (h),fg,fm CYP3A"] + [f"V{j},10,24,0.5,{rng.uniform(0, 1):.2f}" for j in range(20)]
    result = evaluate_pairs(loads_perpetrators("\n".join(lines)), loads_victims("\n".join(vlines)))
    full = ranking(result)
    for top in (1, 7, 100, 599, 600, 1000):
        assert np.array_equal(ranking(result, top), full[:top])
