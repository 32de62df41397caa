"""fm back-calculation and the perpetrator-dose ceiling (the regimen search is tested in test_regimens.py)."""

from __future__ import annotations

import pytest
from conftest import base_dict

from interact import assess
from interact.dosing import fm_from_observed_ratio
from interact.errors import InputError
from interact.scenario import scenario_from_dict


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
