"""How sure: input distributions, sampling and one-at-a-time sensitivity.

A scenario's point estimate (:func:`interact.assessment.assess`) rests on
inputs that are known only roughly.  Here each input may carry a
distribution; samples of all of them go through the same vectorised
equations as the point estimate (:mod:`interact.exposure`,
:mod:`interact.prediction`), evaluated on arrays, so that a distribution of
zero width gives back the point estimate bit for bit.

Distributions (all parameters in the input's own canonical unit):

- log-normal from a coefficient of variation: median = the point value,
  sigma = sqrt(ln(1 + CV^2))  (standard log-normal moments; common practice);
- log-normal from a 95% interval (for example a fitted Ki's confidence
  interval): median = sqrt(lower x upper), sigma = ln(upper/lower) / (2 x 1.959964);
- uniform between two bounds;
- fixed at the point value.

How the user declares them (not part of the scenario file):

- on the command line, ``--vary PATH=SPEC`` with SPEC ``cv:30%``,
  ``ci:0.8 uM,2.1 uM``, ``uniform:0.5,0.9`` or ``fixed``;
- in a sidecar TOML file with a ``[vary]`` table of ``"PATH" = "SPEC"`` and an
  optional ``[sampling]`` table (``samples``, ``seed``, ``method``).

PATH names a scenario input as in the scenario file, e.g.
``perpetrator.inhibits[0].ki``, ``perpetrator.cmax``,
``victim.pathways[0].fm``, a transporter route's ``victim.pathways[1].fraction``,
``victim.renal_fraction`` (see :meth:`ScenarioModel.inputs`).

Sampled fractions are kept inside (0, 1] (fm, route and renal fractions inside
[0, 1]; values outside are moved to the bound and counted), and where sampled
fractions break one of the scenario reader's organ sums they are scaled down
together (counted too): fm + hepatic uptake + renal fraction at most 1 of
systemic clearance (with the hepatic clearances: fm at most 1 of CLmet, uptake
at most 1 of PS_inf, renal fraction at most 1 - the hepatic fraction);
intestinal efflux at most Fg of the oral dose; renal secretion at most 1 of
renal clearance.
"""

from __future__ import annotations

import dataclasses
import math
import re
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any, Final

import numpy as np
import pint
from numpy.typing import NDArray

from . import model as _model
from . import units
from .arrays import band_codes, band_labels
from .assessment import Assessment
from .constants import Constant, kdeg_per_h
from .dosing import ACTIONS, Regimen, choose_regimens, feasible_fraction, regimen_label
from .errors import InputError
from .exposure import enterocyte_um, unbound_cmax_um, unbound_inlet_um
from .kinetics.conversion import ki_from_ic50
from .prediction import Routes, liver_ratio, reversible_term, route_pathways, routes_of
from .scenario import INTERVAL_KEYS, Inhibition
from .tables import load_classes, resolve_target

__all__ = [
    "METHODS",
    "CrossingPoint",
    "Distribution",
    "FmCurve",
    "Input",
    "OrganIndices",
    "Ratios",
    "ScenarioModel",
    "Sensitivity",
    "TornadoBar",
    "UncertaintyResult",
    "UncertaintySpec",
    "VarianceIndices",
    "crossing_points",
    "fm_curves",
    "loads_spec",
    "parse_distribution",
    "parse_vary",
    "run_uncertainty",
    "scale_to_room",
    "scenario_intervals",
    "sensitivity",
    "sobol_indices",
    "tornado",
    "variance_indices",
]

METHODS: Final = ("mc", "lhs")
Z975: Final = 1.959963984540054  # standard normal 97.5th percentile (scipy.stats.norm.ppf(0.975))
MAX_SAMPLES: Final = 5_000_000
_TINY: Final = 1e-12
_CHUNK: Final = 250_000  # samples evaluated at once (bounds memory)
RENAL: Final = "victim.renal_fraction"


# --------------------------------------------------------------------------- distributions


@dataclass(frozen=True, slots=True, kw_only=True)
class Distribution:
    """A distribution of one input, in the input's canonical unit.

    ``kind`` is ``lognormal`` (``median``, ``sigma`` on the natural-log scale),
    ``uniform`` (``low``, ``high``) or ``fixed``; ``text`` is what the user wrote.
    """

    kind: str
    median: float = 0.0
    sigma: float = 0.0
    low: float = 0.0
    high: float = 0.0
    text: str = ""

    def ppf(self, u: NDArray[np.float64], point: float) -> NDArray[np.float64]:
        """Quantiles for probabilities ``u`` (the inverse CDF)."""
        from scipy.special import ndtri

        if self.kind == "lognormal":
            return self.median * np.exp(self.sigma * ndtri(u))
        if self.kind == "uniform":
            return self.low + (self.high - self.low) * u
        return np.full(np.shape(u), point)

    def draw(self, rng: np.random.Generator, n: int, point: float) -> NDArray[np.float64]:
        """``n`` Monte Carlo draws."""
        if self.kind == "lognormal":
            return self.median * np.exp(self.sigma * rng.standard_normal(n))
        if self.kind == "uniform":
            return self.low + (self.high - self.low) * rng.random(n)
        return np.full(n, point)

    def interval(self, point: float) -> tuple[float, float]:
        """The central 95% interval (the uniform range; the point for a fixed value)."""
        if self.kind == "lognormal":
            return self.median * math.exp(-Z975 * self.sigma), self.median * math.exp(Z975 * self.sigma)
        if self.kind == "uniform":
            return self.low, self.high
        return point, point

    def describe(self, unit: str) -> str:
        u = f" {unit}" if unit else ""
        if self.kind == "lognormal":
            cv = math.sqrt(math.expm1(self.sigma**2))
            return f"log-normal, median {self.median:.4g}{u}, CV {100 * cv:.3g}%"
        if self.kind == "uniform":
            return f"uniform {self.low:.4g} to {self.high:.4g}{u}"
        return "fixed"


@dataclass(frozen=True, slots=True, kw_only=True)
class Input:
    """One scenario input that can be varied: its path, meaning, canonical unit and point value."""

    path: str
    label: str
    unit: str
    kind: str  # a units kind ("concentration", "rate", ...), or "fraction" / "number"
    value: float
    molar_mass: pint.Quantity | None = None

    @property
    def is_fraction(self) -> bool:
        return self.kind == "fraction"


_SPEC = re.compile(r"^\s*(cv|ci|ci95|uniform|fixed)\s*(?::\s*(.*?))?\s*$", re.IGNORECASE)
_SPEC_HELP: Final = "expected cv:30%, ci:LOW,HIGH (a 95% interval), uniform:LOW,HIGH or fixed"


def _bound(text: str, inp: Input, field: str) -> float:
    """One bound in the input's canonical unit (a unit is required for dimensional inputs)."""
    text = text.strip()
    if inp.kind in ("fraction", "number"):
        try:
            value = float(text)
        except ValueError:
            raise InputError(field, text, "is not a plain number; expected a number such as 0.4") from None
        if not math.isfinite(value):
            raise InputError(field, text, "is not finite; expected a number such as 0.4")
        if inp.kind == "fraction" and field.endswith("fu_inc"):
            units.check_fraction_size(value, field, text)
        return value
    q = units.parse(text, inp.kind, field=field)
    if inp.kind == "concentration":
        return units.concentration_um(q, inp.molar_mass, field=field)
    if inp.kind == "dose":
        return units.amount_umol(q, inp.molar_mass, field=field)
    return units.magnitude(q, inp.unit)


#: the widest log-normal accepted: the sigma of a CV of 1000% (the cv: limit); a 95% interval spanning a factor of about 4,500
_MAX_SIGMA: Final = math.sqrt(math.log1p(10.0**2))


def _check_width(field: str, spec: object, lower: float, upper: float) -> float:
    """The log-normal sigma of a 95% interval, refused (naming ``field``) when wider than a CV of 1000%."""
    sigma = math.log(upper / lower) / (2 * Z975) if lower != upper else 0.0
    if not math.isfinite(sigma) or sigma > _MAX_SIGMA:
        widest = math.exp(2 * Z975 * _MAX_SIGMA)
        raise InputError(
            field, spec, f"spans a factor of {upper / lower:.3g}; expected at most {widest:,.0f} (a CV of at most 1000%, as for cv:)"
        )
    return sigma


