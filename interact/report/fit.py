"""Reports of incubation fits: model comparison, verdict, estimates, unbound Ki (text, Markdown, JSON)."""

from __future__ import annotations

import json
import math
from typing import Any

from ..cautions import FIT_CAUTION
from ..kinetics.binding import BindingPrediction, UnboundConstant
from ..kinetics.engine import Estimate, FitResult
from ..kinetics.fitting import LABELS, ErrorModel, ModelComparison
from ..kinetics.ic50 import IC50Fit, KiFromIC50
from ..results import FIT_SCHEMA, IC50_SCHEMA
from .document import Note, Section, Table, cite_data, render_markdown, render_text
from .numbers import fmt

__all__ = ["comparison_to_dict", "fit_sections", "format_comparison", "format_ic50", "ic50_to_dict"]


def _interval(low: float | None, high: float | None, unit: str = "") -> str:
    if low is None or high is None:
        return "-"
    hi = "unbounded" if math.isinf(high) else fmt(high)
    lo = fmt(low)
    return f"{lo} to {hi}" + (f" {unit}" if unit and not math.isinf(high) else "")


def _est_cells(e: Estimate) -> tuple[str, ...]:
    value = "unbounded" if math.isinf(e.value) else fmt(e.value)
    se = fmt(e.std_error) if e.std_error is not None else "-"
    return (
        e.name,
        value,
        e.unit or "-",
        se,
        _interval(e.ci_low, e.ci_high),
        _interval(e.profile_low, e.profile_high),
        e.note,
    )


def _key_constant(fit: FitResult) -> str:
    parts = []
    for name in ("Ki", "Kic", "Kiu"):
        if name in fit.names:
            e = fit.estimate(name)
            value = "unbounded" if math.isinf(e.value) else fmt(e.value)
            interval = _interval(e.profile_low, e.profile_high) if e.profile_low is not None else _interval(e.ci_low, e.ci_high)
            parts.append(f"{name} {value} [{interval}]")
    return "; ".join(parts) or "-"


def fit_sections(
    comp: ModelComparison,
    *,
    unbound: UnboundConstant | None = None,
    binding: BindingPrediction | None = None,
    plots: str = "",
) -> list[Section]:
    """Document sections for a comparison (rendered by every format alike)."""
    level = f"{comp.level:.0%}"
    out = [_data_section(comp), _comparison_section(comp, level)]
    if comp.error_model is not None:
        out.append(_error_model_section(comp.error_model))
    out.append(Section(title="Verdict", blocks=(Note(text=comp.verdict.text, kind="verdict"),)))
    out.append(_estimates_section(comp, level))
    if comp.f_tests:
        out.append(_f_test_section(comp))
    if unbound is not None:
        out.append(_unbound_section(unbound, binding))
    if comp.warnings:
        out.append(Section(title="Design and fit warnings", blocks=tuple(Note(text=w, kind="caution") for w in comp.warnings)))
    if plots:
        out.append(Section(title="Diagnostic plot", blocks=()))
    out.append(Section(title="Caution", blocks=(Note(text=FIT_CAUTION, kind="caution"),)))
    return out


def _data_section(comp: ModelComparison) -> Section:
    """What was read: rows, substrate and inhibitor levels, velocity unit, weights."""
    d = comp.data
    s_lv, i_lv = d.substrate_levels, d.inhibitor_levels
    return Section(
        title="Incubation data",
        blocks=(
            f"{d.source or 'data'}: {d.n} rows; substrate {fmt(min(s_lv))}-{fmt(max(s_lv))} {d.substrate_unit} at "
            f"{len(s_lv)} levels; "
            + (f"inhibitor {', '.join(fmt(x) for x in i_lv)} uM; " if i_lv != (0.0,) else "no inhibitor; ")
            + f"velocity in {d.velocity_unit or 'unstated units'}; "
            f"weights: {comp.weights}.",
        ),
    )


def _comparison_section(comp: ModelComparison, level: str) -> Section:
    """One row per model fitted: fit quality, AICc and its weight, the key constant."""
    weights = {r.model: r for r in comp.ranking}
    rows = []
    for f in comp.fits:
        r = weights.get(f.model)
        rows.append(
            (
                LABELS[f.model],
                str(f.n_params),
                fmt(f.rss, 4) if f.success else "failed",
                fmt(f.residual_sd) if f.success else "-",
                f"{f.aicc:.2f}" if f.success else "-",
                f"{r.delta_aicc:.2f}" if r else "-",
                f"{r.weight:.3f}" if r else "-",
                _key_constant(f) if f.success else f.message,
            )
        )
    return Section(
        title="Model comparison",
        blocks=(
            Table(
                headers=(
                    "model",
                    "p",
                    "RSS",
                    "residual SD",
                    "AICc",
                    "dAICc",
                    "weight",
                    f"constants (uM) [{level} profile interval]",
                ),
                rows=tuple(rows),
            ),
        ),
    )


def _error_model_section(e: ErrorModel) -> Section:
    return Section(
        title="Error model",
        blocks=(
            e.text,
            Table(
                headers=("variance model", "exponent theta", "log-likelihood", "AICc"),
                rows=tuple((n, f"{th:.3g}", fmt(ll), fmt(a)) for n, th, ll, a in e.candidates),
            ),
        ),
    )


