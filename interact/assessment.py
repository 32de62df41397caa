"""The main job in one call: :func:`assess` turns a scenario into an :class:`Assessment`.

Both shells render an Assessment; neither recomputes anything.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass
from typing import Any, Final

from . import __version__, units
from .cautions import CAUTIONS
from .constants import Constant, kdeg_per_h, resolve_constants
from .dosing import DoseLimit, DoseSuggestion, RegimenPlan, highest_perpetrator_scale, plan_for_victim, suggest_dose
from .errors import FromMemoryWarning, InputError, ModelLimitWarning, WarningList, emit_warnings
from .exposure import Setting, SpeciesExposure, resolve_exposure, resolve_settings
from .genotype import PhenotypeCase, phenotype_cases
from .prediction import Prediction, predict, ratio_function, routes_of
from .scenario import METABOLISM, Scenario
from .screening import ScreenResult, screen
from .tables import UNVERIFIED, RuleSet, Sourced, load_classes, load_rules, table_versions, with_multipliers

__all__ = ["Assessment", "Provenance", "assess"]

_UNCOMPETITIVE_NOTE: Final = (
    "uncompetitive inhibition barely lowers intrinsic clearance at substrate concentrations far below Km; "
    "the models apply Ki as if competitive, which overstates the effect (conservative)"
)


@dataclass(frozen=True, slots=True, kw_only=True)
class Provenance:
    """What an assessment rests on.

    The tool version, the rule set (identifier, title, version, table version, file) and the
    version of every reference table.
    """

    tool_version: str
    rules_id: str
    rules_title: str
    rules_version: str
    rules_table_version: str
    rules_path: str
    table_versions: tuple[tuple[str, str], ...]


@dataclass(frozen=True, slots=True, kw_only=True)
class Assessment:
    """Everything the engine computed for one scenario, with what it rests on."""

    scenario: Scenario
    rules: RuleSet
    settings: tuple[Setting, ...]
    species: tuple[SpeciesExposure, ...]
    constants: tuple[Constant, ...]
    screen: tuple[ScreenResult, ...]
    prediction: Prediction
    aucr_cutoff: Sourced
    study_indicated: bool
    dose: DoseSuggestion
    regimens: RegimenPlan
    phenotypes: tuple[PhenotypeCase, ...]  # drug-drug-gene cases when the victim states phenotypes (interact.genotype)
    perpetrator_limit: DoseLimit
    kdeg_used: tuple[Setting, ...]
    warnings: tuple[str, ...]
    cautions: tuple[str, ...]
    memory_values: tuple[str, ...]
    provenance: Provenance

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready data in the documented schema (``schema`` = :data:`interact.results.ASSESSMENT_SCHEMA`).

        Returns
        -------
        dict
            Concentrations in uM, rates in 1/h, ratios dimensionless; the data of
            ``interact assess --format json`` (without a time course), whose writer,
            :func:`interact.report.assessment.assessment_to_dict`, builds on this dict:
            it puts the text in the rule set's words and resolves the citation markers
            of the sources into a ``references`` list.
        """
        from .results import assessment_dict

        return assessment_dict(self)

    def to_json(self, indent: int | None = 2) -> str:
        """:meth:`to_dict` as JSON text (strict: no NaN or infinity)."""
        return json.dumps(self.to_dict(), indent=indent, allow_nan=False)

    def __repr__(self) -> str:
        from .results import assessment_repr

        return assessment_repr(self)

    def _repr_html_(self) -> str:
        """The summary, ratios, action, warnings and cautions as HTML (shown by Jupyter)."""
        from .results import assessment_html

        return assessment_html(self)


