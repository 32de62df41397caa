"""The per-victim step-function form of the dose action equals the direct rule, also right at its breakpoints;
a partial ranking equals the start of the full one."""

from __future__ import annotations

import itertools

import numpy as np

from interact.arrays import dose_action_breakpoints, dose_action_codes, dose_action_codes_by_victim, dose_candidates
from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims, ranking


def test_step_lookup_equals_direct_rule_at_and_near_breakpoints() -> None:
    checked = 0
    for usual, interval, strengths, b, nti in itertools.product(
        [2.5, 10.0], [4.0, 24.0, 3.0], [(), (5.0,), (2.5, 5.0, 10.0), (0.5,)], [(0.8, 1.25), (0.5, 2.0)], [False, True]
    ):
        cand = dose_candidates([strengths])
        bp = dose_action_breakpoints(usual_dose=usual, interval_h=interval, candidates=cand[0], lower=b[0], upper=b[1])
        r = np.concatenate(
            [
                np.geomspace(0.05, 60, 400),
                bp,
                np.nextafter(bp, 0),
                np.nextafter(bp, np.inf),
                bp * (1 + 1e-10),
                bp * (1 - 1e-10),
                bp * (1 + 2e-9),
                bp * (1 - 2e-9),
            ]
        )
        fast = dose_action_codes_by_victim(
            r[:, None],
            usual_dose=np.array([usual]),
            interval_h=np.array([interval]),
            candidates=cand,
            lower=np.array([b[0]]),
            upper=np.array([b[1]]),
            narrow_therapeutic_index=np.array([nti]),
        )[:, 0]
        slow = dose_action_codes(
            r, usual_dose=usual, interval_h=interval, candidates=cand[0], lower=b[0], upper=b[1], narrow_therapeutic_index=nti
        )
        assert np.array_equal(fast, slow), (usual, interval, strengths, b, nti)
        checked += r.size
    assert checked > 10_000


def test_partial_ranking_is_prefix_of_full() -> None:
    rng = np.random.default_rng(3)
    lines = ["name,dose (mg),molar mass (g/mol),cmax (uM),fu_p,ki CYP3A (uM)"]
    lines += [f"P{i},100,400,{rng.uniform(0.1, 5):.3f},0.1,{rng.uniform(0.05, 5):.3f}" for i in range(30)]
    vlines = ["name,dose (mg),interval (h),fg,fm CYP3A"] + [f"V{j},10,24,0.5,{rng.uniform(0, 1):.2f}" for j in range(20)]
    result = evaluate_pairs(loads_perpetrators("\n".join(lines)), loads_victims("\n".join(vlines)))
    full = ranking(result)
    for top in (1, 7, 100, 599, 600, 1000):
        assert np.array_equal(ranking(result, top), full[:top])
