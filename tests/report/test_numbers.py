"""One significant-figure policy: every number is shown to 3 significant figures (more only for whole numbers of
more digits), whatever its size, including values that round up to the next power of ten (common practice)."""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from interact.report.numbers import fmt


def _significant(text: str) -> int:
    digits = text.replace("-", "").replace(".", "").lstrip("0")
    return len(digits)


@given(st.floats(min_value=1e-3, max_value=9.99e5, allow_nan=False, allow_infinity=False))
def test_three_significant_figures_at_every_size(x: float) -> None:
    shown = fmt(x)
    assert float(shown) == pytest.approx(x, rel=5.01e-3)
    whole = len(str(int(float(shown)))) if float(shown) >= 1 else 0
    assert _significant(shown) == max(3, whole), shown


@pytest.mark.parametrize(("value", "shown"), [(9.99996, "10.0"), (99.96, "100"), (0.099996, "0.100"), (2.2222, "2.22")])
def test_rounding_up_to_the_next_power_of_ten_keeps_the_policy(value: float, shown: str) -> None:
    # the complete-inhibition ceiling printed "10.00" beside "2.22" before
    assert fmt(value) == shown
    assert math.isclose(float(fmt(value)), value, rel_tol=5e-3)
