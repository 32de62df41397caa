"""Mechanistic static model for one scenario: the victim's AUC ratio in gut, liver and in total.

The arithmetic is :mod:`interact.model` (equations and sources there), evaluated on floats;
this module turns a scenario's constants and concentrations into its inputs and its result into
:class:`Prediction` records (terms per enzyme, mechanism parts, ceilings, band).  Complete
inhibition bounds the ratio by 1/(1 - sum fm) in the liver and 1/Fg in the gut.

The object drug's transporter routes (:class:`Routes`) are pathways of the same model: intestinal
efflux in the gut (at I,ent), hepatic uptake in the liver (at Iin,max,u; with the hepatic clearances,
the extended clearance concept), renal secretion in the kidney (at Imax,u); see :mod:`interact.model`.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Final, NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from . import model
from .constants import Constant
from .errors import InputError
from .exposure import SpeciesExposure
from .scenario import METABOLISM, VICTIM_ROUTES, Victim
from .tables import Band, Classes
from .transporters import clearance_regime

__all__ = [
    "EnzymeEffect",
    "MechanismPart",
    "Prediction",
    "RouteEffect",
    "Routes",
    "gut_ratio",
    "inactivation_term",
    "induction_term",
    "liver_ratio",
    "predict",
    "ratio_function",
    "refuse_routes",
    "reversible_term",
    "route_pathways",
    "routes_of",
]

MECHANISM_PARTS = ("reversible", "time-dependent", "induction")
#: name of the part with both inhibitory mechanisms on (reported when induction is also present)
INHIBITION_PART = "reversible + time-dependent"


def reversible_term(sum_ratio: ArrayLike) -> NDArray[np.float64]:
    """Fraction of activity left by reversible inhibition: 1/(1 + sum [I]/Ki,u)."""
    return np.asarray(model.reversible(np.asarray(sum_ratio, dtype=float)))


def inactivation_term(kobs_per_h: ArrayLike, kdeg_per_h: ArrayLike) -> NDArray[np.float64]:
    """Fraction of enzyme left at steady state by inactivation: kdeg/(kdeg + kobs)."""
    return np.asarray(model.inactivation(np.asarray(kobs_per_h, dtype=float), np.asarray(kdeg_per_h, dtype=float)))


def induction_term(effect: ArrayLike, calibration: ArrayLike = 1.0) -> NDArray[np.float64]:
    """Fold increase in enzyme: 1 + d x sum(Emax [I]/(EC50,u + [I]))."""
    return np.asarray(model.induction(np.asarray(effect, dtype=float), np.asarray(calibration, dtype=float)))


def liver_ratio(fm: ArrayLike, activity: ArrayLike) -> NDArray[np.float64]:
    """AUCR_h = 1/(sum fm x activity + 1 - sum fm), pathways along the last axis (summed in their order)."""
    f = np.asarray(fm, dtype=float)
    a = np.asarray(activity, dtype=float)
    f, a = np.broadcast_arrays(f, a)
    n = f.shape[-1] if f.ndim else 0
    pathways = [model.Pathway(target=k, organ="liver", fraction=f[..., k]) for k in range(n)]
    out = model.organ_ratio("fraction", pathways, [a[..., k] for k in range(n)])
    return np.broadcast_to(np.asarray(out, dtype=float), f.shape[:-1]).copy() if n == 0 else np.asarray(out, dtype=float)


def gut_ratio(fg: ArrayLike, activity: ArrayLike) -> NDArray[np.float64]:
    """AUCR_g = 1/(activity x (1 - Fg) + Fg); Fg is the victim's intestinal availability."""
    g = np.asarray(fg, dtype=float)
    pathway = model.Pathway(target=0, organ="gut", fraction=g)
    return np.asarray(model.organ_ratio("availability", (pathway,), (np.asarray(activity, dtype=float),)), dtype=float)


