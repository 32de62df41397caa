"""Scenario inputs: frozen dataclasses, TOML loading with validation, atomic saving.

A scenario holds what the user knows: the perpetrator (its exposure, binding,
absorption, inhibited targets and inhibitory metabolites), the victim (dose,
regimen, intestinal availability, elimination pathways) and any overrides of
physiological defaults.  Values with units are pint quantities parsed from
text such as ``"812 ng/mL"``; fractions are floats.  Missing optional values
stay ``None`` here: the engine fills the defaults and reports their sources.

Validation collects every problem at once, each with its dotted key path and,
when the scenario came from a file, the line it is on.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field, fields, replace
from pathlib import Path
from typing import Any, Final, TypeVar

import pint

from . import units
from .dosing import MAX_UNIT_SIZES
from .errors import InputError, Problem, ScenarioError
from .scenario_fields import MAX_ITEMS, FieldReader, brief
from .tables import load_phenotypes, resolve_target

__all__ = [
    "INTERVAL_KEYS",
    "MECHANISMS",
    "VICTIM_ROUTES",
    "ExtendedClearance",
    "Inhibition",
    "Metabolite",
    "Pathway",
    "Perpetrator",
    "Physiology",
    "Scenario",
    "SiteConcentrations",
    "Turnover",
    "Victim",
    "demo_path",
    "dumps_scenario",
    "load_scenario",
    "loads_scenario",
    "merge_scenario_text",
    "save_scenario",
    "scenario_from_dict",
    "scenario_to_dict",
    "section_from_dict",
    "starter_path",
]

MECHANISMS: Final = ("competitive", "noncompetitive", "uncompetitive", "mixed")
ROUTES: Final = ("oral", "intravenous")

Q = pint.Quantity
T = TypeVar("T")


@dataclass(frozen=True, slots=True, kw_only=True)
class Inhibition:
    """One target inhibited (or induced) by one species (parent or metabolite).

    Reversible inhibition is given either as ``ki`` or as ``ic50`` with the
    ``mechanism`` (and, except for noncompetitive, ``substrate_conc`` and
    ``km``) for the Cheng-Prusoff conversion.  ``fu_inc`` converts the in vitro
    constant to its unbound value (Ki,u = Ki x fu,inc).  For transporters the
    IC50 (or Ki) is used as the inhibition constant, as guidance does.

    Time-dependent inhibition (``kinact``, ``ki_inact`` = KI) and induction
    (``emax``, ``ec50``, ``calibration`` = d) are optional.  ``fu_inc`` corrects
    Ki, KI and EC50 alike unless ``fu_inc_ki_inact`` or ``fu_inc_ec50`` gives a
    constant its own binding (1 for a constant already unbound).
    """

    target: str
    ki: Q | None = None
    ic50: Q | None = None
    substrate_conc: Q | None = None
    km: Q | None = None
    mechanism: str = "competitive"
    alpha: float | None = None
    fu_inc: float | None = None
    kinact: Q | None = None
    ki_inact: Q | None = None
    emax: float | None = None
    ec50: Q | None = None
    calibration: float | None = None
    origin: str = ""
    #: separate binding for KI and EC50 (e.g. hepatocyte fu for EC50); without them ``fu_inc`` applies to every constant
    fu_inc_ki_inact: float | None = None
    fu_inc_ec50: float | None = None
    #: 95 % intervals carried from a fit (``ki_ci = ["63.3 uM", "82.3 uM"]``); the uncertainty command uses them
    ki_ci: tuple[Q, Q] | None = None
    km_ci: tuple[Q, Q] | None = None
    kinact_ci: tuple[Q, Q] | None = None
    ki_inact_ci: tuple[Q, Q] | None = None
    emax_ci: tuple[float, float] | None = None
    ec50_ci: tuple[Q, Q] | None = None

    def interval(self, key: str) -> tuple[Any, Any] | None:
        """The interval given for constant ``key`` (``ki``, ``km``, ``kinact``, ``ki_inact``, ``emax``, ``ec50``), or None."""
        return getattr(self, f"{key}_ci", None) if key in INTERVAL_KEYS else None


#: constants that may carry an interval (``<key>_ci``) and the kind of unit each takes
INTERVAL_KEYS: Final = {
    "ki": "concentration",
    "km": "concentration",
    "kinact": "rate",
    "ki_inact": "concentration",
    "emax": "",
    "ec50": "concentration",
}


@dataclass(frozen=True, slots=True, kw_only=True)
class Metabolite:
    """An inhibitory metabolite with its own systemic exposure."""

    name: str
    cmax: Q
    fu_plasma: float
    molar_mass: Q | None = None
    fu_plasma_measured: bool = False
    inhibits: tuple[Inhibition, ...] = ()


@dataclass(frozen=True, slots=True, kw_only=True)
class SiteConcentrations:
    """Site concentrations of the parent given directly (``[perpetrator.site_concentrations]``), e.g. from a
    published table: each replaces the computed value, and outputs mark it "given".

    ``igut`` is the gut-lumen concentration of the basic screens (dose / 250 mL), ``ient`` the enterocyte
    concentration of the mechanistic model, ``iin_max_u`` the unbound hepatic inlet concentration.
    """

    igut: Q | None = None
    ient: Q | None = None
    iin_max_u: Q | None = None


#: the keys of [perpetrator.site_concentrations]
SITE_KEYS: Final = ("igut", "ient", "iin_max_u")


@dataclass(frozen=True, slots=True, kw_only=True)
class Perpetrator:
    """The inhibiting drug.  ``cmax`` is the total plasma Cmax at steady state, highest dose."""

    name: str
    dose: Q
    cmax: Q
    fu_plasma: float
    molar_mass: Q | None = None
    route: str = "oral"
    interval: Q | None = None
    fu_plasma_measured: bool = False
    blood_plasma_ratio: float | None = None
    fa_fg: float | None = None
    fa: float | None = None
    ka: Q | None = None
    inhibits: tuple[Inhibition, ...] = ()
    metabolites: tuple[Metabolite, ...] = ()
    half_life: Q | None = None  # elimination half-life; used only by the time course (interact.dynamic)
    cmax_dose: Q | None = None  # the dose at which cmax was measured (checked against dose)
    #: molar mass of the species that reaches the enterocyte and the liver when it differs from the dosed compound
    #: (a prodrug whose active form inhibits): the enterocyte and portal terms convert a mass dose with it
    active_molar_mass: Q | None = None
    site_concentrations: SiteConcentrations | None = None


#: routes by which a transporter clears the object drug, and the organ of each
VICTIM_ROUTES: Final = {"intestinal efflux": "gut", "hepatic uptake": "liver", "renal secretion": "kidney"}
#: the route of an enzyme pathway
METABOLISM: Final = "metabolism"


@dataclass(frozen=True, slots=True, kw_only=True)
class Pathway:
    """A fraction of the victim's disposition through one enzyme or transporter.

    ``enzyme`` names the target (an enzyme, or a transporter for the transporter routes) and ``fm`` its fraction:

    - ``metabolism`` (file keys ``enzyme``, ``fm``): the fraction of systemic clearance through the enzyme
      (with ``extended_clearance``: the fraction of the metabolic clearance CLmet);
    - ``intestinal efflux`` (``transporter``, ``fraction``): the fraction of the oral dose the transporter
      returns to the gut lumen (the intestinal availability it governs is 1 - fraction);
    - ``hepatic uptake``: the fraction of systemic clearance that depends on uptake by the transporter
      (with ``extended_clearance``: its fraction of the uptake clearance PS_inf);
    - ``renal secretion``: the fraction of the *renal* clearance secreted by the transporter.
    """

    enzyme: str
    fm: float
    route: str = METABOLISM

    @property
    def organ(self) -> str:
        """``gut``, ``liver`` or ``kidney``: the organ whose ratio the pathway enters."""
        return VICTIM_ROUTES.get(self.route, "liver")


@dataclass(frozen=True, slots=True, kw_only=True)
class ExtendedClearance:
    """Hepatic clearances of the object drug for the extended clearance concept (``[victim.extended_clearance]``).

    Flows (``"120 mL/min"``) or plain numbers relative to any common reference (ratios): sinusoidal uptake
    ``ps_inf``, sinusoidal efflux ``ps_eff``, metabolism ``cl_met`` and biliary excretion ``cl_bile``, all
    unbound intrinsic clearances.  ``hepatic_fraction`` is the hepatic share of systemic clearance (default
    1 - renal_fraction).
    """

    ps_inf: Q | float
    ps_eff: Q | float
    cl_met: Q | float
    cl_bile: Q | float | None = None
    hepatic_fraction: float | None = None

    def relative(self) -> tuple[float, float, float, float]:
        """(PS_inf, PS_eff, CLmet, CLbile) as floats in one unit (L/min for flows)."""
        out = []
        for value in (self.ps_inf, self.ps_eff, self.cl_met, self.cl_bile):
            out.append(units.magnitude(value, "L/min") if isinstance(value, pint.Quantity) else float(value or 0.0))
        return out[0], out[1], out[2], out[3]


@dataclass(frozen=True, slots=True, kw_only=True)
class PhenotypeChoice:
    """The object drug's metaboliser phenotype for one polymorphic enzyme (``[[victim.phenotypes]]``).

    ``phenotype`` is a name from the phenotype table or ``"all"`` (every phenotype of the table, one row each);
    ``activity``, when given, replaces the table's relative activity (the phenotype is then named "given").
    """

    enzyme: str
    phenotype: str
    activity: float | None = None


@dataclass(frozen=True, slots=True, kw_only=True)
class Victim:
    """The affected drug.  Pathways not listed (1 - sum of fm) are unaffected."""

    name: str
    dose: Q
    interval: Q
    fg: float | None = None
    route: str = "oral"
    strengths: tuple[Q, ...] = ()
    pathways: tuple[Pathway, ...] = ()
    no_effect_lower: float | None = None
    no_effect_upper: float | None = None
    narrow_therapeutic_index: bool = False
    # regimen search (interact.dosing): halves of scored strengths, units per administration, intervals tried,
    # and the boundaries for steady-state peak and trough ratios of a changed interval (default: no_effect_boundary)
    scored_strengths: tuple[Q, ...] = ()
    max_units: int | None = None
    intervals: tuple[Q, ...] = ()
    peak_boundary: tuple[float, float] | None = None
    trough_boundary: tuple[float, float] | None = None
    phenotypes: tuple[PhenotypeChoice, ...] = ()  # drug-drug-gene interaction (interact.genotype)
    # used by the time course (interact.dynamic) and, for interval changes, by the regimen search:
    half_life: Q | None = None  # elimination half-life without the perpetrator
    hepatic_extraction: float | None = None  # hepatic (blood) extraction ratio without the perpetrator
    ka: Q | None = None  # first-order absorption rate constant (oral)
    renal_fraction: float | None = None  # fraction of systemic clearance that is renal (fe,renal)
    extended_clearance: ExtendedClearance | None = None


@dataclass(frozen=True, slots=True, kw_only=True)
class Physiology:
    """Overrides of physiological defaults; ``None`` means use the table value."""

    hepatic_blood_flow: Q | None = None
    enterocytic_blood_flow: Q | None = None
    gut_volume: Q | None = None
    fu_gut: float | None = None
    fu_plasma_floor: float | None = None


@dataclass(frozen=True, slots=True, kw_only=True)
class Turnover:
    """Override of an enzyme's degradation rate constants (1/time)."""

    enzyme: str
    kdeg_liver: Q | None = None
    kdeg_gut: Q | None = None