def parse_distribution(spec: str, inp: Input) -> Distribution:
    """Read a SPEC such as ``cv:30%``, ``ci:0.8 uM,2.1 uM``, ``uniform:0.5,0.9`` or ``fixed`` for ``inp``.

    Raises
    ------
    InputError
        Naming the input's path, the text and what is expected.
    """
    field = inp.path
    m = _SPEC.match(spec) if isinstance(spec, str) else None
    if m is None:
        raise InputError(field, spec, _SPEC_HELP)
    kind, rest = m.group(1).lower(), (m.group(2) or "")
    if kind == "fixed":
        if rest:
            raise InputError(field, spec, "takes no value: 'fixed' keeps the scenario's value")
        return Distribution(kind="fixed", text=spec)
    if kind == "cv":
        text = rest.strip()
        scale = 100.0 if text.endswith("%") else 1.0
        try:
            cv = float(text.rstrip("%").strip()) / scale
        except ValueError:
            raise InputError(field, spec, "has no number after 'cv:'; expected e.g. cv:30% or cv:0.3") from None
        if not math.isfinite(cv) or cv < 0 or cv > 10:
            raise InputError(field, spec, "has a CV outside 0 to 1000%; expected e.g. cv:30%")
        if inp.value <= 0:
            raise InputError(field, spec, f"cannot be log-normal around the point value {inp.value:g}; give uniform:LOW,HIGH")
        return Distribution(kind="lognormal", median=inp.value, sigma=math.sqrt(math.log1p(cv * cv)), text=spec)
    parts = rest.split(",")
    if len(parts) != 2:
        raise InputError(field, spec, f"needs two bounds separated by a comma; {_SPEC_HELP}")
    lo_text, hi_text = parts[0].strip(), parts[1].strip()
    if inp.kind not in ("fraction", "number") and lo_text and not re.search(r"[A-Za-zµμ%]", lo_text):
        unit_part = re.sub(r"^[-+0-9.eE\s]+", "", hi_text)
        lo_text = f"{lo_text} {unit_part}"  # "0.8, 2.1 uM" means both in uM
    lo, hi = _bound(lo_text, inp, field), _bound(hi_text, inp, field)
    if lo > hi:
        raise InputError(field, spec, f"has lower bound {lo:.4g} above upper bound {hi:.4g}")
    if inp.is_fraction and (lo < 0 or hi > 1):
        raise InputError(field, spec, "has bounds outside [0, 1]; expected fractions")
    if kind in ("ci", "ci95"):
        if lo <= 0:
            raise InputError(field, spec, "needs a positive lower bound for a log-normal 95% interval")
        sigma = _check_width(field, spec, lo, hi)
        median = lo if lo == hi else math.sqrt(lo) * math.sqrt(hi)  # two roots: the product of wide bounds can overflow
        return Distribution(kind="lognormal", median=median, sigma=sigma, text=spec)
    if lo < 0:
        raise InputError(field, spec, "has a negative lower bound; expected values of at least 0")
    return Distribution(kind="uniform", low=lo, high=hi, text=spec)


def interval_distribution(lower: float, upper: float, text: str = "") -> Distribution:
    """A log-normal from a 95% interval in canonical units, e.g. a fitted Ki's confidence interval."""
    if not (0 < lower <= upper) or not math.isfinite(upper):
        raise InputError("interval", (lower, upper), "is not a positive interval with lower <= upper")
    sigma = _check_width("interval", text or (lower, upper), lower, upper)
    median = lower if lower == upper else math.sqrt(lower) * math.sqrt(upper)
    return Distribution(kind="lognormal", median=median, sigma=sigma, text=text or f"ci:{lower:g},{upper:g}")


# --------------------------------------------------------------------------- the model on arrays


@dataclass(frozen=True, slots=True, kw_only=True)
class Ratios:
    """Gut, liver, kidney and total AUC ratios (dimensionless) as arrays of a common shape (total = gut x liver x kidney)."""

    gut: NDArray[np.float64]
    liver: NDArray[np.float64]
    kidney: NDArray[np.float64]
    total: NDArray[np.float64]


@dataclass(frozen=True, slots=True, kw_only=True)
class _Species:
    cmax: str
    fu: str
    measured: bool
    parent: bool


@dataclass(frozen=True, slots=True, kw_only=True)
class _Const:
    prefix: str
    species: str
    species_index: int
    target: str
    ki: str | None  # path of the varied Ki (or IC50) input
    ic50_route: tuple[str, float | None, float | None, float | None] | None  # mechanism, S, Km, alpha
    fu_inc: str
    kinact: str | None
    ki_inact: str | None
    emax: str | None
    ec50: str | None
    calibration: str
    ki_inact_fu: str = ""  # path of the binding applied to KI (its own, or the shared fu_inc)
    ec50_fu: str = ""


def _inhibition_items(scenario: Any) -> list[tuple[str, Inhibition, pint.Quantity | None]]:
    """(path prefix, inhibition, molar mass) in the order of :func:`interact.constants.resolve_constants`."""
    p = scenario.perpetrator
    out = [(f"perpetrator.inhibits[{i}]", item, p.molar_mass) for i, item in enumerate(p.inhibits)]
    for j, m in enumerate(p.metabolites):
        out.extend((f"perpetrator.metabolites[{j}].inhibits[{i}]", item, m.molar_mass) for i, item in enumerate(m.inhibits))
    return out


