"""The one interaction model (interact.model) against independent arithmetic.

- Plain-float restatement of the net-effect mechanistic static model (Fahmi et al., Drug Metab Dispos
  2008;36:1698; structure seen in Guengerich 2022, Fig. 17; terms from memory, as in interact.model),
  written here term by term, in the order the model documents (constants in order, pathways in
  order, (1 - sum fm) added after the weighted sum): equal to the last bit.
- On arrays (a sample axis, a perpetrator x victim grid) each element equals the float evaluation.
- A mechanism switched off equals the same constants without that mechanism.
- Published check: with one pathway of fm = 1 and reversible inhibition only, the liver ratio is the
  basic model's R = 1 + [I]/Ki,u; CPT 2015 Table 2 (tests/data/cpt2015_table2_cyp_r_values.csv,
  source in the file) gives R for named inhibitors.
Input values drawn by hypothesis are arbitrary test inputs, not check values.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from conftest import read_checks
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import model
from interact.model import Acting, Pathway

positive = st.floats(1e-3, 1e3)
fraction = st.floats(0.0, 1.0)


@st.composite
def cases(draw: st.DrawFn) -> dict:
    n_species = draw(st.integers(1, 2))
    n_targets = draw(st.integers(1, 3))
    acting = []
    for _ in range(draw(st.integers(0, 4))):
        tdi = draw(st.booleans())
        ind = draw(st.booleans())
        acting.append(
            {
                "target": draw(st.integers(0, n_targets - 1)),
                "species": draw(st.integers(0, n_species - 1)),
                "ki_u": draw(st.none() | positive),
                "kinact": draw(positive) if tdi else None,
                "ki_inact_u": draw(positive) if tdi else None,
                "emax": draw(st.floats(0.0, 20.0)) if ind else None,
                "ec50_u": draw(positive) if ind else None,
                "calibration": draw(st.floats(0.1, 1.0)) if ind else 1.0,
            }
        )
    targets = draw(st.permutations(range(n_targets)))
    fms = [draw(fraction) for _ in range(draw(st.integers(0, n_targets)))]
    total = sum(fms)
    fms = [f / total for f in fms] if total > 1.0 else fms
    pathways = [(targets[k], fm) for k, fm in enumerate(fms)]
    gut = (draw(st.integers(0, n_targets - 1)), draw(fraction)) if draw(st.booleans()) else None
    conc = {site: [draw(st.floats(0.0, 100.0)) for _ in range(n_species)] for site in ("liver", "gut")}
    kdeg = {(t, s): draw(st.none() | st.floats(1e-3, 1.0)) for t in range(n_targets) for s in ("liver", "gut")}
    return {"acting": acting, "pathways": pathways, "gut": gut, "conc": conc, "kdeg": kdeg}


def _by_hand(case: dict, include: tuple[str, ...] = model.MECHANISMS) -> tuple[float, float, float]:
    """The net-effect model in plain floats, written out here (not calling interact)."""

    def activity(target: int, site: str) -> float:
        ratio = kobs = effect = 0.0
        any_tdi = any_ind = False
        for c in case["acting"]:
            if c["target"] != target:
                continue
            conc = case["conc"][site][c["species"]]
            if "reversible" in include and c["ki_u"] is not None:
                ratio += conc / c["ki_u"]
            if "time-dependent" in include and c["kinact"] is not None:
                kobs += c["kinact"] * conc / (c["ki_inact_u"] + conc)
                any_tdi = True
            if "induction" in include and c["emax"] is not None:
                effect += c["calibration"] * c["emax"] * conc / (c["ec50_u"] + conc)
                any_ind = True
        kdeg = case["kdeg"][target, site]
        inact = kdeg / (kdeg + kobs) if any_tdi and kdeg is not None else 1.0
        return 1.0 / (1.0 + ratio) * inact * ((1.0 + effect) if any_ind else 1.0)

    weighted = fm_sum = 0.0
    for target, fm in case["pathways"]:
        weighted += fm * activity(target, "liver")
        fm_sum += fm
    liver = 1.0 / (weighted + (1.0 - fm_sum))
    gut = 1.0
    if case["gut"] is not None:
        target, fg = case["gut"]
        gut = 1.0 / (activity(target, "gut") * (1.0 - fg) + fg)
    return gut, liver, gut * liver


def _model_inputs(case: dict, wrap=lambda x: x) -> tuple[list[Acting], list[Pathway], dict, dict]:  # type: ignore[no-untyped-def]
    structure = ("target", "species")
    acting = [Acting(**{k: (wrap(v) if v is not None and k not in structure else v) for k, v in c.items()}) for c in case["acting"]]
    pathways = [Pathway(target=t, organ="liver", fraction=wrap(fm)) for t, fm in case["pathways"]]
    if case["gut"] is not None:
        pathways.append(Pathway(target=case["gut"][0], organ="gut", fraction=wrap(case["gut"][1])))
    conc = {site: [wrap(x) for x in values] for site, values in case["conc"].items()}
    kdeg = {k: (None if v is None else wrap(v)) for k, v in case["kdeg"].items()}
    return acting, pathways, conc, kdeg


@settings(max_examples=200, deadline=None)
@given(case=cases())
def test_floats_equal_the_equations_written_out_to_the_last_bit(case: dict) -> None:
    gut, liver, total = _by_hand(case)
    r = model.evaluate(*_model_inputs(case))
    assert (r.gut, r.liver, r.total) == (gut, liver, total)


@settings(max_examples=100, deadline=None)
@given(case=cases(), include=st.sets(st.sampled_from(model.MECHANISMS)))
def test_switching_a_mechanism_off_equals_the_equations_without_it(case: dict, include: set[str]) -> None:
    chosen = tuple(m for m in model.MECHANISMS if m in include)
    r = model.evaluate(*_model_inputs(case), include=chosen)
    assert (r.gut, r.liver, r.total) == _by_hand(case, chosen)


@settings(max_examples=60, deadline=None)
@given(case=cases(), n=st.integers(1, 5))
def test_arrays_evaluate_every_element_as_floats(case: dict, n: int) -> None:
    # the same case repeated along a sample axis, each copy with its concentrations scaled by 1, 2, ... n
    scales = np.arange(1.0, n + 1.0)
    r = model.evaluate(*_model_inputs(case, lambda x: np.full(n, x)), scale=scales)
    for k in range(n):
        one = model.evaluate(*_model_inputs(case), scale=float(scales[k]))
        assert np.broadcast_to(r.total, (n,))[k] == one.total
        assert np.broadcast_to(r.gut, (n,))[k] == one.gut


def test_a_perpetrator_by_victim_grid_equals_each_pair() -> None:
    # perpetrators along axis 0 (Ki,u on target 0; inf: not given), victims along axis 1 (fm, Fg)
    ki = np.array([0.5, 2.0, np.inf])[:, None]
    conc = np.array([1.0, 0.3, 4.0])[:, None]
    fm = np.array([0.9, 0.5, 1.0, 0.0])[None, :]
    fg = np.array([0.3, 1.0, 0.6, 0.5])[None, :]
    r = model.evaluate(
        [Acting(target=0, species=0, ki_u=ki)],
        [Pathway(target=0, organ="gut", fraction=fg), Pathway(target=0, organ="liver", fraction=fm)],
        {"liver": (conc,), "gut": (conc,)},
        {},
    )
    assert r.total.shape == (3, 4)
    for i in range(3):
        for j in range(4):
            act = 1.0 / (1.0 + float(conc[i, 0]) / float(ki[i, 0]))
            f, g = float(fm[0, j]), float(fg[0, j])
            expected = 1.0 / (act * (1.0 - g) + g) * (1.0 / (f * act + (1.0 - f)))
            assert r.total[i, j] == expected


def test_no_inhibitor_and_complete_inhibition_limits() -> None:
    # common practice: without the perpetrator every ratio is 1; with fm = 1 and Fg the ratio tends to 1/Fg x (1 + [I]/Ki,u)
    pathways = [Pathway(target=0, organ="liver", fraction=1.0), Pathway(target=0, organ="gut", fraction=0.4)]
    none = model.evaluate([Acting(target=0, species=0, ki_u=1.0)], pathways, {"liver": (0.0,), "gut": (0.0,)}, {})
    assert (none.gut, none.liver, none.total) == (1.0, 1.0, 1.0)
    strong = model.evaluate([Acting(target=0, species=0, ki_u=1e-6)], pathways, {"liver": (1.0,), "gut": (1.0,)}, {})
    assert strong.gut == pytest.approx(1 / 0.4, rel=1e-5)
    assert strong.liver == pytest.approx(1e6 + 1.0, rel=1e-12)


@pytest.mark.parametrize(
    "row",
    [r for r in read_checks("cpt2015_table2_cyp_r_values.csv") if r["row_usable_as_oracle"] == "yes"],
    ids=lambda r: r["inhibitor"],
)
def test_fm_one_reversible_liver_ratio_is_the_published_r(row: dict[str, str]) -> None:
    # CPT 2015 Table 2: R = 1 + [I]/Ki,u with Ki,u = Ki x fu,inc, printed to two decimals
    ki_u = float(row["Ki_uM"]) * float(row["fu_inc"])
    conc = float(row["I_uM_published"])
    r = model.evaluate([Acting(target=0, species=0, ki_u=ki_u)], [Pathway(target=0, organ="liver", fraction=1.0)], {"liver": (conc,)}, {})
    assert math.isclose(float(r.liver), float(row["R_published"]), abs_tol=0.005 + 1e-12)
    assert float(r.total) == pytest.approx(1.0 + conc / ki_u, rel=1e-12)


def test_an_unknown_organ_form_is_refused() -> None:
    with pytest.raises(ValueError, match="organ form"):
        model.organ_ratio("kidney-ish", [Pathway(target=0, organ="x", fraction=0.5)], [1.0])


@settings(max_examples=100, deadline=None)
@given(case=cases(), scales=st.lists(st.floats(0.0, 1e3), min_size=1, max_size=6))
def test_a_bound_model_scans_scales_as_the_equations_do(case: dict, scales: list[float]) -> None:
    # the perpetrator-dose scan binds the inputs once and evaluates many scales: each equals the equations written out
    # with every concentration times the scale, and Model.evaluate at that scale, to the last bit
    acting, pathways, conc, kdeg = _model_inputs(case)
    structure = model.Model(acting, pathways)
    bound = structure.bind(conc, kdeg)
    for s in scales:
        scaled = {**case, "conc": {site: [s * x for x in values] for site, values in case["conc"].items()}}
        assert bound.total(s) == structure.evaluate(conc, kdeg, scale=s).total == _by_hand(scaled)[2]
    assert bound.evaluate().total == bound.total() == _by_hand(case)[2]
