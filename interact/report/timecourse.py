"""Formatting a :class:`~interact.dynamic.TimeCourse`: text sections and JSON data.

``format_*`` return text; shells write it.  The chart is :func:`interact.report.figures.timecourse_figure`.
"""

from __future__ import annotations

import json
import math
from typing import Any

import numpy as np

from ..assessment import Assessment
from ..cautions import CAUTION_LINE
from ..dosing import timing_advice
from ..dynamic import TimeCourse
from ..results import TIMECOURSE_SCHEMA, setting_dict
from .document import Note, Section, Table, cite_data, render_markdown, render_text, speak_sections
from .numbers import fmt, fmt_ratio

__all__ = [
    "TIMECOURSE_SCHEMA",
    "format_timecourse",
    "timecourse_advice",
    "timecourse_sections",
    "timecourse_to_dict",
]


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
        "settings": [setting_dict(s) for s in (*tc.settings, *tc.kdeg_used)],
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