#: the accepted blood-to-plasma ratio: from well below 1 - haematocrit (about 0.55) to far above any drug's
BLOOD_PLASMA_RANGE: Final = (0.2, 100.0)


@dataclass(frozen=True, slots=True, kw_only=True)
class Scenario:
    """A perpetrator-victim pair and everything needed to assess it."""

    title: str
    perpetrator: Perpetrator
    victim: Victim
    invented: bool = False
    rules: str | None = None
    physiology: Physiology = field(default_factory=Physiology)
    turnover: tuple[Turnover, ...] = ()
    notes: str = ""
    #: the folder of the file it was read from: a relative ``rules`` path is read from there (not saved; not compared)
    folder: str | None = field(default=None, compare=False, repr=False)
    #: per-scenario overrides of basic-model multipliers: (criterion id of the rule set, value); shown in every output
    multipliers: tuple[tuple[str, float], ...] = ()
    spelling: tuple[str, str] = ("perpetrator", "victim")
    """The table names the file used: ``[perpetrator]``/``[victim]`` or the ICH M12 terms ``[precipitant]``/``[object]``;
    :func:`scenario_to_dict` writes them back the same way."""


SPELLINGS: Final = {"perpetrator": "precipitant", "victim": "object"}
"""Accepted aliases of the two drug tables: the older words and the ICH M12 terms (precipitant, object drug)."""


# --------------------------------------------------------------------------- loading


def demo_path() -> Path:
    """The built-in demo scenario (an invented compound pair)."""
    return Path(__file__).with_name("demo.toml")


def starter_path() -> Path:
    """The commented starter scenario that ``interact new`` writes (placeholder values to replace)."""
    return Path(__file__).with_name("starter.toml")


def load_scenario(path: str | Path) -> Scenario:
    """Read and validate a scenario TOML file.

    Raises
    ------
    InputError
        The file cannot be read or is not TOML.
    ScenarioError
        The TOML is readable but has problems; all are listed with key paths and lines.
    """
    from .files import read_text

    path = Path(path)
    return loads_scenario(read_text(path, "scenario"), source=str(path), folder=path.absolute().parent)


def loads_scenario(text: str, *, source: str = "scenario", folder: str | Path | None = None) -> Scenario:
    """Parse and validate scenario TOML text; ``folder`` (where the file lies) anchors a relative ``rules`` path."""
    from .files import loads_toml

    text = text.removeprefix("\ufeff")
    scenario = scenario_from_dict(loads_toml(text, source), source=source, text=text)
    return scenario if folder is None else replace(scenario, folder=str(folder))


def scenario_from_dict(data: object, *, source: str = "scenario", text: str | None = None) -> Scenario:
    """Build a :class:`Scenario` from plain data (as read from TOML), validating all of it."""
    reader = _Reader(text)
    scenario = reader.scenario(data)
    if reader.problems or scenario is None:
        raise ScenarioError(tuple(reader.problems) or (Problem(field="scenario", message="is empty"),), source)
    return scenario