class ScenarioModel:
    """One scenario's mechanistic model as a function of its inputs, on arrays.

    Built from an :class:`~interact.assessment.Assessment`; :meth:`evaluate`
    takes arrays for any subset of :meth:`inputs` (the rest stay at their
    point values) and returns the gut, liver and total AUC ratios, with the
    same equations and order of operations as :func:`interact.prediction.predict`.
    """

    def __init__(self, assessment: Assessment) -> None:
        a = assessment
        self.assessment = a
        p_ = a.scenario.perpetrator
        # given site concentrations stay at their given values; an active moiety's molar mass scales the absorbed amount
        self._given = p_.site_concentrations
        self._absorbed = 1.0
        if p_.active_molar_mass is not None and a.species[0].dose_umol > 0:
            absorbed = units.amount_umol(p_.dose, p_.active_molar_mass, field="perpetrator.active_molar_mass")
            self._absorbed = absorbed / a.species[0].dose_umol
        rules = a.rules
        override = a.scenario.physiology.fu_plasma_floor
        self._floor = float(rules.fu_plasma_floor.value) if override is None else float(override)
        self._exempt = bool(rules.fu_plasma_floor_measured_exempt.value)
        self._oral = a.scenario.perpetrator.route == "oral"
        self._input_list: list[Input] = []
        self._species = self._exposure_inputs()
        self._consts = [
            self._constant_inputs(prefix, item, mw, c)
            for (prefix, item, mw), c in zip(_inhibition_items(a.scenario), a.constants, strict=True)
        ]
        self._victim_inputs()
        # inputs the model actually uses (a constant on a target the victim does not depend on has no effect)
        relevant_targets = {pw.enzyme for pw in a.scenario.victim.pathways} | ({self._gut_enzyme} if self._gut_enzyme else set())
        inputs = self._input_list
        self._inputs = tuple(inputs)
        self._by_path = {i.path: i for i in inputs}
        self._point: dict[str, float] = {i.path: i.value for i in inputs}
        # the renal fraction moves the ratio only through renal secretion routes or the hepatic share of the clearances
        renal_moves = any(r == "renal secretion" for r, _, _ in self._route_inputs) or (
            self._routes.clearances is not None and not self._hepatic_given
        )
        self._relevant = tuple(
            i
            for i in inputs
            if not any(i.path.startswith(c.prefix + ".") and c.target not in relevant_targets for c in self._consts)
            and (i.path != RENAL or renal_moves)
        )
        self._targets: dict[str, int] = {}
        for name in (
            *(e for e, _ in self._pathways),
            *(e for e, _ in (*self._routes.efflux, *self._routes.uptake, *self._routes.secretion)),
            *((self._gut_enzyme,) if self._gut_enzyme else ()),
            *(c.target for c in self._consts),
        ):
            self._targets.setdefault(name, len(self._targets))

    def _add(self, path: str, label: str, unit: str, kind: str, value: float | None, mw: pint.Quantity | None = None) -> str:
        assert value is not None
        self._input_list.append(Input(path=path, label=label, unit=unit, kind=kind, value=float(value), molar_mass=mw))
        return path

    def _exposure_inputs(self) -> list[_Species]:
        """The perpetrator's exposure inputs: Cmax and fu,p of each species; for an oral perpetrator its absorption and flows."""
        a, add = self.assessment, self._add
        p = a.scenario.perpetrator
        settings = {st.name: st for st in a.settings}
        parent = a.species[0]
        species = [
            _Species(
                cmax=add("perpetrator.cmax", f"Cmax of {p.name}", "uM", "concentration", parent.cmax_um, p.molar_mass),
                fu=add("perpetrator.fu_plasma", f"fu,p of {p.name}", "", "fraction", p.fu_plasma),
                measured=p.fu_plasma_measured,
                parent=True,
            )
        ]
        for j, m in enumerate(p.metabolites):
            sp = a.species[j + 1]
            species.append(
                _Species(
                    cmax=add(f"perpetrator.metabolites[{j}].cmax", f"Cmax of {m.name}", "uM", "concentration", sp.cmax_um, m.molar_mass),
                    fu=add(f"perpetrator.metabolites[{j}].fu_plasma", f"fu,p of {m.name}", "", "fraction", m.fu_plasma),
                    measured=m.fu_plasma_measured,
                    parent=False,
                )
            )
        if self._oral:
            add("perpetrator.dose", f"Dose of {p.name}", "umol", "dose", parent.dose_umol, p.molar_mass)
            add("perpetrator.ka", "Perpetrator absorption rate ka", "1/min", "rate", settings["absorption_rate"].value)
            add("perpetrator.fa_fg", "Perpetrator Fa x Fg", "", "fraction", settings["fa_fg"].value)
            add("perpetrator.fa", "Perpetrator Fa", "", "fraction", settings["fraction_absorbed"].value)
            rb = settings["blood_plasma_ratio"].value
            add("perpetrator.blood_plasma_ratio", "Perpetrator blood-to-plasma ratio Rb", "", "number", rb)
            add("physiology.hepatic_blood_flow", "Hepatic blood flow Qh", "L/min", "flow", settings["hepatic_blood_flow"].value)
            qent = settings["enterocytic_blood_flow"].value
            add("physiology.enterocytic_blood_flow", "Enterocytic blood flow Qent", "L/min", "flow", qent)
            add("physiology.fu_gut", "Unbound fraction in enterocytes fu,gut", "", "fraction", settings["fu_gut"].value)
        return species

    def _ki_input(self, prefix: str, item: Inhibition, mw: pint.Quantity | None, c: Constant) -> tuple[str | None, Any]:
        """The path of the Ki (or IC50) input and, for an IC50, the Cheng-Prusoff route (mechanism, S, Km, alpha)."""
        who = f"{c.species} on {c.target}"
        if c.ki_um is None:
            return None, None
        if item.ki is not None:
            return self._add(f"{prefix}.ki", f"Ki of {who}", "uM", "concentration", c.ki_um, mw), None
        assert item.ic50 is not None
        ic50 = units.concentration_um(item.ic50, mw, field=f"{prefix}.ic50")
        path = self._add(f"{prefix}.ic50", f"IC50 of {who}", "uM", "concentration", ic50, mw)
        target = resolve_target(c.target)
        if target is None or target.kind == "transporter" or item.mechanism == "noncompetitive":
            return path, None
        sub = units.concentration_um(item.substrate_conc, mw, field=f"{prefix}.substrate_conc") if item.substrate_conc else None
        km = units.concentration_um(item.km, mw, field=f"{prefix}.km") if item.km else None
        return path, (item.mechanism, sub, km, item.alpha)

    def _constant_inputs(self, prefix: str, item: Inhibition, mw: pint.Quantity | None, c: Constant) -> _Const:
        """The inputs of one constant (Ki or IC50, fu,inc, kinact, KI, Emax, EC50, their own bindings, d)."""
        add = self._add
        who = f"{c.species} on {c.target}"
        ki_path, route = self._ki_input(prefix, item, mw, c)
        fu_path = add(f"{prefix}.fu_inc", f"fu,inc of {who}", "", "fraction", c.fu_inc)
        own_ki_inact = item.fu_inc_ki_inact is not None and c.ki_inact_um is not None
        own_ec50 = item.fu_inc_ec50 is not None and c.ec50_um is not None
        tdi, ind = c.kinact_per_h is not None, c.emax is not None
        return _Const(
            prefix=prefix,
            species=c.species,
            species_index=c.species_index,
            target=c.target,
            ki=ki_path,
            ic50_route=route,
            fu_inc=fu_path,
            kinact=add(f"{prefix}.kinact", f"kinact of {who}", "1/h", "rate", c.kinact_per_h) if tdi else None,
            ki_inact=add(f"{prefix}.ki_inact", f"KI of {who}", "uM", "concentration", c.ki_inact_um, mw)
            if c.ki_inact_um is not None
            else None,
            ki_inact_fu=add(f"{prefix}.fu_inc_ki_inact", f"binding of KI of {who}", "", "fraction", c.ki_inact_fu)
            if own_ki_inact
            else fu_path,
            emax=add(f"{prefix}.emax", f"Emax of {who}", "", "number", c.emax) if ind else None,
            ec50=add(f"{prefix}.ec50", f"EC50 of {who}", "uM", "concentration", c.ec50_um, mw) if c.ec50_um is not None else None,
            ec50_fu=add(f"{prefix}.fu_inc_ec50", f"binding of EC50 of {who}", "", "fraction", c.ec50_fu) if own_ec50 else fu_path,
            calibration=add(f"{prefix}.calibration", f"Induction calibration d of {who}", "", "number", c.calibration)
            if ind
            else f"{prefix}.calibration",
        )

    def _victim_inputs(self) -> None:
        """The victim's Fg (when the gut wall is modelled) and fm per pathway; kdeg of each inactivated enzyme."""
        a, add = self.assessment, self._add
        v = a.scenario.victim
        self._gut_enzyme = a.prediction.gut_enzyme
        if self._gut_enzyme is not None:
            add("victim.fg", f"Fg of {v.name}", "", "fraction", a.prediction.fg_used)
        self._pathways = [
            (pw.enzyme, add(f"victim.pathways[{k}].fm", f"fm {pw.enzyme} of {v.name}", "", "fraction", pw.fm))
            for k, pw in enumerate(v.pathways)
            if pw.route == "metabolism"
        ]
        # transporter routes: each fraction an input (path as in the scenario file; efflux only for an oral object drug,
        # as interact.prediction.routes_of), and the renal fraction that scales the secretion fractions
        self._routes = routes_of(v)
        self._route_inputs = [
            (
                pw.route,
                pw.enzyme,
                add(f"victim.pathways[{k}].fraction", f"{pw.route} fraction {pw.enzyme} of {v.name}", "", "fraction", pw.fm),
            )
            for k, pw in enumerate(v.pathways)
            if pw.route != "metabolism" and (pw.route != "intestinal efflux" or v.route == "oral")
        ]
        self._renal = None if v.renal_fraction is None else add(RENAL, f"renal fraction of {v.name}", "", "fraction", v.renal_fraction)
        ecm = v.extended_clearance
        self._hepatic_given = ecm is not None and ecm.hepatic_fraction is not None
        self._fg_given = v.fg
        self._organs = _model.ORGANS
        if self._routes.clearances is not None:
            liver = _model.Organ(site="liver", form="extended", clearances=self._routes.clearances, fraction=self._routes.hepatic_fraction)
            self._organs = {**_model.ORGANS, "liver": liver}
        kdeg, _ = kdeg_per_h(a.scenario, a.constants)
        self._kdeg: dict[str, tuple[str | None, str | None]] = {}
        for enzyme, (k_liver, k_gut) in kdeg.items():
            self._kdeg[enzyme] = (
                add(f"turnover.{enzyme}.kdeg_liver", f"kdeg {enzyme} (liver)", "1/h", "rate", k_liver) if k_liver is not None else None,
                add(f"turnover.{enzyme}.kdeg_gut", f"kdeg {enzyme} (gut)", "1/h", "rate", k_gut) if k_gut is not None else None,
            )

    # -- what can vary
    def inputs(self, relevant_only: bool = False) -> tuple[Input, ...]:
        """Every input the model reads (``relevant_only``: only those that can move the AUC ratio)."""
        return self._relevant if relevant_only else self._inputs

    def fraction_groups(self) -> tuple[tuple[tuple[str, ...], str | float], ...]:
        """The scenario reader's organ sums as (paths, limit): the paths' fractions add up to at most the limit
        (a number, or the path of the input that is the limit: Fg for intestinal efflux)."""
        fm = tuple(p for _, p in self._pathways)
        of = lambda route: tuple(p for r, _, p in self._route_inputs if r == route)  # noqa: E731
        renal = (self._renal,) if self._renal else ()
        if self._routes.clearances is None:
            groups: list[tuple[tuple[str, ...], str | float]] = [((*fm, *of("hepatic uptake"), *renal), 1.0)]
        else:
            hepatic = self._routes.hepatic_fraction if self._hepatic_given else 0.0
            groups = [(fm, 1.0), (of("hepatic uptake"), 1.0), (renal, 1.0 - hepatic)]
        fg: str | float = "victim.fg" if "victim.fg" in self._point else (1.0 if self._fg_given is None else self._fg_given)
        groups += [(of("intestinal efflux"), fg), (of("renal secretion"), 1.0)]
        return tuple((paths, limit) for paths, limit in groups if paths)

    def group_of(self, path: str) -> tuple[tuple[str, ...], str | float] | None:
        """The organ sum (:meth:`fraction_groups`) ``path`` belongs to, if any."""
        return next((g for g in self.fraction_groups() if path in g[0]), None)

    def fraction_room(self, path: str) -> float:
        """The largest value the fraction at ``path`` can take with the others of its organ sum at their point values
        (at most 1, at least 0)."""
        group = self.group_of(path)
        if group is None:
            return 1.0
        paths, limit = group
        whole = self._point[limit] if isinstance(limit, str) else limit
        return max(0.0, min(1.0, whole - sum(self._point[p] for p in paths if p != path)))

    def input(self, path: str) -> Input:
        """The input at ``path``; an :class:`InputError` lists the valid paths otherwise."""
        try:
            return self._by_path[path]
        except KeyError:
            known = ", ".join(i.path for i in self._relevant)
            raise InputError("vary", path, f"is not an input of this scenario's model; expected one of {known}") from None

    def point(self, path: str) -> float:
        return self._point[path]

    # -- the equations: interact.model on the arrays of the inputs
    def evaluate(self, values: Mapping[str, Any] | None = None) -> Ratios:
        """AUC ratios with ``values`` (path -> array or float, canonical units) replacing point values.

        Arrays broadcast against each other; the result has their common shape.  The arithmetic is
        :func:`interact.model.evaluate`, the one model :func:`interact.assess` evaluates on floats.
        """
        vals = values or {}

        def get(path: str) -> Any:
            return vals[path] if path in vals else self._point[path]

        liver_conc, gut_conc = self._concentrations(get)
        t = self._targets
        pathways = [_model.Pathway(target=t[enzyme], organ="liver", fraction=get(path)) for enzyme, path in self._pathways]
        if self._gut_enzyme is not None:
            pathways.insert(0, _model.Pathway(target=t[self._gut_enzyme], organ="gut", fraction=get("victim.fg")))
        pathways += route_pathways(self._routes_at(get), t)
        kdeg = {
            (t[enzyme], site): get(path)
            for enzyme, paths in self._kdeg.items()
            if enzyme in t
            for site, path in zip(("liver", "gut"), paths, strict=True)
            if path is not None
        }
        kidney_conc = [unbound_cmax_um(get(sp.cmax), self._fu(sp, get)) for sp in self._species]
        sites = {"liver": liver_conc, "gut": gut_conc, "kidney": kidney_conc}
        organs = self._organs
        if self._routes.clearances is not None and not self._hepatic_given and RENAL in vals:
            # the hepatic share of systemic clearance is 1 - the renal fraction when not given (routes_of)
            organs = {**organs, "liver": dataclasses.replace(organs["liver"], fraction=1.0 - get(RENAL))}
        r = _model.Model(self._acting(get), pathways, organs).evaluate(sites, kdeg)
        gut, liver, kidney = np.broadcast_arrays(
            np.asarray(r.gut, dtype=float), np.asarray(r.liver, dtype=float), np.asarray(r.kidney, dtype=float)
        )
        return Ratios(gut=gut, liver=liver, kidney=kidney, total=gut * liver * kidney)

    def _routes_at(self, get: Callable[[str], Any]) -> Routes:
        """The transporter routes with the fractions ``get`` gives (:func:`interact.prediction.routes_of`'s arithmetic)."""
        if not self._route_inputs:
            return self._routes
        renal = get(self._renal) if self._renal else 0.0
        of = lambda route: tuple((t, get(p)) for r, t, p in self._route_inputs if r == route)  # noqa: E731
        secretion = tuple((t, renal * f) for t, f in of("renal secretion"))
        return dataclasses.replace(self._routes, efflux=of("intestinal efflux"), uptake=of("hepatic uptake"), secretion=secretion)

    def _concentrations(self, get: Callable[[str], Any]) -> tuple[list[Any], list[Any]]:
        """Unbound concentrations (uM) of each species at the hepatic inlet and in the enterocytes (:mod:`interact.exposure`)."""
        liver_conc: list[Any] = []
        gut_conc: list[Any] = []
        for sp in self._species:
            cmax = get(sp.cmax)
            fu = self._fu(sp, get)
            if sp.parent and self._oral:
                ka = get("perpetrator.ka")
                dose = get("perpetrator.dose") if self._absorbed == 1.0 else get("perpetrator.dose") * self._absorbed
                qh, rb = get("physiology.hepatic_blood_flow"), get("perpetrator.blood_plasma_ratio")
                liver_conc.append(unbound_inlet_um(cmax, fu, dose, get("perpetrator.fa_fg"), ka, qh, rb))
                qent, fu_gut = get("physiology.enterocytic_blood_flow"), get("physiology.fu_gut")
                gut_conc.append(enterocyte_um(dose, get("perpetrator.fa"), ka, qent, fu_gut))
            else:
                imax_u = unbound_cmax_um(cmax, fu)
                liver_conc.append(imax_u)
                gut_conc.append(imax_u)
        given = self._given
        if given is not None and given.iin_max_u is not None:  # fixed at the given value (interact.exposure)
            liver_conc[0] = units.concentration_um(given.iin_max_u, None, field="perpetrator.site_concentrations.iin_max_u")
        if given is not None and given.ient is not None:
            gut_conc[0] = units.concentration_um(given.ient, None, field="perpetrator.site_concentrations.ient")
        return liver_conc, gut_conc

    def _fu(self, sp: _Species, get: Callable[[str], Any]) -> Any:
        """fu,p as used: raised to the floor unless a measured value may stand below it (as interact.exposure.floored_fu)."""
        fu = get(sp.fu)
        if not (sp.measured and self._exempt):
            fu = np.where(np.less(fu, self._floor), self._floor, fu)
        return fu

    def _acting(self, get: Callable[[str], Any]) -> list[_model.Acting]:
        """Unbound constants of the perpetrator (Ki,u = Ki x fu,inc after Cheng-Prusoff for an IC50; KI,u; EC50,u)."""
        out = []
        for c in self._consts:
            ki_u = None
            if c.ki is not None:
                ki = get(c.ki)
                if c.ic50_route is not None:
                    mech, sub, km, alpha = c.ic50_route
                    ki = ki_from_ic50(ki, mech, sub, km, alpha)
                ki_u = np.multiply(ki, get(c.fu_inc))
            tdi = c.kinact is not None and c.ki_inact is not None
            ind = c.emax is not None and c.ec50 is not None
            out.append(
                _model.Acting(
                    target=self._targets[c.target],
                    species=c.species_index,
                    ki_u=ki_u,
                    kinact=get(c.kinact) if tdi and c.kinact else None,
                    ki_inact_u=get(c.ki_inact) * get(c.ki_inact_fu) if tdi and c.ki_inact else None,
                    emax=get(c.emax) if ind and c.emax else None,
                    ec50_u=get(c.ec50) * get(c.ec50_fu) if ind and c.ec50 else None,
                    calibration=get(c.calibration) if ind else 1.0,
                )
            )
        return out

    def actions(self, total: NDArray[np.float64], gut: NDArray[np.float64] | None = None) -> NDArray[np.int8]:
        """Suggested-action codes (into :data:`interact.dosing.ACTIONS`) for AUC ratios ``total`` with gut parts ``gut``."""
        return choose_regimens(self.assessment.regimens, total, gut).action


