"""Batch screening of object drugs with transporter routes (efflux, uptake, secretion columns and renal_fraction):
each pair's ratios equal assess() on that pair alone (property test over random tables; values are arbitrary inputs)."""

from __future__ import annotations

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from interact import assess
from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims, pair_scenario
from interact.errors import InputError

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

TARGETS = ("CYP3A", "CYP2C9", "BCRP", "OATP1B1", "OAT3")
pos = st.floats(min_value=1e-2, max_value=1e2, allow_nan=False, allow_infinity=False)
P_HEAD = ["name", "dose (mg)", "molar mass (g/mol)", "cmax (uM)", "fu_p", "route", *(f"ki {t} (uM)" for t in TARGETS)]
V_HEAD = [
    "name",
    "dose (mg)",
    "interval (h)",
    "fg",
    "route",
    "renal_fraction",
    "fm CYP2C9",
    "efflux BCRP",
    "uptake OATP1B1",
    "secretion OAT3",
]


@st.composite
def tables(draw: st.DrawFn) -> tuple[str, str]:
    prows = []
    for k in range(draw(st.integers(1, 3))):
        kis = [draw(st.one_of(st.just(""), pos.map(repr))) for _ in TARGETS]
        if all(x == "" for x in kis):
            kis[2] = "1.5"
        prows.append(
            [
                f"P{k}",
                repr(draw(st.floats(1, 500))),
                "400",
                repr(draw(pos)),
                repr(draw(st.floats(0.01, 1.0))),
                draw(st.sampled_from(["", "intravenous"])),
                *kis,
            ]
        )
    vrows = []
    for k in range(draw(st.integers(1, 3))):
        fm, up, renal = draw(st.floats(0.0, 0.3)), draw(st.floats(0.0, 0.4)), draw(st.floats(0.0, 0.3))
        fg = draw(st.floats(0.5, 1.0))
        efflux = draw(st.floats(0.0, 0.5))
        fm_text = draw(st.sampled_from(["", repr(fm)]))
        vrows.append(
            [
                f"V{k}",
                "10",
                "24",
                draw(st.sampled_from(["", repr(fg)])),
                draw(st.sampled_from(["", "oral", "intravenous"])),
                repr(renal),
                fm_text,
                draw(st.sampled_from(["", repr(efflux)])),
                draw(st.sampled_from(["", repr(up)])),
                draw(st.sampled_from(["", repr(draw(st.floats(0.0, 1.0)))])),
            ]
        )
    csv = lambda head, rows: "\n".join(",".join(r) for r in [head, *rows]) + "\n"  # noqa: E731
    return csv(P_HEAD, prows), csv(V_HEAD, vrows)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(tables())
def test_each_pair_with_routes_equals_assess_alone(texts: tuple[str, str]) -> None:
    perps = loads_perpetrators(texts[0])
    victims = loads_victims(texts[1])
    result = evaluate_pairs(perps, victims)
    for i in range(len(perps.rows)):
        for j in range(len(victims.rows)):
            a = assess(pair_scenario(perps, victims, i, j))
            pr = a.prediction
            assert result.total[i, j] == pytest.approx(pr.total, rel=1e-12), (i, j)
            untouched = bool(result.flags[i, j] & 8)  # a pathway or route this perpetrator has no constant for
            assert untouched == any("has no entry for the victim's pathway" in w for w in a.warnings)
            assert result.gut[i, j] == pytest.approx(pr.gut, rel=1e-12)
            assert result.liver[i, j] == pytest.approx(pr.liver, rel=1e-12)
            assert result.kidney[i, j] == pytest.approx(pr.kidney, rel=1e-12)
    # the three organ columns multiply to the total for every pair
    product = result.gut * result.liver * result.kidney
    assert product == pytest.approx(result.total, rel=1e-12)
    cols = result.columns()
    assert cols["auc_ratio_gut"] * cols["auc_ratio_liver"] * cols["auc_ratio_kidney"] == pytest.approx(cols["auc_ratio"], rel=1e-12)


def test_a_route_column_error_names_the_column() -> None:
    victims = "name,dose (mg),interval (h),efflux BCRP,secretion OAT3\nV,10,24,1.5,0.5\n"
    with pytest.raises(InputError) as info:
        loads_victims(victims)
    text = str(info.value)
    assert "efflux BCRP" in text or "secretion OAT3" in text
