"""Basic static models: each rule-set criterion applied to each inhibited target.

Forms (``[I]`` is the criterion's concentration times its multiplier; sums run
over the parent and its metabolites, except the gut-lumen concentration,
which only the parent has):

- ``one-plus-sum``: R = 1 + sum([I]/K)             R1, R1,gut, OATP R    (Lee 2024; JPET)
- ``sum``:          R = sum([I]/K)                 transporter ratios    (JPET)
- ``tdi``:          R2 = (kobs + kdeg)/kdeg, kobs = sum(kinact [I]/(KI,u + [I]))   (Lee 2024)
- ``induction``:    R3 = 1 / (1 + d sum(Emax [I]/(EC50,u + [I])))            (Lee 2024, from memory)
- ``fold-change``:  F = 1 + sum(Emax [I]/(EC50,u + [I])), the in vitro mRNA fold change over
                    vehicle predicted at [I] from the fitted Emax and EC50 (no d: an in vitro
                    quantity); flag F >= 2 (Lee et al. 2024: FDA 2020 2-fold rule; the M12 concentration
                    limit is from memory)

Emax is the maximal *increase* over vehicle (fold change minus 1), so that the
enzyme level is 1 + Emax [I]/(EC50 + [I]) times baseline (algebra).

Cutoffs, multipliers and concentrations are data from the rule set.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .constants import Constant
from .exposure import SpeciesExposure
from .tables import Criterion, RuleSet, Sourced

__all__ = ["Contribution", "ScreenResult", "fold_change", "inactivation_ratio", "induction_ratio", "screen"]


@dataclass(frozen=True, slots=True, kw_only=True)
class Contribution:
    """One species' share of a criterion: its concentration and constant (uM)."""

    species: str
    concentration_um: float
    constant_um: float
    term: float


@dataclass(frozen=True, slots=True, kw_only=True)
class ScreenResult:
    """A basic-model value for one target against one criterion."""

    criterion: str
    label: str
    target: str
    mechanism: str
    value: float
    cutoff: Sourced
    comparison: str
    indicated: bool
    equation: str
    concentration: str
    multiplier: float
    multiplier_source: Sourced | None
    contributions: tuple[Contribution, ...]
    kdeg_per_h: float | None = None

    @property
    def verdict(self) -> str:
        return "study indicated" if self.indicated else "below cutoff"


def inactivation_ratio(kobs_per_h: ArrayLike, kdeg_per_h: ArrayLike) -> NDArray[np.float64]:
    """R2 = (kobs + kdeg) / kdeg."""
    return (np.asarray(kobs_per_h) + kdeg_per_h) / np.asarray(kdeg_per_h)


def induction_ratio(effect: ArrayLike, calibration: ArrayLike = 1.0) -> NDArray[np.float64]:
    """R3 = 1 / (1 + d x effect), effect = sum(Emax [I]/(EC50 + [I]))."""
    return 1.0 / (1.0 + np.multiply(calibration, effect))


def fold_change(effect: ArrayLike) -> NDArray[np.float64]:
    """In vitro fold change over vehicle: 1 + effect, effect = sum(Emax [I]/(EC50 + [I])) (no d)."""
    return 1.0 + np.asarray(effect, dtype=float)


def _concentration(exp: SpeciesExposure, kind: str) -> float | None:
    if kind == "unbound-cmax":
        return exp.unbound_cmax_um
    if kind == "total-cmax":
        return exp.cmax_um
    if kind == "unbound-inlet":
        return exp.unbound_inlet_um
    if kind == "gut-lumen":
        return exp.gut_lumen_um if exp.is_parent else None
    raise ValueError(kind)  # rule sets are validated on load


def _applies(crit: Criterion, c: Constant, oral: bool) -> bool:
    if c.group not in crit.groups or (crit.oral_only and not oral) or (crit.gut_wall_only and not c.gut_wall):
        return False
    if crit.mechanism == "reversible":
        return c.ki_u_um is not None
    if crit.mechanism == "time-dependent":
        return c.kinact_per_h is not None and c.ki_inact_u_um is not None
    return c.emax is not None and c.ec50_u_um is not None


def _contribution(crit: Criterion, c: Constant, x: float) -> Contribution:
    """One species' term of a criterion at concentration ``x`` (uM, the multiplier applied)."""
    if crit.form in ("one-plus-sum", "sum"):
        assert c.ki_u_um is not None
        return Contribution(species=c.species, concentration_um=x, constant_um=c.ki_u_um, term=x / c.ki_u_um)
    if crit.form == "tdi":
        assert c.kinact_per_h is not None and c.ki_inact_u_um is not None
        term = c.kinact_per_h * x / (c.ki_inact_u_um + x)
        return Contribution(species=c.species, concentration_um=x, constant_um=c.ki_inact_u_um, term=term)
    assert c.emax is not None and c.ec50_u_um is not None
    d = 1.0 if crit.form == "fold-change" else c.calibration
    return Contribution(species=c.species, concentration_um=x, constant_um=c.ec50_u_um, term=d * c.emax * x / (c.ec50_u_um + x))


def _criterion_value(form: str, total: float, kdeg: float | None) -> float:
    """The criterion's value from the sum of its terms (``kdeg`` in 1/h for the time-dependent form)."""
    if form == "one-plus-sum":
        return 1.0 + total
    if form == "sum":
        return total
    if form == "tdi":
        assert kdeg is not None
        return float(inactivation_ratio(total, kdeg))
    if form == "fold-change":
        return float(fold_change(total))
    return float(induction_ratio(total))


def screen(
    rules: RuleSet,
    constants: tuple[Constant, ...],
    species: tuple[SpeciesExposure, ...],
    *,
    oral: bool,
    kdeg_liver: dict[str, float],
) -> tuple[ScreenResult, ...]:
    """Every criterion of ``rules`` that applies to a target in ``constants``."""
    results = []
    targets = list(dict.fromkeys(c.target for c in constants))
    for crit in rules.criteria:
        mult = float(crit.multiplier.value) if crit.multiplier else 1.0
        for target in targets:
            acting = [c for c in constants if c.target == target and _applies(crit, c, oral)]
            parts = []
            for c in acting:
                conc = _concentration(species[c.species_index], crit.concentration)
                if conc is None:
                    continue
                parts.append(_contribution(crit, c, mult * conc))
            if not parts:
                continue
            kdeg = kdeg_liver.get(target) if crit.form == "tdi" else None
            if crit.form == "tdi" and kdeg is None:
                continue
            value = _criterion_value(crit.form, sum(p.term for p in parts), kdeg)
            results.append(
                ScreenResult(
                    criterion=crit.id,
                    label=crit.label,
                    target=target,
                    mechanism=crit.mechanism,
                    value=value,
                    cutoff=crit.cutoff,
                    comparison=crit.comparison,
                    indicated=crit.flags(value),
                    equation=crit.equation,
                    concentration=crit.concentration,
                    multiplier=mult,
                    multiplier_source=crit.multiplier,
                    contributions=tuple(parts),
                    kdeg_per_h=kdeg,
                )
            )
    return tuple(results)
