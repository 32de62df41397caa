"""Fuzz: the time course ends in a result or a named InputError, quickly, for any interval, half-life, ka or kdeg.

Inputs are the invented example scenario (interact/examples/tdi_inducer.toml) with its times and rates
replaced by values drawn over 60 orders of magnitude; the values are inputs, not checks.
"""

from __future__ import annotations

import math
import os
import time
import tomllib
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from fuzzcount import CASES, RESULTS
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import interact
from interact import assess
from interact.dynamic import MAX_INTERVALS, simulate
from interact.errors import InputError
from interact.scenario import scenario_from_dict

EXAMPLE = Path(interact.__file__).parent / "examples" / "tdi_inducer.toml"
BASE = tomllib.loads(EXAMPLE.read_text(encoding="utf-8"))
#: the budget of one time course, seconds: a hang must trip it, not a loaded machine (the slowest accepted case takes about a second)
BUDGET_S = 30.0


def _magnitude() -> st.SearchStrategy[float]:
    edge = st.sampled_from([1e-30, 1e-6, 1e-3, 1 / 60, 0.0167, 0.5, 24.0, 8784.0, 9000.0, 1e6, 1e30])
    plausible = st.floats(-1, 2.5).map(lambda e: 10.0**e)  # 0.1 to about 300 in the unit drawn
    return st.one_of(edge, st.floats(-9, 9).map(lambda e: 10.0**e), plausible, plausible)


@st.composite
def _scenario(draw: st.DrawFn) -> dict[str, Any]:
    data: dict[str, Any] = tomllib.loads(EXAMPLE.read_text(encoding="utf-8"))
    p, v = data["perpetrator"], data["victim"]
    for table, key, unit in (
        (p, "interval", draw(st.sampled_from(["h", "min", "s", "day", "wk"]))),
        (v, "interval", draw(st.sampled_from(["h", "min", "s", "day"]))),
        (p, "half_life", "h"),
        (v, "half_life", "h"),
        (p, "ka", "1/h"),
        (v, "ka", "1/h"),
    ):
        if draw(st.booleans()):
            table[key] = f"{draw(_magnitude()):.6g} {unit}"
    if draw(st.booleans()):
        data["turnover"] = [{"enzyme": "CYP3A", "kdeg_liver": f"{draw(_magnitude()):.6g} 1/h", "kdeg_gut": f"{draw(_magnitude()):.6g} 1/h"}]
    return data


@settings(max_examples=80 * int(os.environ.get("FUZZ_SCALE", "1")), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=_scenario(), days=st.sampled_from([1.0, 30.0, 365.0]))
def test_time_course_ends_in_a_result_or_a_named_error(data: dict[str, Any], days: float) -> None:
    CASES["time course"] += 1
    try:
        result = assess(scenario_from_dict(data))
    except InputError as exc:
        assert exc.field
        return
    start = time.perf_counter()
    try:
        course = simulate(result, days=days)
    except InputError as exc:
        assert exc.field and str(exc)
    else:
        assert np.all(np.isfinite(course.exposure_ratio)) and np.all(np.isfinite(course.victim_with))
        assert all(math.isfinite(x) for x in (course.steady_state_ratio, course.peak_ratio, course.cmax_ratio))
        RESULTS["time course"] += 1
    assert time.perf_counter() - start < BUDGET_S


@pytest.mark.parametrize(
    ("key", "value", "field"),
    [
        (("victim", "interval"), "10 s", "victim.interval"),
        (("victim", "interval"), "1 min", "victim.interval"),
        (("perpetrator", "interval"), "1e30 wk", "perpetrator.interval"),
        (("victim", "interval"), "1e30 wk", "victim.interval"),
        (("perpetrator", "half_life"), "1e-30 h", "perpetrator.half_life"),
        (("perpetrator", "half_life"), "1e30 h", "perpetrator.half_life"),
        (("victim", "half_life"), "1e30 h", "victim.half_life"),
        (("perpetrator", "ka"), "1e-30 1/min", "perpetrator.ka"),
        (("perpetrator", "ka"), "1e30 1/min", "perpetrator.ka"),
        (("victim", "ka"), "1e-30 1/h", "victim.ka"),
    ],
)
def test_issue_reproductions_are_refused_before_starting(key: tuple[str, str], value: str, field: str) -> None:
    """Issue 11: these hung, exhausted memory or overflowed; now each is refused at once with the field named."""
    data = tomllib.loads(EXAMPLE.read_text(encoding="utf-8"))
    data[key[0]][key[1]] = value
    result = assess(scenario_from_dict(data))
    start = time.perf_counter()
    with pytest.raises(InputError) as info:
        simulate(result, days=30)
    assert info.value.field == field
    assert time.perf_counter() - start < 1.0


def test_the_step_budget_is_what_the_error_says() -> None:
    data = tomllib.loads(EXAMPLE.read_text(encoding="utf-8"))
    data["victim"]["interval"] = "2 min"
    result = assess(scenario_from_dict(data))
    with pytest.raises(InputError, match=f"{MAX_INTERVALS:,}"):
        simulate(result, days=30)
