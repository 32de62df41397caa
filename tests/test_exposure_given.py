"""Site concentrations for reproducing published tables: computed from the printed inputs where the table gives
none of its own adjustments, given directly (and marked "given") where it does, and the active-moiety molar mass.

Outside reference: Elsby et al., Drug Metab Dispos 2016, Table 3 (seen; ``tests/data/elsby2016_rosuvastatin.csv``):
Igut,max = Fa ka Dose / Qent with Fa 1, ka 0.1 1/min, Qent 300 mL/min, and Iinlet,max,u = fu (Cmax + Fa ka Dose / Qh)
with Qh 1500 mL/min.  The clopidogrel rows carry no footnote, so they recompute from dose, molar mass, Cmax and fu.
"""

from __future__ import annotations

import pytest
from conftest import base_dict, read_checks

from interact import assess
from interact.scenario import scenario_from_dict

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

ROWS = {f"{r['precipitant']}-{r['dose_mg']}": r for r in read_checks("elsby2016_rosuvastatin.csv")}


def _scenario(row: dict[str, str], **extra: object):  # type: ignore[no-untyped-def]
    data = base_dict()
    data["perpetrator"].update(
        name=row["precipitant"],
        dose=f"{row['dose_mg']} mg",
        molar_mass=f"{row['molar_mass_g_per_mol']} g/mol",
        cmax=f"{row['cmax_um']} uM",
        fu_plasma=float(row["fu"]),
        ka="0.1 1/min",
        fa=1.0,
        fa_fg=1.0,
        **extra,
    )
    data["perpetrator"]["inhibits"] = [{"target": "BCRP", "ic50": f"{row['bcrp_ki_um']} uM"}]
    data["physiology"] = {"hepatic_blood_flow": "1500 mL/min", "enterocytic_blood_flow": "300 mL/min", "fu_gut": 1.0}
    return scenario_from_dict(data)


def _parent(row: dict[str, str], **extra: object):  # type: ignore[no-untyped-def]
    a = assess(_scenario(row, **extra), rules="fda-2020")
    return a, a.species[0]


@pytest.mark.parametrize("key", ["clopidogrel-75", "clopidogrel-300"])
def test_enterocyte_and_inlet_concentrations_recompute_as_printed(key: str) -> None:
    """Printed to two or three significant figures (78, 311 uM; 0.311, 1.245 uM): compare at that precision."""
    row = ROWS[key]
    _, parent = _parent(row)
    assert parent.enterocyte_um == pytest.approx(float(row["igut_max_um"]), rel=0.01)
    assert parent.unbound_inlet_um == pytest.approx(float(row["iinlet_max_u_um"]), rel=0.002)


def test_given_site_concentrations_replace_the_computed_ones_and_say_so() -> None:
    row = ROWS["eltrombopag-75"]  # Table 3 adjusts its Igut,max (footnote a, not shown): the printed value is given
    sites = {"ient": f"{row['igut_max_um']} uM", "iin_max_u": f"{row['iinlet_max_u_um']} uM", "igut": "678 uM"}
    a, parent = _parent(row, site_concentrations=sites)
    assert (parent.enterocyte_um, parent.unbound_inlet_um, parent.gut_lumen_um) == (29.0, 0.236, 678.0)
    given = {s.name: s for s in a.settings if s.origin == "given" and s.name.startswith("given_")}
    assert set(given) == {"given_ient", "given_iin_max_u", "given_igut"}
    assert "replaces the computed" in given["given_ient"].note
    _, computed = _parent(row)
    assert computed.enterocyte_um != pytest.approx(29.0, rel=0.05)  # the footnote's adjustment is not reproduced


def test_active_molar_mass_converts_the_absorbed_dose_only() -> None:
    """The enterocyte and portal terms scale with 1 / molar mass of the absorbed species; Igut (dose / 250 mL) does not."""
    row = ROWS["clopidogrel-75"]
    _, base = _parent(row)
    mw = float(row["molar_mass_g_per_mol"])
    _, active = _parent(row, active_molar_mass=f"{2 * mw} g/mol")
    assert active.enterocyte_um == pytest.approx(base.enterocyte_um / 2, rel=1e-12)
    portal = base.unbound_inlet_um - base.unbound_cmax_um
    assert active.unbound_inlet_um - active.unbound_cmax_um == pytest.approx(portal / 2, rel=1e-9)
    assert active.gut_lumen_um == base.gut_lumen_um


def test_multiplier_override_changes_the_screen_and_is_shown() -> None:
    data = base_dict()
    data["perpetrator"]["inhibits"] = [{"target": "CYP3A", "kinact": "2 1/h", "ki_inact": "5 uM"}]
    base = assess(scenario_from_dict(data), rules="fda-2020")
    tdi = next(r for r in base.screen if r.criterion.startswith("tdi") and r.target == "CYP3A" and "gut" not in r.criterion)
    data["multipliers"] = {tdi.criterion: 1.0}
    over = assess(scenario_from_dict(data), rules="fda-2020")
    r = next(x for x in over.screen if x.criterion == tdi.criterion and x.target == "CYP3A")
    assert tdi.multiplier == 50.0 and r.multiplier == 1.0  # FDA 2020: 50 x Imax,u (reference notes, seen in Lee 2024)
    assert r.value < tdi.value
    assert r.multiplier_source is not None and "override" in r.multiplier_source.source
    assert any("overridden by the scenario: x 1 (fda-2020 uses x 50)" in w for w in over.warnings)
    data["multipliers"] = {"no-such-criterion": 2.0}
    with pytest.raises(ValueError, match=r"multipliers\.no-such-criterion"):
        assess(scenario_from_dict(data), rules="fda-2020")
