"""Every figure the tool draws, as a matplotlib :class:`~matplotlib.figure.Figure` (for notebooks and files).

Each ``*_figure`` function draws with matplotlib's object-oriented API only: it
builds a ``Figure`` directly (no pyplot, no figure manager) or draws into the
``ax`` it is given, and never switches the caller's backend, so inline
plotting in a notebook keeps working.  The file-writing commands call the same
functions and :func:`save_figure`.  The data come from the core
(:mod:`interact.kinetics.diagnostics`, :class:`~interact.uncertainty.Sensitivity`,
:class:`~interact.uncertainty.UncertaintyResult`, :func:`interact.dynamic.time_course_arrays`);
nothing is recomputed here.  Every figure says it shows a model estimate.
"""

from __future__ import annotations

import io
import math
import re
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Final, cast

import numpy as np

from ..errors import InputError
from .document import terminal_safe

if TYPE_CHECKING:
    import pint
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from ..dynamic import TimeCourse
    from ..kinetics.diagnostics import PlotData
    from ..kinetics.fitting import ModelComparison
    from ..tables import Terms
    from ..uncertainty import Sensitivity, UncertaintyResult

__all__ = [
    "FIGURE_SUFFIXES",
    "figure_bytes",
    "fit_diagnostics_figure",
    "fit_figure",
    "fm_curves_figure",
    "histogram_figure",
    "inline_svg",
    "save_figure",
    "sobol_figure",
    "timecourse_figure",
    "tornado_figure",
]

FIGURE_SUFFIXES: Final = (".svg", ".png", ".pdf")
MODEL_NOTE: Final = "model estimate, not clinical advice"
_LOW: Final = "#2471a3"
_HIGH: Final = "#d35400"


def _t(text: str) -> str:
    """User text (names, labels) as plain figure text: no control characters, and "$" not read as mathtext."""
    return terminal_safe(text).replace("$", r"\$")


def _log_axis(ax: Axes, which: str, *, fine: bool = False) -> None:
    """A log-scale ratio axis labelled with plain numbers (0.5, 1, 2, 5; ``fine`` adds 1.5, 3 and 7), not powers of ten."""
    from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter

    axis = ax.xaxis if which == "x" else ax.yaxis
    (ax.set_xscale if which == "x" else ax.set_yscale)("log")
    axis.set_major_locator(LogLocator(base=10.0, subs=(1.0, 1.5, 2.0, 3.0, 5.0, 7.0) if fine else (1.0, 2.0, 5.0)))
    axis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
    axis.set_minor_formatter(NullFormatter())


def _figure(ax: Axes | None, size: tuple[float, float]) -> tuple[Figure, Axes]:
    """The figure and axes to draw on: the caller's ``ax``, else a new Figure (no pyplot, no backend switch)."""
    if ax is not None:
        return ax.figure, ax  # type: ignore[return-value]
    from matplotlib.figure import Figure

    fig = Figure(figsize=size, layout="constrained")
    return fig, fig.add_subplot()


def figure_bytes(fig: Figure, fmt: str) -> bytes:
    """The figure encoded as ``svg``, ``png`` or ``pdf`` (matplotlib picks the renderer for the format, not the backend).

    No creation date is written, so the same figure gives the same bytes.
    """
    buffer = io.BytesIO()
    fig.savefig(buffer, format=fmt, metadata={"Date": None} if fmt in ("svg", "pdf") else None)
    return buffer.getvalue()


def inline_svg(fig: Figure) -> str:
    """The figure as an ``<svg>`` element to place inside an HTML page (XML prolog, doctype and metadata dropped)."""
    text = figure_bytes(fig, "svg").decode("utf-8")
    text = re.sub(r"\s*<metadata>.*?</metadata>", "", text, flags=re.S)  # matplotlib's RDF block (namespace URLs, creator)
    return text[text.index("<svg") :]


