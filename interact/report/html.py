"""Reports to hand on: one self-contained HTML page (or Markdown file) per scenario.

The body reuses the assessment's document sections
(:func:`interact.report.assessment.assessment_sections`) and adds the rule
set, the equations, the AUC ratio with its uncertainty, the sensitivity
charts (inline SVG) and the provenance (tool and table versions, SHA-256 of
the scenario file, time).  Every user-supplied string is escaped; the page
loads nothing from anywhere (a Content-Security-Policy forbids it) and has
print styles.
"""

from __future__ import annotations

import base64
import hashlib
import html
import platform
import re
from collections.abc import Sequence
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

from .. import __version__
from ..assessment import Assessment
from ..cautions import CAUTION_LINE
from ..kinetics.conversion import CHENG_PRUSOFF_SOURCE
from ..uncertainty import Sensitivity, UncertaintyResult
from .assessment import assessment_sections, user_text
from .document import (
    Note,
    Section,
    Table,
    cite,
    keep_together,
    list_groups,
    md_escape,
    render_markdown,
    speak_sections,
    without_empty_columns,
)
from .figures import fm_curves_figure, histogram_figure, inline_svg, tornado_figure
from .uncertainty import sensitivity_sections, uncertainty_sections

__all__ = ["Figure", "ReportPart", "render_report_html", "render_report_markdown", "report_parts"]


@dataclass(frozen=True, slots=True, kw_only=True)
class Figure:
    svg: str
    caption: str


@dataclass(frozen=True, slots=True, kw_only=True)
class ReportPart:
    section: Section
    figures: tuple[Figure, ...] = ()


def _equations(a: Assessment) -> Section:
    rows = [
        ("Imax,u", "fu,p x Cmax (fu,p raised to the rule set's floor unless measured and allowed)", "[@dmd2019inlet]"),
        ("Igut", "Dose / 250 mL (oral perpetrator)", "[@dmd2019inlet]"),
        ("Iin,max,u", "fu,p x (Cmax + Fa x Fg x ka x Dose / (Qh x Rb))", "[@dmd2019inlet] (Tables 7, 8); [@jpetverinurad] (Table 7)"),
        ("I,ent", "fu,gut x Fa x ka x Dose / Qent", "from memory"),
        (
            "Ki,u",
            "Ki x fu,inc; from IC50 by Cheng-Prusoff: competitive Ki = IC50 / (1 + [S]/Km), "
            "uncompetitive Ki = IC50 / (1 + Km/[S]), noncompetitive Ki = IC50",
            CHENG_PRUSOFF_SOURCE,
        ),
    ]
    seen: set[str] = set()
    for r in a.screen:
        if r.criterion not in seen:
            seen.add(r.criterion)
            rows.append((r.label, r.equation, f"rule set {a.rules.id}: {r.cutoff.source}"))
    rows += [
        ("reversible term", "1 / (1 + sum [I] / Ki,u)", "[@fahmi2008] (net-effect model; structure seen in [@guengerich2022])"),
        ("inactivation term", "kdeg / (kdeg + sum kinact [I] / (KI,u + [I]))", "[@fahmi2008]"),
        ("induction term", "1 + d x sum Emax [I] / (EC50,u + [I])", "[@fahmi2008]; d as in [@lee2024]"),
        ("AUCR liver", "1 / (sum fm x activity + (1 - sum fm)), [I] = Iin,max,u", "[@fahmi2008]"),
        ("AUCR gut", "1 / (activity x (1 - Fg) + Fg), [I] = I,ent, gut-wall enzyme only", "[@fahmi2008]"),
        ("AUCR", "AUCR gut x AUCR liver", "[@fahmi2008]"),
        (
            "exposure ratio of a regimen",
            "AUCR x dose / usual dose x usual interval / interval; offered only inside the no-effect boundary",
            "linear pharmacokinetics (common practice)",
        ),
        (
            "peak and trough of a changed interval",
            "Cmax = F D / V / (1 - exp(-k tau)), Cmin = Cmax exp(-k tau); F x gut AUCR, k / (AUCR / gut AUCR)",
            "one-compartment accumulation (common practice)",
        ),
        (
            "exposure vs normal metaboliser",
            "1 / (sum fm x a x activity + 1 - sum fm), a = phenotype activity",
            "phenotype-activity static model (common practice)",
        ),
        ("log-normal from CV", "sigma = sqrt(ln(1 + CV^2)), median = the scenario's value", "standard log-normal moments"),
        (
            "log-normal from a 95% interval",
            "median = sqrt(lower x upper), sigma = ln(upper / lower) / (2 x 1.96)",
            "normal quantiles",
        ),
    ]
    return Section(
        title="Equations used",
        blocks=(
            Table(headers=("quantity", "equation", "source"), rows=tuple(rows)),
            "Sources are cited by author and year; the references at the end of this report give them in full.",
        ),
    )


