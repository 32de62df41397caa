"""Results as plain data and short summaries: JSON-ready dicts, ``repr`` and notebook HTML.

One implementation each: :meth:`interact.assessment.Assessment.to_dict` and the
reports (``interact assess --format json``) both call :func:`assessment_dict`;
the ``__repr__`` and ``_repr_html_`` of the results call the summaries here.
The JSON schema names of every output are declared here too, one constant per
output, ``<OUTPUT>_SCHEMA = "interact.<output>/<version>"``.
"""

from __future__ import annotations

import html
import math
from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING, Any, Final

from .cautions import CAUTION_LINE, FIT_CAUTION
from .dosing import ACTIONS, RegimenOutcome
from .exposure import Setting
from .numbers import fmt, fmt_ratio

if TYPE_CHECKING:
    from .assessment import Assessment
    from .constants import Constant
    from .dosing import DoseSuggestion
    from .exposure import SpeciesExposure
    from .genotype import PhenotypeCase
    from .kinetics.fitting import ModelComparison
    from .prediction import SiteTerms
    from .screening import ScreenResult
    from .uncertainty import UncertaintyResult

__all__ = [
    "ASSESSMENT_SCHEMA",
    "BATCH_SCHEMA",
    "FIT_SCHEMA",
    "IC50_SCHEMA",
    "MECHANISM_FIT_SCHEMA",
    "TIMECOURSE_SCHEMA",
    "UNCERTAINTY_SCHEMA",
    "assessment_dict",
    "assessment_html",
    "assessment_repr",
    "comparison_html",
    "comparison_repr",
    "data_frame",
    "setting_dict",
    "summary_html",
    "uncertainty_html",
    "uncertainty_repr",
]

#: ``interact assess --format json`` and :meth:`Assessment.to_dict`
ASSESSMENT_SCHEMA: Final = "interact.assessment/1"
#: ``interact uncertainty --format json``
UNCERTAINTY_SCHEMA: Final = "interact.uncertainty/1"
#: ``interact batch --format json``
BATCH_SCHEMA: Final = "interact.batch/1"
#: ``interact fit --format json`` (an inhibition model comparison)
FIT_SCHEMA: Final = "interact.fit/1"
#: ``interact fit-ic50 --format json``
IC50_SCHEMA: Final = "interact.ic50/1"
#: time-dependent inactivation and induction fits
MECHANISM_FIT_SCHEMA: Final = "interact.mechanism-fit/1"
#: ``interact timecourse --format json``
TIMECOURSE_SCHEMA: Final = "interact.timecourse/1"


def _regimen_json(o: RegimenOutcome | None) -> dict[str, object] | None:
    if o is None:
        return None
    r = o.regimen
    return {
        "kind": r.kind,
        "dose": _num(r.dose),
        "interval_h": r.interval_h,
        "units": r.makeup or None,
        "exposure_ratio": _num(o.exposure_ratio),
        "peak_ratio": _num(o.peak_ratio),
        "trough_ratio": _num(o.trough_ratio),
        "inside_boundary": o.feasible,
        "peak_and_trough_checked": o.checked,
    }


def _num(x: float | None) -> float | None:
    if x is None or not math.isfinite(x):
        return None
    return x


def setting_dict(s: Setting) -> dict[str, Any]:
    """A setting (value used, unit, origin, source, status) as JSON-ready data."""
    return {
        "name": s.name,
        "label": s.label,
        "value": s.value,
        "unit": s.unit,
        "origin": s.origin,
        "source": s.source,
        "status": s.status,
        "note": s.note,
    }


def _species_json(sp: SpeciesExposure) -> dict[str, Any]:
    return {
        "species": sp.species,
        "parent": sp.is_parent,
        "cmax": sp.cmax_um,
        "fu_plasma_used": sp.fu_plasma_used,
        "imax_u": sp.unbound_cmax_um,
        "igut": sp.gut_lumen_um if sp.is_parent else None,
        "iin_max_u": sp.unbound_inlet_um,
        "i_ent": sp.enterocyte_um,
    }


