"""The enzymes the time course follows: one entry per enzyme and site, with the perpetrator's constants on it.

Enzyme turnover per enzyme and site (Fahmi et al. 2008 structure, from memory; its steady state is induction x
inactivation, the static model's terms):

    dE/dt = kdeg (E0 x induction(I) - E) - kobs(I) E,  E0 = 1

The three terms come from :mod:`interact.prediction` (``reversible_term``, ``inactivation_term``,
``induction_term``) on arrays over time.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

from ..prediction import inactivation_term, induction_term, reversible_term

if TYPE_CHECKING:
    from ..assessment import Assessment

Array = NDArray[np.float64]


@dataclass(frozen=True, slots=True, kw_only=True)
class EnzymeSite:
    """One enzyme at one site: its fm, kdeg and the perpetrator's constants acting on it (by species index)."""

    enzyme: str
    site: str  # "liver" | "gut"
    fm: float  # liver: the pathway's fm; gut: 0 (enters through Fg)
    kdeg: float | None  # 1/h
    inv_ki: tuple[tuple[int, float], ...]  # (species, 1/Ki,u in 1/uM)
    inact: tuple[tuple[int, float, float], ...]  # (species, kinact 1/h, KI,u uM)
    induce: tuple[tuple[int, float, float], ...]  # (species, d x Emax, EC50,u uM)

    @property
    def turnover(self) -> bool:
        """Whether the amount of enzyme is followed in time (a kdeg and a mechanism that changes the amount)."""
        return self.kdeg is not None and bool(self.inact or self.induce)

    def terms(self, conc: Array) -> tuple[Array, Array, Array]:
        """(reversible term, kobs in 1/h, induction fold) at species concentrations ``conc`` (uM, species first)."""
        c = np.asarray(conc, dtype=float)
        zero = np.zeros(c.shape[1:])
        ratio = sum((c[j] * k for j, k in self.inv_ki), zero)
        kobs = sum((kin * c[j] / (ki + c[j]) for j, kin, ki in self.inact), zero) if self.kdeg is not None else zero
        effect = sum((e * c[j] / (ec + c[j]) for j, e, ec in self.induce), zero)
        return reversible_term(ratio), kobs, induction_term(effect)

    def steady_amount(self, conc: Array) -> Array:
        """Enzyme at steady state relative to baseline, induction x inactivation (the static model's terms)."""
        _, kobs, induction = self.terms(conc)
        assert self.kdeg is not None
        return induction * inactivation_term(kobs, self.kdeg)


def enzyme_sites(a: Assessment, kdeg: dict[str, tuple[float | None, float | None]], gut_enzyme: str | None) -> list[EnzymeSite]:
    """The liver site of each of the victim's pathways, and the gut-wall site of ``gut_enzyme`` if any."""
    out = []
    enzymes = [(pw.enzyme, pw.fm, "liver") for pw in a.scenario.victim.pathways]
    if gut_enzyme is not None:
        enzymes.append((gut_enzyme, 0.0, "gut"))
    for enzyme, fm, site in enzymes:
        acting = [c for c in a.constants if c.target == enzyme]
        out.append(
            EnzymeSite(
                enzyme=enzyme,
                site=site,
                fm=fm,
                kdeg=kdeg.get(enzyme, (None, None))[0 if site == "liver" else 1],
                inv_ki=tuple((c.species_index, 1.0 / c.ki_u_um) for c in acting if c.ki_u_um is not None),
                inact=tuple(
                    (c.species_index, c.kinact_per_h, c.ki_inact_u_um)
                    for c in acting
                    if c.kinact_per_h is not None and c.ki_inact_u_um is not None
                ),
                induce=tuple(
                    (c.species_index, c.calibration * c.emax, c.ec50_u_um) for c in acting if c.emax is not None and c.ec50_u_um is not None
                ),
            )
        )
    return out