# --------------------------------------------------------------------------- declarations


@dataclass(frozen=True, slots=True, kw_only=True)
class UncertaintySpec:
    """What varies and how it is sampled."""

    vary: tuple[tuple[str, str], ...] = ()  # (path, SPEC text)
    samples: int | None = None
    seed: int | None = None
    method: str | None = None


def parse_vary(text: str) -> tuple[str, str]:
    """Split ``PATH=SPEC`` (the ``--vary`` option)."""
    if not isinstance(text, str) or "=" not in text:
        raise InputError("--vary", text, "is not PATH=SPEC; expected e.g. perpetrator.inhibits[0].ki=cv:30%")
    path, spec = text.split("=", 1)
    if not path.strip():
        raise InputError("--vary", text, "has no input path before '='")
    return path.strip(), spec.strip()


def loads_spec(text: str, *, source: str = "uncertainty file") -> UncertaintySpec:
    """Read a sidecar TOML: ``[vary]`` with ``"PATH" = "SPEC"`` and optional ``[sampling]``."""
    from .files import loads_toml

    data = loads_toml(text, source)
    unknown = set(data) - {"vary", "sampling", "title", "notes"}
    if unknown:
        raise InputError(f"{source}: {sorted(unknown)[0]}", sorted(unknown)[0], "is not a known table; expected [vary] and [sampling]")
    vary = data.get("vary", {})
    if not isinstance(vary, dict):
        raise InputError(f"{source}: vary", vary, 'is not a table; expected [vary] with "PATH" = "SPEC" lines')
    pairs = []
    for path, spec in vary.items():
        if not isinstance(spec, str):
            raise InputError(f"{source}: vary.{path}", spec, f"is not text; {_SPEC_HELP}")
        pairs.append((path, spec))
    sampling = data.get("sampling", {})
    if not isinstance(sampling, dict):
        raise InputError(f"{source}: sampling", sampling, "is not a table")
    bad = set(sampling) - {"samples", "seed", "method"}
    if bad:
        raise InputError(f"{source}: sampling.{sorted(bad)[0]}", sorted(bad)[0], "is not a known key; expected samples, seed, method")
    samples, seed, method = sampling.get("samples"), sampling.get("seed"), sampling.get("method")
    for key, value, least in (("samples", samples, 1), ("seed", seed, 0)):
        if value is not None and (isinstance(value, bool) or not isinstance(value, int) or value < least):
            raise InputError(f"{source}: sampling.{key}", value, f"is not a whole number of at least {least}")
    if method is not None and method not in METHODS:
        raise InputError(f"{source}: sampling.method", method, f"is not one of {', '.join(METHODS)}")
    return UncertaintySpec(vary=tuple(pairs), samples=samples, seed=seed, method=method)


