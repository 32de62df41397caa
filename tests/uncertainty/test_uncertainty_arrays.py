"""The array forms of the class band and the dose action agree with the scalar core, case by case."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from interact.arrays import ACTIONS, band_codes, band_labels, dose_action_codes, dose_candidates
from interact.dosing import PRACTICAL_INTERVALS_H, suggest_dose
from interact.tables import load_classes

ratios = st.one_of(
    st.floats(min_value=0.05, max_value=60.0, allow_nan=False),
    st.sampled_from([0.2, 0.5, 0.8, 1.0, 1.25, 2.0, 5.0, 0.7999999999, 1.2500000001]),
)


@given(r=ratios)
def test_band_codes_match_classify(r: float) -> None:
    classes = load_classes()
    band = classes.classify(r)
    label = band_labels(classes)[int(band_codes(r, classes))]
    if band is None:
        assert label == "no class"
    else:
        kind = "inhibition" if band in classes.inhibition else "induction"
        assert label == f"{band.name} {kind}"


@settings(max_examples=300, deadline=None)
@given(
    r=ratios,
    usual=st.sampled_from([1.0, 2.5, 5.0, 10.0, 20.0, 40.0, 100.0]),
    interval=st.sampled_from([*PRACTICAL_INTERVALS_H, 3.0, 10.0, 36.0]),
    strengths=st.lists(st.sampled_from([0.5, 1.0, 2.5, 5.0, 10.0, 20.0, 25.0, 40.0]), max_size=3, unique=True),
    boundary=st.sampled_from([(0.8, 1.25), (0.5, 2.0), (0.9, 1.11), (1.0, 1.0)]),
    nti=st.booleans(),
)
def test_dose_action_codes_match_suggest_dose(r, usual, interval, strengths, boundary, nti) -> None:  # type: ignore[no-untyped-def]
    expected = suggest_dose(
        auc_ratio=r,
        usual_dose=usual,
        dose_unit="mg",
        interval_h=interval,
        strengths=tuple(strengths),
        boundary=boundary,
        boundary_origin="test",
        narrow_therapeutic_index=nti,
    ).action
    cand = dose_candidates([tuple(strengths)])[0]
    code = dose_action_codes(
        np.array([r]),
        usual_dose=usual,
        interval_h=interval,
        candidates=cand,
        lower=boundary[0],
        upper=boundary[1],
        narrow_therapeutic_index=nti,
    )
    assert ACTIONS[int(code[0])] == expected


def test_dose_action_codes_match_suggest_dose_on_a_grid() -> None:
    import itertools

    rs = np.concatenate([np.geomspace(0.05, 60, 60), [0.8, 1.25, 2.0, 5.0]])
    seen = set()
    for usual, interval, strengths, b, nti in itertools.product(
        [2.5, 10.0, 40.0],
        [4.0, 24.0, 168.0, 3.0],
        [(), (5.0,), (2.5, 5.0, 10.0), (0.5,)],
        [(0.8, 1.25), (0.5, 2.0)],
        [False, True],
    ):
        cand = dose_candidates([strengths])[0]
        codes = dose_action_codes(
            rs, usual_dose=usual, interval_h=interval, candidates=cand, lower=b[0], upper=b[1], narrow_therapeutic_index=nti
        )
        for r, c in zip(rs, codes, strict=True):
            expected = suggest_dose(
                auc_ratio=float(r),
                usual_dose=usual,
                dose_unit="mg",
                interval_h=interval,
                strengths=strengths,
                boundary=b,
                boundary_origin="",
                narrow_therapeutic_index=nti,
            ).action
            assert ACTIONS[int(c)] == expected, (r, usual, interval, strengths, b, nti)
            seen.add(expected)
    assert seen == set(ACTIONS)
