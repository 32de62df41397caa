"""Mechanistic static model: the victim's AUC ratio in gut, liver and in total.

Net-effect form (Fahmi et al., Drug Metab Dispos 2008;36:1698; structure seen
in Guengerich 2022, Fig. 17; the equations below are from memory, algebra checked).  For each
enzyme e that clears the victim, the fraction of its activity that remains
in an organ is the product of three terms, named by meaning:

- reversible   = 1 / (1 + sum_j [I]_j / Ki,u,j)
- inactivation = kdeg / (kdeg + sum_j kinact_j [I]_j / (KI,u,j + [I]_j))
- induction    = 1 + d sum_j Emax_j [I]_j / (EC50,u,j + [I]_j)

and the organ ratios are

- liver: AUCR_h = 1 / (sum_e fm_e x activity_h,e + (1 - sum_e fm_e))
- gut:   AUCR_g = 1 / (activity_g x (1 - Fg) + Fg), for the gut-wall enzyme (CYP3A)
- total: AUCR = AUCR_g x AUCR_h

with [I]_h the unbound hepatic inlet concentration and [I]_g the enterocyte
concentration (see :mod:`interact.exposure`).  Complete inhibition bounds the
ratio by 1/(1 - sum fm) in the liver and 1/Fg in the gut.

Transporter routes of the object drug (:class:`Routes`, :mod:`interact.transporters`) enter the same
organ form: intestinal efflux beside gut-wall CYP3A in the gut term (at I,ent), hepatic uptake beside
the enzymes in the liver term (at Iin,max,u) or, with the hepatic clearances given, through the
extended clearance concept, and renal secretion in a kidney term (at Imax,u); the total is
gut x liver x kidney (:func:`interact.transporters.organ_ratios`).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Final

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .constants import Constant
from .errors import InputError
from .exposure import SpeciesExposure
from .scenario import Victim
from .tables import Band, Classes
from .transporters import clearance_regime, extended_clearance_activity, fraction_weighted_activity, organ_ratios

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
    "routes_of",
]

MECHANISM_PARTS = ("reversible", "time-dependent", "induction")
#: name of the part with both inhibitory mechanisms on (reported when induction is also present)
INHIBITION_PART = "reversible + time-dependent"


def reversible_term(sum_ratio: ArrayLike) -> NDArray[np.float64]:
    """Fraction of activity left by reversible inhibition: 1/(1 + sum [I]/Ki,u)."""
    return 1.0 / (1.0 + np.asarray(sum_ratio, dtype=float))


def inactivation_term(kobs_per_h: ArrayLike, kdeg_per_h: ArrayLike) -> NDArray[np.float64]:
    """Fraction of enzyme left at steady state by inactivation: kdeg/(kdeg + kobs)."""
    kdeg = np.asarray(kdeg_per_h, dtype=float)
    return kdeg / (kdeg + np.asarray(kobs_per_h, dtype=float))


def induction_term(effect: ArrayLike, calibration: ArrayLike = 1.0) -> NDArray[np.float64]:
    """Fold increase in enzyme: 1 + d x sum(Emax [I]/(EC50,u + [I]))."""
    return 1.0 + np.multiply(calibration, effect)


def liver_ratio(fm: ArrayLike, activity: ArrayLike) -> NDArray[np.float64]:
    """AUCR_h = 1/(sum fm x activity + 1 - sum fm), pathways along the last axis."""
    f = np.asarray(fm, dtype=float)
    a = np.asarray(activity, dtype=float)
    return 1.0 / (np.sum(f * a, axis=-1) + (1.0 - np.sum(f, axis=-1)))  # (1 - sum fm) first: exact when fm = 1


def gut_ratio(fg: ArrayLike, activity: ArrayLike) -> NDArray[np.float64]:
    """AUCR_g = 1/(activity x (1 - Fg) + Fg); Fg is the victim's intestinal availability."""
    g = np.asarray(fg, dtype=float)
    return 1.0 / (np.asarray(activity, dtype=float) * (1.0 - g) + g)