def save_figure(
    fig: Figure,
    path: str | Path,
    *,
    field: str = "plot",
    inputs: Sequence[str | Path | None] = (),
    force: bool = False,
    fmt: str | None = None,
) -> Path:
    """Write ``fig`` to ``path`` (.svg, .png or .pdf) through the one writer (:func:`interact.files.write_file`).

    Atomic: the old file or the new one, never a part; ``inputs`` (files the run reads) are never
    overwritten and ``force`` replaces a read-only file, as for every output.  The format
    follows the suffix (.svg, .png, .pdf) unless ``fmt`` names one (``"svg"`` ...).

    Raises
    ------
    InputError
        Unsupported suffix, or the file cannot be written (named by ``field``).
    """
    target = Path(path)
    suffix = target.suffix.lower()
    if fmt is None and suffix not in FIGURE_SUFFIXES:
        raise InputError(field, str(path), f"has an unsupported suffix; expected one of {', '.join(FIGURE_SUFFIXES)}")
    if fmt is not None and f".{fmt}" not in FIGURE_SUFFIXES:
        raise InputError("fmt", fmt, f"is not a figure format; expected one of {', '.join(s.lstrip('.') for s in FIGURE_SUFFIXES)}")
    from ..files import write_file

    write_file(target, figure_bytes(fig, fmt or suffix.lstrip(".")), field=field, inputs=inputs, force=force)
    return target


# --------------------------------------------------------------------------- incubation fits


def _draw_fit_plot(ax: Axes, plot: PlotData) -> None:
    import matplotlib

    cmap = matplotlib.colormaps["viridis"]
    levels = sorted({s.level_um for s in plot.series if s.level_um is not None})
    colour = {lv: cmap(k / max(len(levels) - 1, 1) * 0.9) for k, lv in enumerate(levels)}
    for s in plot.series:
        c = colour.get(s.level_um, "0.4") if s.level_um is not None else "0.4"
        if s.kind == "points":
            ax.plot(s.x, s.y, "o", color=c, label=_t(s.label), markersize=4)
        else:
            ax.plot(s.x, s.y, color=c, linewidth=1.0, linestyle="-" if s.level_um is not None else "--")
    ax.axhline(0.0, color="0.8", linewidth=0.6)
    ax.axvline(0.0, color="0.8", linewidth=0.6)
    ax.set_title(_t(plot.title), fontsize=10)
    ax.set_xlabel(plot.x_label)
    ax.set_ylabel(plot.y_label)
    if any(s.kind == "points" for s in plot.series):
        ax.legend(fontsize=7, frameon=False)


def fit_figure(plots: Sequence[PlotData], axes: Sequence[Axes] | None = None) -> Figure:
    """Fit diagnostics (from :mod:`interact.kinetics.diagnostics`) side by side, one panel per plot.

    Parameters
    ----------
    plots
        Plot data, e.g. :func:`~interact.kinetics.diagnostics.diagnostic_plots` (double reciprocal,
        Dixon, residuals); axes in the plots' own units.
    axes
        Axes to draw into, one per plot (default: a new Figure).
    """
    if axes is None:
        from matplotlib.figure import Figure

        fig = Figure(figsize=(5.2 * len(plots), 4.6), layout="constrained")
        axes = list(fig.subplots(1, len(plots), squeeze=False)[0])
        fig.suptitle("Diagnostics of the global nonlinear fit; not the fitting method", fontsize=8, color="0.4")
    if len(axes) != len(plots):
        raise InputError("axes", len(axes), f"axes were given for {len(plots)} plots; give one per plot")
    for ax, plot in zip(axes, plots, strict=True):
        _draw_fit_plot(ax, plot)
    return axes[0].figure  # type: ignore[return-value]


def fit_diagnostics_figure(comp: ModelComparison, model: str | None = None) -> Figure:
    """The three diagnostics of an inhibition fit (double reciprocal, Dixon, residuals) for ``model`` (default: the verdict)."""
    from ..kinetics.diagnostics import diagnostic_plots

    return fit_figure(diagnostic_plots(comp, model))


# --------------------------------------------------------------------------- uncertainty and sensitivity


def tornado_figure(sens: Sensitivity, boundary: tuple[float, float] = (0.8, 1.25), ax: Axes | None = None, top: int = 15) -> Figure:
    """One-at-a-time sensitivity: bars from the AUC ratio at each input's low end to its high end (log axis).

    Parameters
    ----------
    sens
        From :func:`interact.uncertainty.sensitivity`; ratios dimensionless.
    boundary
        The object drug's no-effect boundary, drawn dashed.
    ax
        Axes to draw into (default: a new Figure).
    top
        Number of inputs shown, largest effect on top.
    """
    bars = list(sens.bars)[:top]
    fig, ax = _figure(ax, (7.5, 0.4 * max(len(bars), 1) + 1.6))
    y = np.arange(len(bars))[::-1]
    point = sens.point_total
    for k, b in zip(y, bars, strict=True):
        ax.barh(k, b.aucr_low - point, left=point, color=_LOW, height=0.6, label="input low" if k == y[0] else None)
        ax.barh(k, b.aucr_high - point, left=point, color=_HIGH, height=0.6, label="input high" if k == y[0] else None)
    ax.set_yticks(y, [_t(b.input.label) for b in bars], fontsize=8)
    _log_axis(ax, "x", fine=True)
    ax.axvline(point, color="k", linewidth=1.2)
    for edge in boundary:
        ax.axvline(edge, color="0.3", linestyle="--", linewidth=0.8)
    ax.set_xlabel(f"AUC ratio (log scale)\npoint estimate {point:.3g} (solid line); dashed: no-effect boundary", fontsize=9)
    fig.suptitle(f"One-at-a-time sensitivity ({MODEL_NOTE})", fontsize=10)
    if bars:
        ax.legend(fontsize=7, frameon=False)
    return fig


