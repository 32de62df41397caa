"""Formatting uncertainty and sensitivity results: document sections, text, Markdown, JSON."""

from __future__ import annotations

import json
import math
from typing import Any

import numpy as np
import pint

from .. import units
from ..cautions import CAUTION_LINE
from ..results import UNCERTAINTY_SCHEMA
from ..scenario import Scenario
from ..uncertainty import Input, OrganIndices, Sensitivity, TornadoBar, UncertaintyResult, VarianceIndices
from .document import Note, Section, Table, cite_data, render_markdown, render_text
from .numbers import fmt, fmt_ratio

__all__ = ["JSON_SCHEMA", "format_uncertainty", "sensitivity_sections", "uncertainty_sections", "uncertainty_to_dict"]

JSON_SCHEMA = UNCERTAINTY_SCHEMA  # the value is declared in interact.results

#: fm values shown in the text table of the AUCR-versus-fm curves
_FM_SHOWN = (0.25, 0.5, 0.75, 0.9, 1.0)


def _pct(p: float) -> str:
    if p == 0.0:
        return "0%"
    if p < 0.001:
        return "<0.1%"
    if p > 0.999 and p < 1.0:
        return ">99.9%"
    return f"{100 * p:.1f}%"


def uncertainty_sections(r: UncertaintyResult, scenario: Scenario | None = None) -> list[Section]:
    """The spread of the AUC ratio as document sections."""
    p5, p50, p95 = (r.percentile(q) for q in (5.0, 50.0, 95.0))
    moderate = next((p for op, b, p in r.exceedance if op == ">=" and b == 2.0), None)
    head = (
        f"AUC ratio {fmt_ratio(p50)} (median; 90% of samples between {fmt_ratio(p5)} and {fmt_ratio(p95)}); "
        f"point estimate {fmt_ratio(r.point_total)}. Most probable class: {r.most_probable_class}"
        + (f"; probability of at least a moderate rise (AUCR >= 2): {_pct(moderate)}" if moderate is not None else "")
        + f". The suggested action ({r.point_action}) changes in {_pct(r.action_change_probability)} of samples."
    )
    method = "Latin hypercube (scipy.stats.qmc)" if r.method == "lhs" else "Monte Carlo"
    dist_rows = tuple(
        (
            v.input.path,
            v.input.label,
            _point_as_given(v.input.value, v.input, scenario),
            v.distribution.describe(v.input.unit),
            v.distribution.text,
            str(v.adjusted) if v.adjusted else "-",
        )
        for v in r.varied
    )
    pct_rows = tuple((f"{q:g}th", fmt_ratio(g), fmt_ratio(h), fmt_ratio(k), fmt_ratio(t)) for q, g, h, k, t in r.percentiles)
    exc_rows = tuple((f"AUCR {op} {b:g}", _pct(p)) for op, b, p in r.exceedance)
    class_rows = tuple((label, _pct(p)) for label, p in r.classes if p > 0 or label == r.point_class)
    action_rows = tuple((a, _pct(p)) for a, p in r.action_probabilities if p > 0 or a == r.point_action)
    blocks: list[str | Table | Note] = [
        Note(text=head, kind="result"),
        f"{r.samples:,} samples, {method}, seed {r.seed}: the same seed gives the same numbers.",
        Table(headers=("input", "meaning", "point value", "distribution", "as declared", "samples moved to a bound"), rows=dist_rows),
        Table(headers=("percentile", "gut AUCR", "liver AUCR", "kidney AUCR", "total AUCR"), rows=pct_rows),
        Table(headers=("threshold", "probability"), rows=exc_rows),
        Table(headers=("class", "probability"), rows=class_rows),
        Table(headers=("suggested action", "probability"), rows=action_rows),
    ]
    blocks.extend(regimen_probability_blocks(r))
    if r.fm_scaled:
        blocks.append(
            f"In {r.fm_scaled:,} samples the sampled fractions broke an organ sum (fm + hepatic uptake + renal fraction at most 1, "
            "efflux at most Fg, renal secretion at most 1) and were scaled down together."
        )
    blocks.append(
        "Distributions: log-normal from a CV (sigma = sqrt(ln(1 + CV^2))) or from a 95% interval "
        "(median = sqrt(lower x upper), sigma = ln(upper/lower) / 3.92); uniform between bounds. "
        "Only the declared inputs vary; the spread says nothing about errors in the model itself."
    )
    return [Section(title="Uncertainty of the AUC ratio", blocks=tuple(blocks))]


