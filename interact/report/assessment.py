"""Formatting an :class:`~interact.assessment.Assessment`: text, Markdown and JSON.

``format_*`` functions return text; shells print it.  The JSON layout is
documented in README.md ("JSON output") and versioned by ``schema``.
"""

from __future__ import annotations

import json
from typing import TYPE_CHECKING, Any, Final

import pint

from .. import units
from ..assessment import Assessment
from ..cautions import CAUTION_LINE, DOSE_CAUTIONS, GENOTYPE_CAUTIONS
from ..dosing import DoseSuggestion, RegimenOutcome
from ..exposure import Setting
from ..results import ASSESSMENT_SCHEMA
from ..tables import load_physiology, resolve_target
from .document import Note, Section, Table, cite, cite_data, render_markdown, render_text, speak_data, speak_sections
from .numbers import fmt, fmt_ratio

if TYPE_CHECKING:
    from ..dynamic import TimeCourse

__all__ = ["JSON_SCHEMA", "assessment_sections", "assessment_to_dict", "format_assessment", "setting_origin", "user_text"]

JSON_SCHEMA = ASSESSMENT_SCHEMA  # the name other modules import; the value is declared in interact.results


def setting_origin(s: Setting) -> str:
    """Where a setting's value came from, with its source and status, as shown beside it."""
    if s.origin == "given":
        text = "given"
    elif s.origin == "override":
        text = "override"
    elif s.origin == "floor":
        text = "raised to floor"
    else:
        text = f"default ({s.origin})" if s.origin == "rule set" else "default"
    parts = [text]
    if s.source:
        parts.append(s.source)
    if s.status:
        parts.append(s.status.upper() if s.status == "from memory" else s.status)
    if s.note:
        parts.append(s.note)
    return "; ".join(parts)


def _q(q: pint.Quantity | None) -> str:
    return "-" if q is None else units.format_quantity(q)


# where a setting the user can give lives in the scenario (section, attribute)
_GIVEN_AT = {
    "hepatic_blood_flow": ("physiology", "hepatic_blood_flow"),
    "enterocytic_blood_flow": ("physiology", "enterocytic_blood_flow"),
    "gut_volume": ("physiology", "gut_volume"),
    "fu_gut": ("physiology", "fu_gut"),
    "absorption_rate": ("perpetrator", "ka"),
    "fa_fg": ("perpetrator", "fa_fg"),
    "fraction_absorbed": ("perpetrator", "fa"),
    "blood_plasma_ratio": ("perpetrator", "blood_plasma_ratio"),
}


def _as_written(value: object) -> str | None:
    if isinstance(value, pint.Quantity):
        return units.format_quantity(value)
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return f"{value:g}"
    if isinstance(value, str) and value.strip():
        return value.strip()
    return None


def _setting_value(a: Assessment, st: Setting) -> str:
    """A setting as the user wrote it (given) or as its table states it (default); computed values to the usual figures."""
    shown: str | None = None
    if st.origin in ("given", "override") and st.name in _GIVEN_AT:
        section, attr = _GIVEN_AT[st.name]
        shown = _as_written(getattr(getattr(a.scenario, section), attr, None))
    elif st.origin in ("default", "rule set"):
        table = a.rules.physiology_value(st.name) if st.origin == "rule set" else None
        table = table or next((p for p in load_physiology() if p.name == st.name), None)
        if table is not None and st.name in _GIVEN_AT:
            shown = _as_written(table.value)
    if shown is None and not st.unit and st.origin == "given":
        shown = f"{st.value:g}"
    return shown or f"{fmt(st.value)} {st.unit}".strip()


def _given(a: Assessment, species_index: int, target: str, attr: str) -> str | None:
    """The constant ``attr`` of the inhibition entry behind a computed constant, as the user wrote it."""
    p = a.scenario.perpetrator
    entries = p.inhibits if species_index == 0 else p.metabolites[species_index - 1].inhibits
    for inh in entries:
        found = resolve_target(inh.target)
        if found is not None and found.name == target:
            return _as_written(getattr(inh, attr, None))
    return None


