"""Mechanistic static model: identities and properties (hypothesis)."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import base_dict
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import assess
from interact.prediction import gut_ratio, liver_ratio, reversible_term
from interact.scenario import scenario_from_dict

# Scenarios here trigger model warnings (Fg not given, fu,inc = 1, kdeg from memory ...) as a side effect of
# what they test; the warnings themselves are checked in tests/api/test_warnings.py and where a test asks for one.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

# Rowland-Matin relation: with one pathway, AUCR_h = 1 / (fm/(1 + I/Ki) + 1 - fm) (common practice, textbook form)


def test_rowland_matin_identity() -> None:
    fm, ratio = 0.9, 3.0
    expected = 1.0 / (fm / (1.0 + ratio) + 1.0 - fm)
    assert liver_ratio(np.array([fm]), reversible_term(np.array([ratio]))) == pytest.approx(expected)
    # fm = 1: AUCR = 1 + I/Ki, the same as the basic R1 at that concentration
    assert liver_ratio(np.array([1.0]), reversible_term(np.array([ratio]))) == pytest.approx(1.0 + ratio)


def test_gut_ratio_limits() -> None:
    assert gut_ratio(0.5, 1.0) == pytest.approx(1.0)
    assert gut_ratio(0.5, 0.0) == pytest.approx(2.0)  # complete inhibition: 1/Fg
    assert gut_ratio(1.0, 0.0) == pytest.approx(1.0)


def test_vectorised_over_batches() -> None:
    fm = np.array([[0.5, 0.3], [0.9, 0.0]])
    act = np.array([[0.5, 1.0], [0.1, 1.0]])
    out = liver_ratio(fm, act)
    assert out.shape == (2,)
    assert out[1] == pytest.approx(1 / (0.09 + 0.1))


def _scenario(ki: float, fm: float, fg: float, cmax: float, dose_mg: float, fm2: float = 0.0):
    data = base_dict()
    data["perpetrator"].update(cmax=f"{cmax} uM", dose=f"{dose_mg} mg")
    data["perpetrator"]["inhibits"] = [{"target": "CYP3A", "ki": f"{ki} uM", "fu_inc": 1.0}]
    pathways = [{"enzyme": "CYP3A", "fm": fm}]
    if fm2:
        pathways.append({"enzyme": "CYP2D6", "fm": fm2})
    data["victim"].update(fg=fg, pathways=pathways)
    return scenario_from_dict(data)


ki_s = st.floats(0.001, 1000)
fm_s = st.floats(0.0, 0.99)
fg_s = st.floats(0.05, 1.0)
c_s = st.floats(0.001, 100)
dose_s = st.floats(0.1, 2000)


@settings(max_examples=60, deadline=None)
@given(ki_s, fm_s, fg_s, c_s, dose_s)
def test_aucr_bounds(ki: float, fm: float, fg: float, cmax: float, dose: float) -> None:
    p = assess(_scenario(ki, fm, fg, cmax, dose)).prediction
    assert p.total >= 1.0 - 1e-12
    assert p.total <= p.ceiling_total * (1 + 1e-9)
    assert p.ceiling_total == pytest.approx(1.0 / ((1.0 - fm) * fg))
    assert p.total == pytest.approx(p.gut * p.liver)


@settings(max_examples=40, deadline=None)
@given(ki_s, fm_s, fg_s, c_s, dose_s)
def test_aucr_rises_with_concentration_and_fm(ki: float, fm: float, fg: float, cmax: float, dose: float) -> None:
    base = assess(_scenario(ki, fm, fg, cmax, dose)).prediction.total
    assert assess(_scenario(ki, fm, fg, cmax * 2, dose * 2)).prediction.total >= base - 1e-12
    assert assess(_scenario(ki, min(fm + 0.01, 1.0), fg, cmax, dose)).prediction.total >= base - 1e-12
    assert assess(_scenario(ki * 2, fm, fg, cmax, dose)).prediction.total <= base + 1e-12


def test_no_inhibitor_means_no_change() -> None:
    # an inhibitor acting only on an enzyme the victim does not use leaves the AUC unchanged
    data = base_dict()
    data["perpetrator"]["inhibits"] = [{"target": "CYP2D6", "ki": "1 uM"}]
    p = assess(scenario_from_dict(data)).prediction
    assert (p.gut, p.liver, p.total) == (1.0, 1.0, 1.0)


@settings(max_examples=40, deadline=None)
@given(ki_s, fg_s, c_s, dose_s)
def test_basic_screen_never_less_conservative(ki: float, fg: float, cmax: float, dose: float) -> None:
    """R1 (fm = 1, same concentration) bounds the hepatic AUCR; R1,gut bounds the gut AUCR."""
    a = assess(_scenario(ki, 0.99, fg, cmax, dose))
    by = {r.criterion: r for r in a.screen}
    sp = a.species[0]
    r1_inlet = 1.0 + sp.unbound_inlet_um / ki  # R1 evaluated at the MSM's hepatic concentration
    assert r1_inlet >= a.prediction.liver - 1e-9
    assert by["reversible-gut"].value >= a.prediction.gut - 1e-9
    if not by["reversible-liver"].indicated and not by["reversible-gut"].indicated:
        assert a.prediction.gut <= 11.0


def test_two_pathways_and_ratio_function_agree() -> None:
    from interact.prediction import ratio_function

    a = assess(_scenario(0.5, 0.6, 0.5, 2.0, 100.0, fm2=0.2))
    c = a.constants
    kdeg = {}
    f = ratio_function(
        pathways=tuple((e.enzyme, e.fm) for e in a.prediction.effects),
        fg=0.5,
        gut_enzyme="CYP3A",
        constants=c,
        species=a.species,
        kdeg=kdeg,
    )
    assert f(1.0) == pytest.approx(a.prediction.total, rel=1e-12)
    assert f(0.0) == pytest.approx(1.0)


def test_pathway_without_inhibition_is_unaffected() -> None:
    a = assess(_scenario(0.5, 0.6, 0.5, 2.0, 100.0, fm2=0.2))
    eff = {e.enzyme: e for e in a.prediction.effects}
    assert eff["CYP2D6"].liver.activity == 1.0
    assert any("CYP2D6" in w for w in a.warnings)