@dataclass(frozen=True, slots=True, kw_only=True)
class Routes:
    """The object drug's transporter routes and, optionally, its hepatic clearances.

    ``efflux``: (transporter, fraction of the oral dose it returns to the lumen); ``uptake``: (transporter,
    fraction of systemic clearance; with ``clearances``, its share of PS_inf); ``secretion``: (transporter,
    fraction of systemic clearance it secretes = renal fraction x its share of renal clearance).
    ``clearances`` = (PS_inf, PS_eff, CLmet, CLbile) in one unit: the extended clearance concept, with the
    enzyme fm then shares of CLmet and ``hepatic_fraction`` the hepatic share of systemic clearance.
    """

    efflux: tuple[tuple[str, float], ...] = ()
    uptake: tuple[tuple[str, float], ...] = ()
    secretion: tuple[tuple[str, float], ...] = ()
    clearances: tuple[float, float, float, float] | None = None
    hepatic_fraction: float = 1.0

    @property
    def empty(self) -> bool:
        return not (self.efflux or self.uptake or self.secretion) and self.clearances is None


NO_ROUTES: Final = Routes()


def routes_of(victim: Victim) -> Routes:
    """The victim's transporter routes and hepatic clearances as the model takes them (efflux only when oral)."""

    def of(route: str, scale: float = 1.0) -> tuple[tuple[str, float], ...]:
        return tuple((pw.enzyme, scale * pw.fm) for pw in victim.pathways if pw.route == route)

    renal = victim.renal_fraction or 0.0
    ecm = victim.extended_clearance
    hepatic = 1.0 - renal if ecm is None or ecm.hepatic_fraction is None else ecm.hepatic_fraction
    return Routes(
        efflux=of("intestinal efflux") if victim.route == "oral" else (),
        uptake=of("hepatic uptake"),
        secretion=of("renal secretion", renal),
        clearances=None if ecm is None else ecm.relative(),
        hepatic_fraction=hepatic,
    )


def refuse_routes(victim: Victim, what: str) -> None:
    """Raise :class:`InputError` naming the victim's first transporter route (or its extended clearance): ``what``
    takes enzyme pathways only so far, and would otherwise count a transporter as an enzyme."""
    for k, pw in enumerate(victim.pathways):
        if pw.route != METABOLISM:
            raise InputError(f"victim.pathways[{k}]", pw.enzyme, f"is a {pw.route} route; {what} takes enzyme pathways only so far")
    if victim.extended_clearance is not None:
        raise InputError("victim.extended_clearance", "given", f"is not taken by {what} so far; assess the scenario without it")


@dataclass(frozen=True, slots=True, kw_only=True)
class SiteTerms:
    """The three terms and their product for one enzyme at one site."""

    concentration_um: tuple[tuple[str, float], ...]
    reversible: float
    inactivation: float
    induction: float
    kdeg_per_h: float | None

    @property
    def activity(self) -> float:
        return self.reversible * self.inactivation * self.induction


@dataclass(frozen=True, slots=True, kw_only=True)
class EnzymeEffect:
    """What the perpetrator does to one enzyme of the victim's."""

    enzyme: str
    fm: float
    liver: SiteTerms
    gut: SiteTerms | None


@dataclass(frozen=True, slots=True, kw_only=True)
class RouteEffect:
    """What the precipitant does to one transporter route of the object drug."""

    transporter: str
    route: str
    fraction: float
    site: SiteTerms


@dataclass(frozen=True, slots=True, kw_only=True)
class MechanismPart:
    """The ratios with only one mechanism (or, for :data:`INHIBITION_PART`, both inhibitory ones) switched on."""

    mechanism: str
    gut: float
    liver: float
    total: float
    kidney: float = 1.0


@dataclass(frozen=True, slots=True, kw_only=True)
class Prediction:
    gut: float
    liver: float
    total: float
    ceiling_gut: float
    ceiling_liver: float
    ceiling_total: float
    band: Band | None
    effects: tuple[EnzymeEffect, ...]
    parts: tuple[MechanismPart, ...]
    mechanisms: tuple[str, ...]
    fg_used: float
    gut_enzyme: str | None
    inhibited_fm: float
    kidney: float = 1.0
    ceiling_kidney: float = 1.0
    routes: tuple[RouteEffect, ...] = ()
    #: with the hepatic clearances: the extended-clearance regime without and with the precipitant
    regime: str | None = None
    regime_with: str | None = None


