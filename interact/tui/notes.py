"""The line under each field: what the value was understood as, what the engine made of it,
or which default (with its source) stands in for an empty field.

Unit conversions use :mod:`interact.units` (the one registry); values the
engine derived (unbound Ki, concentrations, defaults) are read from the
:class:`~interact.assessment.Assessment`, never recomputed here.
"""

from __future__ import annotations

from typing import Any, Final

import pint

from .. import units
from ..assessment import Assessment
from ..errors import InteractError
from ..exposure import Setting
from ..report.assessment import setting_origin
from ..report.numbers import fmt
from ..sources import resolve
from ..tables import resolve_target
from .form import FieldSpec, Path, get_path, local_check

__all__ = ["field_note"]

#: form key -> name of the engine setting that holds its value or default
_SETTINGS: Final = {
    "perpetrator.blood_plasma_ratio": "blood_plasma_ratio",
    "perpetrator.fa_fg": "fa_fg",
    "perpetrator.fa": "fraction_absorbed",
    "perpetrator.ka": "absorption_rate",
    "physiology.hepatic_blood_flow": "hepatic_blood_flow",
    "physiology.enterocytic_blood_flow": "enterocytic_blood_flow",
    "physiology.gut_volume": "gut_volume",
    "physiology.fu_gut": "fu_gut",
}


def _molar_mass(data: dict[str, Any], path: Path) -> pint.Quantity | None:
    where: Path = path[:3] if len(path) > 2 and path[1] == "metabolites" else ("perpetrator",)
    text = get_path(data, (*where, "molar_mass"), None)
    if not isinstance(text, str):
        return None
    try:
        return units.parse(text, "molar_mass", field="molar_mass")
    except InteractError:
        return None


def _understood(spec: FieldSpec, path: Path, value: Any, data: dict[str, Any]) -> str:
    kind = spec.kind
    if value is None:
        return ""
    if isinstance(value, list):
        return f"{len(value)} strength{'s' if len(value) != 1 else ''}: " + ", ".join(units.format_quantity(q) for q in value)
    if kind in ("fraction", "fraction0"):
        return f"{value:g} (= {value * 100:g} %)"
    if not isinstance(value, units.Quantity):
        return ""
    q = value
    if kind == "molar_mass":
        return ""
    shown = units.format_quantity(q)
    try:
        if kind == "concentration":
            mm = _molar_mass(data, path)
            if q.dimensionality == units.ureg.get_dimensionality("[substance]/[length]**3"):
                um = units.magnitude(q, "uM")
                return shown if units.unit_text(q) in ("uM", "µM") else f"{shown} = {fmt(um)} uM"
            if mm is None:
                return f"{shown}: a mass concentration; give the molar mass to convert it to uM"
            return f"{shown} = {fmt(units.concentration_um(q, mm, field=spec.key))} uM (molar mass {units.format_quantity(mm)})"
        if kind == "dose" and path[0] == "perpetrator":
            mm = _molar_mass(data, path)
            if q.dimensionality == units.ureg.get_dimensionality("[substance]"):
                return f"{shown} = {fmt(units.magnitude(q, 'umol'))} umol"
            if mm is not None:
                return f"{shown} = {fmt(units.amount_umol(q, mm, field=spec.key))} umol"
            return shown
        canonical = {"rate": ("1/min", "1/h"), "flow": ("L/min", "L/h"), "time": ("h",), "volume": ("mL",)}.get(kind)
        if canonical:
            own = units.unit_text(q)
            also = [f"{fmt(units.magnitude(q, u))} {u}" for u in canonical if u != own]
            return " = ".join([shown, *also]) if also else ""
    except InteractError:
        return shown
    return shown


def _setting(a: Assessment, name: str) -> Setting | None:
    return next((s for s in a.settings if s.name == name), None)


def _default_text(s: Setting) -> str:
    value = f"{s.value:.4g} {s.unit}".strip()
    return f"empty: {value} used, {setting_origin(s)}"


def _species_index(path: Path) -> int:
    return int(path[2]) + 1 if len(path) > 2 and path[1] == "metabolites" else 0


def _constant(a: Assessment, data: dict[str, Any], path: Path):  # type: ignore[no-untyped-def]
    """The engine's constant for the inhibition entry that ``path`` points into."""
    entry = get_path(data, path[:-1], None)
    if not isinstance(entry, dict) or not isinstance(entry.get("target"), str):
        return None
    target = resolve_target(entry["target"])
    if target is None:
        return None
    index = _species_index(path)
    return next((c for c in a.constants if c.species_index == index and c.target == target.name), None)


