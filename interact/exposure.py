"""Inhibitor concentrations at each site, and the settings they rest on.

Equations (concentrations in uM, doses in umol, flows in L/min, ka in 1/min):

- Imax,u = fu,p x Cmax, with fu,p floored at the rule set's value        (DMD 2019;47:779)
- Igut = Dose / V_gut, V_gut = 250 mL                                  (DMD 2019;47:779)
- Iin,max,u = fu,p x (Cmax + Fa*Fg x ka x Dose / (Qh x Rb))            (DMD 2019;47:779; JPET verinurad; CPT 2015;98:321)
- I_ent = fu,gut x Fa x ka x Dose / Qent (enterocyte, mechanistic model) (from memory)

Metabolites have no portal or gut-lumen term: their systemic unbound Cmax is
used at every site (JPET verinurad study, Table 7).  For an intravenous perpetrator the
gut-lumen and portal terms vanish and the enterocyte sees Imax,u.

Two inputs serve the reproduction of published tables: ``perpetrator.active_molar_mass`` converts a
mass dose into the amount that reaches the enterocyte and the liver (the enterocyte and portal terms)
when that species differs from the dosed compound; ``[perpetrator.site_concentrations]`` gives Igut,
I,ent or Iin,max,u directly, used instead of the computed value and listed as "given".
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any, Final

import numpy as np
from numpy.typing import ArrayLike, NDArray

from . import units
from .scenario import Perpetrator, Scenario
from .tables import RuleSet, Sourced, load_physiology

__all__ = [
    "Setting",
    "SpeciesExposure",
    "enterocyte_um",
    "gut_lumen_um",
    "resolve_exposure",
    "unbound_cmax_um",
    "unbound_inlet_um",
]


@dataclass(frozen=True, slots=True, kw_only=True)
class Setting:
    """One input as used: its value, and whether it was given, defaulted or overridden."""

    name: str
    label: str
    value: float
    unit: str
    origin: str
    source: str = ""
    status: str = ""
    note: str = ""

    @property
    def from_memory(self) -> bool:
        return self.status == "from memory"


@dataclass(frozen=True, slots=True, kw_only=True)
class SpeciesExposure:
    """Concentrations of one inhibitory species (parent or metabolite), in uM."""

    species: str
    is_parent: bool
    cmax_um: float
    fu_plasma_used: float
    unbound_cmax_um: float
    gut_lumen_um: float
    unbound_inlet_um: float
    enterocyte_um: float
    dose_umol: float


def unbound_cmax_um(cmax_um: ArrayLike, fu_plasma: ArrayLike) -> NDArray[np.float64]:
    """Imax,u = fu,p x Cmax,ss (uM)."""
    return np.multiply(cmax_um, fu_plasma)


def gut_lumen_um(dose_umol: ArrayLike, volume_l: ArrayLike) -> NDArray[np.float64]:
    """Igut = dose / intestinal volume (uM from umol and L)."""
    return np.divide(dose_umol, volume_l)


def unbound_inlet_um(
    cmax_um: ArrayLike,
    fu_plasma: ArrayLike,
    dose_umol: ArrayLike,
    fa_fg: ArrayLike,
    ka_per_min: ArrayLike,
    qh_l_per_min: ArrayLike,
    blood_plasma_ratio: ArrayLike,
) -> NDArray[np.float64]:
    """Iin,max,u = fu,p x (Cmax + Fa*Fg x ka x Dose / (Qh x Rb)) in uM."""
    portal = np.multiply(np.multiply(fa_fg, ka_per_min), dose_umol) / np.multiply(qh_l_per_min, blood_plasma_ratio)
    return np.multiply(fu_plasma, np.add(cmax_um, portal))


def enterocyte_um(
    dose_umol: ArrayLike, fa: ArrayLike, ka_per_min: ArrayLike, qent_l_per_min: ArrayLike, fu_gut: ArrayLike = 1.0
) -> NDArray[np.float64]:
    """I_ent = fu,gut x Fa x ka x Dose / Qent in uM."""
    return np.multiply(fu_gut, np.multiply(np.multiply(fa, ka_per_min), dose_umol)) / np.asarray(qent_l_per_min)


#: settings already read from the tables, per rule set object (kept alive by the entry, so its id stays its own):
#: a batch table resolves the same eight settings for every row; parsing their unit text each time was a fifth of
#: reading a perpetrator table (tests/bench/bench_batch.py)
_SETTINGS: dict[tuple[int, str, str, str], tuple[RuleSet, Setting]] = {}


def _table_setting(name: str, label: str, unit: str, rules: RuleSet) -> Setting:
    """A physiology value from the rule set when it has one, else from physiology.toml (remembered per rule set)."""
    key = (id(rules), name, label, unit)
    hit = _SETTINGS.get(key)
    if hit is not None and hit[0] is rules:
        return hit[1]
    if len(_SETTINGS) > 1024:
        _SETTINGS.clear()
    setting = _read_table_setting(name, label, unit, rules)
    _SETTINGS[key] = (rules, setting)
    return setting


def _read_table_setting(name: str, label: str, unit: str, rules: RuleSet) -> Setting:
    item: Sourced | None = rules.physiology_value(name)
    origin = "rule set"
    if item is None:
        item = next(p for p in load_physiology() if p.name == name)
        origin = "default"
    value = item.value
    number = units.magnitude(units.parse(value, _KIND[unit], field=name), unit) if isinstance(value, str) else float(value)
    return Setting(name=name, label=label, value=number, unit=unit, origin=origin, source=item.source, status=item.status, note=item.note)


_KIND: Final = {"L/min": "flow", "1/min": "rate", "L": "volume", "": ""}


def _given_or(name: str, label: str, unit: str, given: float | None, rules: RuleSet, origin: str = "given") -> Setting:
    if given is None:
        return _table_setting(name, label, unit, rules)
    base = _table_setting(name, label, unit, rules)
    return Setting(
        name=name,
        label=label,
        value=float(given),
        unit=unit,
        origin=origin,
        note=f"replaces the {base.origin} value {base.value:.4g} {unit}".rstrip(),
    )


def resolve_settings(scenario: Scenario, rules: RuleSet) -> dict[str, Setting]:
    """Every physiological and absorption setting used, with its origin and source."""
    p = scenario.perpetrator
    phys = scenario.physiology
    out = {
        "hepatic_blood_flow": _given_or(
            "hepatic_blood_flow",
            "Hepatic blood flow Qh",
            "L/min",
            None if phys.hepatic_blood_flow is None else units.magnitude(phys.hepatic_blood_flow, "L/min"),
            rules,
            "override",
        ),
        "enterocytic_blood_flow": _given_or(
            "enterocytic_blood_flow",
            "Enterocytic blood flow Qent",
            "L/min",
            None if phys.enterocytic_blood_flow is None else units.magnitude(phys.enterocytic_blood_flow, "L/min"),
            rules,
            "override",
        ),
        "gut_volume": _given_or(
            "gut_volume",
            "Intestinal volume for Igut",
            "L",
            None if phys.gut_volume is None else units.magnitude(phys.gut_volume, "L"),
            rules,
            "override",
        ),
        "fu_gut": _given_or("fu_gut", "Unbound fraction in enterocytes fu,gut", "", phys.fu_gut, rules, "override"),
        "absorption_rate": _given_or(
            "absorption_rate",
            "Perpetrator absorption rate ka",
            "1/min",
            None if p.ka is None else units.magnitude(p.ka, "1/min"),
            rules,
        ),
        "fa_fg": _given_or("fa_fg", "Perpetrator Fa x Fg", "", p.fa_fg, rules),
        "fraction_absorbed": _given_or("fraction_absorbed", "Perpetrator Fa", "", p.fa, rules),
        "blood_plasma_ratio": _given_or("blood_plasma_ratio", "Perpetrator blood-to-plasma ratio Rb", "", p.blood_plasma_ratio, rules),
    }
    return out


def floored_fu(fu: float, measured: bool, rules: RuleSet, label: str, floor_override: float | None = None) -> tuple[float, Setting]:
    """fu,p as used: raised to the floor (rule set's, or the scenario's override) unless a measured value may stand below it."""
    floor = float(rules.fu_plasma_floor.value) if floor_override is None else floor_override
    exempt = bool(rules.fu_plasma_floor_measured_exempt.value)
    if fu >= floor:
        return fu, Setting(name="fu_plasma", label=label, value=fu, unit="", origin="given")
    if measured and exempt:
        return fu, Setting(
            name="fu_plasma",
            label=label,
            value=fu,
            unit="",
            origin="given",
            source=rules.fu_plasma_floor_measured_exempt.source,
            status=rules.fu_plasma_floor_measured_exempt.status,
            note=f"measured value below the {floor:g} floor used, as {rules.id} allows for a reliable measurement",
        )
    reason = "not marked as measured (fu_plasma_measured = true)" if exempt else f"{rules.id} does not allow values below it"
    return floor, Setting(
        name="fu_plasma",
        label=label,
        value=floor,
        unit="",
        origin="floor",
        source=rules.fu_plasma_floor.source if floor_override is None else "scenario [physiology] fu_plasma_floor",
        status=rules.fu_plasma_floor.status if floor_override is None else "",
        note=f"given {fu:g} raised to the floor {floor:g}: {reason}",
    )


def resolve_exposure(
    scenario: Scenario, rules: RuleSet, settings: dict[str, Setting]
) -> tuple[tuple[SpeciesExposure, ...], tuple[Setting, ...]]:
    """Concentrations of the parent and each metabolite, and the fu,p settings used."""
    p = scenario.perpetrator
    oral = p.route == "oral"
    dose_umol = units.amount_umol(p.dose, p.molar_mass, field="perpetrator.dose")
    absorbed_umol = (
        dose_umol if p.active_molar_mass is None else units.amount_umol(p.dose, p.active_molar_mass, field="perpetrator.active_molar_mass")
    )
    cmax = units.concentration_um(p.cmax, p.molar_mass, field="perpetrator.cmax")
    floor = scenario.physiology.fu_plasma_floor
    fu, fu_setting = floored_fu(p.fu_plasma, p.fu_plasma_measured, rules, f"fu,p of {p.name}", floor)
    qh = settings["hepatic_blood_flow"].value
    qent = settings["enterocytic_blood_flow"].value
    ka = settings["absorption_rate"].value
    imax_u = float(unbound_cmax_um(cmax, fu))
    parent = SpeciesExposure(
        species=p.name,
        is_parent=True,
        cmax_um=cmax,
        fu_plasma_used=fu,
        unbound_cmax_um=imax_u,
        gut_lumen_um=float(gut_lumen_um(dose_umol, settings["gut_volume"].value)) if oral else 0.0,
        unbound_inlet_um=float(
            unbound_inlet_um(cmax, fu, absorbed_umol, settings["fa_fg"].value, ka, qh, settings["blood_plasma_ratio"].value)
        )
        if oral
        else imax_u,
        enterocyte_um=float(enterocyte_um(absorbed_umol, settings["fraction_absorbed"].value, ka, qent, settings["fu_gut"].value))
        if oral
        else imax_u,
        dose_umol=dose_umol,
    )
    parent, given = _given_sites(parent, p)
    species = [parent]
    fus = [fu_setting, *given]
    for i, m in enumerate(p.metabolites):
        mc = units.concentration_um(m.cmax, m.molar_mass, field=f"perpetrator.metabolites[{i}].cmax")
        mfu, mset = floored_fu(m.fu_plasma, m.fu_plasma_measured, rules, f"fu,p of {m.name}", floor)
        mu = float(unbound_cmax_um(mc, mfu))
        species.append(
            SpeciesExposure(
                species=m.name,
                is_parent=False,
                cmax_um=mc,
                fu_plasma_used=mfu,
                unbound_cmax_um=mu,
                gut_lumen_um=0.0,
                unbound_inlet_um=mu,
                enterocyte_um=mu,
                dose_umol=0.0,
            )
        )
        fus.append(mset)
    return tuple(species), tuple(fus)


#: the parent's site concentrations a scenario may give directly: scenario key, field, label
_SITES: Final = (
    ("igut", "gut_lumen_um", "Igut (gut lumen)"),
    ("ient", "enterocyte_um", "I,ent (enterocyte)"),
    ("iin_max_u", "unbound_inlet_um", "Iin,max,u (unbound hepatic inlet)"),
)


def _given_sites(parent: SpeciesExposure, p: Perpetrator) -> tuple[SpeciesExposure, list[Setting]]:
    """The parent with the site concentrations the scenario gives in place of the computed ones, and their settings."""
    sites = p.site_concentrations
    if sites is None:
        return parent, []
    changes: dict[str, Any] = {}
    used = []
    for key, attr, label in _SITES:
        q = getattr(sites, key)
        if q is None:
            continue
        value = units.concentration_um(q, p.molar_mass, field=f"perpetrator.site_concentrations.{key}")
        changes[attr] = value
        used.append(
            Setting(
                name=f"given_{key}",
                label=f"{label} of {p.name}",
                value=value,
                unit="uM",
                origin="given",
                note=f"replaces the computed {getattr(parent, attr):.4g} uM",
            )
        )
    return replace(parent, **changes), used