def assessment_sections(
    a: Assessment, time_course: TimeCourse | None = None, time_course_note: str = "", *, references: bool = True
) -> list[Section]:
    """The assessment as document sections (shared by every format).

    With ``time_course`` (from :func:`interact.dynamic.simulate`) the dynamic
    check and the dose timing are added; ``time_course_note`` says why it is absent.
    Citations are resolved to author-year forms and a references section ends the
    list; with ``references=False`` the citation markers are left for the caller
    (the HTML report adds sections of its own before resolving them all).
    """
    sections: list[Section] = [
        _head_section(a),
        _summary_section(a),
        _inputs_section(a),
        _concentrations_section(a),
        _basic_models_section(a),
        _mechanistic_section(a),
    ]
    if a.phenotypes:
        sections.append(phenotype_section(a))
    timing: tuple[str, ...] = ()
    if time_course is not None:  # (interact.dynamic), when computed
        from .timecourse import timecourse_advice, timecourse_sections

        sections.extend(timecourse_sections(time_course))
        timing = timecourse_advice(time_course, a)
    elif time_course_note:
        sections.append(Section(title="Time course (dynamic check)", blocks=(time_course_note,)))
    sections.append(_dose_section(a, timing))
    sections.extend(_closing_sections(a))
    sections = speak_sections(sections, a.rules.terms, user_text(a))
    return cite(sections) if references else sections


def _head_section(a: Assessment) -> Section:
    """The untitled opening: scenario, rule set, invented-scenario flag and the caution line."""
    s = a.scenario
    head = [
        f"Scenario: {s.title}",
        f"Rule set: {a.rules.title} [{a.rules.id}, table {a.rules.table_version}]" + (f" ({a.rules.source})" if a.rules.source else ""),
    ]
    if s.invented:
        head.append("This scenario is INVENTED: its compounds and values describe no real drug.")
    return Section(title="", blocks=(*head, Note(text=CAUTION_LINE)))


def _summary_section(a: Assessment) -> Section:
    """The answer first: the predicted ratio, its band, the study verdict and the suggested action."""
    pr = a.prediction
    band = pr.band.name if pr.band else ("no meaningful change" if 0.8 < pr.total < 1.25 else "-")
    verdict = (
        f"Predicted victim AUC ratio {fmt_ratio(pr.total)} ({organ_words(pr)}): "
        f"{band}. Mechanistic model {'indicates' if a.study_indicated else 'does not indicate'} a clinical study "
        f"(cutoff {a.aucr_cutoff.value:g}, {a.aucr_cutoff.status}). Suggested action: {a.dose.headline}."
    )
    return Section(title="Summary", blocks=(Note(text=verdict, kind="result"),))


def _perpetrator_rows(a: Assessment) -> list[tuple[str, str, str]]:
    p = a.scenario.perpetrator
    parent = a.species[0]
    rows = [
        ("Name", p.name, ""),
        ("Route", p.route, ""),
        ("Dose", _q(p.dose), f"= {fmt(parent.dose_umol)} umol"),
        ("Cmax (total, steady state)", _q(p.cmax), f"= {fmt(parent.cmax_um)} uM"),
        ("fu,p", f"{p.fu_plasma:g}", "measured" if p.fu_plasma_measured else ""),
        ("Molar mass", _q(p.molar_mass), ""),
    ]
    for m in p.metabolites:
        rows.append((f"Metabolite {m.name}", f"Cmax {_q(m.cmax)}, fu,p {m.fu_plasma:g}", ""))
    return rows


def _victim_rows(a: Assessment) -> list[tuple[str, str, str]]:
    v = a.scenario.victim
    rows = [
        ("Name", v.name, ""),
        ("Route", v.route, ""),
        ("Dose and interval", f"{_q(v.dose)} every {_q(v.interval)}", ""),
        ("Fg", "1 (assumed, not given)" if v.fg is None else f"{v.fg:g}", ""),
        ("Strengths", ", ".join(_q(x) for x in v.strengths) or "-", ""),
    ]
    rows.extend(pathway_rows(v))
    return rows