# --------------------------------------------------------------------------- sampling


@dataclass(frozen=True, slots=True, kw_only=True)
class Varied:
    input: Input
    distribution: Distribution
    adjusted: int  # samples moved to a bound or scaled (fractions, fm sums)


@dataclass(frozen=True, slots=True, kw_only=True)
class RegimenProbability:
    """How likely a regimen keeps the object drug's exposure inside its boundaries, under the sampled inputs."""

    regimen: Regimen | None  # None: the usual regimen, unchanged
    label: str
    probability: float
    feasible_at_point: bool  # inside the boundaries at the point estimate (an option the point suggestion offers)


@dataclass(frozen=True, slots=True, kw_only=True)
class UncertaintyResult:
    """AUC-ratio spread of one scenario under its declared input distributions."""

    method: str
    samples: int
    seed: int
    varied: tuple[Varied, ...]
    point_total: float
    percentiles: tuple[tuple[float, float, float, float, float], ...]  # (percent, gut, liver, kidney, total)
    exceedance: tuple[tuple[str, float, float], ...]  # (">=" | "<=", threshold, probability)
    classes: tuple[tuple[str, float], ...]  # (label, probability), all labels
    most_probable_class: str
    point_class: str
    point_action: str
    action_probabilities: tuple[tuple[str, float], ...]
    action_change_probability: float
    fm_scaled: int  # samples whose fractions broke an organ sum and were scaled down (fm, transporter routes, renal fraction)
    boundary: tuple[float, float]
    regimen_probabilities: tuple[RegimenProbability, ...]  # the usual regimen, every point-feasible option, and the best
    best_regimen: RegimenProbability  # the highest probability of staying inside (ties: the usual regimen, then dose changes)
    point_regimen: RegimenProbability | None  # the point suggestion's regimen (None when the point suggestion is no regimen)
    total: NDArray[np.float64] = field(repr=False, compare=False)
    gut: NDArray[np.float64] = field(default_factory=lambda: np.empty(0), repr=False, compare=False)
    liver: NDArray[np.float64] = field(default_factory=lambda: np.empty(0), repr=False, compare=False)
    kidney: NDArray[np.float64] = field(default_factory=lambda: np.empty(0), repr=False, compare=False)
    inputs: dict[str, NDArray[np.float64]] = field(default_factory=dict, repr=False, compare=False)

    def percentile(self, q: float) -> float:
        for pct, *_, t in self.percentiles:
            if pct == q:
                return t
        raise KeyError(q)

    def sample_columns(self) -> dict[str, NDArray[np.float64]]:
        """Every sample as named columns of equal length.

        Returns
        -------
        dict of str to ndarray
            One column per varied input, named by its path (values in the
            input's canonical unit, :attr:`Input.unit`, after clipping to its
            bounds and scaling of organ sums), then ``auc_ratio_gut``,
            ``auc_ratio_liver``, ``auc_ratio_kidney`` and ``auc_ratio`` (dimensionless).
        """
        n = self.total.size
        out = {path: np.broadcast_to(x, (n,)) for path, x in self.inputs.items()}
        out.update(auc_ratio_gut=self.gut, auc_ratio_liver=self.liver, auc_ratio_kidney=self.kidney, auc_ratio=self.total)
        return out

    def to_records(self) -> np.ndarray:
        """:meth:`sample_columns` as a numpy structured array (one record per sample)."""
        cols = self.sample_columns()
        records = np.empty(self.total.size, dtype=[(k, np.float64) for k in cols])
        for k, v in cols.items():
            records[k] = v
        return records

    def to_pandas(self) -> Any:
        """:meth:`sample_columns` as a pandas DataFrame (needs pandas: ``pip install interact[data]``)."""
        from .results import data_frame

        return data_frame(self.sample_columns())

    def __repr__(self) -> str:
        from .results import uncertainty_repr

        return uncertainty_repr(self)

    def _repr_html_(self) -> str:
        from .results import uncertainty_html

        return uncertainty_html(self)


PERCENTS: Final = (5.0, 50.0, 95.0)


def scenario_intervals(model: ScenarioModel) -> list[tuple[Input, Distribution]]:
    """Distributions from the intervals the scenario carries (``ki_ci`` and the like, written by ``fit --into``).

    Each becomes a log-normal with the interval as its 95 % range (:func:`interval_distribution`), in the
    input's canonical unit; only inputs that can move the AUC ratio are included.
    """
    relevant = {i.path for i in model.inputs(relevant_only=True)}
    out = []
    for prefix, item, mw in _inhibition_items(model.assessment.scenario):
        for key, kind in INTERVAL_KEYS.items():
            ci = item.interval(key)
            path = f"{prefix}.{key}"
            if ci is None or path not in relevant:
                continue
            inp = model.input(path)
            field = f"{prefix}.{key}_ci"
            if kind == "concentration":
                lo, hi = (units.concentration_um(q, mw, field=field) for q in ci)
            elif kind:
                lo, hi = (units.magnitude(q, inp.unit) for q in ci)
            else:
                lo, hi = float(ci[0]), float(ci[1])
            out.append(
                (inp, interval_distribution(lo, hi, text=f"ci:{lo:.4g},{hi:.4g} {inp.unit} (from {key}_ci in the scenario)".strip()))
            )
    return out


def _resolve(model: ScenarioModel, vary: Sequence[tuple[str, str]], use_intervals: bool = True) -> list[tuple[Input, Distribution]]:
    """Declared distributions, then (``use_intervals``) the scenario's own intervals for inputs not declared."""
    out = []
    seen: set[str] = set()
    for path, spec in vary:
        inp = model.input(path)
        if path in seen:
            raise InputError("vary", path, "is declared twice; give one distribution per input")
        seen.add(path)
        out.append((inp, parse_distribution(spec, inp)))
    if use_intervals:
        out.extend((inp, dist) for inp, dist in scenario_intervals(model) if inp.path not in seen)
    return out


def _draw(pairs: list[tuple[Input, Distribution]], n: int, method: str, seed: int) -> dict[str, NDArray[np.float64]]:
    rng = np.random.default_rng(seed)
    drawn: dict[str, NDArray[np.float64]] = {}
    active = [(i, d) for i, d in pairs if d.kind != "fixed"]
    if method == "lhs" and active:
        from scipy.stats import qmc

        u = qmc.LatinHypercube(d=len(active), rng=rng).random(n)
        for k, (inp, dist) in enumerate(active):
            drawn[inp.path] = dist.ppf(u[:, k], inp.value)
    else:
        for inp, dist in active:
            drawn[inp.path] = dist.draw(rng, n, inp.value)
    return drawn


def _evaluate_draws(
    model: ScenarioModel,
    pairs: list[tuple[Input, Distribution]],
    drawn: dict[str, NDArray[np.float64]],
    samples: int,
    progress: Callable[[int, int], None] | None = None,
) -> tuple[Ratios, dict[str, int], int]:
    """Gut, liver, kidney and total AUC ratios of drawn inputs, after moving draws to their bounds and scaling
    fractions that break an organ sum (:func:`_scale_groups`).

    ``drawn`` (path -> array of ``samples`` values, canonical units) is updated in place with the values used.
    Returns the ratios, the count of draws moved to a bound per path, and the count of samples whose fractions were scaled.
    """
    adjusted: dict[str, int] = {}
    for inp, dist in pairs:
        x = drawn.get(inp.path)
        adjusted[inp.path] = 0
        if x is None:
            continue
        # only the bounds a distribution can cross are checked: a log-normal is positive, a uniform stays in its range
        low = 0.0 if inp.path.endswith((".fm", ".fraction")) or inp.path == RENAL else _TINY
        high = 1.0 if inp.is_fraction else math.inf
        check_low = dist.kind == "uniform" and dist.low < low
        check_high = dist.kind == "lognormal" and high < math.inf
        if check_low or check_high:
            bad = np.count_nonzero(x < low) if check_low else 0
            bad += np.count_nonzero(x > high) if check_high else 0
            adjusted[inp.path] = int(bad)
            if bad:
                drawn[inp.path] = np.clip(x, low, high)
    fm_scaled = _scale_groups(model, pairs, drawn, samples)

    gut = np.empty(samples)
    liver = np.empty(samples)
    kidney = np.empty(samples)
    total = np.empty(samples)
    for start in range(0, samples, _CHUNK):
        stop = min(samples, start + _CHUNK)
        r = model.evaluate({k: v[start:stop] for k, v in drawn.items()})
        gut[start:stop] = np.broadcast_to(r.gut, (stop - start,))
        liver[start:stop] = np.broadcast_to(r.liver, (stop - start,))
        kidney[start:stop] = np.broadcast_to(r.kidney, (stop - start,))
        total[start:stop] = np.broadcast_to(r.total, (stop - start,))
        if progress is not None:
            progress(stop, samples)
    return Ratios(gut=gut, liver=liver, kidney=kidney, total=total), adjusted, fm_scaled