def section_from_dict(side: str, data: object) -> Perpetrator | Victim:
    """One section of a scenario, ``perpetrator`` or ``victim``, from plain data, validated as in a whole scenario.

    The batch tables read each row this way (:mod:`interact.batch`): the same checks and messages, without a
    scenario around it.

    Raises
    ------
    ScenarioError
        Every problem of the section, with its key path (``perpetrator.cmax``).
    """
    reader = _Reader(None)
    item = reader.perpetrator(data, side) if side == "perpetrator" else reader.victim(data, side)
    if reader.problems or item is None:
        raise ScenarioError(tuple(reader.problems) or (Problem(field=side, message="is empty"),), "scenario")
    return item


class _PerpetratorReader(FieldReader):
    """The perpetrator's section: its exposure, its metabolites and what each of them inhibits or induces."""

    def inhibition(self, raw: object, path: str, molar_mass: Q | None) -> Inhibition | None:
        data = self.table(
            raw,
            path,
            tuple(f.name for f in fields(Inhibition)),
        )
        if data is None:
            return None
        target = self.target_name(data, "target", path)
        ki = self.quantity(data, "ki", path, "concentration")
        ic50 = self.quantity(data, "ic50", path, "concentration")
        sub = self.quantity(data, "substrate_conc", path, "concentration")
        km = self.quantity(data, "km", path, "concentration")
        mechanism = self.text(data, "mechanism", path, default="competitive")
        if mechanism not in MECHANISMS:
            self.fail(f"{path}.mechanism", f'"{mechanism[:40]}" is not one of {", ".join(MECHANISMS)}')
        alpha = self.number(data, "alpha", path, low=0.0, high=1e6)
        fu_inc = self.fraction(data, "fu_inc", path)
        if fu_inc is not None:
            self.attempt(f"{path}.fu_inc", lambda: units.check_fraction_size(fu_inc, f"{path}.fu_inc", fu_inc))  # type: ignore[arg-type]
            fu_inc = fu_inc if fu_inc >= units.MIN_FRACTION else None
        kinact = self.quantity(data, "kinact", path, "rate")
        ki_inact = self.quantity(data, "ki_inact", path, "concentration")
        emax = self.number(data, "emax", path, low=0.0, high=1e4, low_open=False)
        ec50 = self.quantity(data, "ec50", path, "concentration")
        calibration = self.number(data, "calibration", path, low=0.0, high=10.0, low_open=False)
        origin = self.text(data, "origin", path)
        own_fu = self.own_fu_inc(data, path)
        points = {"ki": ki, "km": km, "kinact": kinact, "ki_inact": ki_inact, "emax": emax, "ec50": ec50}
        cis = {key: self.interval(data, key, path, kind, points[key]) for key, kind in INTERVAL_KEYS.items()}
        given: dict[str, Any] = {**points, "ic50": ic50, "substrate_conc": sub}
        self.inhibition_pairs(data, path, target, mechanism, alpha, given)
        for key in ("ki", "ic50", "substrate_conc", "km", "ki_inact", "ec50"):
            value = given[key]
            if value is not None and molar_mass is None and value.dimensionality != units.KINDS["molar_concentration"][0][0]:
                self.fail(
                    f"{path}.{key}",
                    f'"{units.format_quantity(value)}" is a mass concentration; give molar_mass for this compound or a molar value such as "0.35 uM"',  # noqa: E501
                )
        if target is None:
            return None
        return Inhibition(
            target=target,
            ki=ki,
            ic50=ic50,
            substrate_conc=sub,
            km=km,
            mechanism=mechanism if mechanism in MECHANISMS else "competitive",
            alpha=alpha,
            fu_inc=fu_inc,
            kinact=kinact,
            ki_inact=ki_inact,
            emax=emax,
            ec50=ec50,
            calibration=calibration,
            origin=origin,
            ki_ci=cis["ki"],
            km_ci=cis["km"],
            kinact_ci=cis["kinact"],
            ki_inact_ci=cis["ki_inact"],
            emax_ci=cis["emax"],
            ec50_ci=cis["ec50"],
            fu_inc_ki_inact=own_fu["fu_inc_ki_inact"],
            fu_inc_ec50=own_fu["fu_inc_ec50"],
        )

    def own_fu_inc(self, data: dict[str, Any], path: str) -> dict[str, float | None]:
        """``fu_inc_ki_inact`` and ``fu_inc_ec50``: binding of its own for one constant, given beside that constant."""
        own_fu: dict[str, float | None] = {}
        for fu_key, constant in (("fu_inc_ki_inact", "ki_inact"), ("fu_inc_ec50", "ec50")):
            fu_val = self.fraction(data, fu_key, path)
            if fu_val is not None:
                self.attempt(f"{path}.{fu_key}", lambda v=fu_val, k=fu_key: units.check_fraction_size(v, f"{path}.{k}", v))  # type: ignore[misc]
                if constant not in data:
                    self.fail(f"{path}.{fu_key}", f"is given without {constant}; expected it beside the constant it corrects")
            own_fu[fu_key] = fu_val
        return own_fu

    def inhibition_pairs(
        self, data: dict[str, Any], path: str, target: str | None, mechanism: str, alpha: float | None, values: dict[str, Any]
    ) -> None:
        """The constants that only work together: ic50 with substrate_conc and km (and alpha), kinact with KI, Emax with EC50."""
        if "ki" in data and "ic50" in data:
            self.fail(path, "gives both ki and ic50; expected one of them")
        is_transporter = target is not None and getattr(resolve_target(target), "kind", "") == "transporter"
        if values["ic50"] is not None and not is_transporter:
            if mechanism != "noncompetitive":
                for key in ("substrate_conc", "km"):
                    if values[key] is None and key not in data:
                        self.fail(f"{path}.{key}", f"is missing; the Cheng-Prusoff conversion of ic50 for {mechanism} inhibition needs it")
            if mechanism == "mixed" and alpha is None and "alpha" not in data:
                self.fail(f"{path}.alpha", "is missing; mixed inhibition needs alpha (Kiu = alpha x Kic)")
        if (values["kinact"] is None) != (values["ki_inact"] is None) and ("kinact" in data) != ("ki_inact" in data):
            self.fail(path, "time-dependent inhibition needs both kinact and ki_inact (KI)")
        if (values["emax"] is None) != (values["ec50"] is None) and ("emax" in data) != ("ec50" in data):
            self.fail(path, "induction needs both emax and ec50")
        has_reversible = values["ki"] is not None or values["ic50"] is not None
        if not has_reversible and values["kinact"] is None and values["emax"] is None and not {"ki", "ic50", "kinact", "emax"} & set(data):
            self.fail(
                path,
                "gives no inhibition or induction constant; expected ki, or ic50 with substrate_conc and km, or kinact with ki_inact, or emax with ec50",  # noqa: E501
            )

    def inhibitions(self, data: dict[str, Any], path: str, molar_mass: Q | None) -> tuple[Inhibition, ...]:
        out = []
        seen: dict[str, int] = {}
        for i, raw in self.items(data, "inhibits", path):
            item = self.inhibition(raw, f"{path}.inhibits[{i}]", molar_mass)
            if item is None:
                continue
            if item.target in seen:
                self.fail(
                    f"{path}.inhibits[{i}].target",
                    f'"{item.target}" is listed twice (also inhibits[{seen[item.target]}]); combine them',
                )
                continue
            seen[item.target] = i
            out.append(item)
        return tuple(out)

    def perpetrator(self, raw: object, path: str = "perpetrator") -> Perpetrator | None:
        data = self.table(raw, path, tuple(f.name for f in fields(Perpetrator)))
        if data is None:
            return None
        name = self.name(data, "name", path)
        mw = self.quantity(data, "molar_mass", path, "molar_mass")
        dose = self.quantity(data, "dose", path, "dose", required=True)
        cmax = self.quantity(data, "cmax", path, "concentration", required=True)
        fu_p = self.fraction(data, "fu_plasma", path, required=True)
        route = self.text(data, "route", path, default="oral")
        if route not in ROUTES:
            self.fail(f"{path}.route", f'"{route[:40]}" is not one of {", ".join(ROUTES)}')
        interval = self.quantity(data, "interval", path, "time")
        measured = self.flag(data, "fu_plasma_measured", path)
        # at least 0.2: a drug kept out of red cells has Rb = 1 - haematocrit, about 0.55 (common practice)
        rb = self.number(data, "blood_plasma_ratio", path, low=BLOOD_PLASMA_RANGE[0], high=BLOOD_PLASMA_RANGE[1], low_open=False)
        fa_fg = self.fraction(data, "fa_fg", path)
        fa = self.fraction(data, "fa", path)
        ka = self.quantity(data, "ka", path, "rate")
        half_life = self.quantity(data, "half_life", path, "time")
        cmax_dose = self.quantity(data, "cmax_dose", path, "dose")
        active_mw = self.quantity(data, "active_molar_mass", path, "molar_mass")
        sites = self.site_concentrations(data, path)
        if cmax_dose is not None and dose is not None and cmax_dose.dimensionality != dose.dimensionality:
            self.fail(f"{path}.cmax_dose", f'"{units.format_quantity(cmax_dose)}" is not in the same kind of unit as the dose')
            cmax_dose = None
        self.mass_conc_needs_mw(cmax, mw, f"{path}.cmax")
        if dose is not None and mw is None and dose.dimensionality == units.KINDS["mass"][0][0]:
            self.fail(
                f"{path}.molar_mass",
                'is missing; a dose in mass units needs it to give molar concentrations (e.g. "452.5 g/mol")',
            )
        inhibits = self.inhibitions(data, path, mw)
        metabolites = []
        for i, mraw in self.items(data, "metabolites", path):
            met = self.metabolite(mraw, f"{path}.metabolites[{i}]")
            if met is not None:
                metabolites.append(met)
        if not inhibits and not any(m.inhibits for m in metabolites) and "inhibits" not in data:
            self.fail(f"{path}.inhibits", f"is missing; expected at least one [[{path}.inhibits]] table with a target")
        if None in (dose, cmax, fu_p):
            return None
        assert dose is not None and cmax is not None and fu_p is not None
        return Perpetrator(
            name=name,
            molar_mass=mw,
            dose=dose,
            route=route if route in ROUTES else "oral",
            interval=interval,
            cmax=cmax,
            fu_plasma=fu_p,
            fu_plasma_measured=measured,
            blood_plasma_ratio=rb,
            fa_fg=fa_fg,
            fa=fa,
            ka=ka,
            inhibits=inhibits,
            metabolites=tuple(metabolites),
            half_life=half_life,
            cmax_dose=cmax_dose,
            active_molar_mass=active_mw,
            site_concentrations=sites,
        )

    def site_concentrations(self, data: dict[str, Any], path: str) -> SiteConcentrations | None:
        if "site_concentrations" not in data:
            return None
        at = f"{path}.site_concentrations"
        sdata = self.table(data["site_concentrations"], at, SITE_KEYS)
        if sdata is None:
            return None
        values = {}
        for key in SITE_KEYS:
            q = self.quantity(sdata, key, at, "molar_concentration")
            if q is not None and not q.magnitude > 0:
                self.fail(f"{at}.{key}", f'"{units.format_quantity(q)}" is not above zero; expected a concentration such as "29 uM"')
                q = None
            values[key] = q
        return SiteConcentrations(**values)

    def metabolite(self, raw: object, path: str) -> Metabolite | None:
        data = self.table(raw, path, tuple(f.name for f in fields(Metabolite)))
        if data is None:
            return None
        name = self.name(data, "name", path)
        mw = self.quantity(data, "molar_mass", path, "molar_mass")
        cmax = self.quantity(data, "cmax", path, "concentration", required=True)
        fu_p = self.fraction(data, "fu_plasma", path, required=True)
        measured = self.flag(data, "fu_plasma_measured", path)
        self.mass_conc_needs_mw(cmax, mw, f"{path}.cmax")
        inhibits = self.inhibitions(data, path, mw)
        if cmax is None or fu_p is None:
            return None
        return Metabolite(name=name, molar_mass=mw, cmax=cmax, fu_plasma=fu_p, fu_plasma_measured=measured, inhibits=inhibits)


