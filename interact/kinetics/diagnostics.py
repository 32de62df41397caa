"""Diagnostic plot data for a fit: points and fitted lines as plain arrays.

These are diagnostics of a global nonlinear fit, never the fitting method.
For the models here the double-reciprocal and Dixon forms are exact straight
lines (algebra from the mixed law with 1/Kic = kc, 1/Kiu = ku):

- double reciprocal, at inhibitor I:  1/v = Km (1 + I kc)/Vmax x (1/S) + (1 + I ku)/Vmax;
  competitive lines meet on the 1/v axis, noncompetitive on the 1/S axis, uncompetitive are parallel;
- Dixon, at substrate S:  1/v = (Km/S + 1)/Vmax + (Km kc/S + ku)/Vmax x I;
  competitive lines meet at I = -Ki, above the I axis.

Renderers (terminal text, SVG/PNG) live in :mod:`interact.report.fit_plots`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .fitting import ModelComparison, inverse_constants

__all__ = ["PlotData", "Series", "diagnostic_plots", "dixon_data", "double_reciprocal_data", "residual_data"]


@dataclass(frozen=True, slots=True, kw_only=True)
class Series:
    """One group of points (``kind="points"``) or one fitted line (``kind="line"``)."""

    label: str
    x: tuple[float, ...]
    y: tuple[float, ...]
    kind: str
    level_um: float | None = None


@dataclass(frozen=True, slots=True, kw_only=True)
class PlotData:
    """A plot: axis labels with units, and its series."""

    kind: str
    title: str
    x_label: str
    y_label: str
    series: tuple[Series, ...]
    note: str = ""


def _kappas(comp: ModelComparison, model: str) -> tuple[float, float, float, float]:
    """Vmax, Km, 1/Kic and 1/Kiu of the fitted ``model``."""
    u = comp.fit(model).theta
    return (u[0], u[1], *inverse_constants(model, u))


def _recip_unit(unit: str) -> str:
    return f"1/({unit})" if unit else "1/velocity (data units)"


def _fmt(level: float) -> str:
    return f"{level:.3g}"


def double_reciprocal_data(comp: ModelComparison, model: str | None = None) -> PlotData:
    """1/v against 1/S per inhibitor level, with the fitted lines of ``model`` (default: the verdict)."""
    name = model or comp.verdict.model
    vmax, km, kc, ku = _kappas(comp, name)
    s, i, v = comp.data.arrays()
    ok = (s > 0) & (v > 0)
    xmax = float(np.max(1.0 / s[ok])) * 1.05 if np.any(ok) else 1.0
    xmin = max(-1.2 / km, -0.5 * xmax) if km > 0 else 0.0
    series: list[Series] = []
    for level in comp.data.inhibitor_levels:
        sel = ok & (i == level)
        series.append(Series(label=f"I = {_fmt(level)} uM", x=tuple(1.0 / s[sel]), y=tuple(1.0 / v[sel]), kind="points", level_um=level))
    for level in comp.data.inhibitor_levels:
        slope = km * (1.0 + level * kc) / vmax
        icpt = (1.0 + level * ku) / vmax
        xs = (xmin, xmax)
        series.append(Series(label=f"fit, I = {_fmt(level)} uM", x=xs, y=tuple(icpt + slope * x for x in xs), kind="line", level_um=level))
    hint = {
        "competitive": "competitive: lines meet on the 1/v axis",
        "noncompetitive": "noncompetitive: lines meet on the 1/S axis",
        "uncompetitive": "uncompetitive: parallel lines",
        "mixed": "mixed: lines meet left of the 1/v axis",
        "none": "no inhibition: one line",
    }[name]
    return PlotData(
        kind="double-reciprocal",
        title=f"Double reciprocal ({name} fit)",
        x_label="1/S (1/uM)",
        y_label=f"1/v ({_recip_unit(comp.data.velocity_unit)})",
        series=tuple(series),
        note=hint + "; a diagnostic of the nonlinear fit, not the fitting method",
    )


def dixon_data(comp: ModelComparison, model: str | None = None) -> PlotData:
    """1/v against I per substrate level, with the fitted lines of ``model`` (default: the verdict)."""
    name = model or comp.verdict.model
    vmax, km, kc, ku = _kappas(comp, name)
    s, i, v = comp.data.arrays()
    ok = (s > 0) & (v > 0)
    imax = float(np.max(i)) * 1.05 if np.max(i) > 0 else 1.0
    ki = 1.0 / kc if kc > 0 else (1.0 / ku if ku > 0 else math.inf)
    xmin = max(-1.2 * ki, -0.5 * imax) if math.isfinite(ki) else 0.0
    series: list[Series] = []
    for level in comp.data.substrate_levels:
        if level <= 0:
            continue
        sel = ok & (s == level)
        series.append(Series(label=f"S = {_fmt(level)} uM", x=tuple(i[sel]), y=tuple(1.0 / v[sel]), kind="points", level_um=level))
    for level in comp.data.substrate_levels:
        if level <= 0:
            continue
        icpt = (km / level + 1.0) / vmax
        slope = (km * kc / level + ku) / vmax
        xs = (xmin, imax)
        series.append(Series(label=f"fit, S = {_fmt(level)} uM", x=xs, y=tuple(icpt + slope * x for x in xs), kind="line", level_um=level))
    return PlotData(
        kind="dixon",
        title=f"Dixon ({name} fit)",
        x_label="I (uM)",
        y_label=f"1/v ({_recip_unit(comp.data.velocity_unit)})",
        series=tuple(series),
        note="competitive: lines meet at I = -Ki above the axis; a diagnostic, not the fitting method",
    )


def residual_data(comp: ModelComparison, model: str | None = None) -> PlotData:
    """Raw residuals (observed - fitted) against fitted velocity, per inhibitor level."""
    name = model or comp.verdict.model
    fit = comp.fit(name)
    _, i, _ = comp.data.arrays()
    fitted = np.asarray(fit.fitted)
    resid = np.asarray(fit.residuals)
    series = []
    for level in comp.data.inhibitor_levels:
        sel = i == level
        series.append(Series(label=f"I = {_fmt(level)} uM", x=tuple(fitted[sel]), y=tuple(resid[sel]), kind="points", level_um=level))
    lo, hi = (float(fitted.min()), float(fitted.max())) if fitted.size else (0.0, 1.0)
    series.append(Series(label="zero", x=(lo, hi), y=(0.0, 0.0), kind="line"))
    unit = comp.data.velocity_unit or "data units"
    return PlotData(
        kind="residuals",
        title=f"Residuals ({name} fit)",
        x_label=f"fitted v ({unit})",
        y_label=f"observed - fitted ({unit})",
        series=tuple(series),
        note="look for trends or a funnel (then try weights 1/y or 1/y2)",
    )


def diagnostic_plots(comp: ModelComparison, model: str | None = None) -> tuple[PlotData, PlotData, PlotData]:
    """The three diagnostic plots of ``model`` (default: the verdict's model)."""
    return double_reciprocal_data(comp, model), dixon_data(comp, model), residual_data(comp, model)