def assess(scenario: Scenario, rules: str | RuleSet | None = None, *, warn: bool = True) -> Assessment:
    """Assess a perpetrator-victim scenario.

    Parameters
    ----------
    scenario
        A validated :class:`~interact.scenario.Scenario`.
    rules
        A rule set, its name, or a path to a rule-set TOML file.  By default the
        scenario's own ``rules`` key, else ICH M12 (2024).

    Returns
    -------
    Assessment
        Concentrations, basic-model results, mechanistic AUC ratios, the dose
        suggestion, warnings, cautions and provenance.

    Raises
    ------
    InputError
        If a value the engine needs cannot be used (for example a mass
        concentration without molar mass in a hand-built scenario).

    Warns
    -----
    InteractWarning
        With ``warn`` (the default), each of the assessment's warnings is also emitted through
        :func:`warnings.warn` under its topic (:class:`~interact.errors.AssumptionWarning`,
        :class:`~interact.errors.FromMemoryWarning`, :class:`~interact.errors.ModelLimitWarning`),
        so a notebook shows it; the shells pass ``warn=False`` and print ``Assessment.warnings``.
    """
    rule_set = _rule_set(scenario, rules)
    classes = load_classes()
    settings = resolve_settings(scenario, rule_set)
    species, fu_settings = resolve_exposure(scenario, rule_set, settings)
    constants = resolve_constants(scenario)
    kdeg, kdeg_used = kdeg_per_h(scenario, constants)
    p = scenario.perpetrator
    v = scenario.victim
    warnings = WarningList()
    rule_set = _multipliers(warnings, scenario, rule_set)
    screen_results = screen(
        rule_set, constants, species, oral=p.route == "oral", kdeg_liver={k: lv for k, (lv, _) in kdeg.items() if lv is not None}
    )
    gut_enzyme = next((c.target for c in constants if c.gut_wall), None) if v.route == "oral" else None
    fg = 1.0 if v.fg is None else v.fg
    pathways, routes = tuple((pw.enzyme, pw.fm) for pw in v.pathways if pw.route == METABOLISM), routes_of(v)
    prediction = predict(
        pathways=pathways, fg=fg, gut_enzyme=gut_enzyme, constants=constants, species=species, kdeg=kdeg, classes=classes, routes=routes
    )
    _check_finite(screen_results, prediction, constants)
    _input_warnings(warnings, scenario, constants, gut_enzyme, kdeg, kdeg_used)
    _model_limit_warnings(warnings, scenario, rule_set, constants, screen_results, prediction)
    _route_warnings(warnings, scenario, prediction)
    # -- dose
    plan = plan_for_victim(v, (classes.no_effect_lower, classes.no_effect_upper), "default 0.8-1.25, ICH M12 5.3.1")
    dose = suggest_dose(
        plan,
        auc_ratio=prediction.total,
        gut_ratio=prediction.gut,
        mechanism_parts=tuple((pt.mechanism, pt.total) for pt in prediction.parts) if "induction" in prediction.mechanisms else (),
    )
    cases = phenotype_cases(v.phenotypes, prediction, plan)
    _dose_warnings(warnings, scenario, plan)
    ratio_at = ratio_function(
        pathways=pathways, fg=fg, gut_enzyme=gut_enzyme, constants=constants, species=species, kdeg=kdeg, routes=routes
    )
    limit = _perpetrator_limit(p, prediction, ratio_at, plan.boundary[1])
    study, aucr_cut = _study(warnings, rule_set, prediction)
    all_settings = (*settings.values(), *fu_settings)
    memory = _memory_values(rule_set, (*all_settings, *kdeg_used), screen_results, cases, constants, aucr_cut, prediction)
    if warn:
        emit_warnings(zip(warnings.categories, warnings, strict=True))
    return Assessment(
        scenario=scenario,
        rules=rule_set,
        settings=all_settings,
        species=species,
        constants=constants,
        screen=screen_results,
        prediction=prediction,
        aucr_cutoff=aucr_cut,
        study_indicated=study,
        dose=dose,
        regimens=plan,
        phenotypes=cases,
        perpetrator_limit=limit,
        kdeg_used=tuple(kdeg_used),
        warnings=tuple(warnings),
        cautions=CAUTIONS,
        memory_values=memory,
        provenance=_provenance(rule_set),
    )


def _multipliers(warnings: WarningList, scenario: Scenario, rule_set: RuleSet) -> RuleSet:
    """The rule set with the scenario's basic-model multipliers, each override named in the warnings (every output)."""
    own = {c.id: float(c.multiplier.value) if c.multiplier else 1.0 for c in rule_set.criteria}
    changed = with_multipliers(rule_set, scenario.multipliers)
    for key, value in scenario.multipliers:
        warnings.append(
            f"Basic-model concentration multiplier of {key} overridden by the scenario: x {value:g} ({rule_set.id} uses x {own[key]:g})."
        )
    return changed


