"""Curves for the terminal plots, and a small Unicode (braille) chart renderer.

The curves come from the core's own functions: :func:`interact.prediction.liver_ratio`
and :func:`interact.prediction.gut_ratio` (vectorised over fm) and
:func:`interact.prediction.ratio_function` (the perpetrator-dose scan).  Nothing
here re-derives the model; it only chooses the points and draws them.

The chart is drawn with braille cells (2 x 4 dots per character) so a curve is
smooth in an 80 x 24 terminal.  Reference lines and the current point use
distinct characters and are named in the legend, so nothing depends on colour.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from ..assessment import Assessment
from ..constants import kdeg_per_h
from ..prediction import liver_ratio, ratio_function, routes_of
from ..report.numbers import fmt, fmt_ratio

__all__ = ["Chart", "Series", "dose_curve", "draw", "fm_curve", "legend"]


@dataclass(frozen=True, slots=True, kw_only=True)
class Series:
    """A curve in data coordinates."""

    x: tuple[float, ...]
    y: tuple[float, ...]


@dataclass(frozen=True, slots=True, kw_only=True)
class Chart:
    """What to draw: a curve, reference lines, a marked point, labels in words."""

    title: str
    x_label: str
    y_label: str
    curve: Series
    hlines: tuple[tuple[float, str], ...] = ()
    vlines: tuple[tuple[float, str], ...] = ()
    point: tuple[float, float] | None = None
    point_label: str = ""
    log_x: bool = False
    notes: tuple[str, ...] = field(default_factory=tuple)
    extra: tuple[Series, ...] = ()
    extra_label: str = ""


def fm_curve(a: Assessment, points: int = 101) -> Chart | None:
    """Total AUC ratio against the fm of the victim's main inhibited pathway.

    The inhibitor's effect on every enzyme (activity left in liver and gut) is
    held at its current value; the main pathway's fm runs from 0 to the most
    the other pathways leave (sum of fm <= 1).
    """
    pr = a.prediction
    effects = [e for e in pr.effects if e.liver.activity != 1.0]
    if not effects or pr.routes or pr.regime is not None:  # with transporter routes this liver-only curve would be wrong
        return None
    main = max(effects, key=lambda e: e.fm)
    others = [e for e in pr.effects if e is not main]
    room = 1.0 - sum(e.fm for e in others)
    if room <= 0:
        return None
    fm = np.linspace(0.0, room, points)
    fms = np.column_stack([fm, *[np.full(points, e.fm) for e in others]])
    act = np.array([main.liver.activity, *[e.liver.activity for e in others]])
    liver = liver_ratio(fms, np.broadcast_to(act, fms.shape))
    gut = pr.gut  # the gut-wall part does not depend on the liver fm
    total = gut * liver
    other_inhibited = pr.inhibited_fm - main.fm
    ceiling = pr.ceiling_gut / (1.0 - np.clip(fm + other_inhibited, 0.0, 0.999))
    upper = float(a.aucr_cutoff.value)
    return Chart(
        title=(
            f"AUC ratio against fm of {main.enzyme} (inhibitor effect as now: "
            f"{fmt(main.liver.activity)} of {main.enzyme} activity left in the liver)"
        ),
        x_label=f"fm of {main.enzyme}",
        y_label="AUC ratio",
        curve=Series(x=tuple(fm.tolist()), y=tuple(total.tolist())),
        hlines=((upper, f"AUCR cutoff {upper:g}"),),
        point=(main.fm, pr.total),
        point_label=f"now: fm {main.fm:g}, AUC ratio {fmt_ratio(pr.total)}",
        extra=(Series(x=tuple(fm.tolist()), y=tuple(ceiling.tolist())),),
        extra_label="complete inhibition",
        notes=(f"other pathways held: {', '.join(f'{e.enzyme} fm {e.fm:g}' for e in others) or 'none'}; gut part {fmt_ratio(gut)}",),
    )


def dose_curve(a: Assessment, points: int = 121) -> Chart | None:
    """Total AUC ratio against the perpetrator's dose (concentrations taken as dose-proportional)."""
    s = a.scenario
    pr = a.prediction
    if not a.constants:
        return None
    kdeg, _ = kdeg_per_h(s, a.constants)
    at = ratio_function(
        pathways=tuple((pw.enzyme, pw.fm) for pw in s.victim.pathways if pw.route == "metabolism"),
        fg=pr.fg_used,
        gut_enzyme=pr.gut_enzyme,
        constants=a.constants,
        species=a.species,
        kdeg=kdeg,
        routes=routes_of(s.victim),
    )
    lim = a.perpetrator_limit
    dose = float(s.perpetrator.dose.magnitude)
    unit = lim.dose_unit
    low, high = 0.01, 10.0
    if lim.scale is not None and math.isfinite(lim.scale) and lim.scale > 0:  # a scale of 0 crashed the app (stateful test)
        low = min(low, lim.scale / 3.0)
        high = max(high, lim.scale * 3.0)
    scales = np.geomspace(low, high, points)
    ratios = tuple(at(float(k)) for k in scales)
    lower, upper = a.dose.boundary
    vlines: tuple[tuple[float, str], ...] = ()
    if lim.dose is not None:
        vlines = ((lim.dose, f"highest dose within the boundary {fmt(lim.dose)} {unit}"),)
    return Chart(
        title=f"AUC ratio of the victim against the perpetrator dose (log scale, {unit})",
        x_label=f"perpetrator dose ({unit})",
        y_label="AUC ratio",
        curve=Series(x=tuple((scales * dose).tolist()), y=ratios),
        hlines=((upper, f"no-effect boundary {upper:g}"), (lower, f"no-effect boundary {lower:g}")),
        vlines=vlines,
        point=(dose, pr.total),
        point_label=f"now: {fmt(dose)} {unit}, AUC ratio {fmt_ratio(pr.total)}",
        log_x=True,
        notes=("assumes the perpetrator's concentrations scale linearly with its dose",),
    )


