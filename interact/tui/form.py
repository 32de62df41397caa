"""The input form: what each field is, how its text becomes scenario data, and the widgets.

The form (drawn by :mod:`interact.tui.form_view`) edits a plain dictionary in the layout of the scenario file (the data
:func:`interact.scenario.scenario_from_dict` reads).  A field writes the user's
text into the dictionary (unit values stay text; plain numbers become floats);
the app rebuilds the scenario from the dictionary after every edit, so the
core does all validation and every message names the same key path as the file.
Keys the form does not show (time-dependent inhibition, turnover ...) are kept
untouched in the dictionary and saved with the rest.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache
from typing import Any, Final

from ..errors import InputError

__all__ = [
    "MISSING",
    "SCHEMA",
    "FieldSpec",
    "Heading",
    "ListSpec",
    "choices_for",
    "get_path",
    "key_of",
    "local_check",
    "set_path",
    "shows",
    "text_of",
    "value_of",
]


class _Missing:
    def __repr__(self) -> str:
        return "MISSING"


#: a field left empty: the key is removed, so the engine's default applies
MISSING: Final = _Missing()

Path = tuple[str | int, ...]


@dataclass(frozen=True, slots=True)
class FieldSpec:
    """One input: its key in the scenario table, label, kind of value and a hint."""

    key: str
    label: str
    kind: str
    hint: str = ""


@dataclass(frozen=True, slots=True)
class Heading:
    text: str


@dataclass(frozen=True, slots=True)
class ListSpec:
    """A list of tables (targets, pathways, metabolites) with its item layout."""

    key: str
    title: str
    noun: str
    items: tuple[Any, ...]


# kinds: units.KINDS names for quantities; "fraction", "fraction0" (zero allowed),
# "number", "text", "flag", "choice:<name>", "doses" (comma list), "pair" (two numbers)
_TARGET_ITEMS: Final = (
    FieldSpec("target", "Target", "choice:target", "enzyme or transporter, e.g. CYP3A"),
    FieldSpec("ki", "Ki", "concentration", "e.g. 0.35 uM (or give IC50)"),
    FieldSpec("ic50", "IC50", "concentration", "e.g. 1.2 uM (instead of Ki)"),
    FieldSpec("substrate_conc", "[S] in assay", "concentration", "for Cheng-Prusoff, e.g. 5 uM"),
    FieldSpec("km", "Km", "concentration", "for Cheng-Prusoff, e.g. 5 uM"),
    FieldSpec("mechanism", "Mechanism", "choice:mechanism", "competitive"),
    FieldSpec("alpha", "alpha (mixed)", "number", "mixed only: Kiu = alpha x Kic"),
    FieldSpec("fu_inc", "fu,inc", "fraction", "unbound in incubation, e.g. 0.6"),
)

TARGETS: Final = ListSpec("inhibits", "Inhibited targets", "target", _TARGET_ITEMS)

METABOLITES: Final = ListSpec(
    "metabolites",
    "Inhibitory metabolites",
    "metabolite",
    (
        FieldSpec("name", "Name", "text", "e.g. M1"),
        FieldSpec("molar_mass", "Molar mass", "molar_mass", "e.g. 468 g/mol"),
        FieldSpec("cmax", "Cmax (total)", "concentration", "steady state, e.g. 0.4 ug/mL"),
        FieldSpec("fu_plasma", "fu,p", "fraction", "unbound in plasma, e.g. 0.1"),
        FieldSpec("fu_plasma_measured", "fu,p measured", "flag", "yes if reliably measured"),
        TARGETS,
    ),
)

PATHWAYS: Final = ListSpec(
    "pathways",
    "Elimination pathways",
    "pathway",
    (
        FieldSpec("enzyme", "Enzyme", "choice:enzyme", "e.g. CYP3A"),
        FieldSpec("fm", "fm", "fraction0", "fraction of clearance, e.g. 0.8"),
        FieldSpec("transporter", "or Transporter", "choice:transporter", "instead of an enzyme, e.g. BCRP"),
        FieldSpec("route", "Route", "choice:victim_route", "intestinal efflux, hepatic uptake or renal secretion"),
        FieldSpec("fraction", "Fraction", "fraction0", "of the oral dose (efflux), clearance (uptake), renal clearance (secretion)"),
    ),
)

PHENOTYPES: Final = ListSpec(
    "phenotypes",
    "Genotype (phenotype per pathway)",
    "phenotype",
    (
        FieldSpec("enzyme", "Enzyme", "choice:polymorphic", "a polymorphic pathway, e.g. CYP2D6"),
        FieldSpec("phenotype", "Phenotype", "choice:phenotype", "poor, intermediate, normal, ... or all"),
        FieldSpec("activity", "Own activity", "number", "instead of a phenotype: relative activity, e.g. 0.3"),
    ),
)

_PERPETRATOR: Final = (
    FieldSpec("name", "Name", "text", "e.g. Compound A"),
    Heading("Exposure"),
    FieldSpec("dose", "Dose", "dose", "highest dose, e.g. 200 mg"),
    FieldSpec("route", "Route", "choice:route", "oral or intravenous"),
    FieldSpec("interval", "Interval", "time", "e.g. 24 h"),
    FieldSpec("cmax", "Cmax (total)", "concentration", "steady state, e.g. 812 ng/mL"),
    FieldSpec("cmax_dose", "Cmax measured at", "dose", "the dose that gave this Cmax, e.g. 200 mg"),
    FieldSpec("molar_mass", "Molar mass", "molar_mass", "e.g. 452.5 g/mol"),
    Heading("Binding"),
    FieldSpec("fu_plasma", "fu,p", "fraction", "unbound in plasma, e.g. 0.02"),
    FieldSpec("fu_plasma_measured", "fu,p measured", "flag", "yes if reliably measured"),
    FieldSpec("blood_plasma_ratio", "Rb (blood:plasma)", "number", "e.g. 0.8"),
    Heading("Absorption"),
    FieldSpec("fa_fg", "Fa x Fg", "fraction", "e.g. 1"),
    FieldSpec("fa", "Fa", "fraction", "fraction absorbed"),
    FieldSpec("ka", "ka", "rate", "e.g. 0.1 1/min"),
)

_VICTIM: Final = (
    FieldSpec("name", "Name", "text", "e.g. Drug B"),
    FieldSpec("dose", "Dose", "dose", "usual dose, e.g. 10 mg"),
    FieldSpec("interval", "Interval", "time", "e.g. 24 h"),
    FieldSpec("route", "Route", "choice:route", "oral or intravenous"),
    FieldSpec("fg", "Fg", "fraction", "intestinal availability, e.g. 0.5"),
    FieldSpec("renal_fraction", "Renal fraction", "fraction0", "of systemic clearance, e.g. 0.3"),
    FieldSpec("strengths", "Strengths", "doses", "e.g. 2.5 mg, 5 mg, 10 mg"),
    FieldSpec("scored_strengths", "Scored (halvable)", "doses", "strengths that may be halved, e.g. 10 mg"),
    FieldSpec("max_units", "Units per dose, max", "number", "tablets per administration (default 4)"),
    FieldSpec("half_life", "Half-life", "time", "judges interval changes, e.g. 12 h"),
    FieldSpec("no_effect_boundary", "No-effect range", "pair", "AUC ratios, e.g. 0.8, 1.25"),
    FieldSpec("peak_boundary", "Peak range", "pair", "peak ratios (default: no-effect range)"),
    FieldSpec("trough_boundary", "Trough range", "pair", "trough ratios (default: no-effect range)"),
    FieldSpec("narrow_therapeutic_index", "Narrow ther. index", "flag", "yes or no"),
    PATHWAYS,
    PHENOTYPES,
)

_SCENARIO: Final = (
    FieldSpec("title", "Title", "text", "a short description"),
    FieldSpec("rules", "Rule set", "choice:rules", "ich-m12-2024"),
)

_PHYSIOLOGY: Final = (
    FieldSpec("hepatic_blood_flow", "Qh (liver)", "flow", "e.g. 97 L/h"),
    FieldSpec("enterocytic_blood_flow", "Qent (gut wall)", "flow", "e.g. 18 L/h"),
    FieldSpec("gut_volume", "Gut volume", "volume", "for Igut, e.g. 250 mL"),
    FieldSpec("fu_gut", "fu,gut", "fraction", "unbound in enterocytes"),
    FieldSpec("fu_plasma_floor", "fu,p floor", "fraction", "replaces the rule set's lowest fu,p"),
)

#: the whole form: (group title, table key, items), in the order a pharmacologist fills it
SCHEMA: Final = (
    ("Precipitant (perpetrator)", "perpetrator", (*_PERPETRATOR, TARGETS, METABOLITES)),
    ("Object drug (victim)", "victim", _VICTIM),
    ("Scenario", "", _SCENARIO),
    ("Physiology (leave empty for the defaults)", "physiology", _PHYSIOLOGY),
)


def choices_for(kind: str) -> tuple[str, ...]:
    """The values a choice or yes/no field offers as suggestions (empty for other kinds)."""
    if kind == "flag":
        return ("yes", "no")
    if kind.startswith("choice:"):
        return _choices(kind.split(":", 1)[1])
    return ()


@lru_cache(maxsize=8)
def _choices(name: str) -> tuple[str, ...]:
    from ..scenario import MECHANISMS, ROUTES, VICTIM_ROUTES
    from ..tables import load_phenotypes, load_targets, rule_set_names  # not before the first screen

    if name == "mechanism":
        return MECHANISMS
    if name == "victim_route":
        return tuple(VICTIM_ROUTES)
    if name == "transporter":
        return tuple(t.name for t in load_targets() if t.victim_route is not None)
    if name == "route":
        return ROUTES
    if name == "rules":
        return rule_set_names()
    if name in ("polymorphic", "phenotype"):
        table = load_phenotypes()
        if name == "polymorphic":
            return tuple(table)
        return (*dict.fromkeys(p.name for rows in table.values() for p in rows), "all")
    kinds = ("enzyme",) if name == "enzyme" else ("enzyme", "transporter")
    return tuple(t.name for t in load_targets() if t.kind in kinds)


# --------------------------------------------------------------------------- paths and values


def key_of(path: Path) -> str:
    """The dotted key path the core uses in messages: ``perpetrator.inhibits[0].ki``."""
    out = ""
    for part in path:
        if isinstance(part, int):
            out += f"[{part}]"
        else:
            out = f"{out}.{part}" if out else part
    return out


def get_path(data: Any, path: Path, default: Any = MISSING) -> Any:
    node = data
    for part in path:
        try:
            node = node[part]
        except (KeyError, IndexError, TypeError):
            return default
    return node


def set_path(data: dict[str, Any], path: Path, value: Any) -> None:
    """Set (or, for MISSING, remove) the value at ``path``, creating tables on the way."""
    node: Any = data
    for n, part in enumerate(path[:-1]):
        if isinstance(part, int):
            node = node[part]
        else:
            wanted = list if isinstance(path[n + 1], int) else dict
            if not isinstance(node.get(part), wanted):
                if value is MISSING:
                    return
                node[part] = wanted()
            node = node[part]
    last = path[-1]
    if value is MISSING:
        if isinstance(node, dict):
            node.pop(last, None)
    else:
        node[last] = value


def _num_text(value: float) -> str:
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int) or (isinstance(value, float) and value.is_integer() and abs(value) < 1e15):
        return str(int(value))
    return repr(value)


def text_of(kind: str, value: Any) -> str:
    """What the field shows for a value found in the data."""
    if value is MISSING or value is None:
        return ""
    if kind == "flag" and isinstance(value, bool):
        return "yes" if value else "no"
    if kind in ("doses", "pair") and isinstance(value, list):
        return ", ".join(_num_text(v) if isinstance(v, (int, float)) else str(v) for v in value)
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return _num_text(value)
    return str(value)


_PAIR = re.compile(r"^\s*([0-9.eE+]+)\s*(?:,|;|\bto\b|-|–)\s*([0-9.eE+]+)\s*$")
_FLAGS: Final = {"yes": True, "y": True, "true": True, "no": False, "n": False, "false": False}


def value_of(kind: str, text: str) -> Any:
    """The data value for the user's text; MISSING when empty.

    Text that cannot be converted is stored as typed, so the core's validation
    reports it with the field's key path and nothing the user typed is lost.
    """
    t = text.strip()
    if not t:
        return MISSING
    if kind in ("fraction", "fraction0", "number"):
        try:
            v = float(t)
        except ValueError:
            return t
        return v if math.isfinite(v) else t
    if kind == "flag":
        return _FLAGS.get(t.lower(), t)
    if kind == "doses":
        return [p.strip() for p in t.split(",") if p.strip()]
    if kind == "pair":
        m = _PAIR.match(t)
        if m:
            try:
                return [float(m.group(1)), float(m.group(2))]
            except ValueError:
                return t
        return t
    return text if kind == "text" else t


def shows(kind: str, text: str, value: Any) -> bool:
    """Whether a field of this kind holding ``text`` holds ``value`` (the data the engine evaluates).

    Both sides are brought to the text the field would show for them, so "0.70"
    holds 0.7, "300" holds a file's ``300`` and "y" holds ``true``; this is the
    form's one test of "the field shows what was computed".
    """
    return text_of(kind, value_of(kind, text)) == text_of(kind, value)


@lru_cache(maxsize=4096)
def local_check(kind: str, text: str, key: str) -> tuple[str | None, Any]:
    """Check one field on its own: (error message or None, parsed quantity or value).

    Cached: every keystroke notes all fields again, and parsing their unchanged
    texts with pint was half of that. The values are shared; callers only read them.
    """
    from .. import units

    t = text.strip()
    if not t:
        return None, None
    try:
        if kind in units.KINDS:
            return None, units.parse(t, kind, field=key)
        if kind in ("fraction", "fraction0"):
            return None, units.parse_fraction(t, field=key, allow_zero=kind == "fraction0")
        if kind == "doses":
            return None, [units.parse(p, "dose", field=f"{key}[{i}]") for i, p in enumerate(value_of(kind, t))]
        if kind == "flag" and t.lower() not in _FLAGS:
            return f'"{t}" is not yes or no', None
        if kind == "pair" and not isinstance(value_of(kind, t), list):
            return f'"{t}" is not two AUC ratios such as "0.8, 1.25"', None
        if kind.startswith("choice:"):
            options = _choices(kind.split(":", 1)[1])
            if kind in ("choice:target", "choice:enzyme", "choice:transporter"):
                return None, t  # aliases are resolved by the core
            if t not in options:
                return f'"{t}" is not one of {", ".join(options)}', None
    except InputError as exc:
        shown = f'"{exc.value}"' if isinstance(exc.value, str) else repr(exc.value)
        return f"{shown} {exc.expected}", None
    return None, t