class _VictimReader(FieldReader):
    """The victim's section: dose, regimen, unit sizes, elimination pathways and phenotypes."""

    _victim_keys: frozenset[str] = frozenset()

    def victim(self, raw: object, path: str = "victim") -> Victim | None:
        data = self.table(
            raw,
            path,
            (*tuple(f.name for f in fields(Victim) if f.name not in ("no_effect_lower", "no_effect_upper")), "no_effect_boundary"),
        )
        if data is None:
            return None
        self._victim_keys = frozenset(data)
        name = self.name(data, "name", path)
        dose = self.quantity(data, "dose", path, "dose", required=True)
        interval = self.quantity(data, "interval", path, "time", required=True)
        fg = self.fraction(data, "fg", path)
        route = self.text(data, "route", path, default="oral")
        if route not in ROUTES:
            self.fail(f"{path}.route", f'"{route[:40]}" is not one of {", ".join(ROUTES)}')
        nti = self.flag(data, "narrow_therapeutic_index", path)
        v_half_life = self.quantity(data, "half_life", path, "time")
        v_extraction = self.fraction(data, "hepatic_extraction", path)
        if v_extraction is not None and v_extraction >= 1.0:
            self.fail(f"{path}.hepatic_extraction", f"{v_extraction:g} is not below 1; expected an extraction ratio in (0, 1)")
            v_extraction = None
        v_ka = self.quantity(data, "ka", path, "rate")
        strengths, scored, intervals, max_units = self.unit_sizes(data, path, dose)
        renal_fraction = self.fraction(data, "renal_fraction", path, allow_zero=True)
        ecm = self.extended_clearance(data, path)
        pathways = self.pathways(data, path, fg=fg, renal_fraction=renal_fraction, ecm=ecm)
        phenotypes = self.phenotypes(data, path, {p.enzyme for p in pathways if p.route == METABOLISM})
        if phenotypes and (ecm is not None or any(p.route != METABOLISM for p in pathways)):
            self.fail(
                f"{path}.phenotypes",
                "are not combined with transporter routes or extended_clearance in this version; "
                "assess the phenotypes with the enzyme pathways alone",
            )
        lower, upper = self.boundary(data, "no_effect_boundary", path) or (None, None)
        peak_boundary = self.boundary(data, "peak_boundary", path)
        trough_boundary = self.boundary(data, "trough_boundary", path)
        if dose is None or interval is None:
            return None
        return Victim(
            name=name,
            dose=dose,
            interval=interval,
            fg=fg,
            route=route if route in ROUTES else "oral",
            strengths=strengths,
            pathways=pathways,
            no_effect_lower=lower,
            no_effect_upper=upper,
            narrow_therapeutic_index=nti,
            scored_strengths=scored,
            max_units=max_units,
            intervals=intervals,
            peak_boundary=peak_boundary,
            trough_boundary=trough_boundary,
            phenotypes=phenotypes,
            half_life=v_half_life,
            hepatic_extraction=v_extraction,
            ka=v_ka,
            renal_fraction=renal_fraction,
            extended_clearance=ecm,
        )

    def unit_sizes(self, data: dict[str, Any], path: str, dose: Q | None) -> tuple[tuple[Q, ...], tuple[Q, ...], tuple[Q, ...], int | None]:
        """What doses can be given: strengths, scored strengths, intervals and units per administration."""
        strengths = self.quantities(data, "strengths", path, "dose", example='["2.5 mg", "5 mg"]', like=dose)
        scored = self.quantities(data, "scored_strengths", path, "dose", example='["10 mg"]', like=dose)
        for i, q in enumerate(scored):
            if not any(units.magnitude(q, units.unit_text(s)) == float(s.magnitude) for s in strengths):
                self.fail(f"{path}.scored_strengths[{i}]", f'"{units.format_quantity(q)}" is not one of the strengths')
        if len(strengths) + len(scored) > MAX_UNIT_SIZES:
            self.fail(
                f"{path}.strengths",
                f"has {len(strengths)} strengths and {len(scored)} scored ones; the regimen search takes at most {MAX_UNIT_SIZES} "
                "unit sizes in all (list the forms in use)",
            )
        intervals = self.quantities(data, "intervals", path, "time", example='["8 h", "12 h", "24 h"]')
        max_units = None
        if "max_units" in data:
            mu = data["max_units"]
            if isinstance(mu, (int, float)) and not isinstance(mu, bool) and math.isfinite(mu) and mu == int(mu) and 1 <= mu <= 8:
                max_units = int(mu)
            else:
                self.fail(f"{path}.max_units", f"{brief(mu)} is not a whole number from 1 to 8 (units per administration)")
        return strengths, scored, intervals, max_units

    def pathway(self, praw: object, at: str) -> Pathway | None:
        """One ``[[victim.pathways]]`` entry: ``enzyme`` with ``fm``, or ``transporter`` with ``fraction`` (and ``route``)."""
        pdata = self.table(praw, at, ("enzyme", "fm", "transporter", "fraction", "route"))
        if pdata is None:
            return None
        if "transporter" in pdata or ("enzyme" not in pdata and ("fraction" in pdata or "route" in pdata)):
            for key in ("enzyme", "fm"):
                if key in pdata:
                    self.fail(f"{at}.{key}", "is given with a transporter; give transporter, fraction (and route) for a transporter")
            name = self.target_name(pdata, "transporter", at)
            fraction = self.fraction(pdata, "fraction", at, required=True, allow_zero=True)
            target = resolve_target(name) if name is not None else None
            if target is None:
                return None
            routes = ", ".join(f'"{r}"' for r in VICTIM_ROUTES)
            if target.kind != "transporter" or target.victim_route is None:
                self.fail(
                    f"{at}.transporter",
                    f'"{name}" is not a transporter of an object-drug route ({routes}); an enzyme goes under enzyme, with fm',
                )
                return None
            route = self.text(pdata, "route", at, default=target.victim_route)
            if route not in VICTIM_ROUTES:
                self.fail(f"{at}.route", f'"{route[:40]}" is not one of {routes}')
                return None
            if route != target.victim_route:
                self.fail(
                    f"{at}.route", f'"{route}" is not a route of {target.name}; the static model takes it for "{target.victim_route}"'
                )
                return None
            return None if fraction is None else Pathway(enzyme=target.name, fm=fraction, route=route)
        for key in ("fraction", "route"):
            if key in pdata:
                self.fail(f"{at}.{key}", "is given with an enzyme; an enzyme pathway takes enzyme and fm")
        enzyme = self.target_name(pdata, "enzyme", at)
        fm = self.fraction(pdata, "fm", at, required=True, allow_zero=True)
        if enzyme is None:
            return None
        target = resolve_target(enzyme)
        if target is not None and target.kind != "enzyme":
            self.fail(
                f"{at}.enzyme",
                f'"{enzyme}" is a transporter; write it as transporter = "{enzyme}" with its fraction (and route)',
            )
            return None
        return None if fm is None else Pathway(enzyme=enzyme, fm=fm)

    def pathways(
        self, data: dict[str, Any], path: str, *, fg: float | None, renal_fraction: float | None, ecm: ExtendedClearance | None
    ) -> tuple[Pathway, ...]:
        """The victim's pathways, each target once, and each organ's fractions summing to at most 1."""
        pathways: list[Pathway] = []
        seen: set[str] = set()
        for i, praw in self.items(data, "pathways", path):
            at = f"{path}.pathways[{i}]"
            item = self.pathway(praw, at)
            if item is None:
                continue
            key = "enzyme" if item.route == METABOLISM else "transporter"
            if item.enzyme in seen:
                self.fail(f"{at}.{key}", f'"{item.enzyme}" is listed twice; give one fraction per {key}')
                continue
            seen.add(item.enzyme)
            pathways.append(item)
        self._check_sums(pathways, path, fg=fg, renal_fraction=renal_fraction, ecm=ecm)
        return tuple(pathways)

    def _check_sums(
        self, pathways: list[Pathway], path: str, *, fg: float | None, renal_fraction: float | None, ecm: ExtendedClearance | None
    ) -> None:
        """Each organ's fractions must sum to at most 1 (the rest is unaffected); the message names the parts."""

        def total(route: str) -> float:
            return sum(p.fm for p in pathways if p.route == route)

        def over(value: float) -> bool:
            return value > 1.0 + 1e-9

        fm, uptake, efflux, secretion = (total(r) for r in (METABOLISM, "hepatic uptake", "intestinal efflux", "renal secretion"))
        renal = renal_fraction or 0.0
        if ecm is not None:
            if over(fm):
                self.fail(
                    f"{path}.pathways",
                    f"fm values sum to {fm:.12g}; with extended_clearance they are fractions of CLmet: expected at most 1",
                )
            if over(uptake):
                self.fail(
                    f"{path}.pathways",
                    f"hepatic uptake fractions sum to {uptake:.12g}; with extended_clearance they are fractions of PS_inf: "
                    "expected at most 1",
                )
            hepatic = ecm.hepatic_fraction if ecm.hepatic_fraction is not None else 1.0 - renal
            if over(hepatic + renal):
                self.fail(
                    f"{path}.extended_clearance.hepatic_fraction",
                    f"{hepatic:g} with renal_fraction {renal:g} sums to {hepatic + renal:.12g}; "
                    "expected at most 1 (fractions of systemic clearance)",
                )
        elif uptake == 0.0 and renal_fraction is None:
            if over(fm):
                self.fail(
                    f"{path}.pathways", f"fm values sum to {fm:.12g}; expected a total of at most 1 (the rest is renal and other routes)"
                )
        elif over(fm + uptake + renal):
            self.fail(
                f"{path}.pathways",
                f"fractions of systemic clearance sum to {fm + uptake + renal:.12g} (metabolism fm {fm:g} + hepatic uptake {uptake:g} + "
                f"renal_fraction {renal:g}); expected at most 1",
            )
        gut_loss = efflux + (1.0 - fg if fg is not None else 0.0)
        if over(gut_loss):
            self.fail(
                f"{path}.pathways",
                f"intestinal fractions sum to {gut_loss:.12g} (intestinal efflux {efflux:g}"
                + (f" + gut-wall metabolism 1 - fg = {1.0 - fg:g}" if fg is not None else "")
                + "); expected at most 1 (fractions of the oral dose lost in the gut wall)",
            )
        if over(secretion):
            self.fail(
                f"{path}.pathways", f"renal secretion fractions sum to {secretion:.12g}; expected at most 1 (fractions of renal clearance)"
            )
        if secretion > 0.0 and renal_fraction is None and "renal_fraction" not in self._victim_keys:
            self.fail(f"{path}.renal_fraction", "is missing; a renal secretion pathway needs the renal fraction of systemic clearance")

    def extended_clearance(self, data: dict[str, Any], path: str) -> ExtendedClearance | None:
        """``[victim.extended_clearance]``: all four clearances as flows, or all as plain numbers (ratios)."""
        if "extended_clearance" not in data:
            return None
        at = f"{path}.extended_clearance"
        edata = self.table(data["extended_clearance"], at, ("ps_inf", "ps_eff", "cl_met", "cl_bile", "hepatic_fraction"))
        if edata is None:
            return None
        values: dict[str, Any] = {}
        kinds = set()
        for key in ("ps_inf", "ps_eff", "cl_met", "cl_bile"):
            if key not in edata:
                if key != "cl_bile":
                    self.fail(f"{at}.{key}", 'is missing; expected a clearance such as "120 mL/min" or a number (a ratio)')
                continue
            raw = edata[key]
            value: Any
            if isinstance(raw, (int, float)) and not isinstance(raw, bool):
                value = self.number(edata, key, at, low=0.0, high=1e12, low_open=key in ("ps_inf",))
                kinds.add("ratio")
            else:
                value = self.quantity(edata, key, at, "flow")
                if value is not None and not (math.isfinite(value.magnitude) and value.magnitude >= 0):
                    self.fail(f"{at}.{key}", f'"{units.format_quantity(value)}" is not a clearance of at least 0')
                    value = None
                elif value is not None and key == "ps_inf" and value.magnitude == 0:
                    self.fail(f"{at}.{key}", "is zero; expected an uptake clearance above 0")
                    value = None
                kinds.add("flow")
            if value is not None:
                values[key] = value
        if len(kinds) > 1:
            self.fail(at, "mixes flows and plain numbers; give all four clearances as flows or all as ratios to one reference")
            return None
        hepatic = self.fraction(edata, "hepatic_fraction", at, allow_zero=True)
        if not {"ps_inf", "ps_eff", "cl_met"} <= values.keys():
            return None
        cl_met, cl_bile = values["cl_met"], values.get("cl_bile") or 0.0
        met = units.magnitude(cl_met, "L/min") if isinstance(cl_met, pint.Quantity) else cl_met
        bile = units.magnitude(cl_bile, "L/min") if isinstance(cl_bile, pint.Quantity) else cl_bile
        if met + bile <= 0:
            self.fail(f"{at}.cl_met", "and cl_bile are both zero; expected a hepatic elimination clearance above 0")
            return None
        return ExtendedClearance(hepatic_fraction=hepatic, **values)

    def phenotypes(self, data: dict[str, Any], path: str, pathway_enzymes: set[str]) -> tuple[PhenotypeChoice, ...]:
        table = load_phenotypes()
        out: list[PhenotypeChoice] = []
        seen: set[str] = set()
        for i, raw in self.items(data, "phenotypes", path):
            at = f"{path}.phenotypes[{i}]"
            pdata = self.table(raw, at, ("enzyme", "phenotype", "activity"))
            if pdata is None:
                continue
            enzyme = self.target_name(pdata, "enzyme", at)
            if enzyme is None:
                continue
            if enzyme not in table:
                self.fail(f"{at}.enzyme", f'"{enzyme}" has no phenotype table; expected one of {", ".join(table)}')
                continue
            if enzyme not in pathway_enzymes:
                self.fail(f"{at}.enzyme", f'"{enzyme}" is not one of the victim\'s pathways; its phenotype would change nothing')
                continue
            if enzyme in seen:
                self.fail(f"{at}.enzyme", f'"{enzyme}" is listed twice; give one phenotype (or "all") per enzyme')
                continue
            seen.add(enzyme)
            if "activity" in pdata and "phenotype" in pdata:
                self.fail(f"{at}.activity", "is given with a phenotype; give either a phenotype from the table or your own activity")
                continue
            if "activity" in pdata:
                activity = self.number(pdata, "activity", at, low=0.0, high=10.0, low_open=False)
                if activity is not None:
                    out.append(PhenotypeChoice(enzyme=enzyme, phenotype="given", activity=activity))
                continue
            names = [p.name for p in table[enzyme]]
            phenotype = self.text(pdata, "phenotype", at, required=True)
            if phenotype not in (*names, "all"):
                self.fail(f"{at}.phenotype", f'"{phenotype[:40]}" is not one of {", ".join(names)} or "all" (or give activity)')
                continue
            out.append(PhenotypeChoice(enzyme=enzyme, phenotype=phenotype))
        return tuple(out)


