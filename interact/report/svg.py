"""Small self-contained SVG charts for reports: tornado, AUC ratio against fm, histogram of sampled ratios.

Hand-written SVG (no plotting library, no fonts or scripts fetched): every
text is escaped, sizes are fixed so the charts print at the width of a page.
"""

from __future__ import annotations

import html
import math
from collections.abc import Sequence

from ..uncertainty import FmCurve, TornadoBar
from .numbers import fmt, fmt_ratio

__all__ = ["fm_curves_svg", "histogram_svg", "tornado_svg"]

_W = 640
_FONT = 'font-family="Helvetica, Arial, sans-serif" font-size="11"'
# colour-blind-safe pair (Okabe-Ito blue and vermillion) and greys
_LOW = "#0072B2"
_HIGH = "#D55E00"
_GRID = "#d0d0d0"
_INK = "#222222"


def _e(text: str) -> str:
    return html.escape(text, quote=True)


def _head(height: int, title: str) -> list[str]:
    return [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{_W}" height="{height}" viewBox="0 0 {_W} {height}" '
        f'role="img" aria-label="{_e(title)}" {_FONT}>',
        f"<title>{_e(title)}</title>",
        f'<rect x="0" y="0" width="{_W}" height="{height}" fill="white"/>',
        f'<text x="{_W / 2:.0f}" y="16" text-anchor="middle" font-size="13" fill="{_INK}">{_e(title)}</text>',
    ]


def _log_ticks(lo: float, hi: float) -> list[float]:
    """Round AUC-ratio ticks (1, 1.25, 2, 5, 10 ...) inside [lo, hi]."""
    base = [0.1, 0.2, 0.5, 0.8, 1.0, 1.25, 1.5, 2.0, 3.0, 5.0, 10.0, 20.0, 50.0, 100.0, 200.0, 500.0, 1000.0]
    ticks = [t for t in base if lo <= t <= hi]
    return ticks or [lo, hi]


def tornado_svg(bars: Sequence[TornadoBar], point: float, boundary: tuple[float, float], title: str = "One-at-a-time sensitivity") -> str:
    """Horizontal bars from the AUC ratio at each input's low to its high end, largest effect on top (log axis)."""
    bars = list(bars)[:15]
    row = 22
    left, right, top = 230, 40, 44
    height = top + row * max(len(bars), 1) + 50
    values = [point, boundary[0], boundary[1]] + [v for b in bars for v in (b.aucr_low, b.aucr_high)]
    lo = min(v for v in values if v > 0) / 1.15
    hi = max(values) * 1.15
    lx0, lx1 = math.log(lo), math.log(hi)

    def x(v: float) -> float:
        return left + (math.log(v) - lx0) / (lx1 - lx0) * (_W - left - right)

    out = _head(height, title)
    bottom = top + row * max(len(bars), 1)
    for t in _log_ticks(lo, hi):
        out.append(f'<line x1="{x(t):.1f}" y1="{top - 4}" x2="{x(t):.1f}" y2="{bottom}" stroke="{_GRID}"/>')
        out.append(f'<text x="{x(t):.1f}" y="{bottom + 14}" text-anchor="middle" fill="{_INK}">{t:g}</text>')
    for edge in boundary:
        out.append(f'<line x1="{x(edge):.1f}" y1="{top - 4}" x2="{x(edge):.1f}" y2="{bottom}" stroke="{_INK}" stroke-dasharray="4 3"/>')
    for k, b in enumerate(bars):
        y = top + k * row
        a0, a1 = sorted((b.aucr_low, b.aucr_high))
        label = b.input.label if len(b.input.label) <= 38 else b.input.label[:36] + "..."
        out.append(f'<text x="{left - 6}" y="{y + 14}" text-anchor="end" fill="{_INK}">{_e(label)}</text>')
        # the part of the bar from the point to the low-input end, then to the high-input end
        for end, colour in ((b.aucr_low, _LOW), (b.aucr_high, _HIGH)):
            x0, x1 = sorted((x(point), x(end)))
            out.append(f'<rect x="{x0:.1f}" y="{y + 4}" width="{max(x1 - x0, 1):.1f}" height="{row - 8}" fill="{colour}"/>')
        out.append(f"<title>{_e(f'{b.input.path}: {fmt(b.low)} to {fmt(b.high)} gives AUCR {fmt_ratio(a0)} to {fmt_ratio(a1)}')}</title>")
    out.append(f'<line x1="{x(point):.1f}" y1="{top - 6}" x2="{x(point):.1f}" y2="{bottom}" stroke="{_INK}" stroke-width="1.5"/>')
    out.append(
        f'<text x="{_W / 2:.0f}" y="{height - 10}" text-anchor="middle" fill="{_INK}">AUC ratio (log scale); point estimate {fmt_ratio(point)}; '  # noqa: E501
        f"dashed: no-effect boundary {boundary[0]:g}-{boundary[1]:g}</text>"
    )
    out.append(
        f'<rect x="{_W - 170}" y="20" width="10" height="10" fill="{_LOW}"/>'
        f'<text x="{_W - 156}" y="29" fill="{_INK}">input low</text>'
        f'<rect x="{_W - 95}" y="20" width="10" height="10" fill="{_HIGH}"/>'
        f'<text x="{_W - 81}" y="29" fill="{_INK}">input high</text>'
    )
    out.append("</svg>")
    return "\n".join(out)


