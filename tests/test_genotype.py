"""Drug-drug-gene interactions: phenotype activities on the object drug's pathways.

Checks (no invented values as check values):
- limits of the algebra (common practice): a normal metaboliser reproduces the population result exactly; a poor
  metaboliser of the only inhibited pathway shows no interaction through it; a poor metaboliser's exposure without the
  precipitant is 1 / (1 - fm) (the fm relation of the Rowland-Matin form);
- the liver term with the shifted fractions fm' = fm a / D, computed here independently, equals the ratio the module
  reports;
- property tests: monotone in activity, bounded by the complete-inhibition ceiling, every offered regimen inside the
  boundary;
- the activity table: CYP2D6 poor metaboliser activity score 0 (CPIC 2016 guideline, Table 1, Hicks et al. 2017,
  Clin Pharmacol Ther 102:37), every row sourced, normal = 1.
No published drug-drug-gene table with full static-model inputs was found to check against (noted in the issue).
"""

from __future__ import annotations

import json
import math

import pytest
from conftest import base_dict
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import assess
from interact.errors import ScenarioError
from interact.report.assessment import assessment_to_dict, format_assessment
from interact.scenario import scenario_from_dict
from interact.tables import STATUSES, load_phenotypes


def _data(phenotypes, fm2d6=0.7, fm3a=0.2, ki="0.05 uM"):  # type: ignore[no-untyped-def]
    d = base_dict()
    d["perpetrator"]["inhibits"] = [{"target": "CYP2D6", "ki": ki}]
    d["victim"]["pathways"] = [{"enzyme": "CYP2D6", "fm": fm2d6}, {"enzyme": "CYP3A", "fm": fm3a}]
    d["victim"]["phenotypes"] = phenotypes
    return d


def test_normal_metaboliser_reproduces_the_population_result_exactly() -> None:
    a = assess(scenario_from_dict(_data([{"enzyme": "CYP2D6", "phenotype": "all"}])))
    normal = next(c for c in a.phenotypes if c.reference)
    assert normal.label == "CYP2D6 normal"
    assert normal.combined_ratio == a.prediction.total and normal.interaction_ratio == a.prediction.total
    assert normal.genotype_ratio == 1.0 and normal.ceiling == a.prediction.ceiling_total
    assert normal.dose.action == a.dose.action and normal.dose.chosen == a.dose.chosen


def test_poor_metaboliser_of_the_inhibited_pathway_shows_no_interaction_through_it() -> None:
    a = assess(scenario_from_dict(_data([{"enzyme": "CYP2D6", "phenotype": "poor"}])))
    poor = next(c for c in a.phenotypes if not c.reference)
    assert poor.interaction_ratio == pytest.approx(1.0, abs=1e-15)  # only CYP2D6 is inhibited; the gut term is 1
    assert poor.genotype_ratio == pytest.approx(1 / (1 - 0.7))  # common practice: AUC_PM / AUC_NM = 1 / (1 - fm)
    assert poor.combined_ratio == pytest.approx(poor.genotype_ratio)
    # the whole clearance moves onto the other pathways: CYP3A 0.2 of 0.3 left
    assert dict(poor.fm) == pytest.approx({"CYP2D6": 0.0, "CYP3A": 0.2 / 0.3})
    # a normal-metaboliser reference row is added for comparison
    assert [c.reference for c in a.phenotypes] == [True, False]