class _Reader(_PerpetratorReader, _VictimReader):
    """Walks a whole scenario, section by section, converting values and collecting problems."""

    def scenario(self, data: object) -> Scenario | None:
        top = self.table(
            data, "", ("title", "invented", "rules", "notes", *SPELLINGS, *SPELLINGS.values(), "physiology", "turnover", "multipliers")
        )
        if top is None:
            return None
        names: list[str] = []
        for key, alias in SPELLINGS.items():
            if key in top and alias in top:
                self.fail(alias, f"and [{key}] are the same table; give one of them (ICH M12 calls it [{alias}])")
            names.append(alias if alias in top and key not in top else key)
        perp_name, victim_name = names
        title = self.text(top, "title", "", default="Untitled scenario")
        invented = self.flag(top, "invented", "")
        rules = self.text(top, "rules", "") or None
        notes = self.text(top, "notes", "")
        for key, name in zip(SPELLINGS, names, strict=True):
            if name not in top:
                self.fail(key, f"is missing; expected a [{key}] table (or [{SPELLINGS[key]}], the ICH M12 term)")
        perp = self.perpetrator(top[perp_name], perp_name) if perp_name in top else None
        victim = self.victim(top[victim_name], victim_name) if victim_name in top else None
        physiology = self.physiology(top.get("physiology", {}))
        turnover_list: list[Turnover] = []
        for i, raw in self.items(top, "turnover", ""):
            entry = self.turnover(raw, f"turnover[{i}]")
            if entry is None:
                continue
            first = next((k for k, t in enumerate(turnover_list) if t.enzyme == entry.enzyme), None)
            if first is not None:  # the last would win silently, and the order of entries would change the answer
                self.fail(
                    f"turnover[{i}].enzyme", f'"{entry.enzyme}" is listed twice (first in turnover[{first}]); give one entry per enzyme'
                )
                continue
            turnover_list.append(entry)
        turnover = tuple(turnover_list)
        multipliers = self.multipliers(top)
        if perp is None or victim is None or physiology is None:
            return None
        return Scenario(
            title=title,
            invented=invented,
            rules=rules,
            notes=notes,
            perpetrator=perp,
            victim=victim,
            physiology=physiology,
            turnover=turnover,
            multipliers=multipliers,
            spelling=(perp_name, victim_name),
        )

    def multipliers(self, top: dict[str, Any]) -> tuple[tuple[str, float], ...]:
        """``[multipliers]``: criterion id -> a positive number (checked against the rule set when assessed)."""
        raw = top.get("multipliers", {})
        if not isinstance(raw, dict):
            self.fail("multipliers", f'{brief(raw)} is not a table; expected e.g. [multipliers] with "tdi-liver" = 5')
            return ()
        out = []
        for key in list(raw)[:MAX_ITEMS]:
            value = self.number(raw, key, "multipliers", low=0.0, high=1e4)
            if value is not None:
                out.append((str(key), value))
        return tuple(out)

    def physiology(self, raw: object) -> Physiology | None:
        path = "physiology"
        data = self.table(raw, path, tuple(f.name for f in fields(Physiology)))
        if data is None:
            return None
        return Physiology(
            hepatic_blood_flow=self.quantity(data, "hepatic_blood_flow", path, "flow"),
            enterocytic_blood_flow=self.quantity(data, "enterocytic_blood_flow", path, "flow"),
            gut_volume=self.quantity(data, "gut_volume", path, "volume"),
            fu_gut=self.fraction(data, "fu_gut", path),
            fu_plasma_floor=self.fraction(data, "fu_plasma_floor", path),
        )

    def turnover(self, raw: object, path: str) -> Turnover | None:
        data = self.table(raw, path, ("enzyme", "kdeg_liver", "kdeg_gut"))
        if data is None:
            return None
        enzyme = self.target_name(data, "enzyme", path)
        liver = self.quantity(data, "kdeg_liver", path, "rate")
        gut = self.quantity(data, "kdeg_gut", path, "rate")
        if enzyme is None:
            return None
        return Turnover(enzyme=enzyme, kdeg_liver=liver, kdeg_gut=gut)