def _route_warnings(warnings: WarningList, scenario: Scenario, prediction: Prediction) -> None:
    """What a reviewer of a transporter-cleared object drug should know."""
    v = scenario.victim
    if v.route != "oral" and any(pw.route == "intestinal efflux" for pw in v.pathways):
        warnings.append("The victim is given intravenously: its intestinal efflux routes play no part and are left out.", ModelLimitWarning)
    if v.extended_clearance is not None:
        warnings.append(
            "Hepatic clearances given: uptake and metabolism act through the extended clearance concept; the enzyme fm "
            "are shares of CLmet and the hepatic uptake fractions shares of PS_inf.",
            ModelLimitWarning,
        )
        if prediction.regime_with != prediction.regime:
            warnings.append(
                f"The precipitant moves the victim's hepatic clearance from {prediction.regime} to {prediction.regime_with}: "
                "which step limits it depends on the inhibition ([@patileavrana2018]).",
                ModelLimitWarning,
            )


def _rule_set(scenario: Scenario, rules: str | RuleSet | None) -> RuleSet:
    """The rule set asked for, else the scenario's own key (a relative path is read from the scenario's folder)."""
    if isinstance(rules, RuleSet):
        return rules
    if rules is not None:
        return load_rules(rules)
    return load_rules(scenario.rules, base=scenario.folder)


def _input_warnings(
    warnings: WarningList,
    scenario: Scenario,
    constants: tuple[Constant, ...],
    gut_enzyme: str | None,
    kdeg: dict[str, tuple[float | None, float | None]],
    kdeg_used: list[Setting],
) -> None:
    """Warnings a reviewer would want about the inputs: defaults assumed, pathways untouched, kdeg unknown."""
    v = scenario.victim
    acting_targets = {c.target for c in constants}
    if gut_enzyme is not None and v.fg is None:
        warnings.append(
            f"victim.fg not given: Fg = 1 assumed, so no gut-wall interaction is predicted although {gut_enzyme} "
            "is inhibited; give the victim's Fg."
        )
    untouched = [pw.enzyme for pw in v.pathways if pw.enzyme not in acting_targets]
    if untouched:
        warnings.append(f"The perpetrator has no entry for the victim's pathway(s) {', '.join(untouched)}: taken as unaffected.")
    if not v.pathways:
        warnings.append("The victim lists no metabolic pathways: the liver term is 1 by construction.")
    for c in constants:
        _constant_warnings(warnings, c)
    for kd in kdeg_used:
        if kd.from_memory:
            warnings.append(
                f"{kd.label} = {kd.value:.4g} 1/h is from memory ({kd.source}); override it under [[turnover]] if you have a better value.",
                FromMemoryWarning,
            )
    for enzyme, (lv, gv) in kdeg.items():
        if lv is None:
            warnings.append(
                f"No hepatic kdeg is known for {enzyme}: its time-dependent inhibition is left out; give it under [[turnover]]."
            )
        if gv is None and enzyme == gut_enzyme:
            warnings.append(
                f"No intestinal kdeg is known for {enzyme}: its time-dependent inhibition in the gut wall is left out; "
                "give kdeg_gut under [[turnover]]."
            )


def _constant_warnings(warnings: WarningList, c: Constant) -> None:
    """One constant's warnings: uncompetitive applied as competitive, fu,inc assumed or shared between constants."""
    if c.mechanism == "uncompetitive" and c.ki_u_um is not None:
        warnings.append(f"{c.species} on {c.target}: {_UNCOMPETITIVE_NOTE}.", ModelLimitWarning)
    if c.fu_inc_origin == "default" and c.kind == "enzyme" and c.ki_u_um is not None:
        warnings.append(f"{c.species} on {c.target}: fu,inc not given; Ki taken as unbound (fu,inc = 1).")
    shared = [
        name
        for name, value, origin in (("KI", c.ki_inact_um, c.ki_inact_fu_origin), ("EC50", c.ec50_um, c.ec50_fu_origin))
        if value is not None and origin.startswith("fu_inc (given")
    ]
    if shared and c.fu_inc != 1.0:
        corrected = " and ".join(["Ki", *shared] if c.ki_um is not None else shared)
        warnings.append(
            f"{c.species} on {c.target}: fu_inc {c.fu_inc:g} corrects {corrected} "
            f"alike; if {' or '.join(shared)} was measured in another system (hepatocytes) or is already unbound, give "
            + " / ".join(f"fu_inc_{'ki_inact' if n == 'KI' else 'ec50'}" for n in shared)
            + " (1 for an unbound value)."
        )