def _scale_groups(
    model: ScenarioModel, pairs: list[tuple[Input, Distribution]], drawn: dict[str, NDArray[np.float64]], samples: int
) -> int:
    """Per sample, scale down together the varied fractions of each organ sum they break (the scenario reader's
    sums, :meth:`ScenarioModel.fraction_groups`): the drawn ones, and every fm when any fm is drawn; the others stay
    at their point values and leave the rest of the limit.  ``drawn`` is updated in place; returns the number of
    samples scaled."""
    dist_of = {i.path: d for i, d in pairs}
    fm_paths = {p for _, p in model._pathways}
    any_fm = any(p in drawn for p in fm_paths)

    def most(path: str) -> float:
        d = dist_of.get(path)
        if path not in drawn or d is None or d.kind == "fixed":
            return model.point(path)
        return d.high if d.kind == "uniform" else 1.0

    scaled = np.zeros(samples, dtype=bool)
    for paths, limit in model.fraction_groups():
        moving = [p for p in paths if p in drawn or (any_fm and p in fm_paths)]
        if not moving:
            continue
        whole = drawn.get(limit, model.point(limit)) if isinstance(limit, str) else limit
        room = np.maximum(np.asarray(whole, dtype=float) - sum(model.point(p) for p in paths if p not in moving), 0.0)
        if np.all(sum(most(p) for p in moving) <= room):
            continue  # no draw can break this sum
        parts, over = scale_to_room([np.broadcast_to(drawn.get(p, model.point(p)), (samples,)) for p in moving], room)
        if over.any():
            drawn.update(zip(moving, parts, strict=True))
            scaled |= over
    return int(np.count_nonzero(scaled))


def scale_to_room(parts: Sequence[Any], room: Any) -> tuple[list[NDArray[np.float64]], NDArray[np.bool_]]:
    """Fractions ``parts`` (arrays of one shape) scaled down together, element by element, by room / sum where their
    sum exceeds ``room`` (the rest of an organ sum's limit): the organ-sum rule of the uncertainty run and of the
    probabilistic batch screen.  Returns the parts (unchanged where they fit) and where they were scaled."""
    total = sum((np.asarray(p, dtype=float) for p in parts), start=np.zeros(np.shape(parts[0])))
    over = total > room
    factor = np.where(over, room / np.where(over, total, 1.0), 1.0)
    return [np.asarray(p, dtype=float) * factor for p in parts], over


def _refuse_nonfinite(total: NDArray[np.float64], pairs: list[tuple[Input, Distribution]]) -> None:
    """Never "not a number" in a summary: the input ranges keep ratios finite, so this names the inputs if not."""
    nonfinite = ~np.isfinite(total)
    if nonfinite.any():
        raise InputError(
            "vary",
            ", ".join(inp.path for inp, _ in pairs),
            f"gave a ratio that is not a finite number in {int(nonfinite.sum()):,} of {total.size:,} samples; narrow these distributions",
        )


def run_uncertainty(
    assessment: Assessment,
    vary: Sequence[tuple[str, str]],
    *,
    samples: int = 10_000,
    seed: int = 0,
    method: str = "lhs",
    use_intervals: bool = True,
    progress: Callable[[int, int], None] | None = None,
) -> UncertaintyResult:
    """Sample the declared inputs and summarise the AUC ratio.

    Parameters
    ----------
    assessment
        The point assessment (its scenario, rule set and settings are used).
    vary
        (PATH, SPEC) pairs, see :func:`parse_distribution`.
    samples
        Number of samples (1 to 5,000,000).
    seed
        Seed of the numpy Generator; the same seed gives the same numbers.
    method
        ``mc`` (independent draws) or ``lhs`` (Latin hypercube, scipy.stats.qmc).
    use_intervals
        Also vary every constant whose interval the scenario gives (``ki_ci`` ...), as a log-normal
        with that 95 % range, unless ``vary`` declares a distribution for it (declared ones win).
    progress
        Called as ``progress(done, samples)`` after each chunk of samples is evaluated.

    Returns
    -------
    UncertaintyResult
        Percentiles, class and action probabilities, and every sample kept as arrays
        (:meth:`UncertaintyResult.sample_columns`).
    """
    if method not in METHODS:
        raise InputError("method", method, f"is not one of {', '.join(METHODS)}")
    if isinstance(samples, bool) or not isinstance(samples, int) or not 1 <= samples <= MAX_SAMPLES:
        raise InputError("samples", samples, f"is not a whole number from 1 to {MAX_SAMPLES:,}")
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise InputError("seed", seed, "is not a whole number of at least 0")
    model = ScenarioModel(assessment)
    pairs = _resolve(model, vary, use_intervals)
    if not pairs:
        raise InputError(
            "vary", "nothing", "declares no uncertain input and the scenario carries no interval; give --vary PATH=SPEC or a --spec file"
        )
    drawn = _draw(pairs, samples, method, seed)
    ratios, adjusted, fm_scaled = _evaluate_draws(model, pairs, drawn, samples, progress)
    _refuse_nonfinite(ratios.total, pairs)
    result = summarise(assessment, model, pairs, adjusted, fm_scaled, ratios, method=method, seed=seed)
    return dataclasses.replace(result, inputs=dict(drawn))


def summarise(
    assessment: Assessment,
    model: ScenarioModel,
    pairs: list[tuple[Input, Distribution]],
    adjusted: dict[str, int],
    fm_scaled: int,
    ratios: Ratios,
    *,
    method: str,
    seed: int,
) -> UncertaintyResult:
    classes = load_classes()
    gut, liver, kidney, total = ratios.gut, ratios.liver, ratios.kidney, ratios.total
    n = total.size
    # one sort of the total ratios serves its percentiles, the threshold counts, the classes and the
    # actions (counts do not depend on the order; searching sorted values is fast)
    ts = np.sort(total)
    pg, pl, pk, pt = (np.percentile(x, PERCENTS) for x in (gut, liver, kidney, ts))
    percentiles = tuple((q, float(pg[k]), float(pl[k]), float(pk[k]), float(pt[k])) for k, q in enumerate(PERCENTS))
    exceed = [
        (">=", b.bound, float(n - np.searchsorted(ts, b.bound, side="left")) / n) for b in sorted(classes.inhibition, key=lambda b: b.bound)
    ]
    if "induction" in assessment.prediction.mechanisms or float(ts[0]) < 1.0:
        exceed += [
            ("<=", b.bound, float(np.searchsorted(ts, b.bound, side="right")) / n)
            for b in sorted(classes.induction, key=lambda b: -b.bound)
        ]
    labels = band_labels(classes)
    codes = band_codes(ts, classes)
    counts = np.bincount(codes, minlength=len(labels))
    point_code = int(band_codes(assessment.prediction.total, classes))
    actions = model.actions(total, gut)
    action_counts = np.bincount(actions.ravel(), minlength=len(ACTIONS))
    point_action = assessment.dose.action
    regimen_probs, best, point_regimen = _regimen_probabilities(assessment, total, gut)
    change = 1.0 - float(action_counts[ACTIONS.index(point_action)]) / n
    return UncertaintyResult(
        method=method,
        samples=n,
        seed=seed,
        varied=tuple(Varied(input=i, distribution=d, adjusted=adjusted.get(i.path, 0)) for i, d in pairs),
        point_total=assessment.prediction.total,
        percentiles=percentiles,
        exceedance=tuple(exceed),
        classes=tuple((labels[k], float(counts[k]) / n) for k in range(len(labels))),
        most_probable_class=labels[int(np.argmax(counts))],
        point_class=labels[point_code],
        point_action=point_action,
        action_probabilities=tuple((ACTIONS[k], float(action_counts[k]) / n) for k in range(len(ACTIONS))),
        action_change_probability=change,
        fm_scaled=fm_scaled,
        boundary=assessment.dose.boundary,
        regimen_probabilities=regimen_probs,
        best_regimen=best,
        point_regimen=point_regimen,
        total=total,
        gut=gut,
        liver=liver,
        kidney=kidney,
    )


def _regimen_probabilities(
    assessment: Assessment, total: NDArray[np.float64], gut: NDArray[np.float64]
) -> tuple[tuple[RegimenProbability, ...], RegimenProbability, RegimenProbability | None]:
    """P(inside the boundaries) for the usual regimen and each candidate; the options to show and the best."""
    plan, d = assessment.regimens, assessment.dose
    p_usual, p_cand = feasible_fraction(plan, total, gut)
    point_feasible = {o.index for o in d.options}
    usual_ok = d.boundary[0] <= d.auc_ratio <= d.boundary[1]
    usual = RegimenProbability(regimen=None, label="usual regimen, unchanged", probability=p_usual, feasible_at_point=usual_ok)
    entries = [
        RegimenProbability(
            regimen=reg,
            label=regimen_label(reg, plan.dose_unit),
            probability=float(p_cand[k]),
            feasible_at_point=k in point_feasible,
        )
        for k, reg in enumerate(plan.candidates)
    ]
    best = usual
    for e in entries:  # candidate order breaks ties (dose changes before intervals, fewer units first)
        if e.probability > best.probability:
            best = e
    shown = sorted([usual, *(e for e in entries if e.feasible_at_point)], key=lambda e: -e.probability)
    if best not in shown:
        shown.append(best)
    point: RegimenProbability | None = None
    if d.chosen is not None:
        point = entries[d.chosen.index]
    elif d.action == "no change":
        point = usual
    return tuple(shown), best, point