# --------------------------------------------------------------------------- saving


def _put(out: dict[str, Any], key: str, value: Any) -> None:
    """``out[key]`` as file data (a quantity as its text), unless ``value`` is None."""
    if value is None:
        return
    if isinstance(value, pint.Quantity):
        out[key] = units.format_quantity(value)
    elif isinstance(value, tuple):
        out[key] = [units.format_quantity(v) if isinstance(v, pint.Quantity) else v for v in value]
    else:
        out[key] = value


def _inhibition_dict(item: Inhibition) -> dict[str, Any]:
    out: dict[str, Any] = {"target": item.target}
    for f in fields(Inhibition)[1:]:
        value = getattr(item, f.name)
        if f.name == "mechanism" and value == "competitive" and item.ic50 is None:
            continue
        if f.name == "origin" and not value:
            continue
        _put(out, f.name, value)
    return out


def _perpetrator_dict(p: Perpetrator) -> dict[str, Any]:
    perp: dict[str, Any] = {"name": p.name}
    for key in ("molar_mass", "dose", "route", "interval", "cmax", "fu_plasma"):
        _put(perp, key, getattr(p, key))
    if p.fu_plasma_measured:
        perp["fu_plasma_measured"] = True
    for key in ("blood_plasma_ratio", "fa_fg", "fa", "ka", "half_life", "cmax_dose", "active_molar_mass"):
        _put(perp, key, getattr(p, key))
    if p.site_concentrations is not None:
        sites: dict[str, Any] = {}
        for key in SITE_KEYS:
            _put(sites, key, getattr(p.site_concentrations, key))
        perp["site_concentrations"] = sites
    perp["inhibits"] = [_inhibition_dict(i) for i in p.inhibits]
    if p.metabolites:
        mets = []
        for m in p.metabolites:
            md: dict[str, Any] = {"name": m.name}
            _put(md, "molar_mass", m.molar_mass)
            _put(md, "cmax", m.cmax)
            md["fu_plasma"] = m.fu_plasma
            if m.fu_plasma_measured:
                md["fu_plasma_measured"] = True
            md["inhibits"] = [_inhibition_dict(i) for i in m.inhibits]
            mets.append(md)
        perp["metabolites"] = mets
    return perp