def fm_curves_svg(curves: Sequence[FmCurve], boundary: float = 1.25, title: str = "AUC ratio against fm") -> str:
    """AUC ratio (log axis) against fm for each curve; the last curve (this scenario) is drawn thick."""
    left, right, top, bottom_pad = 60, 150, 34, 44
    height = 330
    ys = [v for c in curves for v in c.aucr if v > 0 and math.isfinite(v)]
    lo, hi = 1.0, min(max([*ys, boundary * 1.2]) * 1.1, 1e4)
    ly0, ly1 = math.log(lo), math.log(hi)
    pw, ph = _W - left - right, height - top - bottom_pad

    def px(f: float) -> float:
        return left + f * pw

    def py(v: float) -> float:
        v = min(max(v, lo), hi)
        return top + ph - (math.log(v) - ly0) / (ly1 - ly0) * ph

    out = _head(height, title)
    for t in _log_ticks(lo, hi):
        out.append(f'<line x1="{left}" y1="{py(t):.1f}" x2="{left + pw}" y2="{py(t):.1f}" stroke="{_GRID}"/>')
        out.append(f'<text x="{left - 6}" y="{py(t) + 4:.1f}" text-anchor="end" fill="{_INK}">{t:g}</text>')
    for f in (0.0, 0.25, 0.5, 0.75, 1.0):
        out.append(f'<text x="{px(f):.1f}" y="{top + ph + 16}" text-anchor="middle" fill="{_INK}">{f:g}</text>')
    out.append(
        f'<line x1="{left}" y1="{py(boundary):.1f}" x2="{left + pw}" y2="{py(boundary):.1f}" stroke="{_INK}" stroke-dasharray="4 3"/>'
    )
    out.append(f'<rect x="{left}" y="{top}" width="{pw}" height="{ph}" fill="none" stroke="{_INK}"/>')
    n = len(curves)
    for k, c in enumerate(curves):
        mine = c.label.startswith("this scenario")
        shade = 30 + int(150 * k / max(n - 2, 1)) if not mine else 0
        colour = _HIGH if mine else f"rgb({shade},{shade},{min(shade + 60, 255)})"
        pts = " ".join(f"{px(f):.1f},{py(v):.1f}" for f, v in zip(c.fm, c.aucr, strict=True) if v > 0 and math.isfinite(v))
        out.append(f'<polyline points="{pts}" fill="none" stroke="{colour}" stroke-width="{2.5 if mine else 1.2}"/>')
        ly = top + 12 + 15 * k
        out.append(
            f'<line x1="{left + pw + 10}" y1="{ly - 4}" x2="{left + pw + 28}" y2="{ly - 4}" stroke="{colour}" '
            f'stroke-width="{2.5 if mine else 1.2}"/>'
        )
        label = c.label.replace("this scenario (fm ", "this scenario (").replace(" varied)", ")")
        out.append(f'<text x="{left + pw + 32}" y="{ly}" fill="{_INK}">{_e(label[:22])}</text>')
    out.append(
        f'<text x="{left + pw / 2:.0f}" y="{height - 8}" text-anchor="middle" fill="{_INK}">'
        f"fm of the inhibited pathway; AUC ratio on a log scale; dashed: {boundary:g}</text>"
    )
    out.append("</svg>")
    return "\n".join(out)


