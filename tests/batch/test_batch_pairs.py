"""Batch screening: each pair's result equals assess() on that pair alone (property test over random tables).

The reference here is the project's own single-scenario engine, itself checked
against published tables in tests/test_screening.py and tests/test_prediction.py;
this test shows that the vectorised batch path changes nothing.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from interact import assess
from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims, pair_scenario, ranking
from interact.dosing import ACTIONS
from interact.tables import load_classes

# Scenarios here trigger model warnings (Fg not given, fu,inc = 1, kdeg from memory ...) as a side effect of
# what they test; the warnings themselves are checked in tests/api/test_warnings.py and where a test asks for one.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

ENZYMES = ("CYP3A", "CYP2C9", "CYP2D6")

pos = st.floats(min_value=1e-3, max_value=1e3, allow_nan=False, allow_infinity=False)
frac = st.floats(min_value=0.001, max_value=1.0, allow_nan=False)


@st.composite
def perpetrator_row(draw: st.DrawFn, k: int) -> list[str]:
    kis = [draw(st.one_of(st.none(), pos)) for _ in ENZYMES]
    if all(x is None for x in kis):
        kis[draw(st.integers(0, len(ENZYMES) - 1))] = draw(pos)
    fu_incs = [draw(st.one_of(st.none(), frac)) for _ in ENZYMES]
    return [
        f"P{k}",
        repr(draw(pos)),
        repr(draw(st.floats(100, 900))),
        repr(draw(pos)),
        repr(draw(frac)),
        draw(st.sampled_from(["", "true"])),
        draw(st.sampled_from(["", "oral", "intravenous"])),
        draw(st.sampled_from(["", "0.6", "1.3"])),
        draw(st.sampled_from(["", "0.7"])),
        draw(st.sampled_from(["", "0.05"])),
        *("" if x is None else repr(x) for x in kis),
        *("" if (f is None or kis[e] is None) else repr(f) for e, f in enumerate(fu_incs)),
    ]


@st.composite
def victim_row(draw: st.DrawFn, k: int) -> list[str]:
    fms = [draw(st.one_of(st.none(), st.floats(0.0, 0.33))) for _ in ENZYMES]
    strengths = draw(st.lists(st.sampled_from(["1", "2.5", "5", "10", "20"]), max_size=3, unique=True))
    return [
        f"V{k}",
        draw(st.sampled_from(["2.5", "5", "10", "40"])),
        draw(st.sampled_from(["8", "12", "24"])),
        draw(st.one_of(st.just(""), st.floats(0.05, 1.0).map(repr))),
        draw(st.sampled_from(["", "oral", "intravenous"])),
        ";".join(strengths),
        draw(st.sampled_from(["", "yes"])),
        draw(st.sampled_from(["", "3", "30", "200"])),
        *("" if f is None else repr(f) for f in fms),
    ]


P_HEAD = [
    "name",
    "dose (mg)",
    "molar mass (g/mol)",
    "cmax (uM)",
    "fu_p",
    "fu_p measured",
    "route",
    "rb",
    "fa_fg",
    "ka (1/min)",
    *(f"ki {e} (uM)" for e in ENZYMES),
    *(f"fu_inc {e}" for e in ENZYMES),
]
V_HEAD = ["name", "dose (mg)", "interval (h)", "fg", "route", "strengths (mg)", "nti", "half_life (h)", *(f"fm {e}" for e in ENZYMES)]


@st.composite
def tables(draw: st.DrawFn) -> tuple[str, str]:
    n_p, n_v = draw(st.integers(1, 4)), draw(st.integers(1, 4))
    prows = [draw(perpetrator_row(k)) for k in range(n_p)]
    vrows = [draw(victim_row(k)) for k in range(n_v)]
    return ("\n".join(",".join(r) for r in [P_HEAD, *prows]) + "\n", "\n".join(",".join(r) for r in [V_HEAD, *vrows]) + "\n")


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(tables())
def test_each_pair_equals_assess_alone(texts: tuple[str, str]) -> None:
    ptext, vtext = texts
    perps = loads_perpetrators(ptext)
    victims = loads_victims(vtext)
    result = evaluate_pairs(perps, victims)
    labels = result.band_names
    classes = load_classes()
    for i in range(len(perps.rows)):
        for j in range(len(victims.rows)):
            a = assess(pair_scenario(perps, victims, i, j))
            pr = a.prediction
            assert result.total[i, j] == pr.total, (i, j)
            assert result.gut[i, j] == pr.gut and result.liver[i, j] == pr.liver
            assert result.kidney[i, j] == pr.kidney == 1.0  # no secretion routes in these tables
            assert ACTIONS[result.action[i, j]] == a.dose.action  # the same regimen rule, half-life included
            band = classes.classify(pr.total)
            assert labels[result.band[i, j]] == (
                "no class" if band is None else f"{band.name} {'inhibition' if band in classes.inhibition else 'induction'}"
            )
            assert bool(result.study[i, j]) == a.study_indicated
            sp = a.species[0]
            assert perps.inlet_um[i] == sp.unbound_inlet_um and perps.enterocyte_um[i] == sp.enterocyte_um
            fg_flag = bool(result.flags[i, j] & 1)
            assert fg_flag == any(w.startswith("victim.fg not given") for w in a.warnings)
            untouched = bool(result.flags[i, j] & 8)
            assert untouched == any("has no entry for the victim's pathway" in w for w in a.warnings)
    # ranked worst first
    sev = np.abs(np.log(result.total.ravel()[ranking(result)]))
    assert np.all(np.diff(sev) <= 0)
