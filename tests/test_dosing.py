"""Dose suggestion, fm back-calculation and the perpetrator-dose ceiling.

The arithmetic follows linear pharmacokinetics (common practice): the dose that
restores exposure is dose / AUCR; the interval that does is tau x AUCR.
"""

from __future__ import annotations

import pytest
from conftest import base_dict

from interact import assess
from interact.cautions import DOSE_CAUTIONS, INCREASE_CAUTION
from interact.dosing import fm_from_observed_ratio, suggest_dose
from interact.errors import InputError
from interact.scenario import scenario_from_dict


def _suggest(aucr: float, strengths=(2.5, 5.0, 10.0), nti: bool = False):
    return suggest_dose(
        auc_ratio=aucr,
        usual_dose=10.0,
        dose_unit="mg",
        interval_h=24.0,
        strengths=strengths,
        boundary=(0.8, 1.25),
        boundary_origin="test",
        narrow_therapeutic_index=nti,
    )


def test_within_boundary_no_change() -> None:
    d = _suggest(1.2)
    assert d.action == "no change" and d.chosen_dose is None
    assert d.cautions == DOSE_CAUTIONS


def test_reduce_to_a_strength_inside_the_boundary() -> None:
    d = _suggest(2.0)
    assert d.action == "reduce dose"
    assert d.exact_dose == pytest.approx(5.0)
    assert d.chosen_dose == 5.0 and d.ratio_with_chosen == pytest.approx(1.0)
    assert d.exact_interval_h == pytest.approx(48.0)
    assert d.chosen_interval_h == 48.0
    assert all(c in d.cautions for c in DOSE_CAUTIONS)


def test_falls_back_to_largest_not_above_exact() -> None:
    d = _suggest(3.0, strengths=(2.5, 10.0))
    # 2.5 mg -> 0.75 (below 0.8); 5 mg (2 x 2.5) -> 1.5 (above 1.25): none inside, so the largest <= 3.33 mg
    assert d.chosen_dose == 2.5
    assert d.ratio_with_chosen == pytest.approx(0.75)
    assert any("below the lower boundary" in r for r in d.reasons)


def test_no_strength_small_enough_gives_interval_or_avoid() -> None:
    d = _suggest(50.0, strengths=(5.0, 10.0))
    assert d.chosen_dose is None
    assert d.action == "avoid or monitor"  # 24 h x 50 = 1200 h: no practical interval either


def test_increase_for_induction_carries_stronger_caution() -> None:
    d = _suggest(0.5)
    assert d.action == "increase dose"
    assert d.chosen_dose == 20.0 and d.chosen_units == "2 x 10"
    assert d.cautions[0] == INCREASE_CAUTION


def test_narrow_therapeutic_index_defers_to_monitoring() -> None:
    d = _suggest(2.0, nti=True)
    assert d.action == "avoid or monitor"
    assert any("narrow therapeutic index" in r for r in d.reasons)


def test_fm_back_calculation() -> None:
    # complete inhibition: AUCR = 1/(1 - fm) (Rowland-Matin; common practice)
    assert fm_from_observed_ratio(5.0) == pytest.approx(0.8)
    assert fm_from_observed_ratio(10.0, gut_ratio=2.0) == pytest.approx(0.8)
    assert fm_from_observed_ratio(5.0, remaining_activity=0.1) == pytest.approx(0.8 / 0.9)
    for kwargs in (
        {"observed_ratio": 0.5},
        {"observed_ratio": 20.0, "remaining_activity": 0.5},
        {"observed_ratio": 2.0, "gut_ratio": 3.0},
    ):
        with pytest.raises(InputError):
            fm_from_observed_ratio(**kwargs)


def test_perpetrator_dose_ceiling_keeps_victim_at_boundary() -> None:
    data = base_dict()
    a = assess(scenario_from_dict(data))
    lim = a.perpetrator_limit
    assert lim.scale is not None and lim.dose is not None
    data["perpetrator"]["dose"] = f"{100 * lim.scale!r} mg"
    data["perpetrator"]["cmax"] = f"{1 * lim.scale!r} uM"
    again = assess(scenario_from_dict(data))
    assert again.prediction.total == pytest.approx(1.25, rel=1e-6)


def test_no_ceiling_when_complete_inhibition_stays_inside() -> None:
    data = base_dict()
    data["victim"]["pathways"] = [{"enzyme": "CYP3A", "fm": 0.1}]
    data["victim"]["fg"] = 1.0
    a = assess(scenario_from_dict(data))
    assert a.perpetrator_limit.scale is None and "no limit" in a.perpetrator_limit.reason