def _model_limit_warnings(
    warnings: WarningList,
    scenario: Scenario,
    rule_set: RuleSet,
    constants: tuple[Constant, ...],
    screen_results: tuple[ScreenResult, ...],
    prediction: Prediction,
) -> None:
    """The mechanistic model flags what the basic R1 screen does not (the inlet concentration exceeds Cmax,u)."""
    acting_targets = {c.target for c in constants}
    rev_flags = {r.target for r in screen_results if r.criterion.startswith("reversible") and r.indicated}
    if prediction.total >= float(rule_set.aucr_inhibition_cutoff.value):
        missed = [
            pw.enzyme
            for pw in scenario.victim.pathways
            if pw.route == METABOLISM and pw.enzyme in acting_targets and pw.enzyme not in rev_flags
        ]
        if missed and any(c.ki_u_um is not None and c.target in missed for c in constants):
            warnings.append(
                f"The mechanistic model predicts AUCR >= {rule_set.aucr_inhibition_cutoff.value:g} although the basic R1 "
                f"screen does not flag {', '.join(missed)}: the hepatic inlet concentration exceeds Cmax,u.",
                ModelLimitWarning,
            )


def _dose_warnings(warnings: WarningList, scenario: Scenario, plan: RegimenPlan) -> None:
    """A default boundary on a narrow-therapeutic-index victim; a Cmax measured at another perpetrator dose."""
    p = scenario.perpetrator
    boundary = plan.boundary
    if plan.narrow_therapeutic_index and plan.boundary_origin.startswith("default"):
        warnings.append(
            f"The default no-effect boundary {boundary[0]:g}-{boundary[1]:g} was applied to a narrow-therapeutic-index victim; "
            "give its own victim.no_effect_boundary (usually narrower) from its label or exposure-response data."
        )
    if p.cmax_dose is not None:
        dose_now = units.magnitude(p.dose, units.unit_text(p.cmax_dose))
        measured_at = float(p.cmax_dose.magnitude)
        if not math.isclose(dose_now, measured_at, rel_tol=1e-9):
            warnings.append(
                f"The perpetrator's dose ({units.format_quantity(p.dose)}) differs from the dose at which its Cmax was measured "
                f"({units.format_quantity(p.cmax_dose)}): Cmax is used as given, not scaled; give the Cmax at "
                f"{units.format_quantity(p.dose)} (the perpetrator-dose ceiling below assumes Cmax scales with dose)."
            )


def _study(warnings: WarningList, rule_set: RuleSet, prediction: Prediction) -> tuple[bool, Sourced]:
    """Whether a clinical study is indicated, and the AUCR cutoff that decided it."""
    aucr_cut = rule_set.aucr_inhibition_cutoff
    induced = prediction.total <= float(rule_set.aucr_induction_cutoff.value)
    study = prediction.total >= float(aucr_cut.value) or induced
    if induced:
        aucr_cut = rule_set.aucr_induction_cutoff
    # mixed effects: inhibition and induction are judged separately too, not only their net (memory: FDA practice)
    if "induction" in prediction.mechanisms and len(prediction.mechanisms) > 1:
        inhibitory = [pt for pt in prediction.parts if pt.mechanism != "induction"]
        inhib = max(inhibitory, key=lambda pt: pt.total) if inhibitory else None
        induct = next((pt for pt in prediction.parts if pt.mechanism == "induction"), None)
        if inhib is not None and inhib.total >= float(rule_set.aucr_inhibition_cutoff.value) and not study:
            study = True
            warnings.append(
                f"The net AUCR {prediction.total:.3g} hides inhibition: {inhib.mechanism} alone gives {inhib.total:.3g} "
                f"(>= {rule_set.aucr_inhibition_cutoff.value:g}); a clinical study is indicated on the inhibition alone.",
                ModelLimitWarning,
            )
        if induct is not None and induct.total <= float(rule_set.aucr_induction_cutoff.value) and not induced:
            if not study:
                aucr_cut = rule_set.aucr_induction_cutoff
            study = True
            warnings.append(
                f"The net AUCR {prediction.total:.3g} hides induction: induction alone gives {induct.total:.3g} "
                f"(<= {rule_set.aucr_induction_cutoff.value:g}); a clinical study is indicated on the induction alone.",
                ModelLimitWarning,
            )
    return study, aucr_cut


