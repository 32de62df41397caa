"""Carrying a Ki into scenario text: validation, refusal on bad input, nothing lost.

The scenario used is the built-in demo (invented compounds, says so).
"""

from __future__ import annotations

import pytest

from interact import demo_path, loads_scenario
from interact.errors import InputError
from interact.kinetics import update_inhibition_text

DEMO = demo_path().read_text(encoding="utf-8")


def test_mixed_writes_alpha_and_is_loadable() -> None:
    text = update_inhibition_text(
        DEMO, target="CYP3A", ki_um=2.0, mechanism="mixed", alpha=3.5, origin="fit of x.csv, mixed model, 2026-12-01"
    )
    inh = next(i for i in loads_scenario(text).perpetrator.inhibits if i.target == "CYP3A")
    assert inh.mechanism == "mixed" and inh.alpha == 3.5 and inh.fu_inc == 0.55  # fu_inc kept when not given
    assert inh.origin.endswith("2026-12-01")


MINIMAL = """# invented test scenario: no real compounds
title = "Invented test scenario"
invented = true

[perpetrator]
name = "Compound T (invented)"
dose = "100 mg"
molar_mass = "400 g/mol"
cmax = "1 uM"  # total
fu_plasma = 0.1

[victim]
name = "Probe V (invented)"
dose = "5 mg"
interval = "24 h"

[[victim.pathways]]
enzyme = "CYP3A"
fm = 0.8
"""


def test_entry_is_created_in_a_scenario_without_inhibitions() -> None:
    text = update_inhibition_text(MINIMAL, target="cyp2d6", ki_um=1.5, mechanism="competitive", fu_inc=0.8, origin="fit")
    inh = loads_scenario(text).perpetrator.inhibits
    assert [(i.target, i.ki.to("uM").magnitude, i.fu_inc) for i in inh] == [("CYP2D6", 1.5, 0.8)]
    assert "# invented test scenario" in text and 'cmax = "1 uM"  # total' in text


@pytest.mark.parametrize(
    ("kwargs", "needle"),
    [
        ({"target": "CYP9Z9"}, "not a known enzyme"),
        ({"ki_um": float("inf")}, "unbounded"),
        ({"ki_um": -1.0}, "above zero"),
        ({"mechanism": "allosteric"}, "mechanism"),
        ({"mechanism": "mixed"}, "alpha"),
        ({"fu_inc": 1.5}, "fu_inc"),
    ],
)
def test_bad_values_are_refused(kwargs: dict[str, object], needle: str) -> None:
    args: dict[str, object] = {"target": "CYP3A", "ki_um": 1.0, "mechanism": "competitive", "origin": "fit"} | kwargs
    with pytest.raises(InputError, match=needle):
        update_inhibition_text(DEMO, **args)  # type: ignore[arg-type]


def test_unreadable_toml_and_missing_perpetrator_are_refused() -> None:
    with pytest.raises(InputError, match="could not be parsed"):
        update_inhibition_text("title = ", target="CYP3A", ki_um=1.0, mechanism="competitive", origin="fit")
    with pytest.raises(InputError, match="perpetrator"):
        update_inhibition_text('title = "x"\n', target="CYP3A", ki_um=1.0, mechanism="competitive", origin="fit")
