"""Formatting a :class:`~interact.dynamic.TimeCourse`: text sections, JSON data and an SVG plot.

``format_*`` and ``timecourse_svg`` return text; shells write it.
"""

from __future__ import annotations

import html
import json
import math
import textwrap
from typing import Any, cast

import numpy as np
import pint

from ..assessment import Assessment
from ..cautions import CAUTION_LINE
from ..dosing import timing_advice
from ..dynamic import TimeCourse, time_course_arrays
from ..tables import Terms
from .document import Note, Section, Table, cite_data, render_markdown, render_text, speak, speak_sections
from .numbers import fmt, fmt_ratio

__all__ = [
    "TIMECOURSE_SCHEMA",
    "format_timecourse",
    "timecourse_advice",
    "timecourse_sections",
    "timecourse_svg",
    "timecourse_to_dict",
]

TIMECOURSE_SCHEMA = "interact.timecourse/1"


def _days(h: float | None) -> str:
    return "-" if h is None else f"{fmt(h / 24.0)} d ({fmt(h)} h)"


def timecourse_advice(tc: TimeCourse, a: Assessment) -> tuple[str, ...]:
    """When to change the victim's dose and when to return, for this course."""
    return timing_advice(
        action=a.dose.action,
        steady_ratio=tc.steady_state_ratio,
        static_ratio=tc.static_ratio,
        onset_h=tc.onset_h,
        offset_h=tc.offset_h,
        peak_ratio=tc.peak_ratio,
        peak_h=tc.peak_h,
        boundary=a.dose.boundary,
        effect_fraction=tc.effect_fraction,
        follow_up_h=tc.end_h - tc.stop_h,
        mechanisms=a.prediction.mechanisms,
        usual_dose=a.dose.usual_dose,
        dose_unit=a.dose.dose_unit,
        after_stop_ratio=tc.after_stop_ratio,
        after_stop_h=tc.after_stop_h,
        half_offset_h=tc.half_offset_h,
    )


def _sample_days(tc: TimeCourse) -> list[float]:
    stop_d = tc.stop_h / 24.0
    end_d = tc.end_h / 24.0
    marks = [0, 1, 2, 3, 5, 7, 10, 14, 21, 28, 42, 56, 90]
    days = [d for d in marks if d < stop_d] + [stop_d]
    days += [stop_d + d for d in (1, 2, 3, 5, 7, 10, 14, 21, 28, 42, 60, 90) if stop_d + d <= end_d + 1e-9]
    return days


def timecourse_sections(tc: TimeCourse, a: Assessment | None = None) -> list[Section]:
    """The course as document sections (used by ``interact timecourse`` and inside ``interact assess``)."""
    pct = f"{tc.effect_fraction:.0%}"
    summary = Table(
        headers=("quantity", "value", "note"),
        rows=(
            ("AUC ratio, static (mechanistic)", fmt_ratio(tc.static_ratio), "peak concentrations held constant"),
            (
                "AUC ratio, dynamic steady state",
                fmt_ratio(tc.steady_state_ratio),
                f"over the last {fmt(tc.window_h)} h before stopping" + ("" if tc.steady else "; NOT at steady state"),
            ),
            ("Cmax ratio, dynamic", fmt_ratio(tc.cmax_ratio), "last victim interval before stopping"),
            ("Largest change while dosing", fmt_ratio(tc.peak_ratio), f"on day {fmt(tc.peak_h / 24.0)}"),
            (
                "Largest change after stopping",
                fmt_ratio(tc.after_stop_ratio),
                f"{fmt(tc.after_stop_h / 24.0)} d after the stop (windows after dosing)",
            ),
            (f"Onset ({pct} of the effect)", _days(tc.onset_h), "after the first perpetrator dose"),
            ("Half the effect gone", _days(tc.half_offset_h), "after the last day of dosing"),
            (f"Offset (within {1 - tc.effect_fraction:.0%} of none)", _days(tc.offset_h), "after the last day of dosing"),
            ("Perpetrator given", f"{fmt(tc.stop_h / 24.0)} d", f"followed to day {fmt(tc.end_h / 24.0)}"),
            ("Model", tc.mode, tc.solver),
        ),
    )
    t = np.asarray(tc.time_h)
    ratio = np.asarray(tc.exposure_ratio)
    enz_cols = [f"{e.enzyme} {e.site}" for e in tc.enzymes]
    rows = []
    for d in _sample_days(tc):
        h = d * 24.0
        row = [
            fmt(d),
            "on" if h < tc.stop_h - 1e-9 else ("last" if abs(h - tc.stop_h) < 1e-9 else "off"),
            fmt_ratio(float(np.interp(h, t, ratio))),
        ]
        row += [fmt_ratio(float(np.interp(h, t, np.asarray(e.amount)))) for e in tc.enzymes]
        rows.append(tuple(row))
    curve = Table(
        headers=("day", "perpetrator", "exposure ratio (over a dosing interval)", *(f"enzyme {c} (amount on that day)" for c in enz_cols)),
        rows=tuple(rows),
    )
    enz = Table(
        headers=("enzyme", "site", "kdeg 1/h", "amount at stop", "static", "onset", "recovery"),
        rows=tuple(
            (
                e.enzyme,
                e.site,
                fmt(e.kdeg_per_h),
                fmt_ratio(e.amount_at_stop),
                fmt_ratio(e.amount_static),
                _days(e.onset_h),
                _days(e.recovery_h),
            )
            for e in tc.enzymes
        ),
    )
    settings = Table(
        headers=("setting", "value", "origin"),
        rows=tuple(
            (
                st.label,
                f"{fmt(st.value)} {st.unit}".strip(),
                "; ".join(x for x in (st.origin, st.source, st.status.upper() if st.status == "from memory" else st.status, st.note) if x),
            )
            for st in (*tc.settings, *tc.kdeg_used)
        ),
    )
    blocks: list[str | Table | Note] = [
        summary,
        f"Exposure ratio = victim AUC over the preceding {fmt(tc.window_h)} h with the perpetrator / without it (so onset "
        f"and offset times include a lag of up to {fmt(tc.window_h)} h); enzyme amount relative to baseline (1 = unchanged).",
        curve,
    ]
    if tc.enzymes:
        blocks.append(enz)
    blocks.append(settings)
    blocks.extend(f"- {w}" for w in tc.warnings)
    blocks.extend(f"Note: {n}." for n in tc.notes)
    sections = [Section(title="Time course (dynamic check)", blocks=tuple(blocks))]
    if a is not None:
        sections.append(Section(title="Dose timing", blocks=(*timecourse_advice(tc, a), *(Note(text=c) for c in a.dose.cautions))))
    return sections