def _memory_values(
    rule_set: RuleSet,
    settings: tuple[Setting, ...],
    screen_results: tuple[ScreenResult, ...],
    cases: tuple[PhenotypeCase, ...],
    constants: tuple[Constant, ...],
    aucr_cut: Sourced,
    prediction: Prediction,
) -> tuple[str, ...]:
    """Every from-memory or inferred value the assessment used, with its source."""

    def tag(status: str) -> str:
        return " [inferred from an older guidance]" if status == "inferred" else ""

    return tuple(
        sorted(
            {f"{s.label}: {s.source}{tag(s.status)}" for s in settings if s.status in UNVERIFIED and s.origin in ("default", "rule set")}
            | {
                f"{r.label} cutoff for {r.target} ({rule_set.id}): {r.cutoff.source}{tag(r.cutoff.status)}"
                for r in screen_results
                if r.cutoff.unverified
            }
            | {
                f"Phenotype activity {enzyme} {name} = {act:g}: {src.source}{tag(src.status)}"
                for case in cases
                for (enzyme, name, act), src in zip(case.activities, case.sources, strict=True)
                if src is not None and src.status in UNVERIFIED
            }
            | {
                f"Induction calibration factor d = 1 for {c.species} on {c.target}: default ([@lee2024] shows d in the R3 equation; "
                "the default value 1 is from memory)"
                for c in constants
                if c.emax is not None and c.calibration_origin == "default"
            }
            | {
                f"{r.label} multiplier ({rule_set.id}): {r.multiplier_source.source}{tag(r.multiplier_source.status)}"
                for r in screen_results
                if r.multiplier_source is not None and r.multiplier_source.unverified
            }
            | ({f"AUCR cutoff ({rule_set.id}): {aucr_cut.source}{tag(aucr_cut.status)}"} if aucr_cut.unverified else set())
            | (
                {f"Class band '{prediction.band.name}': {prediction.band.source}{tag(prediction.band.status)}"}
                if prediction.band is not None and prediction.band.status in UNVERIFIED
                else set()
            )
        )
    )


def _provenance(rule_set: RuleSet) -> Provenance:
    return Provenance(
        tool_version=__version__,
        rules_id=rule_set.id,
        rules_title=rule_set.title,
        rules_version=rule_set.version,
        rules_table_version=rule_set.table_version,
        rules_path=rule_set.path,
        table_versions=table_versions(),
    )


def _check_finite(screen_results: tuple[ScreenResult, ...], prediction: Prediction, constants: tuple[Constant, ...]) -> None:
    """Refuse a silent infinite or undefined number: extreme inputs (a Ki,u of 1e-300 uM) overflow floats."""
    bad = [r for r in screen_results if not math.isfinite(r.value)]
    if bad or not all(math.isfinite(x) and x > 0 for x in (prediction.gut, prediction.liver, prediction.total)):
        target = bad[0].target if bad else next((e.enzyme for e in prediction.effects if not math.isfinite(e.liver.activity)), "")
        shown = (
            ", ".join(f"{c.species} Ki,u {c.ki_u_um:.3g} uM" for c in constants if c.target == target and c.ki_u_um is not None)
            or "the inputs"
        )
        raise InputError(
            f"perpetrator.inhibits ({target or 'all targets'})",
            shown,
            "give a ratio beyond floating-point range; expected constants and fractions (fu_inc, fu_plasma) of plausible size",
        )


def _perpetrator_limit(p, prediction: Prediction, ratio_at, upper: float) -> DoseLimit:  # type: ignore[no-untyped-def]
    unit = units.unit_text(p.dose)
    dose = float(p.dose.magnitude)
    if "induction" in prediction.mechanisms:
        return DoseLimit(
            scale=None,
            dose=None,
            dose_unit=unit,
            boundary_upper=upper,
            reason="not computed: the perpetrator also induces, so the ratio need not rise with dose",
        )
    if prediction.ceiling_total < upper:
        return DoseLimit(
            scale=None,
            dose=None,
            dose_unit=unit,
            boundary_upper=upper,
            reason=f"no limit: even complete inhibition (AUCR {prediction.ceiling_total:.3g}) stays below {upper:g}",
        )
    scale = highest_perpetrator_scale(ratio_at, upper)
    if scale is None:
        return DoseLimit(scale=None, dose=None, dose_unit=unit, boundary_upper=upper, reason=f"no dose reaches AUCR {upper:g}")
    return DoseLimit(
        scale=scale,
        dose=scale * dose,
        dose_unit=unit,
        boundary_upper=upper,
        reason=(
            f"highest perpetrator dose keeping the victim's AUCR at or below {upper:g}, assuming the perpetrator's "
            "concentrations scale linearly with its dose"
        ),
    )
