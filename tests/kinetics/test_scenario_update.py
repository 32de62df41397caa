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


def test_replaced_lines_keep_their_comments_and_every_earlier_origin() -> None:
    """Issue 11: `fit --into` dropped the comment on each replaced line and the previous origin."""
    text = DEMO.replace('mechanism = "competitive"\n', 'mechanism = "competitive"  # assumed, not tested\norigin = "typed by hand"\n', 1)
    text = text.replace("fu_inc = 0.55\n", "fu_inc = 0.55  # measured by dialysis\n", 1)
    first = update_inhibition_text(
        text, target="CYP3A", ki_um=2.0, mechanism="uncompetitive", fu_inc=0.55, origin="fit of a.csv, 2026-12-01"
    )
    second = update_inhibition_text(first, target="CYP3A", ki_um=3.0, mechanism="uncompetitive", origin="fit of b.csv, 2026-12-02")
    for needle in (
        "from an invented microsomal incubation",  # the comment on the replaced ki line
        "assumed, not tested",  # the comment on the replaced mechanism line
        "measured by dialysis",  # an unchanged value keeps its comment
        '"typed by hand"',  # the first origin
        '"fit of a.csv, 2026-12-01"',  # the second
    ):
        assert needle in second, needle
    inh = next(i for i in loads_scenario(second).perpetrator.inhibits if i.target == "CYP3A")
    assert inh.origin == "fit of b.csv, 2026-12-02" and inh.ki.to("uM").magnitude == 3.0


def test_carried_tdi_constants_keep_comments_and_origin() -> None:
    from interact.kinetics.scenario_update import carry_constants_text

    text = DEMO.replace(
        'ki = "4.2 uM"                 # from an invented microsomal incubation\n',
        'ki = "4.2 uM"\nkinact = "0.05 1/min"  # from a pilot run\nki_inact = "3 uM"\norigin = "typed"\n',
        1,
    )
    new = carry_constants_text(
        text, target="CYP3A", values={"kinact": "0.07 1/min", "ki_inact": "3 uM"}, origin="TDI fit of t.csv, 2026-12-02"
    )
    assert "from a pilot run" in new and 'was "0.05 1/min"' in new and '"typed"' in new