def _constant_rows(a: Assessment) -> list[tuple[str, str, str, str, str, str]]:
    """One row per constant given (reversible Ki, time-dependent kinact/KI, induction Emax/EC50) with its binding."""
    const_rows = []
    for c in a.constants:
        if c.ki_u_um is not None:
            const_rows.append(
                (
                    c.target,
                    c.species,
                    # a Ki the user gave is shown as written (unit and digits); a converted one to the usual figures
                    ((c.ki_route == "Ki given" and _given(a, c.species_index, c.target, "ki")) or f"{fmt(c.ki_um)} uM")
                    + (f" (interval {fmt(c.ki_ci_um[0])}-{fmt(c.ki_ci_um[1])} uM)" if c.ki_ci_um else ""),
                    c.ki_route,
                    f"{c.fu_inc:g} ({c.fu_inc_origin})",
                    f"{fmt(c.ki_u_um)} uM",
                )
            )
        if c.kinact_per_h is not None:
            const_rows.append(
                (
                    c.target,
                    c.species,
                    f"kinact {_given(a, c.species_index, c.target, 'kinact') or f'{fmt(c.kinact_per_h)} 1/h'}, "
                    f"KI {_given(a, c.species_index, c.target, 'ki_inact') or f'{fmt(c.ki_inact_um)} uM'}",
                    "time-dependent",
                    f"{c.ki_inact_fu:g} ({c.ki_inact_fu_origin})",
                    f"KI,u {fmt(c.ki_inact_u_um)} uM",
                )
            )
        if c.emax is not None:
            const_rows.append(
                (
                    c.target,
                    c.species,
                    f"Emax {fmt(c.emax)}, d {c.calibration:g} ({c.calibration_origin}), EC50 {fmt(c.ec50_um)} uM",
                    "induction",
                    f"{c.ec50_fu:g} ({c.ec50_fu_origin})",
                    f"EC50,u {fmt(c.ec50_u_um)} uM",
                )
            )
    return const_rows


def _inputs_section(a: Assessment) -> Section:
    settings_rows = tuple((st.label, _setting_value(a, st), setting_origin(st)) for st in (*a.settings, *a.kdeg_used))
    return Section(
        title="Inputs",
        blocks=(
            Table(headers=("Perpetrator", "value", "as used"), rows=tuple(_perpetrator_rows(a))),
            Table(
                headers=("Target", "species", "constant given", "route to Ki", "binding: fu (source)", "unbound"),
                rows=tuple(_constant_rows(a)),
            ),
            Table(headers=("Victim", "value", ""), rows=tuple(_victim_rows(a))),
            Table(headers=("Setting", "value used", "origin and source"), rows=settings_rows),
        ),
    )


def _concentrations_section(a: Assessment) -> Section:
    conc_rows = tuple(
        (
            sp.species,
            fmt(sp.cmax_um),
            f"{sp.fu_plasma_used:g}",
            fmt(sp.unbound_cmax_um),
            fmt(sp.gut_lumen_um) if sp.is_parent else "-",
            fmt(sp.unbound_inlet_um),
            fmt(sp.enterocyte_um),
        )
        for sp in a.species
    )
    return Section(
        title="Perpetrator concentrations (uM)",
        blocks=(
            Table(headers=("species", "Cmax", "fu,p used", "Imax,u", "Igut", "Iin,max,u", "I,ent"), rows=conc_rows),
            "Imax,u = fu,p x Cmax; Igut = dose / 250 mL ([@dmd2019inlet]); "
            "Iin,max,u = fu,p x (Cmax + Fa*Fg x ka x Dose / (Qh x Rb)) ([@dmd2019inlet], Tables 7 and 8; [@jpetverinurad]); "
            "I,ent = fu,gut x Fa x ka x Dose / Qent (from memory). Metabolites use their systemic Imax,u at every site "
            "([@jpetverinurad], Table 7 footnote).",
        ),
    )


def _basic_models_section(a: Assessment) -> Section:
    screen_rows = tuple(
        (
            r.target,
            r.label,
            fmt_ratio(r.value),
            f"{r.comparison} {r.cutoff.value:g}",
            "STUDY INDICATED" if r.indicated else "below cutoff",
            r.cutoff.status,
            r.equation + (f" [kdeg {fmt(r.kdeg_per_h)} 1/h]" if r.kdeg_per_h is not None else ""),
        )
        for r in a.screen
    )
    return Section(
        title=f"Basic static models ({a.rules.id})",
        blocks=(
            Table(headers=("target", "test", "value", "cutoff", "verdict", "cutoff status", "equation"), rows=screen_rows)
            if screen_rows
            else "No criterion of this rule set applies to the targets given.",
        ),
    )


def _effect_rows(a: Assessment) -> list[tuple[str, ...]]:
    """The mechanistic model's per-enzyme rows: liver, then gut wall where the enzyme acts there."""
    pr = a.prediction
    eff_rows: list[tuple[str, ...]] = []
    for e in pr.effects:
        conc = ", ".join(f"{fmt(cv)}" for _, cv in e.liver.concentration_um) or "-"
        eff_rows.append(
            (
                e.enzyme,
                "liver",
                f"{e.fm:g}",
                conc,
                fmt_ratio(e.liver.reversible),
                fmt_ratio(e.liver.inactivation),
                fmt_ratio(e.liver.induction),
                fmt_ratio(e.liver.activity),
            )
        )
        if e.gut is not None:
            gconc = ", ".join(f"{fmt(cv)}" for _, cv in e.gut.concentration_um) or "-"
            eff_rows.append(
                (
                    e.enzyme,
                    "gut",
                    f"Fg {pr.fg_used:g}",
                    gconc,
                    fmt_ratio(e.gut.reversible),
                    fmt_ratio(e.gut.inactivation),
                    fmt_ratio(e.gut.induction),
                    fmt_ratio(e.gut.activity),
                )
            )
    return eff_rows