@settings(max_examples=200, deadline=None)
@given(
    fm=st.lists(st.floats(0.0, 0.33), min_size=1, max_size=3),  # a valid victim: fm values add up to at most 1
    remaining=st.lists(st.floats(0.01, 1.0), min_size=3, max_size=3),
    a=st.floats(0.0, 3.0),
)
def test_shifted_fractions_give_the_reported_ratios(fm, remaining, a) -> None:  # type: ignore[no-untyped-def]
    from interact.genotype import phenotype_cases
    from interact.prediction import EnzymeEffect, Prediction, SiteTerms
    from interact.scenario import PhenotypeChoice

    enzymes = ["CYP2D6", "CYP3A", "CYP2C9"][: len(fm)]
    effects = tuple(
        EnzymeEffect(
            enzyme=e,
            fm=f,
            liver=SiteTerms(concentration_um=(), reversible=A, inactivation=1.0, induction=1.0, kdeg_per_h=None),
            gut=None,
        )
        for e, f, A in zip(enzymes, fm, remaining, strict=False)
    )
    pred = Prediction(
        gut=1.0, liver=1.0, total=1.0, ceiling_gut=1.0, ceiling_liver=1.0, ceiling_total=1.0, band=None, effects=effects,
        parts=(), mechanisms=("reversible",), fg_used=1.0, gut_enzyme=None, inhibited_fm=0.0,
    )  # fmt: skip
    a_pop = assess(scenario_from_dict(base_dict()))
    case = phenotype_cases((PhenotypeChoice(enzyme="CYP2D6", phenotype="given", activity=a),), pred, a_pop.regimens)[-1]
    acts = [a] + [1.0] * (len(fm) - 1)
    d = sum(f * x for f, x in zip(fm, acts, strict=True)) + 1 - sum(fm)
    shifted = [f * x / d for f, x in zip(fm, acts, strict=True)]
    inter = 1 / (sum(s * A for s, A in zip(shifted, remaining, strict=False)) + 1 - sum(shifted))
    assert case.genotype_ratio == pytest.approx(1 / d, rel=1e-12)
    assert case.interaction_ratio == pytest.approx(inter, rel=1e-12)
    assert case.combined_ratio == pytest.approx(inter / d, rel=1e-12)
    assert [f for _, f in case.fm] == pytest.approx(shifted, rel=1e-12, abs=1e-15)
    assert case.interaction_ratio <= case.ceiling * (1 + 1e-12)
    lo, hi = case.dose.boundary
    assert all(lo <= o.exposure_ratio <= hi for o in case.dose.options)


@settings(max_examples=60, deadline=None)
@given(fm=st.floats(0.05, 0.95), ki=st.sampled_from(["0.01 uM", "0.3 uM", "5 uM"]), lo=st.floats(0.0, 2.0), step=st.floats(0.01, 1.0))
def test_monotone_in_activity(fm, ki, lo, step) -> None:  # type: ignore[no-untyped-def]
    # more activity on the inhibited pathway: lower exposure overall, a larger interaction within the phenotype
    low = assess(scenario_from_dict(_data([{"enzyme": "CYP2D6", "activity": lo}], fm2d6=fm, fm3a=0.0, ki=ki))).phenotypes[-1]
    high = assess(scenario_from_dict(_data([{"enzyme": "CYP2D6", "activity": lo + step}], fm2d6=fm, fm3a=0.0, ki=ki))).phenotypes[-1]
    assert high.combined_ratio <= low.combined_ratio * (1 + 1e-12)
    assert high.genotype_ratio <= low.genotype_ratio * (1 + 1e-12)
    assert high.interaction_ratio >= low.interaction_ratio * (1 - 1e-12)


def test_all_phenotypes_of_two_enzymes_are_combined() -> None:
    d = _data([{"enzyme": "CYP2D6", "phenotype": "all"}, {"enzyme": "CYP2C19", "phenotype": "poor"}])
    d["victim"]["pathways"].append({"enzyme": "CYP2C19", "fm": 0.05})
    a = assess(scenario_from_dict(d))
    assert len(a.phenotypes) == len(load_phenotypes()["CYP2D6"]) + 1  # the reference row is added
    assert a.phenotypes[0].label == "CYP2D6 normal, CYP2C19 normal"
    assert all(len(c.activities) == 2 for c in a.phenotypes)


def test_outputs_carry_the_table_sources_and_cautions() -> None:
    a = assess(scenario_from_dict(_data([{"enzyme": "CYP2D6", "phenotype": "all"}])))
    text = format_assessment(a)
    assert "Object drug genotype" in text  # headings keep their case
    assert "Genotype-guided dosing needs expert review" in text and "not a prescription" in text
    assert any("Phenotype activity CYP2D6 intermediate" in m for m in a.memory_values)
    data = json.loads(json.dumps(assessment_to_dict(a)))
    rows = data["phenotypes"]
    assert [r["label"] for r in rows] == [c.label for c in a.phenotypes]
    assert rows[0]["exposure_vs_normal_alone"] == pytest.approx(a.phenotypes[0].genotype_ratio)