# --------------------------------------------------------------------------- sensitivity


@dataclass(frozen=True, slots=True, kw_only=True)
class TornadoBar:
    """One input swung alone: its low and high values (the input's canonical unit) and the AUC ratios there (dimensionless)."""

    input: Input
    low: float
    high: float
    aucr_low: float
    aucr_high: float
    swing: str  # where the range came from

    @property
    def effect(self) -> float:
        return abs(self.aucr_high - self.aucr_low)


@dataclass(frozen=True, slots=True, kw_only=True)
class FmCurve:
    """The liver AUC ratio (dimensionless) against fm (fraction) for one [I]/Ki,u, or for this scenario's main pathway."""

    label: str
    fm: tuple[float, ...]
    aucr: tuple[float, ...]


@dataclass(frozen=True, slots=True, kw_only=True)
class CrossingPoint:
    """The value of one input at which the AUC ratio reaches the victim's boundary."""

    input: Input
    boundary: float
    value: float | None  # None: never reached within the input's range
    now: float
    sentence: str


@dataclass(frozen=True, slots=True, kw_only=True)
class Sensitivity:
    """Sensitivity of the AUC ratio.

    One-at-a-time (tornado) and variance-based (Sobol') indices, the ratio against fm and the
    boundary crossings.
    """

    point_total: float
    bars: tuple[TornadoBar, ...]
    curves: tuple[FmCurve, ...]
    scenario_ratio: float | None  # [I]/Ki,u of the main pathway's strongest reversible inhibitor
    scenario_fm: float | None
    crossings: tuple[CrossingPoint, ...]
    default_swing: bool
    variance: VarianceIndices | None = None  # variance-based indices over the declared distributions (None: none declared)


# --------------------------------------------------------------------------- variance-based (Sobol') indices

#: base samples of the Sobol' design (a power of 2); the model is evaluated base x (inputs + 2) times
SOBOL_SAMPLES: Final = 4096


#: the organ ratios whose variance-based indices are reported beside the total's
ORGAN_OUTPUTS: Final = ("gut", "liver", "kidney")


@dataclass(frozen=True, slots=True, kw_only=True)
class OrganIndices:
    """First-order and total Sobol' indices of one organ's AUC ratio (one value per input).

    ``constant`` is True when the organ's ratio took one value over the whole design (no sampled
    input moves it): its variance is 0, so no input has a share of it and its indices are 0
    (scipy.stats.sobol_indices sets indices of a null variance to 0; the flag says why they are).
    """

    organ: str
    first_order: tuple[float, ...]
    total_order: tuple[float, ...]
    constant: bool


@dataclass(frozen=True, slots=True, kw_only=True)
class VarianceIndices:
    """First-order and total Sobol' indices of the AUC ratio over the declared input distributions.

    ``first_order[k]`` is the share of the AUC ratio's variance due to input ``k`` alone,
    ``total_order[k]`` the share due to it with all its interactions (Saltelli et al. 2010
    estimators, as computed by :func:`scipy.stats.sobol_indices`).  Estimates carry sampling
    noise: values slightly below 0 or above 1 can occur for inputs with almost no effect.
    """

    inputs: tuple[Input, ...]
    first_order: tuple[float, ...]
    total_order: tuple[float, ...]
    base_samples: int
    evaluations: int
    seed: int
    output: str = "AUC ratio (total)"
    organs: tuple[OrganIndices, ...] = ()  # the same indices of the gut, liver and kidney ratios

    def as_columns(self) -> dict[str, Any]:
        """``input`` (paths), ``label``, ``first_order`` and ``total_order`` (of the total AUC ratio), then
        ``first_order_ORGAN`` and ``total_order_ORGAN`` for gut, liver and kidney, as named columns."""
        out: dict[str, Any] = {
            "input": [i.path for i in self.inputs],
            "label": [i.label for i in self.inputs],
            "first_order": np.asarray(self.first_order),
            "total_order": np.asarray(self.total_order),
        }
        for o in self.organs:
            out[f"first_order_{o.organ}"] = np.asarray(o.first_order)
            out[f"total_order_{o.organ}"] = np.asarray(o.total_order)
        return out

    def to_pandas(self) -> Any:
        """:meth:`as_columns` as a pandas DataFrame (needs pandas: ``pip install interact[data]``)."""
        from .results import data_frame

        return data_frame(self.as_columns())