def _estimates_section(comp: ModelComparison, level: str) -> Section:
    chosen = comp.chosen
    return Section(
        title=f"Estimates: {LABELS[chosen.model]} model",
        blocks=(
            f"{chosen.equation}; n = {chosen.n}, df = {chosen.df}, residual SD {fmt(chosen.residual_sd)}; {chosen.message}.",
            Table(
                headers=("parameter", "estimate", "unit", "SE", f"{level} CI (asymptotic)", f"{level} CI (profile)", "note"),
                rows=tuple(_est_cells(e) for e in chosen.estimates),
            ),
        ),
    )


def _f_test_section(comp: ModelComparison) -> Section:
    return Section(
        title="Nested models: extra-sum-of-squares F tests",
        blocks=(
            Table(
                headers=("reduced", "full", "F", "df", "p"),
                rows=tuple((t.reduced, t.full, fmt(t.f), f"{t.df_num}, {t.df_den}", f"{t.p_value:.3g}") for t in comp.f_tests),
            ),
        ),
    )


def _num(x: float | None) -> float | None:
    return None if x is None or not math.isfinite(x) else float(x)


def _estimate_dict(e: Estimate) -> dict[str, Any]:
    return {
        "name": e.name,
        "value": _num(e.value),
        "unbounded": math.isinf(e.value),
        "unit": e.unit,
        "std_error": _num(e.std_error),
        "ci_asymptotic": [_num(e.ci_low), _num(e.ci_high)],
        "ci_profile": [_num(e.profile_low), _num(e.profile_high)],
        "profile_open_above": e.profile_high is not None and math.isinf(e.profile_high),
        "at_bound": e.at_bound,
        "identifiable": e.identifiable,
        "note": e.note,
    }


def _fit_dict(f: FitResult) -> dict[str, Any]:
    return {
        "model": f.model,
        "equation": f.equation,
        "success": f.success,
        "message": f.message,
        "n": f.n,
        "n_params": f.n_params,
        "df": f.df,
        "rss": _num(f.rss),
        "residual_sd": _num(f.residual_sd),
        "aic": _num(f.aic),
        "aicc": _num(f.aicc),
        "bic": _num(f.bic),
        "estimates": [_estimate_dict(e) for e in f.estimates],
    }


def comparison_to_dict(
    comp: ModelComparison, *, unbound: UnboundConstant | None = None, binding: BindingPrediction | None = None
) -> dict[str, Any]:
    """Plain data for JSON (non-finite numbers become null with an explicit flag)."""
    d = comp.data
    out: dict[str, Any] = {
        "schema": FIT_SCHEMA,
        "data": {
            "source": d.source,
            "rows": d.n,
            "substrate_levels_um": list(d.substrate_levels),
            "inhibitor_levels_um": list(d.inhibitor_levels),
            "velocity_unit": d.velocity_unit,
        },
        "weights": comp.weights,
        "error_model": None
        if comp.error_model is None
        else {
            "name": comp.error_model.name,
            "exponent": comp.error_model.exponent,
            "chosen_on": comp.error_model.model,
            "candidates": [
                {"name": n, "exponent": th, "log_likelihood": _num(ll), "aicc": _num(a)} for n, th, ll, a in comp.error_model.candidates
            ],
            "text": comp.error_model.text,
        },
        "level": comp.level,
        "fits": [_fit_dict(f) for f in comp.fits],
        "ranking": [{"model": r.model, "aicc": _num(r.aicc), "delta_aicc": _num(r.delta_aicc), "weight": r.weight} for r in comp.ranking],
        "f_tests": [
            {"reduced": t.reduced, "full": t.full, "f": _num(t.f), "df": [t.df_num, t.df_den], "p_value": t.p_value} for t in comp.f_tests
        ],
        "verdict": {
            "model": comp.verdict.model,
            "mechanism": comp.verdict.mechanism,
            "strength": comp.verdict.strength,
            "support": comp.verdict.support,
            "group": list(comp.verdict.group),
            "group_support": comp.verdict.group_support,
            "inhibition_shown": comp.verdict.inhibition_shown,
            "text": comp.verdict.text,
            "unidentifiable": list(comp.verdict.unidentifiable),
        },
        "warnings": list(comp.warnings),
        "caution": FIT_CAUTION,
    }
    if unbound is not None:
        out["unbound"] = _unbound_dict(unbound)
    if binding is not None:
        out["binding"] = {
            "method": binding.method,
            "fu_inc": binding.fu_inc,
            "equation": binding.equation,
            "source": binding.source,
            "status": binding.status,
            "warnings": list(binding.warnings),
        }
    return out