def _constant_json(c: Constant) -> dict[str, Any]:
    return {
        "species": c.species,
        "target": c.target,
        "ki_um": c.ki_um,
        "fu_inc": c.fu_inc,
        "fu_inc_origin": c.fu_inc_origin,
        "ki_u_um": c.ki_u_um,
        "ki_route": c.ki_route,
        "mechanism": c.mechanism,
        "kinact_per_h": c.kinact_per_h,
        "ki_ci_um": list(c.ki_ci_um) if c.ki_ci_um else None,
        "ki_inact_um": c.ki_inact_um,
        "ki_inact_fu": c.ki_inact_fu,
        "ki_inact_fu_origin": c.ki_inact_fu_origin,
        "ki_inact_u_um": c.ki_inact_u_um,
        "emax": c.emax,
        "ec50_um": c.ec50_um,
        "ec50_fu": c.ec50_fu,
        "ec50_fu_origin": c.ec50_fu_origin,
        "ec50_u_um": c.ec50_u_um,
        "calibration": c.calibration,
    }


def _screen_json(r: ScreenResult) -> dict[str, Any]:
    return {
        "criterion": r.criterion,
        "label": r.label,
        "target": r.target,
        "mechanism": r.mechanism,
        "value": r.value,
        "comparison": r.comparison,
        "cutoff": r.cutoff.value,
        "cutoff_source": r.cutoff.source,
        "cutoff_status": r.cutoff.status,
        "study_indicated": r.indicated,
        "equation": r.equation,
        "concentration": r.concentration,
        "multiplier": r.multiplier,
        "kdeg_per_h": r.kdeg_per_h,
    }


def _site_json(t: SiteTerms) -> dict[str, Any]:
    return {"reversible": t.reversible, "inactivation": t.inactivation, "induction": t.induction, "activity": t.activity}


def _auc_ratio_json(a: Assessment) -> dict[str, Any]:
    pr = a.prediction
    return {
        "gut": pr.gut,
        "liver": pr.liver,
        "total": pr.total,
        "kidney": pr.kidney,
        "ceiling_gut": _num(pr.ceiling_gut),
        "ceiling_liver": _num(pr.ceiling_liver),
        "ceiling_kidney": _num(pr.ceiling_kidney),
        "ceiling_total": _num(pr.ceiling_total),
        "hepatic_regime": None if pr.regime is None else {"without_precipitant": pr.regime, "with_precipitant": pr.regime_with},
        "band": pr.band.name if pr.band else None,
        "study_indicated": a.study_indicated,
        "cutoff": a.aucr_cutoff.value,
        "by_mechanism": [
            {"mechanism": m.mechanism, "gut": m.gut, "liver": m.liver, "kidney": m.kidney, "total": m.total} for m in pr.parts
        ],
        "transporter_routes": [
            {
                "transporter": r.transporter,
                "route": r.route,
                "fraction": r.fraction,
                "concentration_um": dict(r.site.concentration_um),
                **_site_json(r.site),
            }
            for r in pr.routes
        ],
        "enzymes": [
            {"enzyme": e.enzyme, "fm": e.fm, "liver": _site_json(e.liver), "gut": None if e.gut is None else _site_json(e.gut)}
            for e in pr.effects
        ],
    }


def _dose_json(d: DoseSuggestion) -> dict[str, Any]:
    return {
        "action": d.action,
        "actions": list(ACTIONS),
        "monitoring_required": d.monitoring,
        "headline": d.headline,
        "unit": d.dose_unit,
        "usual_dose": d.usual_dose,
        "usual_interval_h": d.usual_interval_h,
        "half_life_h": d.half_life_h,
        "exact_dose": d.exact_dose,
        "exact_interval_h": d.exact_interval_h,
        "suggested": _regimen_json(d.chosen),
        "options_inside_boundary": [_regimen_json(o) for o in d.options],
        "nearest_outside": [_regimen_json(o) for o in d.nearest],
        "no_effect_boundary": list(d.boundary),
        "peak_boundary": list(d.peak_boundary),
        "trough_boundary": list(d.trough_boundary),
        "boundary_origin": d.boundary_origin,
        "reasons": list(d.reasons),
        "cautions": list(d.cautions),
    }


def _phenotype_json(c: PhenotypeCase) -> dict[str, Any]:
    return {
        "label": c.label,
        "reference": c.reference,
        "activities": [{"enzyme": e, "phenotype": n, "activity": act} for e, n, act in c.activities],
        "fm": dict(c.fm),
        "exposure_vs_normal_alone": c.genotype_ratio,
        "auc_ratio_with_precipitant": c.interaction_ratio,
        "exposure_vs_normal_with_precipitant": c.combined_ratio,
        "ceiling": _num(c.ceiling),
        "action": c.dose.action,
        "headline": c.dose.headline,
        "suggested": _regimen_json(c.dose.chosen),
    }


