"""Results that travel: to_dict / to_json, short repr and notebook HTML, numeric batch columns, samples kept.

The scenarios here are invented test inputs (tests/conftest.py base_dict, the invented demo), not check values;
the checks are invariants: one implementation behind every JSON path, every sample equal to ``assess()`` of
that sample's scenario, every batch column equal to the text output it mirrors.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import json
import math

import numpy as np
import pandas as pd
import pytest
from conftest import base_dict
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import assess, demo_path, load_scenario
from interact.batch import COLUMN_KEYS, OUTPUT_COLUMNS, evaluate_pairs, loads_perpetrators, loads_victims, result_rows
from interact.errors import InputError
from interact.report.assessment import format_assessment, user_text
from interact.results import ASSESSMENT_SCHEMA
from interact.scenario import scenario_from_dict
from interact.uncertainty import run_uncertainty

PERPS = """# invented compounds
name,dose (mg),molar mass (g/mol),cmax (ng/mL),fu_p,ki CYP3A (uM),fu_inc CYP3A,ki_u CYP2C9 (uM)
Alpha,100,400,500,0.05,1.2,0.6,5
Beta,50,350,200,0.2,,,0.8
Gamma,200,500,1500,0.01,0.3,0.9,
"""
VICTIMS = """name,dose (mg),interval (h),fg,strengths (mg),fm CYP3A,fm CYP2C9
VicA,10,24,0.4,2.5;5;10,0.9,
VicB,5,12,0.8,5,0.5,0.3
"""


@pytest.fixture(scope="module")
def demo():  # type: ignore[no-untyped-def]
    return assess(load_scenario(demo_path()))


def test_to_dict_is_the_json_output(demo) -> None:  # type: ignore[no-untyped-def]
    """--format json is to_dict() with the rule set's words and its citations resolved into ``references``."""
    from interact.report.document import cite_data, speak_data

    data = demo.to_dict()
    assert data["schema"] == ASSESSMENT_SCHEMA
    shown = json.loads(format_assessment(demo, "json"))
    assert set(shown) == {*data, "references"}
    assert shown == json.loads(json.dumps(cite_data(speak_data(json.loads(demo.to_json()), demo.rules.terms, user_text(demo)))))
    assert shown["auc_ratio"] == data["auc_ratio"] and shown["concentrations_um"] == data["concentrations_um"]
    assert data["auc_ratio"]["total"] == demo.prediction.total
    assert data["dose"]["action"] == demo.dose.action
    assert data["cautions"] == list(demo.cautions)


def test_repr_is_short_and_says_the_answer(demo) -> None:  # type: ignore[no-untyped-def]
    text = repr(demo)
    assert len(text) < 300
    assert f"{demo.prediction.total:.2f}" in text and demo.dose.action in text


def test_html_summary_has_ratios_action_cautions_and_escapes_user_text() -> None:
    d = base_dict()
    d["title"] = "<script>alert(1)</script> & co"
    a = assess(scenario_from_dict(d))
    page = a._repr_html_()
    assert "<script>" not in page and "&lt;script&gt;" in page
    assert a.dose.headline.replace("'", "&#x27;") in page or a.dose.headline in page
    for caution in a.cautions:
        assert caution.replace("'", "&#x27;") in page
    assert f"{a.prediction.total:.2f}" in page


@pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")  # some draws warn (R1 vs mechanistic); not the point here
@settings(max_examples=25, deadline=None)
@given(cmax=st.floats(0.01, 50), fm=st.floats(0.05, 1.0))
def test_to_json_is_strict_json_for_any_scenario(cmax: float, fm: float) -> None:
    d = base_dict()
    d["perpetrator"]["cmax"] = f"{cmax!r} uM"
    d["victim"]["pathways"][0]["fm"] = fm
    a = assess(scenario_from_dict(d))
    back = json.loads(a.to_json(indent=None))
    assert back["auc_ratio"]["total"] == a.prediction.total
    assert back["auc_ratio"]["gut"] * back["auc_ratio"]["liver"] == pytest.approx(a.prediction.total, rel=1e-12)


# --------------------------------------------------------------------------- uncertainty samples


