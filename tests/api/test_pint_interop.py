"""Quantities from the user's own pint registry: converted through magnitude and unit text, or refused naming the field.

Reference: pint itself (a general-purpose library): the other registry's own conversion of the same quantity.
"""

from __future__ import annotations

import pint
import pytest
from conftest import base_dict
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import assess, units
from interact.errors import ScenarioError, UnitError
from interact.scenario import scenario_from_dict

OTHER = pint.UnitRegistry()  # the user's registry, not interact's


@settings(max_examples=60, deadline=None)
@given(
    value=st.floats(1e-3, 1e4),
    unit=st.sampled_from(["micromolar", "nanomolar", "millimolar", "uM", "nM", "mol/L"]),
)
def test_molar_concentrations_convert_as_pint_does(value: float, unit: str) -> None:
    q = OTHER.Quantity(value, unit)
    ours = units.parse(q, "concentration", field="perpetrator.cmax")
    assert ours._REGISTRY is units.ureg
    assert units.magnitude(ours, "uM") == pytest.approx(q.to("micromolar").magnitude, rel=1e-12)


@settings(max_examples=40, deadline=None)
@given(value=st.floats(1e-2, 1e4), unit=st.sampled_from(["mg", "gram", "microgram", "mmol"]))
def test_doses_convert_as_pint_does(value: float, unit: str) -> None:
    q = OTHER.Quantity(value, unit)
    ours = units.parse(q, "dose", field="perpetrator.dose")
    target = "mg" if q.check("[mass]") else "umol"
    assert units.magnitude(ours, target) == pytest.approx(q.to(target).magnitude, rel=1e-12)


@pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")
def test_a_scenario_built_with_another_registry_assesses_like_text() -> None:
    text = base_dict()
    other = base_dict()
    other["perpetrator"]["cmax"] = OTHER.Quantity(1.0, "micromolar")
    other["perpetrator"]["dose"] = OTHER.Quantity(0.1, "gram")
    other["victim"]["interval"] = OTHER.Quantity(1.0, "day")
    a, b = assess(scenario_from_dict(text)), assess(scenario_from_dict(other))
    assert b.prediction.total == pytest.approx(a.prediction.total, rel=1e-12)
    assert b.dose.action == a.dose.action


def test_unknown_unit_or_array_is_refused_naming_the_field() -> None:
    bad = OTHER.Quantity(1.0, "furlong")
    with pytest.raises(UnitError, match=r"perpetrator\.cmax.*furlong"):
        units.parse(bad, "concentration", field="perpetrator.cmax")
    with pytest.raises(UnitError, match="single number"):
        units.parse(OTHER.Quantity([1.0, 2.0], "uM"), "concentration", field="perpetrator.cmax")
    with pytest.raises(UnitError, match=r"of another dimension|is a"):
        units.parse(OTHER.Quantity(1.0, "micromolar / hour"), "concentration", field="perpetrator.cmax")
    d = base_dict()
    d["perpetrator"]["cmax"] = bad
    with pytest.raises(ScenarioError) as err:
        scenario_from_dict(d)
    assert err.value.problems[0].field == "perpetrator.cmax"