def assessment_dict(a: Assessment) -> dict[str, Any]:
    """The assessment as JSON-ready data (schema :data:`ASSESSMENT_SCHEMA`, documented in README.md "JSON output").

    Concentrations are in uM, rates in 1/h, doses in the unit of the scenario's
    dose (named beside them); ratios are dimensionless.  Non-finite ceilings
    become ``None``.  :meth:`Assessment.to_dict` and the reports call this one
    function.
    """
    lim = a.perpetrator_limit
    return {
        "schema": ASSESSMENT_SCHEMA,
        "title": a.scenario.title,
        "invented": a.scenario.invented,
        "rules": {"id": a.rules.id, "title": a.rules.title, "version": a.rules.version, "table_version": a.rules.table_version},
        "settings": [setting_dict(s) for s in (*a.settings, *a.kdeg_used)],
        "concentrations_um": [_species_json(sp) for sp in a.species],
        "constants": [_constant_json(c) for c in a.constants],
        "screen": [_screen_json(r) for r in a.screen],
        "auc_ratio": _auc_ratio_json(a),
        "dose": _dose_json(a.dose),
        "phenotypes": [_phenotype_json(c) for c in a.phenotypes],
        "perpetrator_dose_limit": {"dose": lim.dose, "unit": lim.dose_unit, "scale": lim.scale, "reason": lim.reason},
        "warnings": list(a.warnings),
        "from_memory": list(a.memory_values),
        "cautions": list(a.cautions),
        "provenance": {
            "tool_version": a.provenance.tool_version,
            "rules_id": a.provenance.rules_id,
            "rules_path": a.provenance.rules_path,
            "tables": dict(a.provenance.table_versions),
        },
    }


# --------------------------------------------------------------------------- short summaries (repr, notebook HTML)


def _organ_product(pr: Any) -> str:
    return f"{fmt_ratio(pr.gut)} x {fmt_ratio(pr.liver)}" + (f" x {fmt_ratio(pr.kidney)}" if pr.kidney != 1.0 else "")


def _short(text: str, limit: int = 60) -> str:
    return text if len(text) <= limit else text[: limit - 3] + "..."


def summary_html(
    title: str,
    rows: Sequence[tuple[str, str]],
    *,
    lead: str = "",
    action: str = "",
    warnings: Iterable[str] = (),
    cautions: Iterable[str] = (CAUTION_LINE,),
) -> str:
    """A compact HTML block for a notebook: a title, a two-column table, the action, warnings and cautions.

    Every string is escaped (scenario titles and names are user text).
    """
    e = html.escape
    parts = [f'<div class="interact-summary"><strong>{e(title)}</strong>']
    if lead:
        parts.append(f"<p>{e(lead)}</p>")
    if rows:
        body = "".join(f'<tr><th style="text-align:left">{e(k)}</th><td style="text-align:left">{e(v)}</td></tr>' for k, v in rows)
        parts.append(f"<table>{body}</table>")
    if action:
        parts.append(f"<p><strong>Action:</strong> {e(action)}</p>")
    shown = list(warnings)
    if shown:
        parts.append("<details><summary>Warnings (" + str(len(shown)) + ")</summary><ul>")
        parts.extend(f"<li>{e(w)}</li>" for w in shown)
        parts.append("</ul></details>")
    for c in cautions:
        parts.append(f"<p><em>Caution:</em> {e(c)}</p>")
    parts.append("</div>")
    return "".join(parts)


def _ratio_rows(a: Assessment) -> list[tuple[str, str]]:
    pr = a.prediction
    rows = [
        ("AUC ratio (total)", fmt_ratio(pr.total)),
        ("AUC ratio gut x liver" + (" x kidney" if pr.kidney != 1.0 else ""), _organ_product(pr)),
        ("Complete-inhibition ceiling", fmt_ratio(pr.ceiling_total)),
        ("Size band", pr.band.name if pr.band else "-"),
        ("Clinical study", f"{'indicated' if a.study_indicated else 'not indicated'} (AUCR cutoff {a.aucr_cutoff.value:g})"),
    ]
    rows.extend((f"{r.label} {r.target}", f"{fmt_ratio(r.value)} {r.comparison} {r.cutoff.value:g}") for r in a.screen)
    return rows