def _route_table(a: Assessment) -> Table:
    """The mechanistic model's per-transporter-route rows."""
    return Table(
        headers=("transporter", "route", "fraction", "[I] uM", "reversible", "inactivation", "induction", "activity left"),
        rows=tuple(
            (
                r.transporter,
                r.route,
                f"{r.fraction:.3g}",
                ", ".join(f"{fmt(cv)}" for _, cv in r.site.concentration_um) or "-",
                fmt_ratio(r.site.reversible),
                fmt_ratio(r.site.inactivation),
                fmt_ratio(r.site.induction),
                fmt_ratio(r.site.activity),
            )
            for r in a.prediction.routes
        ),
    )


def _mechanistic_section(a: Assessment) -> Section:
    pr = a.prediction
    ratio_rows = [
        ("gut", fmt_ratio(pr.gut), fmt_ratio(pr.ceiling_gut)),
        ("liver", fmt_ratio(pr.liver), fmt_ratio(pr.ceiling_liver)),
        *([("kidney", fmt_ratio(pr.kidney), fmt_ratio(pr.ceiling_kidney))] if pr.routes or pr.kidney != 1.0 else []),
        ("total", fmt_ratio(pr.total), fmt_ratio(pr.ceiling_total)),
    ]
    blocks: list[str | Table | Note] = [
        Table(
            headers=("enzyme", "site", "fm / Fg", "[I] uM", "reversible", "inactivation", "induction", "activity left"),
            rows=tuple(_effect_rows(a)),
        ),
    ]
    if pr.routes:
        blocks.append(_route_table(a))
    blocks.append(Table(headers=("AUC ratio", "predicted", "complete-inhibition ceiling"), rows=tuple(ratio_rows)))
    if pr.regime is not None:
        blocks.append(
            f"Hepatic clearance (extended clearance concept): {pr.regime} without the {a.rules.terms.precipitant}, "
            f"{pr.regime_with} with it (beta = (CLmet + CLbile) / PS_eff: uptake-limited at >= 10, metabolism-limited "
            "at <= 0.1, this tool's bounds)."
        )
    for part in pr.parts:
        blocks.append(f"{part.mechanism} alone: AUCR {fmt_ratio(part.total)} ({organ_words(part)})")
    if pr.band is not None:
        blocks.append(f"Size band: {pr.band.name} ({pr.band.source}; {pr.band.status}).")
    blocks.append(
        "AUCR = [1 / (activity_gut x (1 - Fg) + Fg)] x [1 / (sum fm x activity_liver + (1 - sum fm))]; "
        "activity = reversible x inactivation x induction (net-effect model of [@fahmi2008]; structure seen in [@guengerich2022], "
        "equations from memory with the algebra checked)."
    )
    if pr.routes:
        blocks.append(
            "Transporter routes enter the same organ form: the gut term counts each efflux fraction of the oral dose beside "
            "gut-wall metabolism (1 - Fg) at I,ent; the liver term counts hepatic uptake fractions beside fm at Iin,max,u "
            "(or, with the hepatic clearances given, CLint,all = PS_inf (CLmet + CLbile) / (PS_eff + CLmet + CLbile), "
            "[@shitara2006], [@camenisch2012]); the kidney term counts renal fraction x secreted share at Imax,u and is "
            "the factor it adds to the liver's (the two share one systemic clearance); per route AUCR = 1 / (fe / (1 + [I]/Ki) "
            "+ 1 - fe) as in [@elsby2016]; total = gut x liver x kidney."
        )
    return Section(title="Mechanistic static model", blocks=tuple(blocks))