def regimen_probability_blocks(r: UncertaintyResult) -> list[str | Table | Note]:
    """Dose under uncertainty: the probability that each regimen keeps exposure inside the boundaries."""
    lo, hi = r.boundary
    rows = tuple(
        (
            e.label,
            _pct(e.probability),
            "yes" if e.feasible_at_point else "no",
            ("point suggestion" if e is r.point_regimen else "")
            + ("; " if e is r.point_regimen and e is r.best_regimen else "")
            + ("highest probability" if e is r.best_regimen else ""),
        )
        for e in r.regimen_probabilities
    )
    best, point = r.best_regimen, r.point_regimen
    if point is None:
        verdict = (
            f"The point estimate finds no regimen inside the boundary; across the samples, {best.label} stays inside most often "
            f"({_pct(best.probability)})."
        )
    elif point is best:
        verdict = f"The point suggestion ({point.label}) is also the regimen most likely to stay inside ({_pct(point.probability)})."
    else:
        verdict = (
            f"Point suggestion: {point.label}, inside the boundary in {_pct(point.probability)} of samples. Under the sampled "
            f"inputs, {best.label} stays inside more often ({_pct(best.probability)}): the two differ, so weigh them side by side."
        )
    return [
        Note(text=f"Dose under uncertainty (boundary {lo:g}-{hi:g}): {verdict}", kind="result"),
        Table(headers=("regimen", "probability inside the boundaries", "inside at the point estimate", "note"), rows=rows),
        "Probability inside = share of samples in which the regimen's exposure ratio (and, for a changed interval with a known "
        "half-life, its steady-state peak and trough) lies inside the boundaries; the same test as the point suggestion.",
    ]


def variance_table(v: VarianceIndices) -> Table:
    """First-order and total indices, largest total first."""
    order = sorted(range(len(v.inputs)), key=lambda k: -v.total_order[k])
    return Table(
        headers=("input", "first-order index", "total index"),
        rows=tuple((v.inputs[k].path, f"{v.first_order[k]:.3f}", f"{v.total_order[k]:.3f}") for k in order),
    )


def organ_variance_table(v: VarianceIndices) -> Table:
    """First-order / total indices of the gut, liver and kidney ratios, inputs in the order of :func:`variance_table`."""
    order = sorted(range(len(v.inputs)), key=lambda k: -v.total_order[k])

    def cell(o: OrganIndices, k: int) -> str:
        return "constant" if o.constant else f"{o.first_order[k]:.3f} / {o.total_order[k]:.3f}"

    return Table(
        headers=("input", *(f"{o.organ} ratio: first / total" for o in v.organs)),
        rows=tuple((v.inputs[k].path, *(cell(o, k) for o in v.organs)) for k in order),
    )


def _given_at(scenario: Scenario | None, path: str) -> object:
    """The value at a scenario input path (``perpetrator.inhibits[0].ki``), as the user gave it; None when absent."""
    node: object = scenario
    for part in path.split("."):
        name, _, index = part.partition("[")
        node = getattr(node, name, None)
        if index:
            items = node if isinstance(node, tuple) else ()
            k = int(index.rstrip("]"))
            node = items[k] if k < len(items) else None
        if node is None:
            return None
    return node


def _user_unit(inp: Input, scenario: Scenario | None) -> tuple[str, float]:
    """The unit the user wrote ``inp`` in and the model-unit amount in one of it (1 when the user gave none)."""
    given = _given_at(scenario, inp.path)
    if not (isinstance(given, pint.Quantity) and inp.unit):
        return inp.unit, 1.0
    one = units.ureg.Quantity(1.0, units.unit_text(given))
    if inp.kind == "concentration":
        per = units.concentration_um(one, inp.molar_mass, field=inp.path)
    elif inp.kind == "dose":
        per = units.amount_umol(one, inp.molar_mass, field=inp.path)
    else:
        per = units.magnitude(one, inp.unit)
    return units.unit_text(given), per