def _rule_set(a: Assessment) -> Section:
    r = a.rules
    rows = (
        ("identifier", r.id, ""),
        ("title", r.title, ""),
        ("version", r.version, ""),
        ("table version", r.table_version, ""),
        ("guidance", r.source or "-", ""),
        ("fu,p floor", f"{r.fu_plasma_floor.value:g}", f"{r.fu_plasma_floor.source} ({r.fu_plasma_floor.status})"),
        (
            "mechanistic-model inhibition cutoff (AUCR >=)",
            f"{r.aucr_inhibition_cutoff.value:g}",
            f"{r.aucr_inhibition_cutoff.source} ({r.aucr_inhibition_cutoff.status})",
        ),
        (
            "mechanistic-model induction cutoff (AUCR <=)",
            f"{r.aucr_induction_cutoff.value:g}",
            f"{r.aucr_induction_cutoff.source} ({r.aucr_induction_cutoff.status})",
        ),
    )
    return Section(title="Rule set", blocks=(Table(headers=("item", "value", "source and status"), rows=rows),))


def report_parts(
    a: Assessment,
    *,
    spread: UncertaintyResult | None,
    sens: Sensitivity,
    scenario_bytes: bytes,
    source_name: str,
    generated_at: datetime,
) -> list[ReportPart]:
    """The report as sections with their figures, in reading order."""
    base = assessment_sections(a, references=False)
    if base and not base[0].title:  # the page header shows the title and the invented notice once
        head = tuple(b for b in base[0].blocks if not (isinstance(b, str) and (b.startswith("Scenario: ") or "INVENTED" in b)))
        base[0] = Section(title="", blocks=head)
    titles = [s.title for s in base]
    cut = titles.index("Dose suggestion") if "Dose suggestion" in titles else len(base)
    parts = [ReportPart(section=s) for s in base[:cut]]
    # the rule set and the equations right after the inputs
    at = next((k + 1 for k, p in enumerate(parts) if p.section.title == "Inputs"), len(parts))
    parts[at:at] = [ReportPart(section=_rule_set(a)), ReportPart(section=_equations(a))]
    boundary = a.dose.boundary
    if spread is not None:
        u = uncertainty_sections(spread, a.scenario)[0]
        thresholds = sorted({b for _, b, _ in spread.exceedance})
        fig = Figure(
            svg=inline_svg(histogram_figure(spread, thresholds)),
            caption=f"Distribution of {spread.samples:,} sampled AUC ratios.",
        )
        parts.append(ReportPart(section=u, figures=(fig,)))
    else:
        parts.append(
            ReportPart(
                section=Section(
                    title="Uncertainty of the AUC ratio",
                    blocks=(
                        "No input distributions were declared, so no spread is shown: the AUC ratio above is a point estimate. "
                        "Declare them with --vary PATH=SPEC or --spec FILE.toml (interact report --help lists both).",
                    ),
                )
            )
        )
    s = sensitivity_sections(sens, a.scenario)[0]
    figs = [
        Figure(
            svg=inline_svg(tornado_figure(sens, boundary)),
            caption="Each input swung on its own; bars run from the AUC ratio at the input's low end to its high end.",
        )
    ]
    figs.append(
        Figure(
            svg=inline_svg(fm_curves_figure(sens, boundary[1])),
            caption="Liver AUC ratio against fm for several [I]/Ki,u (reversible inhibition), and this scenario's "
            "total AUC ratio as the main pathway's fm varies.",
        )
    )
    parts.append(ReportPart(section=s, figures=tuple(figs)))
    for sec in base[cut:]:
        if sec.title == "Provenance":
            continue
        parts.append(ReportPart(section=sec))
    pv = a.provenance
    digest = hashlib.sha256(scenario_bytes).hexdigest()
    rows = [
        ("tool", f"interact {__version__} (Python {platform.python_version()})"),
        ("scenario file", source_name),
        ("scenario file SHA-256", digest),
        ("generated", generated_at.isoformat(timespec="seconds")),
        ("rule set", f"{pv.rules_id} version {pv.rules_version}, table {pv.rules_table_version} (file {Path(pv.rules_path).name})"),
        *((f"{k} table", ver) for k, ver in pv.table_versions),
    ]
    if spread is not None:
        rows.append(
            (
                "sampling",
                f"{spread.samples:,} samples, {'Latin hypercube' if spread.method == 'lhs' else 'Monte Carlo'}, seed {spread.seed}",
            )
        )
    parts.append(ReportPart(section=Section(title="Provenance", blocks=(Table(headers=("item", "value"), rows=tuple(rows)),))))
    # in the rule set's words; citations resolved once over the whole report, which then ends with exactly the
    # sources it cites
    resolved = cite(speak_sections([p.section for p in parts], a.rules.terms, user_text(a)))
    out = [ReportPart(section=sec, figures=p.figures) for sec, p in zip(resolved, parts, strict=False)]
    return out + [ReportPart(section=sec) for sec in resolved[len(parts) :]]


