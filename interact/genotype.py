"""Drug-drug-gene interactions: the object drug's metaboliser phenotype on each polymorphic pathway.

The object drug's fm values are population figures, taken as the normal
metaboliser's.  A phenotype scales the intrinsic clearance of its pathway by a
relative activity a (0 for a poor metaboliser; reference_tables/phenotypes.toml).
With D = sum_j fm_j a_j + (1 - sum_j fm_j) (linear kinetics; the rest of the
clearance unchanged):

- the fractions shift to fm_j' = fm_j a_j / D, so a poor metaboliser of one
  pathway puts more of its clearance on the others;
- without the precipitant, exposure relative to a normal metaboliser is 1 / D
  (the genotype effect alone);
- with it, the liver term of the mechanistic static model (Fahmi et al. 2008
  net-effect form) with the shifted fractions gives the interaction within the
  phenotype, and 1 / (sum_j fm_j a_j A_j + 1 - sum_j fm_j), with A_j the
  activity the precipitant leaves, the exposure relative to a normal
  metaboliser without the precipitant: the combined drug-drug-gene effect the
  dose must answer.

The gut-wall term (CYP3A) is taken as genotype-independent.  These relations
are the phenotype-activity (linear phenoconversion) form used by static
drug-drug-gene models (common practice; the activity values themselves are
conventions, mostly from memory).
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass
from typing import Final

import numpy as np

from .dosing import DoseSuggestion, RegimenPlan, suggest_dose
from .errors import InputError
from .prediction import Prediction, liver_ratio
from .scenario import PhenotypeChoice
from .tables import Sourced, load_phenotypes

__all__ = ["MAX_CASES", "PhenotypeCase", "phenotype_cases", "phenotype_options"]

#: at most this many phenotype combinations are tabulated
MAX_CASES: Final = 60


@dataclass(frozen=True, slots=True, kw_only=True)
class PhenotypeCase:
    """One combination of phenotypes and what it does to the object drug's exposure."""

    label: str  # "CYP2D6 poor" (several enzymes joined by ", ")
    activities: tuple[tuple[str, str, float], ...]  # (enzyme, phenotype, relative activity)
    sources: tuple[Sourced | None, ...]  # where each activity comes from (None: given, or the added reference row)
    fm: tuple[tuple[str, float], ...]  # the fractions in this phenotype, fm' (every pathway)
    genotype_ratio: float  # exposure without the precipitant, relative to a normal metaboliser
    interaction_ratio: float  # with / without the precipitant, within this phenotype (gut x liver)
    combined_ratio: float  # with the precipitant, relative to a normal metaboliser without it
    ceiling: float  # complete inhibition of the inhibited pathways, within this phenotype (inf when unbounded)
    dose: DoseSuggestion  # the regimen search on the combined ratio
    reference: bool  # every activity 1: the population result itself


def phenotype_options(choice: PhenotypeChoice) -> list[tuple[str, float, Sourced | None]]:
    """(phenotype, relative activity, its source) for a choice: one row, or every phenotype of the table for "all"."""
    table = load_phenotypes().get(choice.enzyme)
    if choice.activity is not None:
        return [("given", choice.activity, None)]
    if table is None:
        raise InputError("victim.phenotypes", choice.enzyme, "has no phenotype table")
    rows = list(table) if choice.phenotype == "all" else [p for p in table if p.name == choice.phenotype]
    if not rows:
        raise InputError("victim.phenotypes", choice.phenotype, f"is not a phenotype of {choice.enzyme}")
    return [(p.name, float(p.activity.value), p.activity) for p in rows]


def phenotype_cases(
    choices: tuple[PhenotypeChoice, ...],
    prediction: Prediction,
    plan: RegimenPlan,
) -> tuple[PhenotypeCase, ...]:
    """Every requested phenotype combination: fractions, genotype, interaction and combined ratios, and the dose.

    Parameters
    ----------
    choices
        The object drug's phenotypes (``victim.phenotypes``); ``"all"`` expands to every phenotype of the table.
    prediction
        The population (normal-metaboliser) prediction: its pathways, the activity the precipitant leaves on
        each (liver) and the gut ratio.
    plan
        The object drug's regimens and boundaries, for the dose advice per phenotype.

    A row with every activity 1 (the population result) is included first when no requested combination is it.
    """
    if not choices:
        return ()
    per_enzyme = [(c.enzyme, phenotype_options(c)) for c in choices]
    combos = list(itertools.product(*(opts for _, opts in per_enzyme)))
    if len(combos) > MAX_CASES:
        raise InputError("victim.phenotypes", f"{len(combos)} combinations", f"are more than the {MAX_CASES} tabulated; ask for fewer")
    enzymes = [e for e, _ in per_enzyme]
    effects = prediction.effects
    fm = np.array([e.fm for e in effects])
    acted = np.array([e.liver.activity for e in effects])
    inhibited = acted < 1.0
    cases = []
    reference = [tuple(("normal", 1.0, None) for _ in enzymes)]
    if not any(all(a == 1.0 for _, a, _ in combo) for combo in combos):
        combos = reference + combos
    for combo in combos:
        by_enzyme = {enzyme: a for enzyme, (_, a, _) in zip(enzymes, combo, strict=True)}
        a = np.array([by_enzyme.get(e.enzyme, 1.0) for e in effects])
        genotype = float(liver_ratio(fm, a))  # 1 / D
        combined_liver = float(liver_ratio(fm, a * acted))
        shifted = fm * a * genotype  # fm' = fm a / D
        interaction_liver = combined_liver / genotype
        inhibited_fm = float(np.sum(shifted[inhibited]))
        ceiling_liver = 1.0 / (1.0 - inhibited_fm) if inhibited_fm < 1.0 else float("inf")
        combined = prediction.gut * combined_liver
        is_reference = all(x == 1.0 for x in a)
        cases.append(
            PhenotypeCase(
                label=", ".join(f"{enzyme} {name}" for enzyme, (name, _, _) in zip(enzymes, combo, strict=True)),
                activities=tuple((enzyme, name, act) for enzyme, (name, act, _) in zip(enzymes, combo, strict=True)),
                sources=tuple(src for _, _, src in combo),
                fm=tuple((e.enzyme, float(f)) for e, f in zip(effects, shifted, strict=True)),
                genotype_ratio=genotype,
                interaction_ratio=prediction.gut * interaction_liver,
                combined_ratio=combined,
                ceiling=prediction.ceiling_gut * ceiling_liver,
                dose=suggest_dose(plan, auc_ratio=combined, gut_ratio=prediction.gut),
                reference=is_reference,
            )
        )
    return tuple(cases)