#: the concentration each site sees: hepatic inlet (unbound), enterocyte, systemic unbound Cmax (kidney)
_SITE_CONCENTRATION: Final = {
    "liver": lambda e: e.unbound_inlet_um,
    "gut": lambda e: e.enterocyte_um,
    "kidney": lambda e: e.unbound_cmax_um,
}
#: the site of each transporter route
_ROUTE_SITE: Final = {"intestinal efflux": "gut", "hepatic uptake": "liver", "renal secretion": "kidney"}


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


def refuse_routes(victim: Victim, what: str) -> None:
    """Raise :class:`InputError` naming the victim's first transporter route (or its extended clearance): ``what``
    takes enzyme pathways only so far, and would otherwise count a transporter as an enzyme."""
    for k, pw in enumerate(victim.pathways):
        if pw.route != "metabolism":
            raise InputError(f"victim.pathways[{k}]", pw.enzyme, f"is a {pw.route} route; {what} takes enzyme pathways only so far")
    if victim.extended_clearance is not None:
        raise InputError("victim.extended_clearance", "given", f"is not taken by {what} so far; assess the scenario without it")


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


def _site(
    enzyme: str,
    constants: tuple[Constant, ...],
    species: tuple[SpeciesExposure, ...],
    site: str,
    kdeg: float | None,
    scale: float,
    include: tuple[str, ...],
) -> SiteTerms:
    ratio = kobs = effect = 0.0
    concs = []
    for c in constants:
        if c.target != enzyme:
            continue
        exp = species[c.species_index]
        conc = scale * _SITE_CONCENTRATION[site](exp)
        concs.append((c.species, conc))
        if c.ki_u_um is not None and "reversible" in include:
            ratio += conc / c.ki_u_um
        if c.kinact_per_h is not None and c.ki_inact_u_um is not None and "time-dependent" in include:
            kobs += c.kinact_per_h * conc / (c.ki_inact_u_um + conc)
        if c.emax is not None and c.ec50_u_um is not None and "induction" in include:
            effect += c.calibration * c.emax * conc / (c.ec50_u_um + conc)
    return SiteTerms(
        concentration_um=tuple(concs),
        reversible=1.0 / (1.0 + ratio),
        inactivation=1.0 if kobs == 0.0 or kdeg is None else kdeg / (kdeg + kobs),
        induction=1.0 + effect,
        kdeg_per_h=kdeg,
    )


@dataclass(frozen=True, slots=True, kw_only=True)
class _Organs:
    gut: float
    liver: float
    kidney: float
    effects: tuple[EnzymeEffect, ...]
    routes: tuple[RouteEffect, ...]
    metabolism_left: float  # with the hepatic clearances: the share of CLmet the precipitant leaves