_CSS = """
:root { --ink: #1d1d1d; --muted: #5a5a5a; --rule: #c9c9c9; --caution: #fff4e0; --result: #e8f1fb; }
* { box-sizing: border-box; }
body { font: 14px/1.45 Helvetica, Arial, sans-serif; color: var(--ink); max-width: 60rem; margin: 2rem auto; padding: 0 1rem; }
h1 { font-size: 1.5rem; margin-bottom: 0.3rem; }
h2 { font-size: 1.15rem; border-bottom: 1px solid var(--rule); padding-bottom: 0.2rem; margin-top: 2rem; }
.flag { display: inline-block; padding: 0.2rem 0.6rem; border: 1px solid var(--ink); font-weight: bold; }
table { border-collapse: collapse; margin: 0.6rem 0 1rem; width: 100%; font-size: 12.5px; }
.wide { overflow-x: auto; }
th, td { border: 1px solid var(--rule); padding: 0.25rem 0.4rem; text-align: left; vertical-align: top;
         overflow-wrap: break-word; hyphens: none; }
td.num { white-space: nowrap; }
ul { margin: 0.4rem 0 1rem; padding-left: 1.4rem; }
li { margin: 0.15rem 0; }
th { background: #f2f2f2; }
.note { padding: 0.5rem 0.7rem; border-left: 4px solid #b36b00; background: var(--caution); }
.note.result { border-left-color: #0b5394; background: var(--result); }
figure { margin: 1rem 0; }
figure svg { max-width: 100%; height: auto; border: 1px solid var(--rule); }
figcaption { color: var(--muted); font-size: 12px; }
footer { margin-top: 2.5rem; color: var(--muted); font-size: 12px; border-top: 1px solid var(--rule); padding-top: 0.5rem; }
@media print {
  body { margin: 0; max-width: none; font-size: 10pt; }
  h2 { break-after: avoid; }
  table, figure, .note { break-inside: avoid; }
  th { background: none; }
  .note, .note.result { background: none; }
  a { color: inherit; text-decoration: none; }
  @page { margin: 15mm; }
}
"""


_SHORT_VALUE = re.compile(r"^[-+<>=~ ]*[\d.,]+(?:e[-+]?\d+)?(?:\u00a0\S+)?$")


def _cell(text: str) -> str:
    """A table cell: numbers kept with their units; a cell that is one short value never wraps."""
    shown = keep_together(text)
    cls = ' class="num"' if _SHORT_VALUE.match(shown) else ""
    return f"<td{cls}>{html.escape(shown)}</td>"


def _block_html(block: str | Table | Note | list[str]) -> str:
    e = html.escape
    if isinstance(block, list):
        return "<ul>" + "".join(f"<li>{e(keep_together(item))}</li>" for item in block) + "</ul>"
    if isinstance(block, Table):
        block = without_empty_columns(block)
        head = "".join(f"<th>{e(h)}</th>" for h in block.headers)
        body = "".join("<tr>" + "".join(_cell(c) for c in row) + "</tr>" for row in block.rows)
        # a table wider than the page scrolls inside its own box instead of squeezing words apart
        return f'<div class="wide"><table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table></div>'
    if isinstance(block, Note):
        return f'<p class="note {e(block.kind)}">{e(keep_together(block.text))}</p>'
    return f"<p>{e(keep_together(block))}</p>"


def render_report_html(a: Assessment, parts: Sequence[ReportPart]) -> str:
    """A complete, self-contained HTML document; every string from the user is escaped."""
    e = html.escape
    s = a.scenario
    flag = (
        "INVENTED scenario: its compounds and values describe no real drug."
        if s.invented
        else "Not marked as invented: the values are presented as real data; check each against its source."
    )
    out = [
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src 'unsafe-inline'; img-src data:\">",
        f"<title>{e(f'interact report: {s.title}')}</title>",
        f"<style>{_CSS}</style>",
        "</head>",
        "<body>",
        f"<header><h1>{e(s.title)}</h1>",
        f'<p class="flag {"invented" if s.invented else "real"}">{e(flag)}</p></header>',
        "<main>",
    ]
    for part in parts:
        sec = part.section
        out.append("<section>")
        if sec.title:
            out.append(f"<h2>{e(sec.title)}</h2>")
        out.extend(_block_html(b) for b in list_groups(sec.blocks))
        for fig in part.figures:
            out.append(f"<figure>{fig.svg}<figcaption>{e(fig.caption)}</figcaption></figure>")
        out.append("</section>")
    out += ["</main>", f"<footer>{e(CAUTION_LINE)} Produced by interact {e(__version__)}.</footer>", "</body>", "</html>", ""]
    return "\n".join(out)


def render_report_markdown(a: Assessment, parts: Sequence[ReportPart]) -> str:
    """The report as Markdown: tables as pipe tables, charts as embedded SVG data URIs."""
    s = a.scenario
    flag = (
        "**INVENTED scenario**: its compounds and values describe no real drug."
        if s.invented
        else "**Not marked as invented**: the values are presented as real data; check each against its source."
    )
    out = [render_markdown([], title=f"interact report: {s.title}").rstrip("\n"), "", flag, ""]
    for part in parts:
        out.append(render_markdown([part.section]).rstrip("\n"))
        out.append("")
        for fig in part.figures:
            data = base64.b64encode(fig.svg.encode("utf-8")).decode("ascii")
            out.append(f"![{md_escape(fig.caption)}](data:image/svg+xml;base64,{data})")
            out.append("")
    return "\n".join(out).rstrip("\n") + "\n"