def assessment_repr(a: Assessment) -> str:
    """One line: title, AUC ratios, study verdict, action and counts of warnings and cautions."""
    pr = a.prediction
    return (
        f"Assessment({_short(a.scenario.title)!r}, AUCR={fmt_ratio(pr.total)} "
        f"(gut {fmt_ratio(pr.gut)} x liver {fmt_ratio(pr.liver)}"
        + (f" x kidney {fmt_ratio(pr.kidney)}" if pr.kidney != 1.0 else "")
        + "), "
        f"study {'indicated' if a.study_indicated else 'not indicated'}, action={a.dose.action!r}, "
        f"warnings={len(a.warnings)}, rules={a.rules.id!r})"
    )


def assessment_html(a: Assessment) -> str:
    """The notebook summary of an assessment: ratios, basic-model values, the action, warnings and cautions."""
    return summary_html(
        f"interact assessment: {a.scenario.title}",
        _ratio_rows(a),
        lead=f"{a.scenario.perpetrator.name} (precipitant) with {a.scenario.victim.name} (object drug); rule set {a.rules.title}."
        + (" INVENTED scenario." if a.scenario.invented else ""),
        action=a.dose.headline,
        warnings=a.warnings,
        cautions=a.cautions,
    )


def uncertainty_repr(r: UncertaintyResult) -> str:
    """One line: the samples, the 5-95% interval of the AUC ratio and the most probable class."""
    return (
        f"UncertaintyResult({r.samples} samples ({r.method}, seed {r.seed}), varied={len(r.varied)}, "
        f"AUCR point {fmt_ratio(r.point_total)}, 5-95% {fmt_ratio(r.percentile(5.0))}-{fmt_ratio(r.percentile(95.0))}, "
        f"most probable {r.most_probable_class!r}, P(action changes)={r.action_change_probability:.3f})"
    )


def uncertainty_html(r: UncertaintyResult) -> str:
    """The notebook summary of an uncertainty run: percentiles, class and action probabilities, cautions."""
    rows = [("Samples", f"{r.samples:,} ({r.method}, seed {r.seed})"), ("Point AUC ratio", fmt_ratio(r.point_total))]
    rows += [
        (f"P{q:g} AUCR (gut, liver, kidney)", f"{fmt_ratio(t)} ({fmt_ratio(g)}, {fmt_ratio(h)}, {fmt_ratio(k)})")
        for q, g, h, k, t in r.percentiles
    ]
    rows += [(f"P(AUCR {op} {b:g})", f"{p:.3f}") for op, b, p in r.exceedance]
    rows += [(f"P(action: {a})", f"{p:.3f}") for a, p in r.action_probabilities if p > 0]
    rows.append(("Varied inputs", ", ".join(v.input.path for v in r.varied)))
    return summary_html(
        "interact uncertainty",
        rows,
        lead=f"Most probable class: {r.most_probable_class} (point estimate: {r.point_class}).",
        action=f"{r.point_action} at the point estimate; it changes in {r.action_change_probability:.1%} of samples",
    )


def comparison_repr(c: ModelComparison) -> str:
    """One line: the models fitted, the verdict and the carried constant."""
    ki = c.ki
    shown = "" if ki is None else f", {ki.name}={fmt(ki.value)} {ki.unit}".rstrip()
    return f"ModelComparison(models={list(c.models)}, verdict={c.verdict.model!r} ({c.verdict.strength}){shown}, n={c.data.n})"


def comparison_html(c: ModelComparison) -> str:
    """The notebook summary of an inhibition fit: ranking by AICc, the verdict and its constant."""
    rows = [(r.model, f"AICc {fmt(r.aicc)}, weight {r.weight:.3f}") for r in c.ranking]
    ki = c.ki
    if ki is not None:
        rows.append((ki.name, f"{fmt(ki.value)} {ki.unit} (CI {fmt(ki.ci_low)}-{fmt(ki.ci_high)})"))
    return summary_html(
        f"interact fit: {c.data.source}",
        rows,
        lead=c.verdict.text,
        warnings=c.warnings,
        cautions=(FIT_CAUTION,),
    )


def data_frame(columns: dict[str, Any]) -> Any:
    """Named columns as a pandas DataFrame.

    Raises
    ------
    ImportError
        When pandas is not installed, saying how to install it (``pip install interact[data]``).
    """
    try:
        import pandas as pd
    except ImportError:
        raise ImportError("to_pandas() needs pandas: pip install 'interact[data]' (or pip install pandas)") from None
    return pd.DataFrame(columns)