def _victim_dict(v: Victim) -> dict[str, Any]:
    vic: dict[str, Any] = {"name": v.name}
    for key in ("dose", "interval", "fg", "route"):
        _put(vic, key, getattr(v, key))
    if v.strengths:
        vic["strengths"] = [units.format_quantity(s) for s in v.strengths]
    if v.no_effect_lower is not None and v.no_effect_upper is not None:
        vic["no_effect_boundary"] = [v.no_effect_lower, v.no_effect_upper]
    if v.narrow_therapeutic_index:
        vic["narrow_therapeutic_index"] = True
    if v.scored_strengths:
        vic["scored_strengths"] = [units.format_quantity(s) for s in v.scored_strengths]
    if v.max_units is not None:
        vic["max_units"] = v.max_units
    if v.intervals:
        vic["intervals"] = [units.format_quantity(t) for t in v.intervals]
    for key in ("peak_boundary", "trough_boundary"):
        if getattr(v, key) is not None:
            vic[key] = list(getattr(v, key))
    if v.phenotypes:
        vic["phenotypes"] = [
            {"enzyme": c.enzyme, "activity": c.activity} if c.activity is not None else {"enzyme": c.enzyme, "phenotype": c.phenotype}
            for c in v.phenotypes
        ]
    for key in ("half_life", "hepatic_extraction", "ka", "renal_fraction"):
        _put(vic, key, getattr(v, key))
    if v.extended_clearance is not None:
        ecm: dict[str, Any] = {}
        for f in fields(ExtendedClearance):
            _put(ecm, f.name, getattr(v.extended_clearance, f.name))
        vic["extended_clearance"] = ecm
    vic["pathways"] = [
        {"enzyme": pw.enzyme, "fm": pw.fm} if pw.route == METABOLISM else {"transporter": pw.enzyme, "route": pw.route, "fraction": pw.fm}
        for pw in v.pathways
    ]
    return vic


def scenario_to_dict(scenario: Scenario) -> dict[str, Any]:
    """Plain data (strings, numbers, lists, tables) that :func:`scenario_from_dict` reads back."""
    out: dict[str, Any] = {"title": scenario.title}
    if scenario.invented:
        out["invented"] = True
    _put(out, "rules", scenario.rules)
    if scenario.notes:
        out["notes"] = scenario.notes
    out[scenario.spelling[0]] = _perpetrator_dict(scenario.perpetrator)
    out[scenario.spelling[1]] = _victim_dict(scenario.victim)
    phys: dict[str, Any] = {}
    for f in fields(Physiology):
        _put(phys, f.name, getattr(scenario.physiology, f.name))
    if phys:
        out["physiology"] = phys
    if scenario.turnover:
        turn = []
        for t in scenario.turnover:
            td: dict[str, Any] = {"enzyme": t.enzyme}
            _put(td, "kdeg_liver", t.kdeg_liver)
            _put(td, "kdeg_gut", t.kdeg_gut)
            turn.append(td)
        out["turnover"] = turn
    if scenario.multipliers:
        out["multipliers"] = dict(scenario.multipliers)
    return out


def dumps_scenario(scenario: Scenario) -> str:
    """The scenario as TOML text (written by tomlkit)."""
    import tomlkit

    return tomlkit.dumps(scenario_to_dict(scenario))