def _num(x: float | None) -> float | None:
    return None if x is None or not math.isfinite(x) else x


def timecourse_to_dict(tc: TimeCourse, a: Assessment | None = None, *, curves: bool = True) -> dict[str, Any]:
    """JSON-ready data; times in h, perpetrator concentrations in uM, victim in ``victim_unit``."""
    out: dict[str, Any] = {
        "schema": TIMECOURSE_SCHEMA,
        "mode": tc.mode,
        "static_auc_ratio": tc.static_ratio,
        "steady_state_auc_ratio": tc.steady_state_ratio,
        "steady": tc.steady,
        "window_h": tc.window_h,
        "cmax_ratio": tc.cmax_ratio,
        "peak_ratio": tc.peak_ratio,
        "peak_h": tc.peak_h,
        "after_stop_ratio": tc.after_stop_ratio,
        "after_stop_h": tc.after_stop_h,
        "effect_fraction": tc.effect_fraction,
        "onset_h": _num(tc.onset_h),
        "offset_h": _num(tc.offset_h),
        "half_offset_h": _num(tc.half_offset_h),
        "stop_h": tc.stop_h,
        "end_h": tc.end_h,
        "solver": tc.solver,
        "enzymes": [
            {
                "enzyme": e.enzyme,
                "site": e.site,
                "kdeg_per_h": e.kdeg_per_h,
                "amount_at_stop": e.amount_at_stop,
                "amount_static": e.amount_static,
                "onset_h": _num(e.onset_h),
                "recovery_h": _num(e.recovery_h),
            }
            for e in tc.enzymes
        ],
        "settings": [
            {
                "name": s.name,
                "label": s.label,
                "value": s.value,
                "unit": s.unit,
                "origin": s.origin,
                "source": s.source,
                "status": s.status,
                "note": s.note,
            }
            for s in (*tc.settings, *tc.kdeg_used)
        ],
        "warnings": list(tc.warnings),
        "notes": list(tc.notes),
    }
    if a is not None:
        out["dose_timing"] = list(timecourse_advice(tc, a))
        out["cautions"] = [CAUTION_LINE, *a.dose.cautions]
    if curves:
        out["curves"] = {
            "time_h": list(tc.time_h),
            "victim_unit": tc.victim_unit,
            "victim_with": list(tc.victim_with),
            "victim_without": list(tc.victim_without),
            "exposure_ratio": list(tc.exposure_ratio),
            "perpetrator_um": list(tc.perpetrator_um),
            "enzymes": {f"{e.enzyme}:{e.site}": list(e.amount) for e in tc.enzymes},
        }
    return out