def variance_indices(
    func: Callable[[NDArray[np.float64]], NDArray[np.float64]], dists: Sequence[Any], *, samples: int, seed: int = 0
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """First-order and total Sobol' indices of ``func`` over independent inputs (scipy.stats.sobol_indices).

    Parameters
    ----------
    func
        Takes ``x`` of shape (inputs, n) and returns shape (outputs, n) (finite values).
    dists
        One object with a ``ppf`` method per input (a scipy distribution, or a marginal of a
        declared :class:`Distribution`).
    samples
        Base sample size, a power of 2; ``func`` sees ``samples x (inputs + 2)`` points.
    seed
        Seed of the numpy Generator that scrambles the Sobol' sequence.

    Returns
    -------
    (first_order, total_order)
        Arrays of shape (outputs, inputs).

    References
    ----------
    Saltelli A. et al. (2010) Variance based sensitivity analysis of model output. Design and
    estimator for the total sensitivity index. Comput Phys Commun 181:259-270 (the estimators
    scipy implements as ``method="saltelli_2010"``).
    """
    from scipy.stats import sobol_indices

    if isinstance(samples, bool) or not isinstance(samples, int) or samples < 2 or samples & (samples - 1):
        raise InputError("samples", samples, "is not a power of 2 of at least 2 (the Sobol' design needs one)")
    res = sobol_indices(func=func, n=samples, dists=list(dists), method="saltelli_2010", rng=np.random.default_rng(seed))
    d = len(dists)  # scipy drops the input axis when there is one input: restore (outputs, inputs)
    return np.reshape(res.first_order, (-1, d)), np.reshape(res.total_order, (-1, d))


@dataclass(frozen=True, slots=True)
class _Marginal:
    """A declared distribution with its point value bound, as the ``ppf`` object scipy expects."""

    dist: Distribution
    point: float

    def ppf(self, u: NDArray[np.float64]) -> NDArray[np.float64]:
        return self.dist.ppf(np.asarray(u, dtype=float), self.point)


def sobol_indices(
    assessment: Assessment, vary: Sequence[tuple[str, str]], *, samples: int = SOBOL_SAMPLES, seed: int = 0
) -> VarianceIndices | None:
    """Variance-based sensitivity of the total AUC ratio to the declared (non-fixed) input distributions.

    The model evaluated is the uncertainty run's (the same clipping of draws to their bounds and
    scaling of fm sums over 1).  Returns None when no input has a non-fixed distribution.

    Parameters
    ----------
    assessment
        The point assessment.
    vary
        (PATH, SPEC) pairs, as for :func:`run_uncertainty`.
    samples
        Base sample size (a power of 2); the model runs ``samples x (inputs + 2)`` times.
    seed
        Seed of the scrambled Sobol' sequence.
    """
    model = ScenarioModel(assessment)
    pairs = _resolve(model, vary)
    active = [(i, d) for i, d in pairs if d.kind != "fixed"]
    if not active:
        return None

    moved = np.zeros(len(ORGAN_OUTPUTS), dtype=bool)  # which organ ratios changed anywhere in the design

    def func(x: NDArray[np.float64]) -> NDArray[np.float64]:
        drawn = {inp.path: np.array(x[k], dtype=float) for k, (inp, _) in enumerate(active)}
        r, _, _ = _evaluate_draws(model, pairs, drawn, x.shape[1])
        _refuse_nonfinite(r.total, pairs)
        # several outputs (gut, liver, kidney, total): scipy 1.17 fails on a single input with a single output
        out = np.vstack([r.gut, r.liver, r.kidney, r.total])
        moved[:] |= np.ptp(out[:-1], axis=1) > 0
        return out

    first, total = variance_indices(func, [_Marginal(d, i.value) for i, d in active], samples=samples, seed=seed)
    organs = tuple(
        OrganIndices(
            organ=name,
            first_order=tuple(float(v) for v in first[k]),
            total_order=tuple(float(v) for v in total[k]),
            constant=not bool(moved[k]),
        )
        for k, name in enumerate(ORGAN_OUTPUTS)
    )
    return VarianceIndices(
        inputs=tuple(i for i, _ in active),
        first_order=tuple(float(v) for v in first[-1]),
        total_order=tuple(float(v) for v in total[-1]),
        base_samples=samples,
        evaluations=samples * (len(active) + 2),
        seed=seed,
        organs=organs,
    )


DEFAULT_FOLD: Final = 2.0


def _default_range(inp: Input, model: ScenarioModel) -> tuple[float, float]:
    """x/÷ 2 around the point value; fractions capped at 1 (and so that their organ sum still holds)."""
    lo, hi = inp.value / DEFAULT_FOLD, inp.value * DEFAULT_FOLD
    if inp.is_fraction:
        cap = 1.0
        if model.group_of(inp.path) is not None:
            cap = max(inp.value, model.fraction_room(inp.path))
        hi = min(hi, cap)
    return lo, hi


def tornado(model: ScenarioModel, vary: Sequence[tuple[str, str]] = ()) -> tuple[tuple[TornadoBar, ...], bool]:
    """One input at a time swung across its 95% interval (or x/÷ 2 when none is declared), ranked by effect.

    Returns the bars (largest effect first) and whether the default swing was used.
    """
    pairs = _resolve(model, vary)
    default = not pairs
    chosen: list[tuple[Input, Distribution | None]]
    if default:
        chosen = [(i, None) for i in model.inputs(relevant_only=True) if i.value > 0]
    else:
        chosen = [(i, d) for i, d in pairs if d.kind != "fixed"]
    if not chosen:
        return (), default
    ranges = []
    for inp, dist in chosen:
        if dist is None:
            lo, hi = _default_range(inp, model)
            ranges.append((inp, lo, hi, f"x/÷ {DEFAULT_FOLD:g} (no distribution declared)"))
        else:
            lo, hi = dist.interval(inp.value)
            if inp.is_fraction:
                lo, hi = max(lo, _TINY), min(hi, 1.0)
            ranges.append((inp, lo, hi, "95% interval of " + dist.describe(inp.unit)))
    n = len(ranges)
    values: dict[str, NDArray[np.float64]] = {}
    for k, (inp, lo, hi, _) in enumerate(ranges):
        arr = values.setdefault(inp.path, np.full(2 * n, inp.value))
        arr[2 * k], arr[2 * k + 1] = lo, hi
    total = model.evaluate(values).total
    total = np.broadcast_to(total, (2 * n,))
    bars = [
        TornadoBar(input=inp, low=lo, high=hi, aucr_low=float(total[2 * k]), aucr_high=float(total[2 * k + 1]), swing=why)
        for k, (inp, lo, hi, why) in enumerate(ranges)
    ]
    bars.sort(key=lambda b: -b.effect)
    return tuple(bars), default


CURVE_RATIOS: Final = (0.1, 0.5, 1.0, 2.0, 5.0, 10.0, 50.0)


def fm_curves(ratios: Sequence[float] = CURVE_RATIOS, points: int = 101) -> tuple[FmCurve, ...]:
    """Liver AUC ratio against fm for reversible inhibition at several [I]/Ki,u (no gut term).

    AUCR = 1 / (fm / (1 + [I]/Ki,u) + 1 - fm)   (the liver term of :mod:`interact.prediction`)
    """
    fm = np.linspace(0.0, 1.0, points)
    out = []
    for r in ratios:
        a = reversible_term(r)
        aucr = liver_ratio(fm[:, None], np.full((points, 1), a))
        out.append(FmCurve(label=f"[I]/Ki,u = {r:g}", fm=tuple(float(x) for x in fm), aucr=tuple(float(x) for x in aucr)))
    return tuple(out)


def _main_pathway(model: ScenarioModel) -> tuple[str, str] | None:
    if not model._pathways:
        return None
    k = int(np.argmax([model.point(p) for _, p in model._pathways]))
    return model._pathways[k]


def crossing_points(model: ScenarioModel) -> tuple[CrossingPoint, ...]:
    """Ki (or IC50) of each reversible constant on the victim's pathways, and the main pathway's fm,
    at which the total AUC ratio reaches the victim's no-effect boundary (brentq on a log scale)."""
    from scipy.optimize import brentq

    a = model.assessment
    lower, upper = a.dose.boundary
    point = a.prediction.total
    boundary = upper if point >= 1.0 else lower
    word = "above" if boundary == upper else "below"
    out: list[CrossingPoint] = []
    targets = {e for e, _ in model._pathways} | ({model._gut_enzyme} if model._gut_enzyme else set())

    def total_at(path: str, x: float) -> float:
        return float(model.evaluate({path: np.asarray(x)}).total)

    for c in model._consts:
        if c.ki is None or c.target not in targets:
            continue
        inp = model.input(c.ki)
        now = inp.value
        name = "Ki" if c.ki.endswith(".ki") else "IC50"

        def g(log_x: float, path: str = c.ki) -> float:
            return total_at(path, math.exp(log_x)) - boundary

        lo_x, hi_x = math.log(now) - 30.0, math.log(now) + 30.0
        if g(lo_x) * g(hi_x) > 0:
            side = "above" if point >= boundary else "below"
            sentence = (
                f"Changing only the {name} of {c.species} on {c.target} cannot bring the AUC ratio to {boundary:g}: "
                f"it stays {side} for any value from {now * math.exp(-30):.3g} to {now * math.exp(30):.3g} uM."
            )
            out.append(CrossingPoint(input=inp, boundary=boundary, value=None, now=now, sentence=sentence))
            continue
        x = math.exp(brentq(g, lo_x, hi_x, xtol=1e-12, rtol=1e-10))
        fu = model.point(c.fu_inc)
        unbound_now = float(np.multiply(ki_from_ic50(now, *c.ic50_route) if c.ic50_route else now, fu))
        unbound_x = float(np.multiply(ki_from_ic50(x, *c.ic50_route) if c.ic50_route else x, fu))
        if boundary == upper:
            if point < upper:
                sentence = (
                    f"The AUC ratio stays below {upper:g} as long as the {name} of {c.species} on {c.target} "
                    f"exceeds {x:.3g} uM (Ki,u {unbound_x:.3g} uM); it is {now:.3g} uM "
                    f"(Ki,u {unbound_now:.3g} uM), a margin of {now / x:.3g}-fold."
                )
            else:
                sentence = (
                    f"The AUC ratio would fall to {upper:g} only if the {name} of {c.species} on {c.target} rose to {x:.3g} uM "
                    f"(Ki,u {unbound_x:.3g} uM) from {now:.3g} uM ({x / now:.3g}-fold)."
                )
        else:
            sentence = f"The AUC ratio crosses {boundary:g} ({word} is outside) at {name} {x:.3g} uM for {inp.label}; it is {now:.3g} uM."
        out.append(CrossingPoint(input=inp, boundary=boundary, value=x, now=now, sentence=sentence))

    main = _main_pathway(model)
    if main is not None:
        enzyme, path = main
        inp = model.input(path)
        cap = model.fraction_room(path)

        def h(fm: float) -> float:
            return total_at(path, fm) - boundary

        if cap > 0 and h(0.0) * h(cap) < 0:
            x = brentq(h, 0.0, cap, xtol=1e-12)
            if point < boundary:
                sentence = f"The AUC ratio stays below {boundary:g} as long as fm {enzyme} is under {x:.3g}; it is {inp.value:.3g}."
            else:
                sentence = f"The AUC ratio reaches {boundary:g} at fm {enzyme} = {x:.3g}; it is {inp.value:.3g}."
            out.append(CrossingPoint(input=inp, boundary=boundary, value=x, now=inp.value, sentence=sentence))
        else:
            out.append(
                CrossingPoint(
                    input=inp,
                    boundary=boundary,
                    value=None,
                    now=inp.value,
                    sentence=f"No fm {enzyme} between 0 and {cap:.3g} brings the AUC ratio to {boundary:g}.",
                )
            )
    return tuple(out)


def sensitivity(assessment: Assessment, vary: Sequence[tuple[str, str]] = ()) -> Sensitivity:
    """Tornado, AUCR-versus-fm curves, boundary crossings and (with ``vary``) variance-based indices for one scenario."""
    model = ScenarioModel(assessment)
    bars, default = tornado(model, vary)
    ratio = fm = None
    main = _main_pathway(model)
    curves = list(fm_curves())
    if main is not None:
        enzyme, path = main
        fm = model.point(path)
        effects = {e.enzyme: e for e in assessment.prediction.effects}
        eff = effects.get(enzyme)
        if eff is not None and eff.liver.reversible < 1.0:
            ratio = 1.0 / eff.liver.reversible - 1.0  # sum [I]/Ki,u on that enzyme in the liver
        grid = np.linspace(0.0, model.fraction_room(path), 101)
        tot = np.broadcast_to(model.evaluate({path: grid}).total, grid.shape)
        curves.append(
            FmCurve(label=f"this scenario (fm {enzyme} varied)", fm=tuple(float(x) for x in grid), aucr=tuple(float(x) for x in tot))
        )
    return Sensitivity(
        point_total=assessment.prediction.total,
        bars=bars,
        curves=tuple(curves),
        scenario_ratio=ratio,
        scenario_fm=fm,
        crossings=crossing_points(model),
        default_swing=default,
        variance=sobol_indices(assessment, vary),  # None when nothing is uncertain (no declared distribution, no interval)
    )
