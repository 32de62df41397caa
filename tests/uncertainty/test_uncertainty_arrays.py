"""The array form of the class band agrees with the scalar core, case by case."""

from __future__ import annotations

from hypothesis import given
from hypothesis import strategies as st

from interact.arrays import band_codes, band_labels
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