def format_timecourse(tc: TimeCourse, a: Assessment | None = None, fmt_name: str = "text", width: int = 100) -> str:
    """The course as ``text``, ``markdown`` or ``json``."""
    if fmt_name == "json":
        return json.dumps(cite_data(timecourse_to_dict(tc, a)), indent=2, allow_nan=False) + "\n"
    head: list[str | Table | Note] = []
    if a is not None:
        head.append(f"Scenario: {a.scenario.title}")
        if a.scenario.invented:
            head.append("This scenario is INVENTED: its compounds and values describe no real drug.")
    head.append(Note(text=CAUTION_LINE))
    sections = [Section(title="", blocks=tuple(head)), *timecourse_sections(tc, a)]
    if a is not None:
        from .assessment import user_text

        sections = speak_sections(sections, a.rules.terms, user_text(a))
    if fmt_name == "markdown":
        return render_markdown(sections, title="interact time course")
    return render_text(sections, width=width)


# --------------------------------------------------------------------------- SVG


def _path(xs: np.ndarray, ys: np.ndarray, x0: float, x1: float, y0: float, y1: float, box: tuple[float, float, float, float]) -> str:
    left, top, w, h = box
    px = left + (xs - x0) / (x1 - x0) * w
    py = top + h - (ys - y0) / (y1 - y0 if y1 > y0 else 1.0) * h
    # thin the polyline to at most ~1500 points
    step = max(1, len(px) // 1500)
    return " ".join(f"{a:.1f},{b:.1f}" for a, b in zip(px[::step], py[::step], strict=True))


def nice_ticks(lo: float, hi: float, count: int = 6, *, days: bool = False, enclose: bool = False) -> list[float]:
    """Round tick values in [lo, hi]: steps of 1, 2 or 5 x 10^k (of 7 days on a time axis of two weeks or more).

    With ``enclose`` the first and last ticks lie at or beyond ``lo`` and ``hi``, so they can serve as axis limits.
    """
    span = hi - lo
    if not math.isfinite(span) or span <= 0:
        return [lo]
    raw = span / max(count - 1, 1)
    if days and span >= 14:
        step = 7.0 * max(1, math.ceil(raw / 7.0))
    else:
        base = 10.0 ** math.floor(math.log10(raw))
        step = next(m * base for m in (1.0, 2.0, 5.0, 10.0) if m * base >= raw)
    first = math.floor(lo / step + 1e-9) * step
    ticks = []
    k = 0
    while first + k * step <= hi + 1e-9 * step:
        t = first + k * step
        if t >= lo - 1e-9 * step or enclose:
            ticks.append(round(t, 10))
        k += 1
    if enclose and ticks[-1] < hi - 1e-9 * step:
        ticks.append(round(ticks[-1] + step, 10))
    return ticks


def _readable_unit(unit: str, largest: float) -> tuple[str, float]:
    """A unit (same dimension) in which ``largest`` reads as a number between 1 and 1000, and the factor to it (pint)."""
    from .. import units

    if not largest > 0 or not math.isfinite(largest):
        return unit, 1.0
    compact = units.ureg.Quantity(largest, unit).to_compact()  # pint picks the prefix
    return units.unit_text(cast("pint.Quantity", compact)), float(compact.magnitude) / largest


def timecourse_svg(tc: TimeCourse, title: str = "", terms: Terms | None = None) -> str:
    """A two-panel SVG: the object drug's concentration with and without the precipitant; exposure ratio and enzymes.

    Round ticks (days in weeks from two weeks on; concentrations in a unit read as 1 to 1000, chosen by pint), legends
    above each panel so they never cover the data, a reference line at 1 in the ratio panel, axis titles clear of the
    tick labels.  ``terms`` gives the rule set's words for the two drugs.
    """
    say = (lambda text: speak(text, terms)) if terms is not None else (lambda text: text)
    arr = time_course_arrays(tc)
    x = arr["time_day"]
    x0, x1 = 0.0, float(x[-1])
    W, H = 900, 680
    e = html.escape
    panels = [(90.0, 78.0, 780.0, 220.0), (90.0, 392.0, 780.0, 220.0)]
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{W}" height="{H}" viewBox="0 0 {W} {H}" font-family="sans-serif" font-size="12">',
        f'<rect width="{W}" height="{H}" fill="white"/>',
    ]
    heading = [*textwrap.wrap(title or "Time course", 100)[:2], "Model estimate, not clinical advice"]
    for k, line in enumerate(heading):
        parts.append(
            f'<text x="{W / 2}" y="{20 + 16 * k}" text-anchor="middle" font-size="{14 if k < len(heading) - 1 else 12}">{e(line)}</text>'
        )
    stop_d = tc.stop_h / 24.0
    xticks = nice_ticks(x0, x1, 7, days=True)

    def frame(box: tuple[float, float, float, float], yticks: list[float], y0: float, y1: float, label: str) -> None:
        left, top, w, h = box
        parts.append(f'<rect x="{left}" y="{top}" width="{w}" height="{h}" fill="none" stroke="#444"/>')
        # the axis title sits left of the widest tick label
        parts.append(
            f'<text x="{left - 70}" y="{top + h / 2}" text-anchor="middle" transform="rotate(-90 {left - 70} {top + h / 2})">{e(label)}</text>'  # noqa: E501
        )
        for v in yticks:
            yy = top + h - (v - y0) / (y1 - y0) * h
            parts.append(f'<text x="{left - 6}" y="{yy + 4:.1f}" text-anchor="end">{v:g}</text>')
            parts.append(f'<line x1="{left}" x2="{left + w}" y1="{yy:.1f}" y2="{yy:.1f}" stroke="#eee"/>')
        for d in xticks:
            xx = left + (d - x0) / (x1 - x0) * w
            parts.append(f'<text x="{xx:.1f}" y="{top + h + 16}" text-anchor="middle">{d:g}</text>')
        sx = left + (stop_d - x0) / (x1 - x0) * w
        parts.append(f'<line x1="{sx:.1f}" x2="{sx:.1f}" y1="{top}" y2="{top + h}" stroke="#999" stroke-dasharray="4 3"/>')

    def legend(box: tuple[float, float, float, float], items: list[tuple[str, str]]) -> None:
        left, top, _, _ = box
        xx = left
        for name, colour in items:
            parts.append(f'<line x1="{xx:.0f}" x2="{xx + 18:.0f}" y1="{top - 12}" y2="{top - 12}" stroke="{colour}" stroke-width="2"/>')
            parts.append(f'<text x="{xx + 22:.0f}" y="{top - 8}" fill="#222">{e(name)}</text>')
            xx += 30 + 7 * len(name)

    vw, vo = arr["victim_with"], arr["victim_without"]
    unit, factor = _readable_unit(tc.victim_unit, float(max(vw.max(), vo.max())))
    vw, vo = vw * factor, vo * factor
    top_c = float(max(vw.max(), vo.max())) or 1.0
    cticks = nice_ticks(0.0, top_c, 5, enclose=True)
    cmax = cticks[-1]
    frame(panels[0], cticks, 0.0, cmax, say(f"victim concentration ({unit})"))
    parts.append(f'<polyline fill="none" stroke="#888" stroke-width="1" points="{_path(x, vo, x0, x1, 0.0, cmax, panels[0])}"/>')
    parts.append(f'<polyline fill="none" stroke="#c0392b" stroke-width="1" points="{_path(x, vw, x0, x1, 0.0, cmax, panels[0])}"/>')
    legend(panels[0], [(say("with perpetrator"), "#c0392b"), (say("without perpetrator"), "#888"), (say("perpetrator stopped"), "#999")])

    series = [(say("exposure ratio (over a dosing interval)"), arr["exposure_ratio"], "#c0392b")]
    colours = ["#2471a3", "#239b56", "#7d3c98", "#b9770e"]
    for i, en in enumerate(tc.enzymes):
        series.append((f"{en.enzyme} {en.site} enzyme", np.asarray(en.amount), colours[i % len(colours)]))
    lo = min(float(min(s[1].min() for s in series)), 1.0)
    hi = max(float(max(s[1].max() for s in series)), 1.0)
    rticks = nice_ticks(max(lo, 0.0), hi, 6, enclose=True)
    rlo, rhi = rticks[0], rticks[-1]
    frame(panels[1], rticks, rlo, rhi, "ratio to baseline (dotted: 1, no change)")
    left, top, w, h = panels[1]
    y1 = top + h - (1.0 - rlo) / (rhi - rlo) * h
    parts.append(f'<line x1="{left}" x2="{left + w}" y1="{y1:.1f}" y2="{y1:.1f}" stroke="#222" stroke-dasharray="2 3"/>')
    for _name, ys, colour in series:
        parts.append(f'<polyline fill="none" stroke="{colour}" stroke-width="1.5" points="{_path(x, ys, x0, x1, rlo, rhi, panels[1])}"/>')
    legend(panels[1], [(name, colour) for name, _, colour in series])
    parts.append(f'<text x="{W / 2}" y="{H - 12}" text-anchor="middle">{e(say("days after the first perpetrator dose"))}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"
