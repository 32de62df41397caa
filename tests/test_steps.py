"""Step tables (:mod:`interact.steps`) give the answer of the decision they tabulate, for every ratio.

The class band (:func:`interact.arrays.band_codes`) and the dose rule (:func:`interact.dosing.choose_regimens`) look
many ratios up in a table; here each is held equal to the decision evaluated directly.

For many rows, ``choose_regimens`` looks each AUC ratio's answer up in a table built from the rule evaluated once per
stretch of ratios over which it cannot change; here it is held equal, action and chosen candidate, to the rule
evaluated directly on every candidate of every row (``_choose_rows``, which ``tests/test_regimens.py`` holds to an
independent brute-force enumeration).  The ratios include each change point and its neighbouring doubles, where
rounding decides, and values that are not finite positive ratios.
"""

from __future__ import annotations

import dataclasses

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from interact.arrays import _band_codes, band_codes
from interact.dosing import _choose_rows, _rule_steps, choose_regimens, plan_regimens
from interact.tables import load_classes

plans = st.builds(
    lambda strengths, scored, half, b, max_units, taus, usual, tau0: plan_regimens(
        usual_dose=usual,
        dose_unit="mg",
        interval_h=tau0,
        strengths=tuple(strengths),
        scored=tuple(strengths[:1]) if scored and strengths else (),
        max_units=max_units,
        intervals_h=tuple(taus),
        half_life_h=half,
        boundary=b,
        boundary_origin="test",
    ),
    st.lists(st.sampled_from([0.5, 1.0, 2.0, 2.5, 5.0, 7.5, 10.0, 20.0, 40.0]), max_size=4, unique=True),
    st.booleans(),
    st.one_of(st.none(), st.none(), st.floats(0.5, 200.0)),
    st.sampled_from([(0.8, 1.25), (0.5, 2.0), (0.9, 1.11), (1.0, 1.0), (0.67, 1.5)]),
    st.integers(1, 5),
    st.lists(st.sampled_from([4.0, 6.0, 8.0, 12.0, 24.0, 36.0, 48.0, 72.0, 168.0]), max_size=6, unique=True),
    st.sampled_from([10.0, 5.0, 7.5, 1.0]),
    st.sampled_from([24.0, 12.0, 8.0]),
)


def _ratios(plan, seed: int) -> np.ndarray:  # type: ignore[no-untyped-def]
    rng = np.random.default_rng(seed)
    lo, hi = plan.boundary
    f = plan.factors[~plan.exact]
    points = np.concatenate([[lo, hi, 1.0], lo / f, hi / f, 1.0 / f, 1.0 / np.sqrt(f[:-1] * f[1:])])
    near = np.concatenate([np.nextafter(points, 0.0), points, np.nextafter(points, np.inf), points * (1 + 1e-9), points * (1 - 1e-9)])
    odd = np.array([0.0, -1.0, np.nan, np.inf, -np.inf, 1e-300, 1e300, 2.0**-24, 2.0**24, 5e-324])
    spread = np.exp(rng.normal(0.0, 1.5, 5000))
    return np.concatenate([near, odd, spread])


@settings(max_examples=120, deadline=None)
@given(plan=plans, seed=st.integers(0, 2**32 - 1), gut_share=st.floats(0.0, 1.0))
def test_the_table_gives_the_rule_evaluated_directly(plan, seed, gut_share) -> None:  # type: ignore[no-untyped-def]
    r = _ratios(plan, seed)
    with np.errstate(invalid="ignore"):
        g = np.where(r > 0, np.abs(r) ** gut_share, 1.0)
    table = choose_regimens(plan, r, g)
    action, chosen = _choose_rows(plan, r, g)
    np.testing.assert_array_equal(table.action, action)
    np.testing.assert_array_equal(table.chosen, chosen)


def test_the_table_is_used_and_shared_by_equal_plans() -> None:
    # the check above would pass trivially if no table were built: plans without a half-life have one,
    # equal plans (compared by value) share it, and a plan judged on peak and trough has none
    a = plan_regimens(usual_dose=10.0, dose_unit="mg", interval_h=24.0, strengths=(2.5, 5.0, 10.0))
    b = dataclasses.replace(a)  # an equal plan, another object (plan_regimens itself returns the remembered one)
    assert a is not b and _rule_steps(a) is _rule_steps(b) is not None
    steps = _rule_steps(a)
    assert steps is not None and (steps.bucket_stretch >= 0).mean() > 0.99  # almost every ratio is a look-up
    judged = plan_regimens(usual_dose=10.0, dose_unit="mg", interval_h=24.0, strengths=(5.0,), half_life_h=12.0)
    assert _rule_steps(judged) is None


@settings(max_examples=30, deadline=None)
@given(seed=st.integers(0, 2**32 - 1))
def test_band_codes_from_the_table_equal_the_comparisons(seed) -> None:  # type: ignore[no-untyped-def]
    classes = load_classes()
    bounds = np.array([b.bound for b in (*classes.inhibition, *classes.induction)])
    near = np.concatenate([np.nextafter(bounds, 0.0), bounds, np.nextafter(bounds, np.inf), bounds * (1 + 1e-9)])
    odd = np.array([0.0, -1.0, np.nan, np.inf, -np.inf, 1e-300, 1e300, 5e-324])
    r = np.concatenate([near, odd, np.exp(np.random.default_rng(seed).normal(0.0, 1.5, 5000))])
    np.testing.assert_array_equal(band_codes(r, classes), _band_codes(r, classes))
    np.testing.assert_array_equal(band_codes(r.reshape(-1, 2)[:, ::-1], classes), _band_codes(r.reshape(-1, 2)[:, ::-1], classes))


@settings(max_examples=20, deadline=None)
@given(seed=st.integers(0, 2**32 - 1))
def test_batch_band_and_study_from_one_table_equal_the_comparisons(seed) -> None:  # type: ignore[no-untyped-def]
    from interact.batch import _band_and_study, _study
    from interact.tables import load_rules

    classes, rules = load_classes(), load_rules(None)
    inh, ind = float(rules.aucr_inhibition_cutoff.value), float(rules.aucr_induction_cutoff.value)
    points = np.array([b.bound for b in (*classes.inhibition, *classes.induction)] + [inh, ind])
    near = np.concatenate([np.nextafter(points, 0.0), points, np.nextafter(points, np.inf)])
    r = np.concatenate([near, np.exp(np.random.default_rng(seed).normal(0.0, 1.5, 6000))])
    band, study = _band_and_study(r, classes, rules)
    np.testing.assert_array_equal(band, _band_codes(r, classes))
    np.testing.assert_array_equal(study, _study(r, inh, ind))