def save_scenario(scenario: Scenario, path: str | Path, *, force: bool = False) -> None:
    """Write the scenario to ``path`` through the one writer (:func:`interact.files.write_file`).

    The writer is atomic, writes through a symbolic link and refuses a folder,
    a device or (unless ``force``) a read-only file.

    When ``path`` already holds a TOML scenario, the new values are merged into
    that text, so the user's comments, key order and the way unchanged values
    were written survive the save (:func:`merge_scenario_text`).
    """
    target = Path(path)
    text: str | None = None
    if target.is_file():
        try:
            text = merge_scenario_text(target.read_text(encoding="utf-8"), scenario)
        except (OSError, UnicodeDecodeError):
            text = None
    write_text_atomic(target, text if text is not None else dumps_scenario(scenario), force=force)


def merge_scenario_text(text: str, scenario: Scenario) -> str | None:
    """``text`` (a scenario file) updated to hold ``scenario``, comments and layout kept.

    Unchanged values keep their original spelling (``"1.6 ug/mL"`` stays as
    typed); changed values are rewritten and keep the comment on their line;
    tables and entries the scenario no longer has are removed.  The merged text
    is read back and must equal ``scenario``; otherwise (or when ``text`` is
    not TOML) None is returned and the caller writes a fresh file.
    """
    import tomlkit
    from tomlkit.exceptions import TOMLKitError

    try:
        doc = tomlkit.parse(text)
    except TOMLKitError:
        return None
    _edit_table(doc, scenario_to_dict(scenario), _same)
    merged = tomlkit.dumps(doc)
    try:
        if loads_scenario(merged) == scenario:
            return merged
    except InputError:
        pass
    return None


def edit_scenario_text(text: str | None, data: dict[str, Any], *, source: str = "scenario") -> str:
    """``text`` (a scenario file) edited so that it holds exactly ``data`` (the file's plain data, edited).

    A faithful edit: comments, key order and the spelling of every value that
    did not change are kept, keys holding defaults stay; only changed values
    are rewritten (keeping their line's comment), and entries that came or went
    are added or removed (matched by content, so removing the second of three
    targets removes that table with its comments).  With no text, or text that
    is not TOML, a fresh file is written.

    The result is read back before it is returned: it must parse to ``data``
    and load as a scenario.

    Raises
    ------
    ScenarioError
        ``data`` is not a valid scenario (a file that would not load is never produced).
    InputError
        The edited text does not read back as ``data`` (a value TOML cannot hold).
    """
    import tomllib

    import tomlkit
    from tomlkit.exceptions import TOMLKitError

    doc: Any = None
    if text is not None:
        try:
            doc = tomlkit.parse(text)
        except TOMLKitError:
            doc = None
    if doc is None:
        doc = tomlkit.document()
    _edit_table(doc, data, _equal)
    out = tomlkit.dumps(doc)
    try:
        back = tomllib.loads(out)
    except tomllib.TOMLDecodeError as exc:  # internal: tomlkit wrote text tomllib rejects
        raise InputError("scenario", source, f"could not be written as TOML ({exc})") from None
    if _pruned(back) != _pruned(data):
        raise InputError("scenario", source, "could not be written so that it reads back the same; nothing was written")
    scenario_from_dict(back, source=source, text=out)  # raises ScenarioError: never write a file that will not load
    return out


def _equal(old: Any, new: Any) -> bool:
    """The same value as read from TOML (1 and 1.0 alike; true is not 1)."""
    if isinstance(old, bool) or isinstance(new, bool):
        return old is new
    if isinstance(old, list) and isinstance(new, list):
        return len(old) == len(new) and all(_equal(a, b) for a, b in zip(old, new, strict=True))
    if isinstance(old, dict) and isinstance(new, dict):
        return old.keys() == new.keys() and all(_equal(old[k], new[k]) for k in old)
    if isinstance(old, int | float) and isinstance(new, int | float):
        return old == new
    return type(old) is type(new) and old == new


def _pruned(data: Any) -> Any:
    """``data`` without empty lists (a file cannot tell an empty list of tables from none)."""
    if isinstance(data, dict):
        return {k: _pruned(v) for k, v in data.items() if v != []}
    if isinstance(data, list):
        return [_pruned(v) for v in data]
    return data


def _same(old: Any, new: Any) -> bool:
    """Equal values, or two unit texts for the same quantity (e.g. "1.6 ug/mL" and "1.6 µg/mL")."""
    if isinstance(old, bool) or isinstance(new, bool):
        return old is new
    if old == new:
        return True
    if isinstance(old, str) and isinstance(new, str):
        return units.same_quantity_text(old, new)
    if isinstance(old, list) and isinstance(new, list) and len(old) == len(new):
        return all(_same(a, b) for a, b in zip(old, new, strict=True))
    return False


def _edit_table(node: Any, new: dict[str, Any], same: Callable[[Any, Any], bool]) -> None:
    """Edit a tomlkit table in place to hold ``new``: the one faithful TOML edit (see :func:`edit_scenario_text`)."""
    from tomlkit.items import AoT, Array, Item

    for key in list(node.keys()):
        if key not in new:
            del node[key]
    for key, value in new.items():
        if key not in node:
            if value != []:
                node[key] = value
            continue
        old = node[key]
        if isinstance(value, dict) and isinstance(old, dict):
            _edit_table(old, value, same)
        elif isinstance(value, list) and all(isinstance(v, dict) for v in value) and isinstance(old, AoT):
            _edit_tables(old, value, same)
        elif (
            isinstance(value, list)
            and isinstance(old, Array)
            and len(old) == len(value)
            and all(isinstance(a, dict) and isinstance(b, dict) for a, b in zip(old, value, strict=True))
        ):
            for old_item, new_item in zip(old, value, strict=True):
                _edit_table(old_item, new_item, same)
        elif not same(old.unwrap() if isinstance(old, Item) else old, value):
            node[key] = value
            _keep_comment(old, node[key])


def _keep_comment(old: Any, new: Any) -> None:
    """Give a rewritten value its line's comment, at the same column where the new value's width allows."""
    from tomlkit.items import AoT, Item

    before = getattr(old, "trivia", None)
    if before is None or not before.comment or not isinstance(new, Item) or isinstance(new, AoT | dict):
        return
    width = len(before.comment_ws) + len(old.as_string()) - len(new.as_string())
    new.trivia.comment_ws = " " * max(width, 1) if before.comment_ws.strip(" ") == "" else before.comment_ws
    new.trivia.comment = before.comment
    new.trivia.trail = before.trail


def _edit_tables(old: Any, new: list[dict[str, Any]], same: Callable[[Any, Any], bool]) -> None:
    """Edit an array of tables in place: entries matched by content (difflib), kept ones edited in place."""
    import difflib
    import json

    def sig(item: Any) -> str:
        return json.dumps(item, sort_keys=True, default=str)

    a = [sig(t.unwrap()) for t in old]
    b = [sig(t) for t in new]
    ops = difflib.SequenceMatcher(a=a, b=b, autojunk=False).get_opcodes()
    for tag, i1, i2, j1, j2 in reversed(ops):  # from the end, so earlier indices stay valid
        if tag == "equal":
            continue
        paired = min(i2 - i1, j2 - j1) if tag == "replace" else 0
        for k in range(paired):
            _edit_table(old[i1 + k], new[j1 + k], same)
        for i in range(i2 - 1, i1 + paired - 1, -1):
            del old[i]
        for j in range(j1 + paired, j2):
            old.insert(i1 + j - j1, new[j])


def write_text_atomic(path: Path, text: str | bytes, *, field: str = "path", force: bool = False) -> None:
    """Write ``text`` (or bytes) to ``path`` through the one writer, :func:`interact.files.write_file`."""
    from .files import write_file

    write_file(path, text, field=field, force=force)