def _targets(
    pathways: tuple[tuple[str, float], ...], gut_enzyme: str | None, constants: tuple[Constant, ...], routes: Routes = NO_ROUTES
) -> dict[str, int]:
    """Index of every target named by the victim's pathways and routes, the gut-wall enzyme and the perpetrator's constants."""
    index: dict[str, int] = {}
    named = (e for e, _ in (*pathways, *routes.efflux, *routes.uptake, *routes.secretion))
    for name in (*named, *((gut_enzyme,) if gut_enzyme else ()), *(c.target for c in constants)):
        index.setdefault(name, len(index))
    return index


def route_pathways(routes: Routes, targets: dict[str, int]) -> list[model.Pathway]:
    """The transporter routes as model pathways: efflux by the availability it governs, uptake and secretion by fraction."""
    role = "uptake" if routes.clearances is not None else ""
    return [
        *(model.Pathway(target=targets[t], organ="gut", fraction=1.0 - f) for t, f in routes.efflux),
        *(model.Pathway(target=targets[t], organ="liver", fraction=f, role=role) for t, f in routes.uptake),
        *(model.Pathway(target=targets[t], organ="kidney", fraction=f) for t, f in routes.secretion),
    ]


class _Inputs(NamedTuple):
    """One scenario's numbers as the arguments of :func:`interact.model.evaluate` (floats: the n = 1 case)."""

    targets: dict[str, int]
    acting: tuple[model.Acting, ...]
    pathways: tuple[model.Pathway, ...]
    concentrations: dict[str, tuple[float, ...]]
    kdeg: dict[tuple[int, str], float | None]
    structure: model.Model

    def evaluate(self, include: tuple[str, ...] = MECHANISM_PARTS, scale: float | None = None) -> model.Evaluation:
        return self.structure.evaluate(self.concentrations, self.kdeg, include=include, scale=scale)


def _inputs(
    pathways: tuple[tuple[str, float], ...],
    fg: float,
    gut_enzyme: str | None,
    constants: tuple[Constant, ...],
    species: tuple[SpeciesExposure, ...],
    kdeg: dict[str, tuple[float | None, float | None]],
    routes: Routes = NO_ROUTES,
) -> _Inputs:
    targets = _targets(pathways, gut_enzyme, constants, routes)
    acting = tuple(
        model.Acting(
            target=targets[c.target],
            species=c.species_index,
            ki_u=c.ki_u_um,
            kinact=c.kinact_per_h if c.ki_inact_u_um is not None else None,
            ki_inact_u=c.ki_inact_u_um,
            emax=c.emax if c.ec50_u_um is not None else None,
            ec50_u=c.ec50_u_um,
            calibration=c.calibration,
        )
        for c in constants
    )
    victim = [model.Pathway(target=targets[e], organ="liver", fraction=fm) for e, fm in pathways]
    if gut_enzyme is not None:
        victim.insert(0, model.Pathway(target=targets[gut_enzyme], organ="gut", fraction=fg))
    victim += route_pathways(routes, targets)
    rates: dict[tuple[int, str], float | None] = {}
    for enzyme, (k_liver, k_gut) in kdeg.items():
        if enzyme in targets:
            rates[targets[enzyme], "liver"] = k_liver
            rates[targets[enzyme], "gut"] = k_gut
    concentrations = {
        "liver": tuple(sp.unbound_inlet_um for sp in species),
        "gut": tuple(sp.enterocyte_um for sp in species),
        "kidney": tuple(sp.unbound_cmax_um for sp in species),
    }
    organs = model.ORGANS
    if routes.clearances is not None:
        extended = model.Organ(site="liver", form="extended", clearances=routes.clearances, fraction=routes.hepatic_fraction)
        organs = {**model.ORGANS, "liver": extended}
    return _Inputs(targets, acting, tuple(victim), concentrations, rates, model.Model(acting, victim, organs))


