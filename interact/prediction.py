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
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .constants import Constant
from .exposure import SpeciesExposure
from .tables import Band, Classes

__all__ = [
    "EnzymeEffect",
    "MechanismPart",
    "Prediction",
    "gut_ratio",
    "inactivation_term",
    "induction_term",
    "liver_ratio",
    "predict",
    "ratio_function",
    "reversible_term",
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
class MechanismPart:
    """The ratios with only one mechanism (or, for :data:`INHIBITION_PART`, both inhibitory ones) switched on."""

    mechanism: str
    gut: float
    liver: float
    total: float


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
        conc = scale * (exp.unbound_inlet_um if site == "liver" else exp.enterocyte_um)
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


def _ratios(
    pathways: tuple[tuple[str, float], ...],
    fg: float,
    gut_enzyme: str | None,
    constants: tuple[Constant, ...],
    species: tuple[SpeciesExposure, ...],
    kdeg: dict[str, tuple[float | None, float | None]],
    scale: float,
    include: tuple[str, ...],
) -> tuple[float, float, tuple[EnzymeEffect, ...]]:
    effects = []
    weighted = 0.0
    fm_sum = 0.0
    for enzyme, fm in pathways:
        k_liver, k_gut = kdeg.get(enzyme, (None, None))
        liver = _site(enzyme, constants, species, "liver", k_liver, scale, include)
        gut = _site(enzyme, constants, species, "gut", k_gut, scale, include) if enzyme == gut_enzyme else None
        effects.append(EnzymeEffect(enzyme=enzyme, fm=fm, liver=liver, gut=gut))
        weighted += fm * liver.activity
        fm_sum += fm
    liver_r = 1.0 / (weighted + (1.0 - fm_sum))  # (1 - sum fm) first: exact when fm = 1, however small the activity
    gut_r = 1.0
    if gut_enzyme is not None:
        k_gut = kdeg.get(gut_enzyme, (None, None))[1]
        g = next((e.gut for e in effects if e.enzyme == gut_enzyme), None)
        if g is None:
            g = _site(gut_enzyme, constants, species, "gut", k_gut, scale, include)
        gut_r = 1.0 / (g.activity * (1.0 - fg) + fg)
    return gut_r, liver_r, tuple(effects)


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
    gut_r, liver_r, effects = _ratios(pathways, fg, gut_enzyme, constants, species, kdeg, scale, MECHANISM_PARTS)
    parts = []
    if len(mechanisms) > 1:
        groups: list[tuple[str, tuple[str, ...]]] = [(m, (m,)) for m in mechanisms]
        if {"reversible", "time-dependent", "induction"} <= set(mechanisms):
            # inhibition and induction run separately, as guidance asks (memory): both inhibitory parts together
            groups.append((INHIBITION_PART, ("reversible", "time-dependent")))
        for name, include in groups:
            g, h, _ = _ratios(pathways, fg, gut_enzyme, constants, species, kdeg, scale, include)
            parts.append(MechanismPart(mechanism=name, gut=g, liver=h, total=g * h))
    acted_on = {c.target for c in constants if c.ki_u_um is not None or c.kinact_per_h is not None}
    inhibited_fm = sum(fm for enzyme, fm in pathways if enzyme in acted_on)
    ceiling_liver = 1.0 / (1.0 - inhibited_fm) if inhibited_fm < 1.0 else float("inf")
    ceiling_gut = 1.0 / fg if gut_enzyme is not None and gut_enzyme in acted_on else 1.0
    total = gut_r * liver_r
    return Prediction(
        gut=gut_r,
        liver=liver_r,
        total=total,
        ceiling_gut=ceiling_gut,
        ceiling_liver=ceiling_liver,
        ceiling_total=ceiling_gut * ceiling_liver,
        band=classes.classify(total),
        effects=effects,
        parts=tuple(parts),
        mechanisms=mechanisms,
        fg_used=fg,
        gut_enzyme=gut_enzyme,
        inhibited_fm=inhibited_fm,
    )


def ratio_function(
    *,
    pathways: tuple[tuple[str, float], ...],
    fg: float,
    gut_enzyme: str | None,
    constants: tuple[Constant, ...],
    species: tuple[SpeciesExposure, ...],
    kdeg: dict[str, tuple[float | None, float | None]],
) -> Callable[[float], float]:
    """A fast scalar ``scale -> total AUCR``, the same model as :func:`predict`.

    Used for root finding over the perpetrator's dose; ``predict`` is the
    reference and a test keeps the two equal.
    """
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
