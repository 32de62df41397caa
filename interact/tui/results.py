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

from rich.style import Style

from ..assessment import Assessment
from ..cautions import DOSE_CAUTIONS, INCREASE_CAUTION
from ..report.assessment import assessment_sections
from ..report.document import Note, Section, Table, cite
from ..report.numbers import fmt_ratio
from ..sources import resolve
from .doc import Doc

__all__ = ["Comparison", "compare", "flatten", "render_answer", "render_stale", "sections_doc"]


#: styles chosen to read on dark and light terminals; words carry every verdict
STYLE = {
    "flag": Style.parse("bold red3"),
    "ok": Style.parse("green4"),
    "heading": Style.parse("bold underline"),
    "result": Style.parse("bold"),
    "stale": Style.parse("bold reverse"),
    "stale_text": Style.parse("bold"),
    "caution": Style.parse("italic"),
    "caution_head": Style.parse("bold italic"),
    "warning": Style.parse("dark_orange3"),
    "dim": Style.parse("dim"),
}


def _section(sections: list[Section], start: str) -> Section | None:
    return next((s for s in sections if s.title.startswith(start)), None)


def _table(section: Section | None, first_header: str) -> Table | None:
    if section is None:
        return None
    return next((b for b in section.blocks if isinstance(b, Table) and b.headers[0] == first_header), None)


def _verdict_style(word: str) -> Style:
    return STYLE["flag"] if "INDICATED" in word.upper() and "NOT" not in word.upper() else STYLE["ok"]


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
        ("suggested action", pinned.dose.headline, now.dose.headline, ""),
        (
            "suggested regimen",
            pinned.dose.chosen.describe(pinned.dose.dose_unit) if pinned.dose.chosen else "-",
            now.dose.chosen.describe(now.dose.dose_unit) if now.dose.chosen else "-",
            "",
        ),
    ]
    old_screen = {(r.target, r.label): r for r in pinned.screen}
    for r in now.screen:
        o = old_screen.get((r.target, r.label))
        if o is None:
            rows.append((f"{r.label} {r.target}", "-", fmt_ratio(r.value), "new"))
        elif o.value != r.value or o.indicated != r.indicated:
            rows.append(
                (
                    f"{r.label} {r.target}",
                    f"{fmt_ratio(o.value)} {o.verdict}",
                    f"{fmt_ratio(r.value)} {r.verdict}",
                    _change(o.value, r.value),
                )
            )
    before, after = flatten(pinned_data), flatten(now_data)
    inputs = []
    for key in sorted(set(before) | set(after)):
        b, a = before.get(key, "(empty)"), after.get(key, "(empty)")
        if b != a:
            inputs.append(f"{key}: {b} -> {a}")
    return Comparison(rows=tuple(rows), inputs=tuple(inputs))


def render_stale(problems: list[str]) -> Doc:
    """The banner over a result that no longer matches the inputs."""
    n = len(problems)
    doc = Doc()
    doc.para(
        ("NOT UPDATED:", STYLE["stale"]),
        (
            f" the inputs have {n} problem{'s' if n != 1 else ''} (marked 'error' in the form). "
            "The numbers below are for the last valid inputs, not for what is typed now.",
            STYLE["stale_text"],
        ),
    )
    for p in problems[:6]:
        doc.para(f"- {p}", indent=2, hanging=2)
    if n > 6:
        doc.para(f"... and {n - 6} more", indent=2)
    return doc.blank()


