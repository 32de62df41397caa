"""Renderers for the fit diagnostics: terminal text (plotext) and SVG/PNG files (matplotlib).

The data come from :mod:`interact.kinetics.diagnostics`; nothing is
recomputed here.  Both libraries are imported only when a plot is drawn; the
matplotlib figure is :func:`interact.report.figures.fit_figure` (object-oriented
API, the caller's backend untouched).
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import Final

from ..errors import InputError
from ..kinetics.diagnostics import PlotData
from .figures import FIGURE_SUFFIXES

__all__ = ["FIGURE_SUFFIXES", "render_terminal", "save_figure"]

_MARKERS: Final = ("o", "x", "+", "*", "#", "@", "%", "&")


def render_terminal(plot: PlotData, width: int = 80, height: int = 22) -> str:
    """The plot as plain text (no colour codes), ``width`` x ``height`` characters."""
    import plotext as plt

    fig = plt.figure
    fig.clear()
    fig.plot_size(max(width, 30), max(height, 10))
    groups: dict[float | None, str] = {}
    legend: list[str] = []
    for series in plot.series:
        if series.kind != "points" or not series.x:
            continue
        marker = _MARKERS[len(groups) % len(_MARKERS)]
        groups[series.level_um] = marker
        sig = fig.signal(list(series.x), list(series.y), marker=marker)
        legend.append(f"{marker} {series.label}")
        fig.draw(sig)
    for series in plot.series:
        if series.kind != "line":
            continue
        sig = fig.signal(list(series.x), list(series.y))
        sig.lines()
        fig.draw(sig)
    fig.title(plot.title)
    fig.label(plot.x_label, axis=0)
    fig.label(plot.y_label, axis=1)
    text = fig.build().string(colorless=True)
    fig.clear()
    key = "\n  " + "   ".join(legend) if legend else ""
    note = f"\n  ({plot.note})" if plot.note else ""
    return text.rstrip() + key + note + "\n"


def save_figure(plots: Sequence[PlotData], path: str | Path, *, inputs: Sequence[str | Path | None] = (), force: bool = False) -> Path:
    """Draw ``plots`` side by side (:func:`interact.report.figures.fit_figure`) into ``path`` (.svg, .png or .pdf).

    Raises
    ------
    InputError
        Unsupported suffix, or the file cannot be written.
    """
    from . import figures

    if Path(path).suffix.lower() not in FIGURE_SUFFIXES:  # before drawing: a bad name costs nothing
        raise InputError("plot", str(path), f"has an unsupported suffix; expected one of {', '.join(FIGURE_SUFFIXES)}")
    return figures.save_figure(figures.fit_figure(plots), path, field="--plot", inputs=inputs, force=force)