def test_uncertainty_keeps_every_sample_and_each_equals_assess(demo) -> None:  # type: ignore[no-untyped-def]
    vary = [("perpetrator.cmax", "cv:50%"), ("victim.pathways[0].fm", "uniform:0.6,0.95")]
    r = run_uncertainty(demo, vary, samples=400, seed=3)
    cols = r.sample_columns()
    assert set(cols) >= {"perpetrator.cmax", "victim.pathways[0].fm", "auc_ratio_gut", "auc_ratio_liver", "auc_ratio"}
    assert all(v.shape == (400,) for v in cols.values())
    np.testing.assert_allclose(cols["auc_ratio"], cols["auc_ratio_gut"] * cols["auc_ratio_liver"], rtol=1e-12)
    # percentiles are those of the kept samples
    assert r.percentile(50.0) == pytest.approx(float(np.percentile(cols["auc_ratio"], 50)), rel=1e-12)
    # a few samples re-assessed from scratch: the kept inputs reproduce the kept ratios
    s = demo.scenario
    cmax_unit = "uM"
    for k in (0, 123, 399):
        fm = float(cols["victim.pathways[0].fm"][k])
        pws = list(s.victim.pathways)
        pws[0] = dataclasses.replace(pws[0], fm=fm)
        pws[1:] = [dataclasses.replace(pw, fm=float(cols[f"victim.pathways[{i}].fm"][k])) for i, pw in enumerate(pws[1:], start=1)]
        from interact import units

        cmax = units.parse(f"{float(cols['perpetrator.cmax'][k])!r} {cmax_unit}", "concentration", field="t")
        changed = dataclasses.replace(
            s,
            perpetrator=dataclasses.replace(s.perpetrator, cmax=cmax),
            victim=dataclasses.replace(s.victim, pathways=tuple(pws)),
        )
        again = assess(changed, warn=False)  # the numbers are checked here, not the warnings
        assert again.prediction.total == pytest.approx(cols["auc_ratio"][k], rel=1e-9)
        assert again.prediction.gut == pytest.approx(cols["auc_ratio_gut"][k], rel=1e-9)
    frame = r.to_pandas()
    assert list(frame.columns) == list(cols) and len(frame) == 400
    rec = r.to_records()
    assert rec.dtype.names == tuple(cols) and float(rec["auc_ratio"][7]) == float(cols["auc_ratio"][7])
    assert len(repr(r)) < 300 and "5-95%" in repr(r)
    assert "Caution" in r._repr_html_()


# --------------------------------------------------------------------------- batch


def _batch():  # type: ignore[no-untyped-def]
    return evaluate_pairs(loads_perpetrators(PERPS), loads_victims(VICTIMS))


def test_batch_columns_are_numbers_equal_to_the_text_rows() -> None:
    res = _batch()
    cols = res.columns()
    assert cols["auc_ratio"].dtype == np.float64 and cols["imax_u_um"].dtype == np.float64
    assert cols["study_indicated"].dtype == np.bool_
    rows = list(result_rows(res))
    assert len(rows) == cols["rank"].size == res.pairs
    assert list(cols) == [*COLUMN_KEYS, "flag_bits"] and len(COLUMN_KEYS) == len(OUTPUT_COLUMNS)
    for k, row in enumerate(rows):  # every column, cell by cell, equals the text output
        for key, text in zip(COLUMN_KEYS, row, strict=True):
            value = cols[key][k]
            if isinstance(value, (float, np.floating)):
                assert (text == "" and not math.isfinite(value)) or float(text) == value, key
            elif isinstance(value, (bool, np.bool_)):
                assert text == ("yes" if value else "no"), key
            else:
                assert text == str(value), key
    for k, row in enumerate(rows):
        by = dict(zip(OUTPUT_COLUMNS, row, strict=True))
        assert by["perpetrator"] == cols["perpetrator"][k] and by["victim"] == cols["victim"][k]
        assert float(by["AUCR"]) == cols["auc_ratio"][k]
        assert float(by["Iin,max,u (uM)"]) == cols["iin_max_u_um"][k]
        assert by["action"] == cols["action"][k] and by["flags"] == cols["flags"][k]
        assert (by["study indicated (mechanistic model)"] == "yes") == bool(cols["study_indicated"][k])
    frame = res.to_pandas(top=3)
    assert len(frame) == 3 and frame["auc_ratio"].dtype == np.float64
    assert frame["auc_ratio"].map(lambda x: abs(math.log(x))).is_monotonic_decreasing  # worst first
    rec = res.to_records()
    assert rec["auc_ratio"].tolist() == cols["auc_ratio"].tolist()


def _records(text: str) -> list[dict[str, str]]:
    lines = [line for line in text.splitlines() if not line.startswith("#")]
    return [{k: v for k, v in row.items() if v != ""} for row in csv.DictReader(io.StringIO("\n".join(lines)))]


def test_batch_loaders_accept_records_and_data_frames() -> None:
    ref = _batch()
    from_records = evaluate_pairs(loads_perpetrators(_records(PERPS), source="records"), loads_victims(_records(VICTIMS)))
    frame_p = pd.read_csv(io.StringIO(PERPS), comment="#")
    frame_v = pd.read_csv(io.StringIO(VICTIMS))  # numbers become floats, empty cells NaN
    from_frames = evaluate_pairs(loads_perpetrators(frame_p, source="frame"), loads_victims(frame_v, source="frame"))
    for got in (from_records, from_frames):
        np.testing.assert_array_equal(got.total, ref.total)
        np.testing.assert_array_equal(got.action, ref.action)


def test_batch_records_errors_name_the_row_and_column() -> None:
    recs = _records(PERPS)
    recs[1]["fu_p"] = "2"
    with pytest.raises(InputError) as err:
        loads_perpetrators(recs, source="records")
    assert "line 2" in str(err.value) and "fu_p" in str(err.value)
    with pytest.raises(InputError, match="one mapping"):
        loads_perpetrators({"name": "x"}, source="records")
    with pytest.raises(InputError, match="row 1"):
        loads_perpetrators(["not a mapping"], source="records")