def _effects(
    pathways: tuple[tuple[str, float], ...],
    gut_enzyme: str | None,
    constants: tuple[Constant, ...],
    inputs: _Inputs,
    result: model.Evaluation,
    kdeg: dict[str, tuple[float | None, float | None]],
    scale: float,
) -> tuple[EnzymeEffect, ...]:
    """The terms of each victim pathway (and of the gut-wall enzyme on its pathway) as :class:`EnzymeEffect` records."""

    def site(enzyme: str, where: str) -> SiteTerms:
        t = result.terms[inputs.targets[enzyme], where]
        conc = inputs.concentrations[where]
        return SiteTerms(
            concentration_um=tuple((c.species, scale * conc[c.species_index]) for c in constants if c.target == enzyme),
            reversible=float(t.reversible),
            inactivation=float(t.inactivation),
            induction=float(t.induction),
            kdeg_per_h=kdeg.get(enzyme, (None, None))[0 if where == "liver" else 1],
        )

    return tuple(
        EnzymeEffect(enzyme=e, fm=fm, liver=site(e, "liver"), gut=site(e, "gut") if e == gut_enzyme else None) for e, fm in pathways
    )


def _mechanisms(constants: tuple[Constant, ...]) -> tuple[str, ...]:
    """The mechanisms the perpetrator's constants carry, in the order of :data:`MECHANISM_PARTS`."""
    present = (
        any(c.ki_u_um is not None for c in constants),
        any(c.kinact_per_h is not None for c in constants),
        any(c.emax is not None for c in constants),
    )
    return tuple(m for m, on in zip(MECHANISM_PARTS, present, strict=True) if on)


def _parts(mechanisms: tuple[str, ...], inputs: _Inputs, scale: float) -> tuple[MechanismPart, ...]:
    """The ratios with one mechanism at a time (and both inhibitory ones together when induction is also present)."""
    if len(mechanisms) <= 1:
        return ()
    groups: list[tuple[str, tuple[str, ...]]] = [(m, (m,)) for m in mechanisms]
    if set(MECHANISM_PARTS) <= set(mechanisms):
        # inhibition and induction run separately, as guidance asks (memory): both inhibitory parts together
        groups.append((INHIBITION_PART, ("reversible", "time-dependent")))
    parts = []
    for name, include in groups:
        r = inputs.evaluate(include, scale)
        g, h, k = float(r.gut), float(r.liver), float(r.kidney)
        parts.append(MechanismPart(mechanism=name, gut=g, liver=h, total=g * h * k, kidney=k))
    return tuple(parts)


def predict(
    *,
    pathways: tuple[tuple[str, float], ...],
    fg: float,
    gut_enzyme: str | None,
    constants: tuple[Constant, ...],
    species: tuple[SpeciesExposure, ...],
    kdeg: dict[str, tuple[float | None, float | None]],
    classes: Classes,
    scale: float = 1.0,
    routes: Routes = NO_ROUTES,
) -> Prediction:
    """The mechanistic static model for one victim: :func:`interact.model.evaluate` on floats, with its terms.

    Parameters
    ----------
    pathways
        (enzyme, fm) pairs of the victim.
    fg
        The victim's intestinal availability Fg (1 = no gut-wall metabolism).
    gut_enzyme
        The gut-wall enzyme to model (CYP3A) if the victim is oral and the
        perpetrator acts on it; otherwise None.
    constants, species
        Unbound constants and concentrations (uM) from :mod:`interact.constants`
        and :mod:`interact.exposure`.
    kdeg
        enzyme -> (hepatic kdeg, intestinal kdeg) in 1/h, for inactivation.
    scale
        Multiplier on every perpetrator concentration (perpetrator-dose scan).
    routes
        The victim's transporter routes and hepatic clearances (:func:`routes_of`).
    """
    inputs = _inputs(pathways, fg, gut_enzyme, constants, species, kdeg, routes)
    mechanisms = _mechanisms(constants)
    result = inputs.evaluate(scale=scale)
    gut_r, liver_r, kidney_r = float(result.gut), float(result.liver), float(result.kidney)
    acted_on = {c.target for c in constants if c.ki_u_um is not None or c.kinact_per_h is not None}
    inhibited_fm = sum(fm for enzyme, fm in pathways if enzyme in acted_on)
    ceiling_liver = 1.0 / (1.0 - inhibited_fm) if inhibited_fm < 1.0 else float("inf")
    ceiling_gut = 1.0 / fg if gut_enzyme is not None and gut_enzyme in acted_on else 1.0
    total = gut_r * liver_r * kidney_r
    ceilings = (ceiling_gut, ceiling_liver, 1.0) if routes.empty else _route_ceilings(inputs, acted_on)
    return Prediction(
        gut=gut_r,
        liver=liver_r,
        total=total,
        ceiling_gut=ceilings[0],
        ceiling_liver=ceilings[1],
        ceiling_total=ceilings[0] * ceilings[1] * ceilings[2],
        band=classes.classify(total),
        effects=_effects(pathways, gut_enzyme, constants, inputs, result, kdeg, scale),
        parts=_parts(mechanisms, inputs, scale),
        mechanisms=mechanisms,
        fg_used=fg,
        gut_enzyme=gut_enzyme,
        inhibited_fm=inhibited_fm,
        kidney=kidney_r,
        ceiling_kidney=ceilings[2],
        routes=_route_effects(routes, constants, inputs, result, kdeg, scale),
        regime=None if routes.clearances is None else str(clearance_regime(*routes.clearances[1:])),
        regime_with=None if routes.clearances is None else _regime_with(routes, pathways, result, inputs),
    )