def render_answer(a: Assessment, comparison: Comparison | None = None, *, narrow: bool = False, stale: bool = False) -> Doc:
    """The results: summary, ratios and ceiling, basic models, dose, warnings.

    ``narrow`` lays the basic-model table out as one line per test, for panels
    under about 60 columns; ``stale`` dims everything (the inputs are invalid).
    """
    sections = assessment_sections(a)
    doc = Doc()
    pr = a.prediction
    dim = STYLE["dim"] if stale else None

    def st(name: str) -> Style:
        return dim or STYLE[name]

    if comparison is not None:
        doc.para(("What-if: pinned result against now", st("heading")))
        doc.table(("", "pinned", "now", "change"), list(comparison.rows))
        if comparison.inputs:
            doc.para(("Inputs changed since pinning:", st("dim")))
            for c in comparison.inputs:
                doc.para((c, st("dim")), indent=2, hanging=2)
        else:
            doc.para(("No input changed since pinning.", st("dim")))
        doc.blank()

    # -- the answer first, in the report's words
    summary = _section(sections, "Summary")
    if summary is not None:
        for b in summary.blocks:
            if isinstance(b, Note):
                doc.para((b.text, st("result")))
    doc.para(
        ("AUC ratio ", st("result")),
        (fmt_ratio(pr.total), st("result")),
        f" ({pr.band.name})" if pr.band else "",
        f"  study {'INDICATED' if a.study_indicated else 'not indicated'} at cutoff {a.aucr_cutoff.value:g}",
    )
    ratios = _table(_section(sections, "Mechanistic static model"), "AUC ratio")
    if ratios is not None:
        doc.table(("AUC ratio", "predicted", "complete inhibition"), [tuple(r) for r in ratios.rows])
    doc.blank()

    # -- basic models (first five columns of the report's table)
    basic = _section(sections, "Basic static models")
    screen = _table(basic, "target")
    doc.para((basic.title if basic else "Basic static models", st("heading")))
    if screen is not None and screen.rows and narrow:
        for r in screen.rows:
            doc.para(f"{r[0]} {r[1]} = {r[2]} (cutoff {r[3]}): ", (r[4], dim or _verdict_style(r[4])), hanging=2)
    elif screen is not None and screen.rows:
        rows = [tuple(r[:5]) for r in screen.rows]
        doc.table(
            ("target", "test", "value", "cutoff", "verdict"),
            rows,
            {(i, 4): dim or _verdict_style(r[4]) for i, r in enumerate(rows)},
        )
    else:
        doc.para("No criterion of this rule set applies to the targets given.")
    doc.blank()

    # -- drug-drug-gene cases, when the victim states phenotypes
    genotype = next((sec for sec in sections if sec.title.startswith("Object drug genotype")), None)
    if genotype is not None:
        doc.para((genotype.title, st("heading")))
        for b in genotype.blocks:
            if isinstance(b, Table):
                doc.table(b.headers, [tuple(r) for r in b.rows])
            elif isinstance(b, Note):
                doc.para(("Caution: ", st("caution_head")), (b.text, st("caution")))
            else:
                doc.para(b, hanging=2)
        doc.blank()

    # -- dose
    dose = _section(sections, "Dose suggestion")
    doc.para((f"Dose of {a.scenario.victim.name}", st("heading")))
    if dose is not None:
        for b in dose.blocks:
            if isinstance(b, Note) and b.kind == "result":
                doc.para((b.text, st("result")))
            elif isinstance(b, str):
                doc.para(f"- {b}", hanging=2)
            elif isinstance(b, Table):
                doc.table(b.headers, [tuple(r) for r in b.rows])
    extra = f" {INCREASE_CAUTION}" if a.dose.action == "increase dose" else ""
    doc.para(("Caution: ", st("caution_head")), (DOSE_CAUTIONS[0] + extra + " (F2: all cautions)", st("caution")))
    doc.blank()

    if a.warnings:
        doc.para(("Warnings", st("heading")))
        for w in a.warnings:
            doc.para((f"- {resolve(w)}", st("warning")), hanging=2)
        doc.blank()
    if a.memory_values:
        doc.para((f"Values from memory or inferred ({len(a.memory_values)}): verify before relying on them", st("heading")))
        for m in a.memory_values:
            doc.para((f"- {resolve(m)}", st("dim")), hanging=2)
    return doc


def sections_doc(sections: list[Section]) -> Doc:
    """Report sections (any of the report module's) as a document for the terminal, citations resolved."""
    doc = Doc()
    for sec in cite(sections):
        if sec.title:
            doc.para((sec.title, STYLE["heading"]))
        for b in sec.blocks:
            if isinstance(b, Table):
                doc.table(b.headers, [tuple(r) for r in b.rows])
            elif isinstance(b, Note):
                doc.para((b.text, STYLE["result"] if b.kind == "result" else STYLE["caution"]))
            else:
                doc.para(str(b))
        doc.blank()
    return doc