def test_bad_phenotype_entries_name_the_field() -> None:
    d = _data(
        [
            {"enzyme": "CYP3A", "phenotype": "poor"},  # no phenotype table
            {"enzyme": "CYP2C9", "phenotype": "poor"},  # not a pathway of the victim
            {"enzyme": "CYP2D6", "phenotype": "slow"},  # not a phenotype
        ]
    )
    with pytest.raises(ScenarioError) as err:
        scenario_from_dict(d)
    fields = {p.field for p in err.value.problems}
    assert {"victim.phenotypes[0].enzyme", "victim.phenotypes[1].enzyme", "victim.phenotypes[2].phenotype"} <= fields
    d = _data([{"enzyme": "CYP2D6", "phenotype": "poor", "activity": 0.2}])
    with pytest.raises(ScenarioError) as err:
        scenario_from_dict(d)
    assert err.value.problems[0].field == "victim.phenotypes[0].activity"


def test_phenotype_table_rows_are_sourced() -> None:
    table = load_phenotypes()
    assert {"CYP2D6", "CYP2C9", "CYP2C19"} <= set(table)
    for enzyme, rows in table.items():
        names = [r.name for r in rows]
        assert "normal" in names and "poor" in names, enzyme
        assert next(r for r in rows if r.name == "normal").activity.value == 1.0
        for r in rows:
            assert r.activity.status in STATUSES and r.activity.source.strip()
            assert 0.0 <= r.activity.value <= 10.0 and math.isfinite(r.activity.value)
        values = [r.activity.value for r in rows]
        assert values == sorted(values), enzyme  # poor to ultrarapid, in order of activity
    # CPIC 2016 Table 1 (Hicks et al. 2017): CYP2D6 poor metaboliser activity score 0
    assert next(r for r in table["CYP2D6"] if r.name == "poor").activity.value == 0.0


def test_batch_phenotype_column_equals_the_single_assessment() -> None:
    from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims, pair_scenario, ranking, result_rows
    from interact.dosing import ACTIONS

    perps = loads_perpetrators(
        "name,dose (mg),molar mass (g/mol),cmax (uM),fu_p,ki CYP2D6 (uM),ki CYP3A (uM)\nP1,100,400,1,0.1,0.05,\nP2,100,400,2,0.2,,3\n"
    )
    victims = loads_victims(
        "name,dose (mg),interval (h),strengths (mg),half_life (h),fm CYP2D6,fm CYP3A,phenotype CYP2D6\n"
        "Y normal,10,24,2.5;5;10,20,0.7,0.2,\nY poor,10,24,2.5;5;10,20,0.7,0.2,poor\n"
        "Y IM,10,24,2.5;5;10,20,0.7,0.2,intermediate\nY a=0.4,10,24,2.5;5;10,,0.7,0.2,0.4\n"
    )
    res = evaluate_pairs(perps, victims)
    for i in range(2):
        for j, v in enumerate(victims.rows):
            a = assess(pair_scenario(perps, victims, i, j))
            if not v.phenotypes:
                assert res.total[i, j] == a.prediction.total and res.exposure[i, j] == a.prediction.total
                assert ACTIONS[res.action[i, j]] == a.dose.action
                continue
            case = next(c for c in a.phenotypes if not c.reference)
            assert res.total[i, j] == pytest.approx(case.interaction_ratio, rel=1e-12)
            assert res.exposure[i, j] == pytest.approx(case.combined_ratio, rel=1e-12)
            assert ACTIONS[res.action[i, j]] == case.dose.action
    # a poor metaboliser ranks by its combined exposure even where the interaction is absent
    rows = list(result_rows(res))
    assert len(rows) == 8 and rows[0][2] in {"Y poor", "Y IM", "Y normal", "Y a=0.4"}
    assert ranking(res).size == 8
    with pytest.raises(Exception, match="one phenotype"):
        loads_victims("name,dose (mg),interval (h),fm CYP2D6,phenotype CYP2D6\nY,10,24,0.7,all\n")