def format_comparison(
    comp: ModelComparison,
    fmt_name: str = "text",
    *,
    width: int = 100,
    unbound: UnboundConstant | None = None,
    binding: BindingPrediction | None = None,
    plots: str = "",
) -> str:
    """The comparison as ``text``, ``markdown`` or ``json``."""
    if fmt_name == "json":
        return json.dumps(cite_data(comparison_to_dict(comp, unbound=unbound, binding=binding)), indent=2) + "\n"
    sections = fit_sections(comp, unbound=unbound, binding=binding, plots=plots)
    if fmt_name == "markdown":
        text = render_markdown(sections, title="Incubation fit")
        return text + (f"\n```\n{plots}```\n" if plots else "")
    text = render_text(sections, width=width)
    if plots:
        marker = "Diagnostic plot\n===============\n"
        text = text.replace(marker, marker + plots + "\n", 1)
    return text


def _unbound_dict(unbound: UnboundConstant) -> dict[str, Any]:
    return {
        "name": unbound.name,
        "ki_um": _num(unbound.ki_um),
        "interval_um": [_num(unbound.low_um), _num(unbound.high_um)],
        "fu_inc": unbound.fu_inc,
        "fu_origin": unbound.fu_origin,
        "ki_u_um": _num(unbound.ki_u_um),
        "interval_u_um": [_num(unbound.low_u_um), _num(unbound.high_u_um)],
    }


def _unbound_section(unbound: UnboundConstant, binding: BindingPrediction | None = None) -> Section:
    blocks: list[str | Table | Note] = [
        Table(
            headers=("constant", "in vitro (uM)", "interval (uM)", "fu,inc", "unbound (uM)", "interval (uM)"),
            rows=(
                (
                    f"{unbound.name} -> {unbound.name},u",
                    fmt(unbound.ki_um),
                    _interval(unbound.low_um, unbound.high_um),
                    fmt(unbound.fu_inc),
                    fmt(unbound.ki_u_um),
                    _interval(unbound.low_u_um, unbound.high_u_um),
                ),
            ),
        ),
        f"fu,inc: {unbound.fu_origin}. Interval: {unbound.interval}; the uncertainty of fu,inc is not included.",
    ]
    if binding is not None:
        blocks.append(f"Predicted with {binding.title}: {binding.equation}. Source: {binding.source} ({binding.status}).")
        blocks.extend(Note(text=w, kind="caution") for w in binding.warnings)
    return Section(title="Unbound inhibition constant", blocks=tuple(blocks))


def ic50_to_dict(result: IC50Fit, ki: KiFromIC50 | None = None, unbound: UnboundConstant | None = None) -> dict[str, Any]:
    out: dict[str, Any] = {
        "schema": IC50_SCHEMA,
        "source": result.source,
        "fit": _fit_dict(result.fit),
        "warnings": list(result.warnings),
        "caution": FIT_CAUTION,
    }
    if unbound is not None:
        out["unbound"] = _unbound_dict(unbound)
    if ki is not None:
        out["cheng_prusoff"] = {
            "mechanism": ki.mechanism,
            "ki_um": _num(ki.ki_um),
            "interval_um": [_num(ki.low_um), _num(ki.high_um)],
            "substrate_um": ki.substrate_um,
            "km_um": ki.km_um,
            "alpha": ki.alpha,
            "source": ki.source,
        }
    return out


def format_ic50(
    result: IC50Fit,
    ki: KiFromIC50 | None = None,
    fmt_name: str = "text",
    *,
    width: int = 100,
    unbound: UnboundConstant | None = None,
) -> str:
    """An IC50 fit (and its Cheng-Prusoff Ki, and Ki,u) as ``text``, ``markdown`` or ``json``."""
    if fmt_name == "json":
        return json.dumps(cite_data(ic50_to_dict(result, ki, unbound)), indent=2) + "\n"
    f = result.fit
    level = f"{f.level:.0%}"
    sections = [
        Section(
            title=f"IC50 curve ({f.model})",
            blocks=(
                f"{result.source or 'data'}: {f.n} rows; {f.equation}; residual SD {fmt(f.residual_sd)} on {f.df} df; {f.message}.",
                Table(
                    headers=("parameter", "estimate", "unit", "SE", f"{level} CI (asymptotic)", f"{level} CI (profile)", "note"),
                    rows=tuple(_est_cells(e) for e in f.estimates),
                ),
            ),
        )
    ]
    if ki is not None:
        inputs = "" if ki.mechanism == "noncompetitive" else f" with S = {fmt(ki.substrate_um)} uM and Km = {fmt(ki.km_um)} uM"
        sections.append(
            Section(
                title="Ki by Cheng-Prusoff",
                blocks=(
                    Note(
                        text=f"{ki.mechanism.capitalize()}{inputs}: Ki = {fmt(ki.ki_um)} uM "
                        f"(interval {_interval(ki.low_um, ki.high_um)} uM, from the IC50 interval). Source: {ki.source}.",
                        kind="verdict",
                    ),
                ),
            )
        )
    if unbound is not None:
        sections.append(_unbound_section(unbound))
    if result.warnings:
        sections.append(Section(title="Warnings", blocks=tuple(Note(text=w, kind="caution") for w in result.warnings)))
    sections.append(Section(title="Caution", blocks=(Note(text=FIT_CAUTION, kind="caution"),)))
    if fmt_name == "markdown":
        return render_markdown(sections, title="IC50 fit")
    return render_text(sections, width=width)
