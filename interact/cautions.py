"""The safety cautions every shell shows.  Core text, no formatting."""

from __future__ import annotations

from typing import Final

__all__ = ["CAUTIONS", "CAUTION_LINE", "DOSE_CAUTIONS", "GENOTYPE_CAUTIONS", "INCREASE_CAUTION"]

CAUTION_LINE: Final = "Model estimate, not clinical advice: the prescriber, the product label and local guidance decide."

CAUTIONS: Final = (
    "These are predictions of static models: screening estimates, not clinical advice.",
    "Dose decisions belong to a licensed prescriber, with the victim drug's product label and local guidance.",
    "Static models can over- or under-predict: nonlinear kinetics, active or inhibitory metabolites not entered, "
    "transporter-enzyme interplay, genotype (unless phenotypes are stated), disease and time course are not captured.",
    "Values marked 'from memory' in the tables were not verified against the primary text; check them before relying on them.",
)

DOSE_CAUTIONS: Final = (
    "A suggested dose is a model estimate for discussion, not a prescription: the prescriber, the label and local guidance decide.",
    "It assumes linear kinetics of the victim and an unchanged exposure target; nonlinear kinetics make dose / AUCR wrong.",
    "Narrow-therapeutic-index drugs, active metabolites or prodrugs, and genotype (poor metabolisers, parallel pathways) "
    "need expert review; therapeutic drug monitoring or avoiding the combination may be safer.",
    "If peak concentration drives toxicity, check Cmax separately: the gut-wall part raises Cmax about as much as AUC.",
)

INCREASE_CAUTION: Final = (
    "A predicted fall in exposure suggests a higher dose: risk of exposure-driven toxicity if the perpetrator is stopped "
    "or its effect wanes, and of lost efficacy if the dose is not raised; the label's maximum dose applies."
)

GENOTYPE_CAUTIONS: Final = (
    "Genotype-guided dosing needs expert review: phenotype from genotype is uncertain (rare alleles, copy number, "
    "phenoconversion by other drugs), and the relative activities here are conventions, mostly from memory.",
    "Follow the pharmacogenetic guideline for the object drug (for example CPIC or DPWG) and its label where they give "
    "phenotype-specific doses; they outrank this estimate.",
    "The model assumes each phenotype scales only its own pathway's intrinsic clearance, linear kinetics, and no genotype "
    "effect in the gut wall.",
)