def _dose_section(a: Assessment, timing: tuple[str, ...]) -> Section:
    """The suggested action, its reasons and regimens, the dose timing (``timing``), the perpetrator's ceiling, cautions."""
    d = a.dose
    dose_blocks: list[str | Table | Note] = [Note(text=f"Suggested action: {d.headline}.", kind="result"), *d.reasons]
    shown = d.options or d.nearest
    if shown:
        dose_blocks.append(regimen_table(d, shown))
    dose_blocks.extend(timing)
    lim = a.perpetrator_limit
    dose_blocks.append(
        f"Perpetrator dose ceiling: {fmt(lim.dose)} {lim.dose_unit} ({lim.reason})."
        if lim.dose is not None
        else f"Perpetrator dose ceiling: {lim.reason}."
    )
    dose_blocks.extend(Note(text=c) for c in d.cautions)
    return Section(title="Dose suggestion", blocks=tuple(dose_blocks))


def _closing_sections(a: Assessment) -> list[Section]:
    """Warnings, values from memory, cautions and provenance."""
    sections: list[Section] = []
    if a.warnings:
        sections.append(Section(title="Warnings", blocks=tuple(f"- {w}" for w in a.warnings)))
    if a.memory_values:
        sections.append(
            Section(
                title="Values from memory or inferred from an older guidance (verify before relying on them)",
                blocks=tuple(f"- {m}" for m in a.memory_values),
            )
        )
    sections.append(Section(title="Cautions", blocks=tuple(Note(text=c) for c in a.cautions)))
    pv = a.provenance
    sections.append(
        Section(
            title="Provenance",
            blocks=(
                f"interact {pv.tool_version}; rule set {pv.rules_id} (version {pv.rules_version}, table {pv.rules_table_version}); "
                + "; ".join(f"{k} table {ver}" for k, ver in pv.table_versions),
            ),
        )
    )
    return sections


def user_text(a: Assessment) -> tuple[str, ...]:
    """What the user typed that outputs show (title, notes, names, origins): never reworded by :func:`speak`."""
    s = a.scenario
    p = s.perpetrator
    items = [s.title, s.notes, p.name, s.victim.name, *(m.name for m in p.metabolites)]
    for inh in (*p.inhibits, *(i for m in p.metabolites for i in m.inhibits)):
        items.append(inh.origin)
    return tuple(x for x in items if x)


def organ_words(pr: Any) -> str:
    """``gut 1.74 x liver 1.29`` (``x kidney 1.01`` when the kidney term is not 1)."""
    kidney = getattr(pr, "kidney", 1.0)
    return f"gut {fmt_ratio(pr.gut)} x liver {fmt_ratio(pr.liver)}" + (f" x kidney {fmt_ratio(kidney)}" if kidney != 1.0 else "")


#: what each route's fraction is a share of
_SHARE_OF: Final = {
    "intestinal efflux": "of the oral dose (returned to the gut lumen)",
    "hepatic uptake": "of systemic clearance (uptake-dependent)",
    "renal secretion": "of renal clearance (secreted)",
}


def pathway_rows(v: Any) -> list[tuple[str, str, str]]:
    """The object drug's pathways as input rows: fm per enzyme, fractions per transporter route, the rest."""
    ecm = v.extended_clearance
    rows = []
    for pw in v.pathways:
        if pw.route == "metabolism":
            rows.append((f"fm {pw.enzyme}", f"{pw.fm:g}", "of CLmet" if ecm is not None else ""))
        else:
            share = "of PS_inf (uptake)" if ecm is not None and pw.route == "hepatic uptake" else _SHARE_OF[pw.route]
            rows.append((f"{pw.enzyme} ({pw.route})", f"{pw.fm:g}", share))
    if v.renal_fraction is not None:
        rows.append(("Renal fraction of clearance", f"{v.renal_fraction:g}", ""))
    if ecm is not None:
        for key, label in (
            ("ps_inf", "PS_inf (uptake)"),
            ("ps_eff", "PS_eff (sinusoidal efflux)"),
            ("cl_met", "CLmet"),
            ("cl_bile", "CLbile"),
        ):
            value = getattr(ecm, key)
            if value is not None:
                rows.append((label, _q(value) if hasattr(value, "units") else f"{value:g}", "extended clearance"))
        hepatic = ecm.hepatic_fraction if ecm.hepatic_fraction is not None else 1.0 - (v.renal_fraction or 0.0)
        rows.append(("Hepatic fraction of clearance", f"{hepatic:.3g}", "" if ecm.hepatic_fraction is not None else "1 - renal fraction"))
    else:
        systemic = sum(pw.fm for pw in v.pathways if pw.route in ("metabolism", "hepatic uptake")) + (v.renal_fraction or 0.0)
        rows.append(("Other routes (unaffected)", f"{max(0.0, 1 - systemic):.3g}", "of systemic clearance"))
    return rows