def _ratios(
    pathways: tuple[tuple[str, float], ...],
    fg: float,
    gut_enzyme: str | None,
    constants: tuple[Constant, ...],
    species: tuple[SpeciesExposure, ...],
    kdeg: dict[str, tuple[float | None, float | None]],
    scale: float,
    include: tuple[str, ...],
    routes: Routes = NO_ROUTES,
    zero: frozenset[str] = frozenset(),
) -> _Organs:
    """The organ ratios; targets in ``zero`` are taken as completely inhibited (for the ceilings)."""
    effects = []
    for enzyme, fm in pathways:
        k_liver, k_gut = kdeg.get(enzyme, (None, None))
        liver = _site(enzyme, constants, species, "liver", k_liver, scale, include)
        gut = _site(enzyme, constants, species, "gut", k_gut, scale, include) if enzyme == gut_enzyme else None
        effects.append(EnzymeEffect(enzyme=enzyme, fm=fm, liver=liver, gut=gut))
    route_effects = []
    for route, items in (("intestinal efflux", routes.efflux), ("hepatic uptake", routes.uptake), ("renal secretion", routes.secretion)):
        site = _ROUTE_SITE[route]
        for name, fraction in items:
            k = kdeg.get(name, (None, None))
            terms = _site(name, constants, species, site, k[1] if site == "gut" else k[0], scale, include)
            route_effects.append(RouteEffect(transporter=name, route=route, fraction=fraction, site=terms))

    def act(name: str, terms: SiteTerms) -> float:
        return 0.0 if name in zero else terms.activity

    gut_f: list[float] = []
    gut_a: list[float] = []
    if gut_enzyme is not None:
        k_gut = kdeg.get(gut_enzyme, (None, None))[1]
        g = next((e.gut for e in effects if e.enzyme == gut_enzyme), None)
        if g is None:
            g = _site(gut_enzyme, constants, species, "gut", k_gut, scale, include)
        gut_f.append(1.0 - fg)
        gut_a.append(act(gut_enzyme, g))
    for r in route_effects:
        if r.route == "intestinal efflux":
            gut_f.append(r.fraction)
            gut_a.append(act(r.transporter, r.site))
    enzyme_f = [e.fm for e in effects]
    enzyme_a = [act(e.enzyme, e.liver) for e in effects]
    uptake = [(r.fraction, act(r.transporter, r.site)) for r in route_effects if r.route == "hepatic uptake"]
    kidney = [(r.fraction, act(r.transporter, r.site)) for r in route_effects if r.route == "renal secretion"]
    metabolism_left = 1.0
    if routes.empty:  # the enzyme-only model, term for term as before (other callers match it to the last bit)
        k_liver = 1.0 / (sum(f * a for f, a in zip(enzyme_f, enzyme_a, strict=True)) + (1.0 - sum(enzyme_f)))
        k_gut = 1.0 / (gut_a[0] * (1.0 - fg) + fg) if gut_a else 1.0
        return _Organs(gut=k_gut, liver=k_liver, kidney=1.0, effects=tuple(effects), routes=(), metabolism_left=1.0)
    if routes.clearances is None:
        liver_f = enzyme_f + [f for f, _ in uptake]
        liver_a = enzyme_a + [a for _, a in uptake]
    else:
        metabolism_left = float(fraction_weighted_activity(enzyme_f or [0.0], enzyme_a or [1.0]))
        uptake_left = float(fraction_weighted_activity([f for f, _ in uptake] or [0.0], [a for _, a in uptake] or [1.0]))
        liver_f = [routes.hepatic_fraction]
        liver_a = [float(extended_clearance_activity(*routes.clearances, uptake_left, metabolism_left))]
    g_r, h_r, k_r = organ_ratios(
        gut_f or [0.0], gut_a or [1.0], liver_f or [0.0], liver_a or [1.0], [f for f, _ in kidney] or [0.0], [a for _, a in kidney] or [1.0]
    )
    return _Organs(
        gut=float(g_r),
        liver=float(h_r),
        kidney=float(k_r),
        effects=tuple(effects),
        routes=tuple(route_effects),
        metabolism_left=metabolism_left,
    )


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
    """The mechanistic static model for one victim.

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
        The object drug's transporter routes and hepatic clearances, if any.
    """
    mechanisms = tuple(
        m
        for m, present in (
            ("reversible", any(c.ki_u_um is not None for c in constants)),
            ("time-dependent", any(c.kinact_per_h is not None for c in constants)),
            ("induction", any(c.emax is not None for c in constants)),
        )
        if present
    )
    organs = _ratios(pathways, fg, gut_enzyme, constants, species, kdeg, scale, MECHANISM_PARTS, routes)
    parts = []
    if len(mechanisms) > 1:
        groups: list[tuple[str, tuple[str, ...]]] = [(m, (m,)) for m in mechanisms]
        if {"reversible", "time-dependent", "induction"} <= set(mechanisms):
            # inhibition and induction run separately, as guidance asks (memory): both inhibitory parts together
            groups.append((INHIBITION_PART, ("reversible", "time-dependent")))
        for name, include in groups:
            o = _ratios(pathways, fg, gut_enzyme, constants, species, kdeg, scale, include, routes)
            parts.append(MechanismPart(mechanism=name, gut=o.gut, liver=o.liver, total=o.gut * o.liver * o.kidney, kidney=o.kidney))
    acted_on = {c.target for c in constants if c.ki_u_um is not None or c.kinact_per_h is not None}
    inhibited_fm = sum(fm for enzyme, fm in pathways if enzyme in acted_on)
    regime = regime_with = None
    if routes.empty:
        ceiling_liver = 1.0 / (1.0 - inhibited_fm) if inhibited_fm < 1.0 else float("inf")
        ceiling_gut = 1.0 / fg if gut_enzyme is not None and gut_enzyme in acted_on else 1.0
        ceiling_kidney = 1.0
    else:
        with np.errstate(divide="ignore"):  # complete inhibition of all clearance: an infinite ceiling
            top = _ratios(pathways, fg, gut_enzyme, constants, species, kdeg, scale, MECHANISM_PARTS, routes, frozenset(acted_on))
        ceiling_gut, ceiling_liver, ceiling_kidney = top.gut, top.liver, top.kidney
        if routes.clearances is not None:
            ps_eff, cl_met, cl_bile = routes.clearances[1:]
            regime = str(clearance_regime(ps_eff, cl_met, cl_bile))
            regime_with = str(clearance_regime(ps_eff, cl_met * organs.metabolism_left, cl_bile))
    total = organs.gut * organs.liver * organs.kidney
    return Prediction(
        gut=organs.gut,
        liver=organs.liver,
        total=total,
        ceiling_gut=ceiling_gut,
        ceiling_liver=ceiling_liver,
        ceiling_total=ceiling_gut * ceiling_liver * ceiling_kidney,
        band=classes.classify(total),
        effects=organs.effects,
        parts=tuple(parts),
        mechanisms=mechanisms,
        fg_used=fg,
        gut_enzyme=gut_enzyme,
        inhibited_fm=inhibited_fm,
        kidney=organs.kidney,
        ceiling_kidney=ceiling_kidney,
        routes=organs.routes,
        regime=regime,
        regime_with=regime_with,
    )


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
    """A fast scalar ``scale -> total AUCR``, the same model as :func:`predict`.

    Used for root finding over the perpetrator's dose; ``predict`` is the
    reference and a test keeps the two equal.  With transporter routes it is
    :func:`predict`'s own organ arithmetic at each scale.
    """
    if not routes.empty:

        def with_routes(scale: float) -> float:
            o = _ratios(pathways, fg, gut_enzyme, constants, species, kdeg, scale, MECHANISM_PARTS, routes)
            return o.gut * o.liver * o.kidney

        return with_routes
    rows: list[
        tuple[float, bool, list[tuple[float, float, float | None, float | None, float | None, float | None, float | None, float]]]
    ] = []
    enzymes = [e for e, _ in pathways]
    if gut_enzyme is not None and gut_enzyme not in enzymes:
        pathways = (*pathways, (gut_enzyme, 0.0))
    for enzyme, fm in pathways:
        k_liver, k_gut = kdeg.get(enzyme, (None, None))
        acts = []
        for c in constants:
            if c.target != enzyme:
                continue
            exp = species[c.species_index]
            acts.append(
                (
                    exp.unbound_inlet_um,
                    exp.enterocyte_um,
                    c.ki_u_um,
                    c.kinact_per_h,
                    c.ki_inact_u_um,
                    c.emax,
                    c.ec50_u_um,
                    c.calibration,
                )
            )
        rows.append((fm, enzyme == gut_enzyme, [(*a, k_liver, k_gut) for a in acts]))  # type: ignore[misc]

    def activity(items: list[tuple[float, ...]], site: int, scale: float) -> float:
        ratio = kobs = effect = 0.0
        kdeg_site = None
        for item in items:
            conc = scale * item[site]
            ki, kinact, ki_inact, emax, ec50, d = item[2], item[3], item[4], item[5], item[6], item[7]
            kdeg_site = item[8 + site]
            if ki is not None:
                ratio += conc / ki
            if kinact is not None and ki_inact is not None:
                kobs += kinact * conc / (ki_inact + conc)
            if emax is not None and ec50 is not None:
                effect += d * emax * conc / (ec50 + conc)
        inact = 1.0 if kobs == 0.0 or kdeg_site is None else kdeg_site / (kdeg_site + kobs)
        return inact * (1.0 + effect) / (1.0 + ratio)

    def total(scale: float) -> float:
        weighted = 0.0
        fm_sum = 0.0
        gut = 1.0
        for fm, is_gut, items in rows:
            weighted += fm * activity(items, 0, scale)  # type: ignore[arg-type]
            fm_sum += fm
            if is_gut:
                gut = 1.0 / (activity(items, 1, scale) * (1.0 - fg) + fg)  # type: ignore[arg-type]
        return gut / (weighted + (1.0 - fm_sum))

    return total
