"""Renderers for the fit diagnostics: terminal text (plotext) and SVG/PNG files (matplotlib).

The data come from :mod:`interact.kinetics.diagnostics`; nothing is
recomputed here.  Both libraries are imported only when a plot is drawn, and
matplotlib always with the non-interactive Agg backend.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import Final

from ..errors import InputError
from ..kinetics.diagnostics import PlotData

__all__ = ["FIGURE_SUFFIXES", "render_terminal", "save_figure"]

FIGURE_SUFFIXES: Final = (".svg", ".png", ".pdf")
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
    """Draw ``plots`` side by side into ``path`` (.svg, .png or .pdf); returns the path.

    Raises
    ------
    InputError
        Unsupported suffix, or the file cannot be written.
    """
    target = Path(path)
    if target.suffix.lower() not in FIGURE_SUFFIXES:
        raise InputError("plot", str(path), f"has an unsupported suffix; expected one of {', '.join(FIGURE_SUFFIXES)}")
    import matplotlib

    matplotlib.use("Agg", force=True)
    from matplotlib.figure import Figure

    fig = Figure(figsize=(5.2 * len(plots), 4.6), layout="constrained")
    axes = fig.subplots(1, len(plots), squeeze=False)[0]
    cmap = matplotlib.colormaps["viridis"]
    for ax, plot in zip(axes, plots, strict=True):
        levels = sorted({s.level_um for s in plot.series if s.level_um is not None})
        colour = {lv: cmap(k / max(len(levels) - 1, 1) * 0.9) for k, lv in enumerate(levels)}
        for s in plot.series:
            c = colour.get(s.level_um, "0.4") if s.level_um is not None else "0.4"
            if s.kind == "points":
                ax.plot(s.x, s.y, "o", color=c, label=s.label, markersize=4)
            else:
                ax.plot(s.x, s.y, color=c, linewidth=1.0, linestyle="-" if s.level_um is not None else "--")
        ax.axhline(0.0, color="0.8", linewidth=0.6)
        ax.axvline(0.0, color="0.8", linewidth=0.6)
        ax.set_title(plot.title, fontsize=10)
        ax.set_xlabel(plot.x_label)
        ax.set_ylabel(plot.y_label)
        ax.legend(fontsize=7, frameon=False)
    fig.suptitle("Diagnostics of the global nonlinear fit; not the fitting method", fontsize=8, color="0.4")
    import io

    from ..files import write_file

    buffer = io.BytesIO()
    fig.savefig(buffer, format=target.suffix.lower().lstrip("."))
    write_file(target, buffer.getvalue(), field="--plot", inputs=inputs, force=force)  # atomic: the old file or the new one, never a part
    return target