def fm_curves_figure(sens: Sensitivity, boundary: float = 1.25, ax: Axes | None = None) -> Figure:
    """Liver AUC ratio against fm for several [I]/Ki,u (reversible inhibition), log ratio axis."""
    fig, ax = _figure(ax, (6.5, 4.5))
    for c in sens.curves:
        ax.plot(c.fm, c.aucr, label=_t(c.label), linewidth=1.2)
    ax.axhline(boundary, color="0.3", linestyle="--", linewidth=0.8)
    if sens.scenario_fm is not None:
        ax.axvline(sens.scenario_fm, color="0.5", linestyle=":", linewidth=0.8)
    _log_axis(ax, "y")
    ax.set_xlabel("fm (fraction of clearance through the pathway)")
    ax.set_ylabel("AUC ratio (liver)")
    ax.set_title(f"AUC ratio against fm ({MODEL_NOTE})", fontsize=10)
    ax.legend(fontsize=7, frameon=False)
    return fig


def histogram_figure(result: UncertaintyResult, thresholds: Sequence[float] | None = None, ax: Axes | None = None) -> Figure:
    """Histogram of the sampled AUC ratios (log bins) with the 5th, 50th and 95th percentiles and class thresholds.

    Parameters
    ----------
    result
        From :func:`interact.uncertainty.run_uncertainty` (its kept samples are drawn).
    thresholds
        Class thresholds to draw dashed (default: the bounds of the exceedance table).
    ax
        Axes to draw into (default: a new Figure).
    """
    fig, ax = _figure(ax, (7.0, 3.8))
    total = np.asarray(result.total, dtype=float)
    total = total[np.isfinite(total) & (total > 0)]
    lo, hi = float(total.min()) / 1.05, float(total.max()) * 1.05
    if hi / lo < 1.2:
        mid = float(np.sqrt(lo * hi))
        lo, hi = mid / 1.1, mid * 1.1
    ax.hist(total, bins=np.geomspace(lo, hi, 41).tolist(), color=_LOW, alpha=0.75)
    _log_axis(ax, "x", fine=True)
    for t in thresholds if thresholds is not None else sorted({b for _, b, _ in result.exceedance}):
        if lo < t < hi:
            ax.axvline(t, color="0.3", linestyle="--", linewidth=0.8)
    for q in (5.0, 50.0, 95.0):
        ax.axvline(result.percentile(q), color=_HIGH, linewidth=2.0 if q == 50.0 else 1.0)
    ax.set_xlabel("AUC ratio (log scale)\norange: 5th, 50th and 95th percentiles; dashed: class thresholds", fontsize=9)
    ax.set_ylabel("samples")
    ax.set_title(f"{result.samples:,} sampled AUC ratios ({MODEL_NOTE})", fontsize=10)
    return fig


def sobol_figure(sens: Sensitivity, ax: Axes | None = None) -> Figure:
    """Variance-based indices beside the tornado: first-order and total Sobol' index per declared input.

    Raises
    ------
    InputError
        When ``sens`` has no variance-based indices (no distribution was declared).
    """
    v = sens.variance
    if v is None:
        raise InputError("sensitivity", "no distributions", "has no variance-based indices; declare distributions (vary)")
    order = sorted(range(len(v.inputs)), key=lambda k: v.total_order[k])
    fig, ax = _figure(ax, (7.0, 0.45 * len(order) + 1.6))
    y = np.arange(len(order))
    ax.barh(y - 0.2, [v.first_order[k] for k in order], height=0.4, color=_LOW, label="first order")
    ax.barh(y + 0.2, [v.total_order[k] for k in order], height=0.4, color=_HIGH, label="total")
    ax.set_yticks(y, [_t(v.inputs[k].label) for k in order], fontsize=8)
    ax.set_xlim(0.0, 1.0)
    ax.set_xlabel(f"share of the variance of the {v.output} (Sobol' indices, {v.base_samples:,} base samples)")
    ax.set_title(f"Variance-based sensitivity ({MODEL_NOTE})", fontsize=10)
    ax.legend(fontsize=7, frameon=False)
    return fig


