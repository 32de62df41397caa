"""The answer panel: an :class:`~interact.assessment.Assessment` as Rich renderables.

The wording comes from the report module (:func:`interact.report.assessment.assessment_sections`):
the summary sentence, the basic-model rows, the AUC-ratio table and the dose
section are the report's own, so the terminal and a written report never
disagree.  Verdicts are words ("STUDY INDICATED", "below cutoff"); colour only
repeats them.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from rich.console import Group, RenderableType
from rich.table import Table as RichTable
from rich.text import Text

from ..assessment import Assessment
from ..cautions import DOSE_CAUTIONS, INCREASE_CAUTION
from ..report.assessment import assessment_sections
from ..report.document import Note, Section, Table
from ..report.numbers import fmt, fmt_ratio

__all__ = ["Comparison", "compare", "flatten", "render_answer", "render_stale"]


#: Rich styles, chosen to read on dark and light terminals; words carry every verdict
STYLE = {
    "flag": "bold red3",
    "ok": "green4",
    "heading": "bold underline",
    "result": "bold",
    "stale": "bold reverse",
    "caution": "italic",
    "warning": "dark_orange3",
    "dim": "dim",
}


def _section(sections: list[Section], start: str) -> Section | None:
    return next((s for s in sections if s.title.startswith(start)), None)


def _table(section: Section | None, first_header: str) -> Table | None:
    if section is None:
        return None
    return next((b for b in section.blocks if isinstance(b, Table) and b.headers[0] == first_header), None)


def _verdict_style(word: str) -> str:
    return STYLE["flag"] if "INDICATED" in word.upper() and "NOT" not in word.upper() else STYLE["ok"]


def _rich_table(headers: tuple[str, ...], rows: list[tuple[str, ...]], verdict_col: int | None = None) -> RichTable:
    t = RichTable(show_edge=False, box=None, pad_edge=False, padding=(0, 1), header_style="bold", expand=False)
    for h in headers:
        t.add_column(h, overflow="fold")
    for row in rows:
        cells: list[Any] = list(row)
        if verdict_col is not None:
            cells[verdict_col] = Text(row[verdict_col], style=_verdict_style(row[verdict_col]))
        t.add_row(*cells)
    return t


@dataclass(frozen=True, slots=True, kw_only=True)
class Comparison:
    """A pinned result against the current one."""

    rows: tuple[tuple[str, str, str, str], ...]
    inputs: tuple[str, ...]


def flatten(data: Any, prefix: str = "") -> dict[str, Any]:
    """Scenario data as ``{key path: value}`` for listing what changed."""
    out: dict[str, Any] = {}
    if isinstance(data, dict):
        for k, v in data.items():
            out.update(flatten(v, f"{prefix}.{k}" if prefix else str(k)))
    elif isinstance(data, list) and data and all(isinstance(v, dict) for v in data):
        for i, v in enumerate(data):
            out.update(flatten(v, f"{prefix}[{i}]"))
    else:
        out[prefix] = data
    return out


def _change(old: float | None, new: float | None) -> str:
    if old is None or new is None:
        return ""
    if old == new:
        return "same"
    if old == 0:
        return f"{new - old:+.3g}"
    return f"{new - old:+.3g} ({(new / old - 1) * 100:+.0f} %)"


def compare(pinned: Assessment, pinned_data: dict[str, Any], now: Assessment, now_data: dict[str, Any]) -> Comparison:
    """What changed between the pinned assessment and the current one."""
    p, n = pinned.prediction, now.prediction
    rows: list[tuple[str, str, str, str]] = [
        ("AUC ratio, total", fmt_ratio(p.total), fmt_ratio(n.total), _change(p.total, n.total)),
        ("AUC ratio, gut", fmt_ratio(p.gut), fmt_ratio(n.gut), _change(p.gut, n.gut)),
        ("AUC ratio, liver", fmt_ratio(p.liver), fmt_ratio(n.liver), _change(p.liver, n.liver)),
        ("class", p.band.name if p.band else "-", n.band.name if n.band else "-", ""),
        ("complete-inhibition ceiling", fmt_ratio(p.ceiling_total), fmt_ratio(n.ceiling_total), ""),
        ("suggested action", pinned.dose.action, now.dose.action, ""),
        (
            f"suggested dose ({now.dose.dose_unit})",
            fmt(pinned.dose.chosen_dose),
            fmt(now.dose.chosen_dose),
            _change(pinned.dose.chosen_dose, now.dose.chosen_dose),
        ),
    ]
    old_screen = {(r.target, r.label): r for r in pinned.screen}
    for r in now.screen:
        o = old_screen.get((r.target, r.label))
        if o is None:
            rows.append((f"{r.label} {r.target}", "-", fmt_ratio(r.value), "new"))
        elif o.value != r.value or o.indicated != r.indicated:
            rows.append((f"{r.label} {r.target}", f"{fmt_ratio(o.value)} {o.verdict}", f"{fmt_ratio(r.value)} {r.verdict}", _change(o.value, r.value)))
    before, after = flatten(pinned_data), flatten(now_data)
    inputs = []
    for key in sorted(set(before) | set(after)):
        b, a = before.get(key, "(empty)"), after.get(key, "(empty)")
        if b != a:
            inputs.append(f"{key}: {b} -> {a}")
    return Comparison(rows=tuple(rows), inputs=tuple(inputs))


def render_stale(problems: list[str]) -> Text:
    """The banner over a result that no longer matches the inputs."""
    n = len(problems)
    t = Text(style=STYLE["stale"])
    t.append("NOT UPDATED: ", style="bold")
    t.append(
        f"the inputs have {n} problem{'s' if n != 1 else ''} (marked 'error' under the fields). "
        "The numbers below are for the last valid inputs, not for what is typed now.\n"
    )
    for p in problems[:6]:
        t.append(f"  - {p}\n")
    if n > 6:
        t.append(f"  ... and {n - 6} more\n")
    return t


def render_answer(a: Assessment, comparison: Comparison | None = None, *, narrow: bool = False) -> RenderableType:
    """The results: summary, ratios and ceiling, basic models, dose, warnings.

    ``narrow`` lays the basic-model table out as one line per test, for panels
    under about 60 columns.
    """
    sections = assessment_sections(a)
    out: list[RenderableType] = []
    pr = a.prediction

    if comparison is not None:
        out.append(Text("What-if: pinned result against now", style=STYLE["heading"]))
        out.append(_rich_table(("", "pinned", "now", "change"), list(comparison.rows)))
        if comparison.inputs:
            out.append(Text("Inputs changed since pinning:\n" + "\n".join(f"  {c}" for c in comparison.inputs), style=STYLE["dim"]))
        else:
            out.append(Text("No input changed since pinning.", style=STYLE["dim"]))
        out.append(Text(""))

    # -- the answer first, in the report's words
    summary = _section(sections, "Summary")
    if summary is not None:
        for b in summary.blocks:
            if isinstance(b, Note):
                out.append(Text(b.text, style=STYLE["result"]))
    big = Text()
    big.append("AUC ratio ", style="bold")
    big.append(fmt_ratio(pr.total), style=STYLE["result"])
    big.append(f"  ({pr.band.name})" if pr.band else "")
    big.append(f"   study {'INDICATED' if a.study_indicated else 'not indicated'} at cutoff {a.aucr_cutoff.value:g}")
    out.append(big)
    ratios = _table(_section(sections, "Mechanistic static model"), "AUC ratio")
    if ratios is not None:
        out.append(_rich_table(("AUC ratio", "predicted", "complete inhibition"), [tuple(r) for r in ratios.rows]))
    out.append(Text(""))

    # -- basic models (first five columns of the report's table)
    basic = _section(sections, "Basic static models")
    screen = _table(basic, "target")
    out.append(Text(basic.title if basic else "Basic static models", style=STYLE["heading"]))
    if screen is not None and screen.rows and narrow:
        for r in screen.rows:
            line = Text(f"{r[0]} {r[1]} = {r[2]} (cutoff {r[3]}): ")
            line.append(r[4], style=_verdict_style(r[4]))
            out.append(line)
    elif screen is not None and screen.rows:
        out.append(_rich_table(("target", "test", "value", "cutoff", "verdict"), [tuple(r[:5]) for r in screen.rows], verdict_col=4))
    else:
        out.append(Text("No criterion of this rule set applies to the targets given."))
    out.append(Text(""))

    # -- dose
    dose = _section(sections, "Dose suggestion")
    out.append(Text(f"Dose of {a.scenario.victim.name}", style=STYLE["heading"]))
    if dose is not None:
        for b in dose.blocks:
            if isinstance(b, Note) and b.kind == "result":
                out.append(Text(b.text, style=STYLE["result"]))
            elif isinstance(b, str):
                out.append(Text(f"- {b}"))
    caution = Text(style=STYLE["caution"])
    caution.append("Caution: ", style="bold")
    caution.append(DOSE_CAUTIONS[0])
    if a.dose.action == "increase dose":
        caution.append(" " + INCREASE_CAUTION)
    caution.append(" (F2: all cautions)")
    out.append(caution)
    out.append(Text(""))

    if a.warnings:
        out.append(Text("Warnings", style=STYLE["heading"]))
        out.extend(Text(f"- {w}", style=STYLE["warning"]) for w in a.warnings)
        out.append(Text(""))
    if a.memory_values:
        out.append(Text(f"Values from memory ({len(a.memory_values)}): verify before relying on them", style=STYLE["heading"]))
        out.extend(Text(f"- {m}", style=STYLE["dim"]) for m in a.memory_values)
    return Group(*out)
