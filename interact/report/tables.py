"""Formatting the reference tables with their sources and status."""

from __future__ import annotations

from pathlib import Path

from ..tables import STATUS_MEANINGS, load_binding, load_classes, load_physiology, load_rules, load_targets, rule_set_names
from .document import Section, Table, cite, render_markdown, render_text

__all__ = ["format_tables"]


def _status(status: str) -> str:
    return "FROM MEMORY" if status == "from memory" else status


def format_tables(rules: str | None = None, fmt_name: str = "text") -> str:
    """Every rule set (or only ``rules``), physiology, classes and targets, with sources."""
    names = [rules] if rules else list(rule_set_names())
    sections = [_rule_set_section(name) for name in names]
    phys = tuple((p.name, str(p.value), _status(p.status), p.source) for p in load_physiology())
    sections.append(Section(title="Physiological defaults", blocks=(Table(headers=("item", "value", "status", "source"), rows=phys),)))
    sections.append(_classes_section())
    sections.append(_targets_section())
    sections.append(_binding_section())
    sections.append(Section(title="Status words", blocks=tuple(f"- {k}: {v}" for k, v in STATUS_MEANINGS.items())))
    sections = cite(sections, every_source=True)
    if fmt_name == "markdown":
        return render_markdown(sections, title="interact reference tables")
    return render_text(sections, width=110)


def _rule_set_section(name: str) -> Section:
    """One rule set: floors, cutoffs, criteria with their multipliers, words for the two drugs, physiology it sets."""
    rs = load_rules(name)
    rows = [
        ("fu,p floor", f"{rs.fu_plasma_floor.value:g}", _status(rs.fu_plasma_floor.status), rs.fu_plasma_floor.source),
        (
            "measured fu,p below floor allowed",
            str(rs.fu_plasma_floor_measured_exempt.value).lower(),
            _status(rs.fu_plasma_floor_measured_exempt.status),
            rs.fu_plasma_floor_measured_exempt.source,
        ),
        (
            "MSM inhibition cutoff (AUCR >=)",
            f"{rs.aucr_inhibition_cutoff.value:g}",
            _status(rs.aucr_inhibition_cutoff.status),
            rs.aucr_inhibition_cutoff.source,
        ),
        (
            "MSM induction cutoff (AUCR <=)",
            f"{rs.aucr_induction_cutoff.value:g}",
            _status(rs.aucr_induction_cutoff.status),
            rs.aucr_induction_cutoff.source,
        ),
    ]
    for c in rs.criteria:
        scope = ", ".join(c.groups) + (" (gut-wall enzyme)" if c.gut_wall_only else "") + (" (oral)" if c.oral_only else "")
        rows.append((f"{c.label} [{scope}]", f"{c.comparison} {c.cutoff.value:g}", _status(c.cutoff.status), c.cutoff.source))
        if c.multiplier is not None:
            rows.append(
                (
                    f"{c.label} concentration multiplier",
                    f"x {c.multiplier.value:g}",
                    _status(c.multiplier.status),
                    c.multiplier.source,
                )
            )
    if rs.terms.source:
        rows.append(("words for the two drugs", f"{rs.terms.precipitant}, {rs.terms.object}", _status(rs.terms.status), rs.terms.source))
    for item in rs.physiology:
        rows.append((item.name, str(item.value), _status(item.status), item.source))
    return Section(
        title=f"Rule set {rs.id}: {rs.title}",
        blocks=(
            Table(headers=("item", "value", "status", "source"), rows=tuple(rows)),
            f"Guidance: {rs.source or 'not named'}. File: {Path(rs.path).name}",
        ),
    )


def _classes_section() -> Section:
    cl = load_classes()
    rows = [(f"inhibition: {b.name}", f">= {b.bound:g}", _status(b.status), b.source) for b in cl.inhibition]
    rows += [(f"induction: {b.name}", f"<= {b.bound:g}", _status(b.status), b.source) for b in cl.induction]
    rows.append(
        (
            "victim study when fm >=",
            f"{cl.victim_study_fm.value:g}",
            _status(cl.victim_study_fm.status),
            cl.victim_study_fm.source,
        )
    )
    rows.append(
        (
            "default no-effect boundary",
            f"{cl.no_effect_lower:g}-{cl.no_effect_upper:g}",
            _status(cl.no_effect_source.status),
            cl.no_effect_source.source,
        )
    )
    return Section(title="Classes by AUC ratio", blocks=(Table(headers=("item", "value", "status", "source"), rows=tuple(rows)),))


def _targets_section() -> Section:
    trows = []
    for t in load_targets():
        for site, kd in (("liver", t.kdeg_liver), ("gut", t.kdeg_gut)):
            if kd is not None:
                trows.append((t.name, t.group, site, str(kd.value), _status(kd.status), kd.source + (f" {kd.note}" if kd.note else "")))
        if t.kdeg_liver is None and t.kdeg_gut is None:
            trows.append((t.name, t.group, "-", "-", "-", "-"))
    return Section(
        title="Targets and enzyme turnover (kdeg)",
        blocks=(Table(headers=("name", "group", "site", "kdeg", "status", "source"), rows=tuple(trows)),),
    )


def _binding_section() -> Section:
    brows = []
    for eq in load_binding():
        brows.append((eq.title, "equation", eq.equation, _status(eq.status), eq.source + (f" {eq.note}" if eq.note else "")))
        for v in eq.values:
            brows.append((eq.title, v.name, str(v.value), _status(v.status), v.source + (f" {v.note}" if v.note else "")))
    return Section(
        title="Nonspecific-binding equations (fu,inc)",
        blocks=(Table(headers=("equation", "item", "value", "status", "source"), rows=tuple(brows)),),
    )