def _range_as_given(b: TornadoBar, scenario: Scenario | None) -> str:
    """The swing of an input in the unit the user wrote it in (mg, ng/mL ...), else in the model's unit."""
    unit, per = _user_unit(b.input, scenario)
    return f"{fmt(b.low / per)} to {fmt(b.high / per)} {unit}".strip()


def _point_as_given(value: float, inp: Input, scenario: Scenario | None) -> str:
    unit, per = _user_unit(inp, scenario)
    return f"{fmt(value / per)} {unit}".strip()


def sensitivity_sections(s: Sensitivity, scenario: Scenario | None = None) -> list[Section]:
    """Tornado, crossings and the AUCR-versus-fm table as document sections (ranges in the units of ``scenario``)."""
    rows = tuple(
        (
            b.input.label,
            _range_as_given(b, scenario),
            fmt_ratio(b.aucr_low),
            fmt_ratio(b.aucr_high),
            fmt(b.effect),
        )
        for b in s.bars
    )
    swing = (
        "Each input swung x/÷ 2 around its value (fractions capped at 1) because no distributions were declared."
        if s.default_swing
        else "Each declared input swung across its 95% interval (uniform: its range), the others at their point values."
    )
    blocks: list[str | Table | Note] = [
        swing,
        Table(headers=("input", "range", "AUCR at low", "AUCR at high", "|difference|"), rows=rows) if rows else "No input to swing.",
    ]
    if s.variance is not None:
        blocks.append(
            f"Variance-based (Sobol') indices of the {s.variance.output} over the declared distributions: first order = share "
            "of its variance due to the input alone; total = with its interactions (Saltelli 2010 estimators, "
            f"scipy.stats.sobol_indices; {s.variance.base_samples:,} base samples, {s.variance.evaluations:,} model runs, "
            f"seed {s.variance.seed}). Sampling noise is about +/-0.01; values near 0 mean no measurable effect."
        )
        blocks.append(variance_table(s.variance))
        if s.variance.organs:
            blocks.append(
                "The same indices of each organ's AUC ratio (total = gut x liver x kidney). 'constant': that ratio took one "
                "value over all the sampled inputs, so no input has a share of its variance (its indices are 0)."
            )
            blocks.append(organ_variance_table(s.variance))
    blocks.extend(c.sentence for c in s.crossings)
    curve_rows = []
    for c in s.curves:
        values = []
        for f in _FM_SHOWN:
            inside = c.fm[0] - 1e-12 <= f <= c.fm[-1] + 1e-12
            values.append(fmt_ratio(float(np.interp(f, c.fm, c.aucr))) if inside else "-")
        curve_rows.append((c.label, *values))
    blocks.append(
        Table(headers=("AUCR vs fm (liver, reversible; interpolated)", *(f"fm {f:g}" for f in _FM_SHOWN)), rows=tuple(curve_rows))
    )
    if s.scenario_ratio is not None and s.scenario_fm is not None:
        blocks.append(f"This scenario: [I]/Ki,u = {fmt(s.scenario_ratio)} on its main pathway, fm {fmt(s.scenario_fm)}.")
    return [Section(title="Sensitivity", blocks=tuple(blocks))]


def _num(x: float | None) -> float | None:
    return None if x is None or not math.isfinite(x) else x