def _route_ceilings(inputs: _Inputs, acted_on: set[str]) -> tuple[float, float, float]:
    """Gut, liver and kidney ratios with every target the precipitant inhibits at activity 0 (infinite when nothing is left)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        organs, _ = inputs.structure.ceilings({inputs.targets[t] for t in acted_on if t in inputs.targets})
    out = [float(organs[name]) for name in ("gut", "liver", "kidney")]
    return tuple(x if np.isfinite(x) and x > 0 else float("inf") for x in out)  # type: ignore[return-value]


def _route_effects(
    routes: Routes,
    constants: tuple[Constant, ...],
    inputs: _Inputs,
    result: model.Evaluation,
    kdeg: dict[str, tuple[float | None, float | None]],
    scale: float,
) -> tuple[RouteEffect, ...]:
    """The terms of each transporter route at its site, as :class:`RouteEffect` records."""
    out = []
    for route, items in (("intestinal efflux", routes.efflux), ("hepatic uptake", routes.uptake), ("renal secretion", routes.secretion)):
        where = VICTIM_ROUTES[route]
        conc = inputs.concentrations[where]
        for name, fraction in items:
            t = result.terms[inputs.targets[name], where]
            terms = SiteTerms(
                concentration_um=tuple((c.species, scale * conc[c.species_index]) for c in constants if c.target == name),
                reversible=float(t.reversible),
                inactivation=float(t.inactivation),
                induction=float(t.induction),
                kdeg_per_h=kdeg.get(name, (None, None))[1 if where == "gut" else 0],
            )
            out.append(RouteEffect(transporter=name, route=route, fraction=fraction, site=terms))
    return tuple(out)


def _regime_with(routes: Routes, pathways: tuple[tuple[str, float], ...], result: model.Evaluation, inputs: _Inputs) -> str:
    """The extended-clearance regime with the precipitant: CLmet reduced by the enzymes' remaining activity."""
    assert routes.clearances is not None
    enzymes = [model.Pathway(target=inputs.targets[e], organ="liver", fraction=fm) for e, fm in pathways]
    left = float(model.remaining(enzymes, [result.terms[pw.target, "liver"].activity for pw in enzymes]))
    ps_eff, cl_met, cl_bile = routes.clearances[1:]
    return str(clearance_regime(ps_eff, cl_met * left, cl_bile))


def ratio_function(
    *,
    pathways: tuple[tuple[str, float], ...],
    fg: float,
    gut_enzyme: str | None,
    constants: tuple[Constant, ...],
    species: tuple[SpeciesExposure, ...],
    kdeg: dict[str, tuple[float | None, float | None]],
    routes: Routes = NO_ROUTES,
) -> Callable[[float], float]:
    """``scale -> total AUCR``: :func:`interact.model.evaluate` with every concentration times ``scale``.

    Used for root finding over the perpetrator's dose.
    """
    inputs = _inputs(pathways, fg, gut_enzyme, constants, species, kdeg, routes)

    run, concentrations, rates = inputs.structure.total, inputs.concentrations, inputs.kdeg
    seen: dict[float, float] = {}  # the root search asks again for the ends of its bracket

    def total(scale: float) -> float:
        value = seen.get(scale)
        if value is None:
            value = seen[scale] = float(run(concentrations, rates, scale))
        return value

    return total
