"""IC50 curves (drc ryegrass) with Cheng-Prusoff, and the binding relations.

Outside reference: drc ``ryegrass`` (Inderjit et al. 2002), 4-parameter
log-logistic fit, IC50 3.058 (tests/data/fit_reference_values.csv; the scipy
refit there is "computed", a second line of evidence).  The binding
coefficients are from memory (reference_tables/binding.toml); their tests
check the relations' algebra and the table's provenance, not outside values.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from interact.errors import InputError
from interact.kinetics import conversion
from interact.kinetics.binding import predict_fu_inc, rescale_fu_inc, unbound_constant, unbound_ki
from interact.kinetics.ic50 import fit_ic50, ki_from_ic50_fit
from interact.tables import STATUSES, load_binding

from .conftest import columns, read_table


def _ryegrass_ref() -> dict[str, float]:
    row = next(r for r in read_table("fit_reference_values.csv") if r["dataset"].startswith("drc ryegrass"))
    names = row["parameter"].split("|")
    return {
        **{n: float(v) for n, v in zip(names, row["estimate"].split("|"), strict=True)},
        **{f"se_{n}": float(v) for n, v in zip(names, row["std_error"].split("|"), strict=True)},
        "rss": float(row["rss"]),
    }


def test_ryegrass_four_parameter_ic50() -> None:
    # drc ryegrass, LL.4: IC50 (e) 3.058, hill (b) 2.98, bottom (c) 0.481, top (d) 7.79 (computed row)
    conc, root = columns("drc_ryegrass.csv", "conc", "rootl")
    ref = _ryegrass_ref()
    fit = fit_ic50(conc, root).fit
    assert fit.success
    assert fit.value("IC50") == pytest.approx(3.058, abs=5e-4)
    for ours, theirs in (("IC50", "e"), ("hill", "b"), ("bottom", "c"), ("top", "d")):
        assert fit.value(ours) == pytest.approx(ref[theirs], rel=1e-5)
        assert fit.estimate(ours).std_error == pytest.approx(ref[f"se_{theirs}"], rel=1e-3)
    assert fit.rss == pytest.approx(ref["rss"], rel=1e-6)
    e = fit.estimate("IC50")
    assert e.profile_low < e.value < e.profile_high  # the profile interval brackets the estimate


def test_three_parameter_fit_fixes_the_bottom_and_cheng_prusoff_maps_the_interval() -> None:
    conc, root = columns("drc_ryegrass.csv", "conc", "rootl")
    result = fit_ic50(conc, root, bottom=0.0)
    assert result.fit.names == ("hill", "top", "IC50")
    ki = ki_from_ic50_fit(result, "competitive", substrate_um=5.0, km_um=5.0)
    # Cheng & Prusoff 1973, competitive: Ki = IC50 / (1 + S/Km) -> IC50/2 at S = Km (seen S12)
    assert ki.ki_um == pytest.approx(result.ic50_um / 2.0, rel=1e-12)
    low, high = result.interval_um
    assert ki.low_um == pytest.approx(low / 2.0) and ki.high_um == pytest.approx(high / 2.0)
    assert ki_from_ic50_fit(result, "noncompetitive").ki_um == pytest.approx(result.ic50_um)
    with pytest.raises(InputError, match="km"):
        ki_from_ic50_fit(result, "competitive", substrate_um=5.0)


def test_ic50_bad_input_is_named() -> None:
    with pytest.raises(InputError, match="inhibitor"):
        fit_ic50([0, 1, 2], [1, 0.5, 0.2])
    with pytest.raises(InputError, match="row 2"):
        fit_ic50([0, -1, 2, 3], [1, 0.5, 0.2, 0.1])


def test_binding_table_rows_name_source_and_status() -> None:
    eqs = {e.id: e for e in load_binding()}
    assert set(eqs) == {"austin-2002", "hallifax-2006", "kilford-2008"}
    # Austin et al. 2002: coefficients from memory; Hallifax & Houston 2006 and Kilford et al. 2008: coefficients
    # seen in the httk package documentation (calc_hep_fu), a secondary source
    assert eqs["austin-2002"].status == "from memory"
    assert eqs["hallifax-2006"].status == eqs["kilford-2008"].status == "seen in a secondary source"
    for eq in eqs.values():
        assert eq.source
        for item in eq.values:
            assert item.source and item.status in STATUSES
    # Kilford et al. 2008 (abstract): accurate up to logP/D 2.5 (corrected from 3.0)
    assert eqs["kilford-2008"].number("accurate_below_lipophilicity") == 2.5
    assert "rat" in eqs["austin-2002"].title
    # coefficients: Austin as recalled in the project's reference notes, section 4 (from memory); Hallifax-Houston as
    # printed in the httk documentation
    assert (eqs["austin-2002"].number("a"), eqs["austin-2002"].number("b")) == (0.56, -1.41)
    assert (eqs["hallifax-2006"].number("a2"), eqs["hallifax-2006"].number("a1"), eqs["hallifax-2006"].number("b")) == (
        0.072,
        0.067,
        -1.126,
    )


@pytest.mark.parametrize("logp", [-0.5, 1.0, 2.5, 4.0])
def test_microsomal_predictions_follow_the_stated_equations(logp: float) -> None:
    a = predict_fu_inc(logp, method="austin-2002", protein_mg_per_ml=1.0)
    h = predict_fu_inc(logp, method="hallifax-2006", protein_mg_per_ml=1.0)
    assert a.fu_inc == pytest.approx(1.0 / (1.0 + 10 ** (0.56 * logp - 1.41)))
    assert h.fu_inc == pytest.approx(1.0 / (1.0 + 10 ** (0.072 * logp**2 + 0.067 * logp - 1.126)))
    assert a.from_memory and h.status == "seen in a secondary source"
    # linear binding: the prediction at 0.25 mg/mL equals rescaling the 1 mg/mL prediction
    low = predict_fu_inc(logp, method="hallifax-2006", protein_mg_per_ml=0.25)
    assert rescale_fu_inc(h.fu_inc, 1.0, 0.25) == pytest.approx(low.fu_inc, rel=1e-12)


def test_hepatocyte_relation_links_to_microsomal_binding_at_1_mg_per_ml() -> None:
    # S17 (seen as a relation): fu,hep = 1 / (1 + 125 VR (1 - fu,mic)/fu,mic), fu,mic at 1 mg/mL, VR 0.005 at 10^6 cells/mL
    for logp in (0.0, 2.0, 3.5):
        mic = predict_fu_inc(logp, method="hallifax-2006", protein_mg_per_ml=1.0).fu_inc
        hep = predict_fu_inc(logp, method="kilford-2008", cells_million_per_ml=1.0)
        assert hep.fu_inc == pytest.approx(1.0 / (1.0 + 125 * 0.005 * (1 - mic) / mic))
    assert any("less accurate" in w for w in predict_fu_inc(3.5, method="kilford-2008", cells_million_per_ml=1.0).warnings)


def test_binding_warns_outside_the_domain_and_rejects_bad_input() -> None:
    assert predict_fu_inc(7.0, protein_mg_per_ml=1.0).warnings
    assert not predict_fu_inc(2.0, protein_mg_per_ml=1.0).warnings
    with pytest.raises(InputError, match="protein"):
        predict_fu_inc(2.0)
    with pytest.raises(InputError, match="binding method"):
        predict_fu_inc(2.0, method="unknown", protein_mg_per_ml=1.0)
    with pytest.raises(InputError, match="fu_inc"):
        rescale_fu_inc(1.5, 1.0, 0.5)


def test_unbound_constant_scales_the_interval_and_keeps_unbounded() -> None:
    u = unbound_constant("Ki", 10.0, 8.0, math.inf, 0.5, interval="95% profile", fu_origin="measured")
    assert (u.ki_u_um, u.low_u_um, u.high_u_um) == (5.0, 4.0, math.inf)
    assert unbound_ki(10.0, 0.5) == float(conversion.unbound(10.0, 0.5))
    assert np.isclose(unbound_ki(3.0, 1.0), 3.0)