def uncertainty_to_dict(r: UncertaintyResult, s: Sensitivity | None = None) -> dict[str, Any]:
    """JSON-ready data (AUC ratios dimensionless, values in each input's canonical unit)."""
    out: dict[str, Any] = {
        "schema": JSON_SCHEMA,
        "method": r.method,
        "samples": r.samples,
        "seed": r.seed,
        "point_auc_ratio": r.point_total,
        "varied": [
            {
                "path": v.input.path,
                "label": v.input.label,
                "unit": v.input.unit,
                "point": v.input.value,
                "distribution": v.distribution.kind,
                "median": v.distribution.median if v.distribution.kind == "lognormal" else None,
                "sigma_log": v.distribution.sigma if v.distribution.kind == "lognormal" else None,
                "low": v.distribution.low if v.distribution.kind == "uniform" else None,
                "high": v.distribution.high if v.distribution.kind == "uniform" else None,
                "declared": v.distribution.text,
                "samples_moved_to_bound": v.adjusted,
            }
            for v in r.varied
        ],
        "percentiles": [{"percent": q, "gut": g, "liver": h, "kidney": k, "total": t} for q, g, h, k, t in r.percentiles],
        "exceedance": [{"comparison": op, "threshold": b, "probability": p} for op, b, p in r.exceedance],
        "classes": {label: p for label, p in r.classes},
        "most_probable_class": r.most_probable_class,
        "point_class": r.point_class,
        "point_action": r.point_action,
        "actions": {a: p for a, p in r.action_probabilities},
        "action_change_probability": r.action_change_probability,
        "regimens": [
            {
                "regimen": e.label,
                "kind": "usual" if e.regimen is None else e.regimen.kind,
                "dose": None if e.regimen is None or math.isnan(e.regimen.dose) else e.regimen.dose,
                "interval_h": None if e.regimen is None else e.regimen.interval_h,
                "probability_inside_boundary": e.probability,
                "inside_at_point_estimate": e.feasible_at_point,
                "point_suggestion": e is r.point_regimen,
                "highest_probability": e is r.best_regimen,
            }
            for e in r.regimen_probabilities
        ],
        "fm_scaled_samples": r.fm_scaled,
        "cautions": [CAUTION_LINE],
    }
    if s is not None:
        out["sensitivity"] = {
            "default_swing": s.default_swing,
            "tornado": [
                {
                    "path": b.input.path,
                    "low": b.low,
                    "high": b.high,
                    "auc_ratio_low": b.aucr_low,
                    "auc_ratio_high": b.aucr_high,
                    "swing": b.swing,
                }
                for b in s.bars
            ],
            "crossings": [
                {"path": c.input.path, "boundary": c.boundary, "value": _num(c.value), "now": c.now, "sentence": c.sentence}
                for c in s.crossings
            ],
            "fm_curves": [{"label": c.label, "fm": list(c.fm), "auc_ratio": list(c.aucr)} for c in s.curves],
            "variance_based": None
            if s.variance is None
            else {
                "output": s.variance.output,
                "method": "Sobol' indices, Saltelli et al. 2010 estimators (scipy.stats.sobol_indices)",
                "base_samples": s.variance.base_samples,
                "model_evaluations": s.variance.evaluations,
                "seed": s.variance.seed,
                "indices": [
                    {"path": i.path, "label": i.label, "first_order": f, "total": t}
                    for i, f, t in zip(s.variance.inputs, s.variance.first_order, s.variance.total_order, strict=True)
                ],
                "organs": [
                    {
                        "organ": o.organ,
                        "constant": o.constant,
                        "indices": [
                            {"path": i.path, "first_order": f, "total": t}
                            for i, f, t in zip(s.variance.inputs, o.first_order, o.total_order, strict=True)
                        ],
                    }
                    for o in s.variance.organs
                ],
            },
        }
    return out


def format_uncertainty(
    r: UncertaintyResult,
    s: Sensitivity | None = None,
    fmt_name: str = "text",
    *,
    title: str = "",
    width: int = 100,
    scenario: Scenario | None = None,
) -> str:
    """The result as ``text``, ``markdown`` or ``json``."""
    if fmt_name == "json":
        return json.dumps(cite_data(uncertainty_to_dict(r, s)), indent=2, allow_nan=False) + "\n"
    sections = [Section(title="", blocks=((f"Scenario: {title}",) if title else ()) + (Note(text=CAUTION_LINE),))]
    sections += uncertainty_sections(r, scenario)
    if s is not None:
        sections += sensitivity_sections(s, scenario)
    if fmt_name == "markdown":
        return render_markdown(sections, title=f"interact uncertainty: {title}" if title else "interact uncertainty")
    return render_text(sections, width=width)