def histogram_svg(
    total: Sequence[float],
    percentiles: tuple[float, float, float],
    thresholds: Sequence[float],
    title: str = "Sampled AUC ratios",
) -> str:
    """Histogram of sampled AUC ratios on a log axis, with the 5th/50th/95th percentiles and class thresholds."""
    import numpy as np

    arr = np.asarray(total, dtype=float)
    arr = arr[np.isfinite(arr) & (arr > 0)]
    left, right, top, bottom_pad = 50, 20, 34, 44
    height = 260
    pw, ph = _W - left - right, height - top - bottom_pad
    lo, hi = float(arr.min()) / 1.05, float(arr.max()) * 1.05
    if hi / lo < 1.2:
        mid = math.sqrt(lo * hi)
        lo, hi = mid / 1.1, mid * 1.1
    edges = np.geomspace(lo, hi, 41)
    counts, _ = np.histogram(arr, bins=edges)
    peak = max(int(counts.max()), 1)
    lx0, lx1 = math.log(lo), math.log(hi)

    def px(v: float) -> float:
        return left + (math.log(v) - lx0) / (lx1 - lx0) * pw

    out = _head(height, title)
    for k, c in enumerate(counts.tolist()):
        h = ph * c / peak
        out.append(
            f'<rect x="{px(edges[k]):.1f}" y="{top + ph - h:.1f}" width="{max(px(edges[k + 1]) - px(edges[k]) - 0.5, 0.5):.1f}" '
            f'height="{h:.1f}" fill="{_LOW}" fill-opacity="0.75"/>'
        )
    for t in thresholds:
        if lo < t < hi:
            out.append(f'<line x1="{px(t):.1f}" y1="{top}" x2="{px(t):.1f}" y2="{top + ph}" stroke="{_INK}" stroke-dasharray="4 3"/>')
            out.append(f'<text x="{px(t) + 3:.1f}" y="{top + 10}" fill="{_INK}">{t:g}</text>')
    for q, v in zip((5, 50, 95), percentiles, strict=True):
        out.append(
            f'<line x1="{px(v):.1f}" y1="{top}" x2="{px(v):.1f}" y2="{top + ph}" stroke="{_HIGH}" stroke-width="{2 if q == 50 else 1}"/>'
        )
    for t in _log_ticks(lo, hi):
        out.append(f'<text x="{px(t):.1f}" y="{top + ph + 14}" text-anchor="middle" fill="{_INK}">{t:g}</text>')
    out.append(f'<rect x="{left}" y="{top}" width="{pw}" height="{ph}" fill="none" stroke="{_INK}"/>')
    out.append(
        f'<text x="{left + pw / 2:.0f}" y="{height - 8}" text-anchor="middle" fill="{_INK}">'
        f"AUC ratio (log scale); orange: 5th, 50th, 95th percentiles; dashed: class thresholds</text>"
    )
    out.append("</svg>")
    return "\n".join(out)
