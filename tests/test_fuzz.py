"""Malformed and hostile scenarios: a result or an InputError naming a field, never another exception."""

from __future__ import annotations

import math
from typing import Any

import pytest
from conftest import base_dict
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from interact import assess
from interact.errors import InputError, ScenarioError
from interact.scenario import loads_scenario, scenario_from_dict

# Scenarios here trigger model warnings (Fg not given, fu,inc = 1, kdeg from memory ...) as a side effect of
# what they test; the warnings themselves are checked in tests/api/test_warnings.py and where a test asks for one.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

HOSTILE = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(-(10**30), 10**30),
    st.floats(allow_nan=True, allow_infinity=True),
    st.text(max_size=30),
    st.sampled_from(
        ["1 uM", "nan uM", "inf mg", "-5 mg", "1e308 uM", "1 kg", "0 L/h", "x" * 5000, "<script>", "1 uM**99", "()", "1 1/1/1"]
    ),
    st.lists(st.integers(), max_size=3),
    st.dictionaries(st.text(max_size=5), st.integers(), max_size=2),
)

PATHS = [
    ("title",),
    ("rules",),
    ("invented",),
    ("perpetrator",),
    ("perpetrator", "dose"),
    ("perpetrator", "cmax"),
    ("perpetrator", "fu_plasma"),
    ("perpetrator", "molar_mass"),
    ("perpetrator", "ka"),
    ("perpetrator", "fa_fg"),
    ("perpetrator", "blood_plasma_ratio"),
    ("perpetrator", "route"),
    ("perpetrator", "inhibits"),
    ("perpetrator", "inhibits", 0, "ki"),
    ("perpetrator", "inhibits", 0, "target"),
    ("perpetrator", "inhibits", 0, "fu_inc"),
    ("perpetrator", "inhibits", 0, "mechanism"),
    ("perpetrator", "metabolites"),
    ("victim",),
    ("victim", "dose"),
    ("victim", "interval"),
    ("victim", "fg"),
    ("victim", "strengths"),
    ("victim", "pathways"),
    ("victim", "pathways", 0, "fm"),
    ("victim", "pathways", 0, "enzyme"),
    ("victim", "no_effect_boundary"),
    ("physiology",),
    ("physiology", "hepatic_blood_flow"),
    ("unknown_key",),
    ("victim", "surprise"),
]


def _set(data: dict[str, Any], path: tuple, value: object) -> None:
    node: Any = data
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = value


def _check_result(a) -> None:  # type: ignore[no-untyped-def]
    for x in (a.prediction.gut, a.prediction.liver, a.prediction.total):
        assert math.isfinite(x) and x > 0
    for r in a.screen:
        assert math.isfinite(r.value)


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.tuples(st.sampled_from(PATHS), HOSTILE), min_size=1, max_size=4))
def test_hostile_values(edits: list[tuple[tuple, object]]) -> None:
    data = base_dict()
    for path, value in edits:
        try:
            _set(data, path, value)
        except (KeyError, IndexError, TypeError):
            continue  # an earlier edit replaced a parent table
    try:
        scenario = scenario_from_dict(data)
    except ScenarioError as exc:
        assert exc.problems and all(p.field for p in exc.problems)
        return
    try:
        _check_result(assess(scenario))
    except InputError as exc:
        assert exc.field


@settings(max_examples=150, deadline=None)
@given(st.text(max_size=300))
def test_random_text_is_rejected_cleanly(text: str) -> None:
    try:
        loads_scenario(text)
    except InputError as exc:
        assert exc.field


def test_non_dict_top_level() -> None:
    for data in (None, [], "x", 3):
        try:
            scenario_from_dict(data)
        except ScenarioError as exc:
            assert exc.problems