# --------------------------------------------------------------------------- drawing

_DOTS = ((0x01, 0x08), (0x02, 0x10), (0x04, 0x20), (0x40, 0x80))  # [row][col] within a cell


def _ticks(lo: float, hi: float, n: int = 4) -> list[float]:
    if hi <= lo:
        return [lo]
    raw = (hi - lo) / n
    mag = 10 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1, 2, 2.5, 5, 10) if m * mag >= raw)
    first = math.ceil(lo / step) * step
    out = []
    v = first
    while v <= hi + step * 1e-9:
        out.append(round(v, 12))
        v += step
    return out


def _log_ticks(lo: float, hi: float) -> list[float]:
    out = []
    for e in range(math.floor(math.log10(lo)), math.ceil(math.log10(hi)) + 1):
        v = 10.0**e
        if lo <= v <= hi:
            out.append(v)
    return out


def _y_range(chart: Chart) -> tuple[float, float]:
    """The y axis: the curve, 1, the reference lines near it and the point, padded by 5 %."""
    ys = [y for y in chart.curve.y if math.isfinite(y)]
    y_lo = min(min(ys), 1.0)
    y_hi = max(ys)
    for y, _ in chart.hlines:
        if y_lo * 0.8 <= y <= y_hi * 1.25:
            y_lo, y_hi = min(y_lo, y), max(y_hi, y)
    if chart.point is not None:
        y_hi = max(y_hi, chart.point[1])
    # the other series (the complete-inhibition ceiling) are kept inside the axes up to 3x the main curve's top;
    # beyond that they are cut at the frame (the legend says so), not drawn off the scale
    extra_top = max((y for s in chart.extra for y in s.y if math.isfinite(y)), default=y_hi)
    y_hi = max(y_hi, min(extra_top, 3.0 * y_hi))
    if y_hi - y_lo < 1e-9:
        y_hi = y_lo + 1.0
    pad = (y_hi - y_lo) * 0.05
    y_lo, y_hi = y_lo - pad, y_hi + pad
    return y_lo, y_hi