def phenotype_section(a: Assessment) -> Section:
    """Drug-drug-gene cases: one row per phenotype combination, with its dose advice."""
    rows = []
    for c in a.phenotypes:
        d = c.dose
        advice = d.headline + (f": {d.chosen.describe(d.dose_unit)}" if d.chosen is not None else "")
        rows.append(
            (
                ", ".join(f"{e} {name} (a = {act:g})" for e, name, act in c.activities) + (", population fm" if c.reference else ""),
                ", ".join(f"{e} {f:.2g}" for e, f in c.fm),
                fmt_ratio(c.genotype_ratio),
                fmt_ratio(c.interaction_ratio),
                fmt_ratio(c.combined_ratio),
                advice,
            )
        )
    blocks: list[str | Table | Note] = [
        Table(
            headers=("phenotype", "fm in it", "vs normal, alone", "AUCR", "vs normal, with precipitant", "dose advice"),
            rows=tuple(rows),
        ),
        "vs normal = AUC relative to a normal metaboliser on the usual dose without the precipitant (alone: the "
        "genotype effect; with precipitant: the combined effect the dose advice answers). AUCR = with / without the "
        "precipitant within the phenotype; a = relative activity of the pathway. fm' = fm x a / "
        "(sum fm x a + 1 - sum fm): a poor metaboliser of one pathway shifts clearance to the others.",
        "Assumptions: the given fm values are the normal metaboliser's; a phenotype scales only its own pathway's "
        "intrinsic clearance by its relative activity a; linear kinetics; no genotype effect in the gut wall.",
    ]
    seen = set()
    for c in a.phenotypes:
        for (e, name, act), src in zip(c.activities, c.sources, strict=True):
            if src is not None and (e, name) not in seen:
                seen.add((e, name))
                blocks.append(f"- {e} {name}: relative activity {act:g} ({src.status}); {src.source}.")
    blocks.extend(Note(text=t) for t in (*GENOTYPE_CAUTIONS, DOSE_CAUTIONS[0]))
    return Section(title="Object drug genotype (drug-drug-gene interaction)", blocks=tuple(blocks))


def regimen_table(d: DoseSuggestion, outcomes: tuple[RegimenOutcome, ...]) -> Table:
    """The regimens inside the boundary (or, when none is, the nearest ones), with their predicted ratios."""
    rows = []
    for o in outcomes:
        peak = fmt_ratio(o.peak_ratio) if o.peak_ratio is not None else ("unchecked" if o.regimen.kind == "interval" else "-")
        trough = fmt_ratio(o.trough_ratio) if o.trough_ratio is not None else ("unchecked" if o.regimen.kind == "interval" else "-")
        mark = "suggested" if d.chosen is not None and o.index == d.chosen.index else ("inside" if o.feasible else "outside")
        rows.append((o.describe(d.dose_unit), fmt_ratio(o.exposure_ratio), peak, trough, mark))
    return Table(
        headers=("regimen", "exposure ratio", "peak ratio", "trough ratio", "against the boundary"),
        rows=tuple(rows),
    )


def assessment_to_dict(a: Assessment, time_course: TimeCourse | None = None) -> dict[str, Any]:
    """JSON-ready data; concentrations in uM, rates in 1/h, ratios dimensionless.

    Citations are resolved to author-year forms; ``references`` lists the sources cited, in full.

    With ``time_course``, a ``time_course`` entry holds its summary and the dose timing (no curves;
    ``interact timecourse --format json`` gives them).
    """
    out = a.to_dict()
    if time_course is not None:
        from .timecourse import timecourse_to_dict

        out["time_course"] = timecourse_to_dict(time_course, a, curves=False)
    worded = speak_data(out, a.rules.terms, user_text(a))
    assert isinstance(worded, dict)
    return cite_data(worded)


def format_assessment(
    a: Assessment, fmt_name: str = "text", width: int = 100, *, time_course: TimeCourse | None = None, time_course_note: str = ""
) -> str:
    """The assessment as ``text``, ``markdown`` or ``json`` (with the time course when given)."""
    if fmt_name == "json":
        data = assessment_to_dict(a, time_course)
        if time_course is None and time_course_note:
            data["time_course"] = {"computed": False, "reason": time_course_note}
        return json.dumps(cite_data(data), indent=2, allow_nan=False) + "\n"
    sections = assessment_sections(a, time_course, time_course_note)
    if fmt_name == "markdown":
        return render_markdown(sections, title=f"interact assessment: {a.scenario.title}")
    return render_text(sections, width=width)