# --------------------------------------------------------------------------- time course


def _readable_unit(unit: str, largest: float) -> tuple[str, float]:
    """A unit (same dimension) in which ``largest`` reads as a number between 1 and 1000, and the factor to it (pint)."""
    from .. import units

    if not largest > 0 or not math.isfinite(largest):
        return unit, 1.0
    compact = units.ureg.Quantity(largest, unit).to_compact()  # pint picks the prefix
    return units.unit_text(cast("pint.Quantity", compact)), float(compact.magnitude) / largest


def timecourse_figure(tc: TimeCourse, title: str = "", axes: Sequence[Axes] | None = None, terms: Terms | None = None) -> Figure:
    """Two panels: the object drug's concentration with and without the precipitant; exposure ratio and enzyme amounts.

    Concentrations in a unit read as 1 to 1000 (chosen by pint), days in weeks from two weeks on, legends above
    each panel so they never cover the data, a dotted reference line at 1 and a dashed line where dosing stops.

    Parameters
    ----------
    tc
        From :func:`interact.dynamic.simulate`; time in days, concentrations in ``tc.victim_unit``,
        ratios and enzyme amounts relative to baseline.
    title
        Figure title (the scenario's).
    axes
        Two axes to draw into (default: a new Figure).
    terms
        The rule set's words for the two drugs (``Assessment.rules.terms``); default perpetrator and victim.
    """
    from matplotlib.ticker import MultipleLocator

    from ..dynamic import time_course_arrays
    from .document import speak

    def say(text: str) -> str:
        return speak(text, terms) if terms is not None else text

    arr = time_course_arrays(tc)
    if axes is None:
        from matplotlib.figure import Figure

        fig = Figure(figsize=(9.0, 6.8), layout="constrained")
        axes = list(fig.subplots(2, 1, sharex=True))
        fig.suptitle(f"{_t(title) or 'Time course'} ({MODEL_NOTE})", fontsize=11)
    if len(axes) != 2:
        raise InputError("axes", len(axes), "axes were given; give two (concentrations, ratios)")
    top, bottom = axes
    x = arr["time_day"]
    unit, factor = _readable_unit(tc.victim_unit, float(max(arr["victim_with"].max(), arr["victim_without"].max())))
    top.plot(x, arr["victim_with"] * factor, color="#c0392b", linewidth=1.0, label=say("with perpetrator"))
    top.plot(x, arr["victim_without"] * factor, color="0.55", linewidth=1.0, label=say("without perpetrator"))
    top.set_ylabel(say(f"victim concentration ({_t(unit)})"))
    top.set_ylim(bottom=0.0)
    bottom.plot(x, arr["exposure_ratio"], color="#c0392b", linewidth=1.5, label=say("exposure ratio (over a dosing interval)"))
    for key, values in arr.items():
        if key.startswith("enzyme:"):
            _, enzyme, site = key.split(":")
            bottom.plot(x, values, linewidth=1.2, label=f"{_t(enzyme)} {site} enzyme")
    bottom.axhline(1.0, color="0.2", linestyle=":", linewidth=0.8)
    bottom.set_ylabel("ratio to baseline (dotted: 1, no change)")
    bottom.set_xlabel(say("days after the first perpetrator dose"))
    if x[-1] - x[0] >= 14.0:
        bottom.xaxis.set_major_locator(MultipleLocator(7.0 * max(1, math.ceil((x[-1] - x[0]) / 6 / 7.0))))
    bottom.set_xlim(0.0, float(x[-1]))
    for ax in (top, bottom):
        ax.axvline(tc.stop_h / 24.0, color="0.6", linestyle="--", linewidth=0.8, label=say("perpetrator stopped") if ax is top else None)
        ax.grid(axis="y", color="0.93", linewidth=0.6)
        ax.legend(fontsize=7, frameon=False, loc="lower left", bbox_to_anchor=(0.0, 1.0), ncols=4, borderaxespad=0.2)
    return top.figure  # type: ignore[return-value]