def draw(chart: Chart, width: int, height: int) -> list[str]:
    """Render ``chart`` into at most ``height`` lines of ``width`` characters.

    Braille dots are the curve (sparse dots: the complete-inhibition curve),
    ``╌`` horizontal reference lines, ``┊`` vertical ones, ``◆`` the current
    point; :func:`legend` names each in words.
    """
    width = max(width, 30)
    height = max(height, 8)
    if not any(math.isfinite(y) for y in chart.curve.y):
        return ["no finite values to plot"]
    y_lo, y_hi = _y_range(chart)
    xs = chart.curve.x
    x_lo, x_hi = min(xs), max(xs)
    fx = (lambda v: math.log10(v)) if chart.log_x else (lambda v: v)
    gx_lo, gx_hi = fx(x_lo), fx(x_hi)

    y_ticks = _ticks(y_lo, y_hi, max(2, (height - 4) // 3))
    label_w = max(len(fmt(t)) for t in y_ticks) + 1
    plot_w = width - label_w - 1
    plot_h = height - 2  # x tick labels and x axis label
    if plot_w < 10 or plot_h < 3:
        return ["(window too small for the plot)"]
    px_w, px_h = plot_w * 2, plot_h * 4
    cells = [[0] * plot_w for _ in range(plot_h)]
    marks: dict[tuple[int, int], str] = {}

    def to_px(x: float, y: float) -> tuple[int, int]:
        gx = (fx(x) - gx_lo) / (gx_hi - gx_lo) if gx_hi > gx_lo else 0.0
        gy = (y - y_lo) / (y_hi - y_lo)
        return round(gx * (px_w - 1)), round((1 - gy) * (px_h - 1))

    def dot(px: int, py: int) -> None:
        if 0 <= px < px_w and 0 <= py < px_h:
            cells[py // 4][px // 2] |= _DOTS[py % 4][px % 2]

    def line(series: Series, every: int = 1) -> None:
        prev = None
        for n, (x, y) in enumerate(zip(series.x, series.y, strict=True)):
            if not math.isfinite(y) or y > y_hi * 1.001:
                prev = None  # beyond the top: not drawn (it would sit on the frame as if it were a value)
                continue
            p = to_px(x, y)
            if prev is not None:
                steps = max(abs(p[0] - prev[0]), abs(p[1] - prev[1]), 1)
                for k in range(steps + 1):
                    if every == 1 or (k + n) % every == 0:
                        dot(round(prev[0] + (p[0] - prev[0]) * k / steps), round(prev[1] + (p[1] - prev[1]) * k / steps))
            prev = p

    for s in chart.extra:
        line(s, every=3)
    line(chart.curve)
    for y, _ in chart.hlines:
        if y_lo <= y <= y_hi:
            row = to_px(x_lo, y)[1] // 4
            for c in range(plot_w):
                if cells[row][c] == 0:
                    marks.setdefault((row, c), "╌")
            tag = f" {y:g}"
            for k, ch in enumerate(tag):
                c = plot_w - len(tag) + k
                if cells[row][c] == 0 and marks.get((row, c), "╌") == "╌":
                    marks[(row, c)] = ch
    for x, _ in chart.vlines:
        if x_lo <= x <= x_hi:
            col = to_px(x, y_lo)[0] // 2
            for r in range(plot_h):
                if cells[r][col] == 0:
                    marks.setdefault((r, col), "┊")
    if chart.point is not None and x_lo <= chart.point[0] <= x_hi:
        px, py = to_px(*chart.point)
        r, c = min(max(py // 4, 0), plot_h - 1), min(max(px // 2, 0), plot_w - 1)
        marks[(r, c)] = "◆"

    tick_rows = {min(max(to_px(x_lo, t)[1] // 4, 0), plot_h - 1): fmt(t) for t in y_ticks if y_lo <= t <= y_hi}
    lines: list[str] = []
    for r in range(plot_h):
        label = tick_rows.get(r, "").rjust(label_w)
        body = "".join(marks.get((r, c)) or (chr(0x2800 + cells[r][c]) if cells[r][c] else " ") for c in range(plot_w))
        lines.append(f"{label}┤{body}" if r in tick_rows else f"{label}│{body}")
    lines.append(" " * label_w + "└" + _x_axis(chart, plot_w, lambda t: to_px(t, y_lo)[0] // 2))
    lines.append(" " * label_w + " " + chart.x_label.center(plot_w))
    return lines


def _x_axis(chart: Chart, plot_w: int, column: Callable[[float], int]) -> str:
    """The x axis tick labels (``column`` places a value), labelled to the end of the data."""
    x_lo, x_hi = min(chart.curve.x), max(chart.curve.x)
    x_ticks = _log_ticks(x_lo, x_hi) if chart.log_x else _ticks(x_lo, x_hi, max(2, plot_w // 12))
    axis = [" "] * plot_w
    for t in x_ticks:
        c = column(t)
        text = fmt(t)
        start = min(max(c - len(text) // 2, 0), plot_w - len(text))
        if all(ch == " " for ch in axis[max(start - 1, 0) : start + len(text) + 1]):
            axis[start : start + len(text)] = list(text)
    end = fmt(x_hi)  # the axis is labelled to the end of the data
    if end not in "".join(axis).split():
        start = plot_w - len(end)
        if start > 0 and all(ch == " " for ch in axis[start - 1 :]):
            axis[start:] = list(end)
    return "".join(axis)


def legend(chart: Chart) -> str:
    """The legend in words: which mark means what."""
    parts = ["⣿ " + chart.y_label]
    if chart.extra:
        parts.append(f"⠑⠢ {chart.extra_label}")
    parts.extend(f"╌ {label}" for _, label in chart.hlines)
    parts.extend(f"┊ {label}" for _, label in chart.vlines)
    if chart.point is not None:
        parts.append(f"◆ {chart.point_label}")
    return "   ".join(parts)
