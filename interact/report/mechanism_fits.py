"""Formatting time-dependent-inhibition and induction fits: text, Markdown and JSON."""

from __future__ import annotations

import json
import math
from typing import Any

from ..kinetics.inactivation import CurveFit, Estimate, InactivationFit
from ..kinetics.induction import InductionFit
from .document import Note, Section, Table, cite_data, render_markdown, render_text
from .numbers import fmt

__all__ = ["format_mechanism_fit", "mechanism_fit_to_dict"]

_CAUTION = "Fitted constants are estimates with uncertainty: check the residuals and the design before carrying them into a prediction."


def _num(x: float | None) -> float | None:
    return None if x is None or not math.isfinite(x) else x


def _profile(e: Estimate) -> str:
    lo, hi = getattr(e, "profile_low", None), getattr(e, "profile_high", None)
    if lo is None and hi is None:
        return "-"
    return f"{fmt(lo)} to {fmt(hi)}"


def _est_rows(ests: tuple[Estimate, ...], level: float) -> Table:
    return Table(
        headers=("parameter", "estimate", "std. error", f"{level:.0%} interval (Wald)", "profile interval", "unit"),
        rows=tuple(
            (
                e.name,
                fmt(e.value, 4),
                fmt(e.std_error),
                "-" if e.ci_low is None else f"{fmt(e.ci_low)} to {fmt(e.ci_high)}",
                _profile(e),
                e.unit + (" (at bound)" if e.at_bound else ""),
            )
            for e in ests
        ),
    )


def _stats(fit: CurveFit) -> str:
    return (
        f"{fit.model}: {fit.equation}; n {fit.n}, df {fit.df}, RSS {fmt(fit.rss, 4)}, residual SD {fmt(fit.residual_sd)}, "
        f"{'converged' if fit.success else 'NOT converged'} ({fit.message}); {fit.nfev} evaluations."
    )


def _sections(result: InactivationFit | InductionFit, source: str) -> list[Section]:
    fit = result.fit
    blocks: list[str | Table | Note] = [f"Data: {source}", Note(text=_CAUTION)]
    if isinstance(result, InactivationFit):
        if result.kobs_fits:
            blocks.append(
                Table(
                    headers=("inhibitor uM", "kobs 1/min", "std. error", "R^2", "points"),
                    rows=tuple(
                        (fmt(k.concentration_um), fmt(k.kobs_per_min, 4), fmt(k.std_error), fmt(k.r_squared, 4), str(k.n))
                        for k in result.kobs_fits
                    ),
                )
            )
            blocks.append("Step 1: kobs = -slope of ln(activity) against pre-incubation time, per concentration.")
        blocks.append(_est_rows((result.kinact, result.ki, result.efficiency), fit.level))
        blocks.append(f"kinact = {fmt(result.kinact_per_h, 4)} 1/h. " + _stats(fit))
    else:
        ests = (result.emax, result.ec50) + ((result.hill,) if result.hill is not None else ())
        blocks.append(_est_rows(ests, fit.level))
        blocks.append(f"Plateau fold change 1 + Emax = {fmt(result.max_fold_change, 4)}. " + _stats(fit))
    blocks.extend(f"Note: {n}." for n in result.notes)
    title = "Time-dependent inhibition fit" if isinstance(result, InactivationFit) else "Induction fit (mRNA fold change)"
    return [Section(title=title, blocks=tuple(blocks))]


def mechanism_fit_to_dict(result: InactivationFit | InductionFit, source: str) -> dict[str, Any]:
    fit = result.fit

    def est(e: Estimate | None) -> dict[str, Any] | None:
        if e is None:
            return None
        return {
            "value": e.value,
            "unit": e.unit,
            "std_error": _num(e.std_error),
            "ci_low": _num(e.ci_low),
            "ci_high": _num(e.ci_high),
            "profile_low": _num(getattr(e, "profile_low", None)),
            "profile_high": _num(getattr(e, "profile_high", None)),
            "at_bound": e.at_bound,
        }

    out: dict[str, Any] = {
        "schema": "interact.mechanism-fit/1",
        "source": source,
        "model": fit.model,
        "equation": fit.equation,
        "success": fit.success,
        "message": fit.message,
        "n": fit.n,
        "df": fit.df,
        "rss": fit.rss,
        "residual_sd": _num(fit.residual_sd),
        "level": fit.level,
        "notes": list(result.notes),
    }
    if isinstance(result, InactivationFit):
        out.update(
            kinact_per_min=est(result.kinact),
            ki_um=est(result.ki),
            kinact_over_ki=est(result.efficiency),
            vehicle_kobs_per_min=result.vehicle_kobs_per_min,
            kobs=[
                {"concentration_um": k.concentration_um, "kobs_per_min": k.kobs_per_min, "std_error": _num(k.std_error), "n": k.n}
                for k in result.kobs_fits
            ],
        )
    else:
        out.update(emax=est(result.emax), ec50_um=est(result.ec50), hill=est(result.hill))
    return out


def format_mechanism_fit(result: InactivationFit | InductionFit, source: str, fmt_name: str = "text", width: int = 100) -> str:
    if fmt_name == "json":
        return json.dumps(cite_data(mechanism_fit_to_dict(result, source)), indent=2, allow_nan=False) + "\n"
    sections = _sections(result, source)
    if fmt_name == "markdown":
        return render_markdown(sections, title=sections[0].title)
    return render_text(sections, width=width)