def _engine(spec: FieldSpec, key: str, path: Path, empty: bool, data: dict[str, Any], a: Assessment) -> str:
    """What the engine made of this field (or used instead of it)."""
    if key in _SETTINGS:
        s = _setting(a, _SETTINGS[key])
        if s is None:
            return ""
        return _default_text(s) if empty else (s.note or "given")
    leaf = path[-1]
    if "inhibits" in path:
        c = _constant(a, data, path)
        if c is None:
            return ""
        if leaf in ("ki", "ic50") and not empty and c.ki_u_um is not None:
            unbound = f"Ki,u = Ki x fu,inc = {fmt(c.ki_um)} x {c.fu_inc:g} = {fmt(c.ki_u_um)} uM"
            return unbound if leaf == "ki" else f"{c.ki_route}; {unbound}"
        if leaf == "fu_inc":
            return f"empty: {c.fu_inc:g} used, Ki taken as unbound" if empty else ""
        entry = get_path(data, path[:-1], {})
        if leaf in ("substrate_conc", "km") and not empty and isinstance(entry, dict) and "ic50" not in entry:
            return "not used: Cheng-Prusoff converts an IC50, and this entry gives none"
        if leaf == "target":
            t = resolve_target(c.target)
            return f"{c.target}: {t.kind if t else ''}, {c.group}" + (", also in the gut wall" if c.gut_wall else "")
        return ""
    if key == "perpetrator.cmax" or (len(path) == 4 and path[1] == "metabolites" and leaf == "cmax"):
        sp = a.species[_species_index(path)] if _species_index(path) < len(a.species) else None
        if sp is None:
            return ""
        text = f"Imax,u = fu,p x Cmax = {sp.fu_plasma_used:g} x {fmt(sp.cmax_um)} = {fmt(sp.unbound_cmax_um)} uM"
        if sp.is_parent and sp.unbound_inlet_um != sp.unbound_cmax_um:
            text += f"; Iin,max,u = {fmt(sp.unbound_inlet_um)} uM"
        return text
    if key == "perpetrator.dose" and a.species and a.species[0].gut_lumen_um:
        return f"Igut = dose / 250 mL = {fmt(a.species[0].gut_lumen_um)} uM; I,ent = {fmt(a.species[0].enterocyte_um)} uM"
    if leaf == "fu_plasma":
        fus = [s for s in a.settings if s.name == "fu_plasma"]
        i = _species_index(path)
        if i < len(fus) and (fus[i].origin != "given" or fus[i].note):
            return f"used {fus[i].value:g}: {fus[i].note}"
        return ""
    if key == "victim.fg":
        if empty:
            return "empty: Fg = 1 assumed, so no gut-wall interaction is predicted"
        return f"gut AUC ratio {fmt(a.prediction.gut)} (complete inhibition: 1/Fg = {fmt(a.prediction.ceiling_gut)})"
    if len(path) == 4 and path[1] == "pathways" and leaf == "fm":
        enzyme = get_path(data, (*path[:-1], "enzyme"), "")
        t = resolve_target(enzyme) if isinstance(enzyme, str) else None
        e = next((e for e in a.prediction.effects if t is not None and e.enzyme == t.name), None)
        rest = max(0.0, 1.0 - sum(pw.fm for pw in a.scenario.victim.pathways))
        left = f"; {fmt(e.liver.activity)} of its activity left in the liver" if e is not None else ""
        return f"other routes (unaffected) take {rest:.3g}{left}"
    if key == "victim.no_effect_boundary" and empty:
        lo, hi = a.dose.boundary
        return f"empty: {lo:g} to {hi:g} used ({a.dose.boundary_origin})"
    if key == "rules":
        return f"{a.rules.title} (table {a.rules.table_version})" + (" (default)" if empty else "")
    return ""


def field_note(spec: FieldSpec, path: Path, key: str, text: str, data: dict[str, Any], a: Assessment | None) -> tuple[str, bool]:
    """(text, is_error) for the line under a field.

    ``a`` is the assessment of the current inputs, or None when they are
    invalid (then only the field's own reading is shown).
    """
    error, value = local_check(spec.kind, text, key)
    if error:
        return error, True
    parts = [p for p in (_understood(spec, path, value, data),) if p]
    if a is not None:
        extra = _engine(spec, key, path, not text.strip(), data, a)
        if extra:
            parts.append(extra)
    return resolve("; ".join(parts)), False
