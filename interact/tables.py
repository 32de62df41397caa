"""Reference tables: rule sets, physiology, classes and targets, with sources.

The TOML files live in ``reference_tables/`` (at the top of a source checkout,
and inside the package when installed from a wheel).  Each value arrives here
as a :class:`Sourced`: the value together with its source and status, so
that every output can say where a number came from and whether it was seen
in a source or recalled from memory.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, replace
from functools import lru_cache
from pathlib import Path
from typing import Any, Final

from .errors import InputError

__all__ = [
    "STATUSES",
    "STATUS_MEANINGS",
    "UNVERIFIED",
    "Band",
    "BindingEquation",
    "Classes",
    "Criterion",
    "Phenotype",
    "RuleSet",
    "Sourced",
    "Target",
    "Terms",
    "load_binding",
    "load_classes",
    "load_phenotypes",
    "load_physiology",
    "load_rules",
    "load_targets",
    "resolve_target",
    "rule_set_names",
    "tables_dir",
    "with_multipliers",
]

DEFAULT_RULES: Final = "ich-m12-2024"
STATUS_MEANINGS: Final = {
    "seen in source": "printed in a cited primary text (a guidance, a paper, a journal table or an abstract)",
    "seen in a secondary source": "printed only in a summary or quotation of the primary text (a review quoting a guidance, "
    "a blog, a forum post, package documentation)",
    "inferred": "carried over from an older guidance or an earlier text, not seen for the one named",
    "from memory": "recalled, not verified against any readable text: verify before relying on it",
    "common practice": "a convention of the trade rather than a published number",
}
STATUSES: Final = tuple(STATUS_MEANINGS)
UNVERIFIED: Final = ("from memory", "inferred")
FORMS: Final = ("one-plus-sum", "sum", "tdi", "induction", "fold-change")
CONCENTRATIONS: Final = ("unbound-cmax", "total-cmax", "gut-lumen", "unbound-inlet")
MECHANISMS: Final = ("reversible", "time-dependent", "induction")


@dataclass(frozen=True, slots=True, kw_only=True)
class Sourced:
    """A reference value with its provenance.

    ``value`` is a float, bool or a unit string such as ``"97 L/h"``.
    """

    name: str
    value: Any
    source: str
    status: str
    note: str = ""

    @property
    def from_memory(self) -> bool:
        return self.status == "from memory"

    @property
    def unverified(self) -> bool:
        """From memory, or inferred from an older guidance: outputs list these for checking."""
        return self.status in UNVERIFIED


@dataclass(frozen=True, slots=True, kw_only=True)
class Criterion:
    """One basic-model test of a rule set."""

    id: str
    label: str
    groups: tuple[str, ...]
    mechanism: str
    form: str
    concentration: str
    equation: str
    cutoff: Sourced
    multiplier: Sourced | None = None
    comparison: str = ">="
    oral_only: bool = False
    gut_wall_only: bool = False

    def flags(self, value: float) -> bool:
        """True when ``value`` meets the cutoff (a clinical study is indicated)."""
        cut = float(self.cutoff.value)
        return value >= cut if self.comparison == ">=" else value <= cut


@dataclass(frozen=True, slots=True, kw_only=True)
class Terms:
    """The words a guidance uses for the two drugs: ICH M12 says precipitant and object drug, older texts
    perpetrator and victim.  Outputs under a rule set speak its words."""

    precipitant: str = "perpetrator"
    object: str = "victim"
    source: str = ""
    status: str = ""


@dataclass(frozen=True, slots=True, kw_only=True)
class RuleSet:
    """A guidance's cutoffs and multipliers."""

    id: str
    title: str
    version: str
    table_version: str
    path: str
    fu_plasma_floor: Sourced
    fu_plasma_floor_measured_exempt: Sourced
    aucr_inhibition_cutoff: Sourced
    aucr_induction_cutoff: Sourced
    criteria: tuple[Criterion, ...]
    physiology: tuple[Sourced, ...] = ()
    source: str = ""
    """The guidance the rule set encodes, as a citation marker (``[@ichm12]``)."""
    terms: Terms = Terms()

    def physiology_value(self, name: str) -> Sourced | None:
        for item in self.physiology:
            if item.name == name:
                return item
        return None


@dataclass(frozen=True, slots=True, kw_only=True)
class Band:
    """A class band: ``lower`` inclusive for inhibition, ``upper`` inclusive for induction."""

    name: str
    bound: float
    source: str
    status: str


@dataclass(frozen=True, slots=True, kw_only=True)
class Classes:
    """The size classes of the AUC ratio and the default no-effect boundary.

    Inhibition and induction bands, the object-drug study fm and the no-effect boundary
    (dimensionless ratios), each with its source.
    """

    inhibition: tuple[Band, ...]
    induction: tuple[Band, ...]
    victim_study_fm: Sourced
    no_effect_lower: float
    no_effect_upper: float
    no_effect_source: Sourced
    version: str

    def classify(self, auc_ratio: float) -> Band | None:
        """The inhibition or induction band of ``auc_ratio``; None between them."""
        for band in sorted(self.inhibition, key=lambda b: -b.bound):
            if auc_ratio >= band.bound:
                return band
        for band in sorted(self.induction, key=lambda b: b.bound):
            if auc_ratio <= band.bound:
                return band
        return None


@dataclass(frozen=True, slots=True, kw_only=True)
class Target:
    """An enzyme or transporter known to the tool."""

    name: str
    group: str
    kind: str
    aliases: tuple[str, ...]
    gut_wall: bool
    kdeg_liver: Sourced | None = None
    kdeg_gut: Sourced | None = None
    #: for a transporter: the route by which it clears an object drug (``intestinal efflux``, ``hepatic uptake``,
    #: ``renal secretion``; see :data:`interact.scenario.VICTIM_ROUTES`)
    victim_route: str | None = None


@lru_cache(maxsize=1)
def tables_dir() -> Path:
    """The folder holding the reference tables (installed or source checkout)."""
    here = Path(__file__).resolve().parent
    for candidate in (here / "reference_tables", here.parent / "reference_tables"):
        if (candidate / "physiology.toml").is_file():
            return candidate
    raise FileNotFoundError(f"reference tables not found beside {here}")  # packaging bug, not user input


@lru_cache(maxsize=1)
def rule_set_names() -> tuple[str, ...]:
    return tuple(sorted(p.stem for p in (tables_dir() / "rules").glob("*.toml")))


def load_rules(name_or_path: str | Path | None = None, *, base: str | Path | None = None) -> RuleSet:
    """A rule set by name (``"ich-m12-2024"``, ``"fda-2020"``) or from a TOML file path.

    A relative path is read from ``base`` when given (the folder of the scenario naming it), else from the
    working folder.
    """
    key = DEFAULT_RULES if name_or_path is None else str(name_or_path)
    if key in rule_set_names():
        return _load_rules_file(str(tables_dir() / "rules" / f"{key}.toml"))
    path = Path(key).expanduser()
    if base is not None and not path.is_absolute():
        path = Path(base) / path
    if path.suffix == ".toml" and path.is_file():
        return _load_rules_file(str(path.resolve()))
    names = ", ".join(rule_set_names())
    raise InputError("rules", key, f"is neither a known rule set ({names}) nor a readable .toml file")


#: the keys of a rule-set file, and of each criterion
_RULE_KEYS: Final = (
    "id",
    "title",
    "version",
    "table_version",
    "physiology",
    "fu_plasma_floor",
    "fu_plasma_floor_measured_exempt",
    "aucr_inhibition_cutoff",
    "aucr_induction_cutoff",
    "criteria",
    "source",
    "terms",
)
_TERMS_KEYS: Final = ("precipitant", "object", "source", "status")
_CRITERION_KEYS: Final = (
    "id",
    "label",
    "groups",
    "mechanism",
    "form",
    "concentration",
    "equation",
    "cutoff",
    "multiplier",
    "comparison",
    "oral_only",
    "gut_wall_only",
)
_SOURCED_KEYS: Final = ("value", "source", "status", "note")
#: the range of each cutoff by form: ratios of the 1 + I/Ki kind are at least 1, induction ratios at most 1
_CUTOFF_RANGE: Final = {
    "one-plus-sum": (1.0, 1e6, False),
    "tdi": (1.0, 1e6, False),
    "sum": (0.0, 1e6, True),
    "induction": (0.0, 1.0, True),
    "fold-change": (0.0, 1e6, True),
}
#: a rule set's [physiology] values: (kind for units.parse, or "fraction", or a number range)
_PHYSIOLOGY_KINDS: Final = {
    "hepatic_blood_flow": "flow",
    "enterocytic_blood_flow": "flow",
    "absorption_rate": "rate",
    "gut_volume": "volume",
    "fa_fg": "fraction",
    "fraction_absorbed": "fraction",
    "fu_gut": "fraction",
    "fu_inc": "fraction",
    "blood_plasma_ratio": "ratio",
}


@lru_cache(maxsize=16)
def _load_rules_file(path: str) -> RuleSet:
    """Read and validate a rule set: every value's type, range and finiteness; all problems at once, with lines."""
    from .rules_reader import read_rule_set  # imported here: it builds on the field reader, which imports this module

    return read_rule_set(path)


@lru_cache(maxsize=1)
def load_physiology() -> tuple[Sourced, ...]:
    data = _read(tables_dir() / "physiology.toml", "physiology")
    return tuple(_sourced(data, k, "physiology") for k, v in data.items() if isinstance(v, dict))


@lru_cache(maxsize=1)
def load_classes() -> Classes:
    data = _read(tables_dir() / "classes.toml", "classes")
    inhibition = tuple(
        Band(
            name=b["name"],
            bound=float(b["lower"]),
            source=_cites(b["source"], "classes.inhibition"),
            status=_status(b, "classes.inhibition"),
        )
        for b in data["inhibition"]
    )
    induction = tuple(
        Band(
            name=b["name"], bound=float(b["upper"]), source=_cites(b["source"], "classes.induction"), status=_status(b, "classes.induction")
        )
        for b in data["induction"]
    )
    boundary = data["no_effect_boundary"]
    return Classes(
        inhibition=inhibition,
        induction=induction,
        victim_study_fm=_sourced(data, "victim_study_fm", "classes", number=True),
        no_effect_lower=float(boundary["lower"]),
        no_effect_upper=float(boundary["upper"]),
        no_effect_source=Sourced(
            name="no_effect_boundary",
            value=(float(boundary["lower"]), float(boundary["upper"])),
            source=_cites(boundary["source"], "classes.no_effect_boundary"),
            status=_status(boundary, "classes.no_effect_boundary"),
        ),
        version=str(data.get("version", "")),
    )


@lru_cache(maxsize=1)
def load_targets() -> tuple[Target, ...]:
    data = _read(tables_dir() / "targets.toml", "targets")
    out = []
    for i, raw in enumerate(data["target"]):
        at = f"targets.target[{i}]"
        out.append(
            Target(
                name=raw["name"],
                group=raw["group"],
                kind=raw["kind"],
                aliases=tuple(raw.get("aliases", ())),
                gut_wall=bool(raw.get("gut_wall", False)),
                kdeg_liver=_sourced(raw, "kdeg_liver", at) if "kdeg_liver" in raw else None,
                kdeg_gut=_sourced(raw, "kdeg_gut", at) if "kdeg_gut" in raw else None,
                victim_route=raw.get("victim_route"),
            )
        )
    return tuple(out)


@dataclass(frozen=True, slots=True, kw_only=True)
class Phenotype:
    """A metaboliser phenotype of a polymorphic enzyme and the relative pathway activity it stands for."""

    enzyme: str
    name: str
    score: str  # the activity score or diplotype it stands for, as text
    activity: Sourced  # intrinsic clearance of the pathway relative to a normal metaboliser


@lru_cache(maxsize=1)
def load_phenotypes() -> dict[str, tuple[Phenotype, ...]]:
    """Phenotypes per polymorphic enzyme (``reference_tables/phenotypes.toml``), in the table's order."""
    data = _read(tables_dir() / "phenotypes.toml", "phenotypes")
    out: dict[str, tuple[Phenotype, ...]] = {}
    for i, raw in enumerate(data.get("enzyme", [])):
        at = f"phenotypes.enzyme[{i}]"
        enzyme = _str(raw, "name", at)
        rows = []
        for j, ph in enumerate(raw.get("phenotype", [])):
            where = f"{at}.phenotype[{j}]"
            activity = _sourced(ph, "activity", where, number=True)
            if not (math.isfinite(activity.value) and 0.0 <= activity.value <= 10.0):
                raise InputError(f"{where}.activity.value", activity.value, "is not a relative activity in [0, 10]")
            rows.append(Phenotype(enzyme=enzyme, name=_str(ph, "name", where), score=str(ph.get("score", "")), activity=activity))
        if not any(r.name == "normal" and r.activity.value == 1.0 for r in rows):
            raise InputError(at, enzyme, "has no normal phenotype with activity 1 (the reference)")
        out[enzyme] = tuple(rows)
    return out


@lru_cache(maxsize=1)
def _target_index() -> dict[str, Target]:
    index: dict[str, Target] = {}
    for target in load_targets():
        for key in (target.name, *target.aliases):
            index[_norm(key)] = target
    return index


def with_multipliers(rules: RuleSet, overrides: tuple[tuple[str, float], ...]) -> RuleSet:
    """``rules`` with a scenario's basic-model multipliers (criterion id, value) in place of its own.

    The replaced criterion's multiplier names the override and the rule set's own value in its source, so the
    override is shown wherever the multiplier is.

    Raises
    ------
    InputError
        An id that is not a criterion of ``rules`` (field ``multipliers.<id>``).
    """
    if not overrides:
        return rules
    ids = [c.id for c in rules.criteria]
    for key, _ in overrides:
        if key not in ids:
            raise InputError(f"multipliers.{key}", key, f"is not a criterion of {rules.id}; expected one of {', '.join(ids)}")
    new = dict(overrides)
    criteria = tuple(
        replace(
            c,
            multiplier=Sourced(
                name="multiplier",
                value=new[c.id],
                source=f"scenario [multipliers] override of {rules.id} (its own value: "
                f"{'x ' + format(float(c.multiplier.value), 'g') if c.multiplier else 'none, i.e. x 1'})",
                status="",
            ),
        )
        if c.id in new
        else c
        for c in rules.criteria
    )
    return replace(rules, criteria=criteria)


def resolve_target(name: str) -> Target | None:
    """The target called ``name`` or one of its aliases (case and dashes ignored)."""
    return _target_index().get(_norm(name))


@lru_cache(maxsize=1)
def table_versions() -> tuple[tuple[str, str], ...]:
    """Versions of the shipped tables, for provenance."""
    out = {}
    for name in ("physiology", "classes", "targets", "phenotypes"):
        data = _read(tables_dir() / f"{name}.toml", name)
        out[name] = str(data.get("version", ""))
    return tuple(sorted(out.items()))


def _norm(name: str) -> str:
    return name.upper().replace("-", "").replace(" ", "").replace("_", "")


def read_table(path: Path, field: str) -> dict[str, Any]:
    """A TOML table file; unreadable or invalid files raise :class:`InputError` naming ``field``."""
    return _read(path, field)


def _cites(text: str, field: str) -> str:
    """``text``, after checking that its citation markers name registered sources."""
    if "[@" in text:
        from .sources import check_markers  # the registry reads its file through this module

        check_markers(text, field)
    return text


def _read(path: Path, field: str) -> dict[str, Any]:
    try:
        text = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(field, str(path), f"could not be read ({exc.__class__.__name__})") from None
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(field, str(path), f"is not valid TOML ({exc})") from None


def _status(raw: dict[str, Any], where: str) -> str:
    status = raw.get("status")
    if status not in STATUSES:
        raise InputError(f"{where}.status", status, f"is not one of {', '.join(STATUSES)}")
    return str(status)


def _sourced(data: dict[str, Any], key: str, where: str, *, number: bool = False) -> Sourced:
    raw = data.get(key)
    at = f"{where}.{key}"
    if not isinstance(raw, dict) or "value" not in raw:
        raise InputError(at, raw, "is missing or not a table with value, source and status")
    value = raw["value"]
    if number and (isinstance(value, bool) or not isinstance(value, (int, float))):
        raise InputError(f"{at}.value", value, "is not a number")
    if not isinstance(raw.get("source"), str) or not raw["source"].strip():
        raise InputError(f"{at}.source", raw.get("source"), "is missing; every reference value names its source")
    return Sourced(
        name=key,
        value=float(value) if number else value,
        source=_cites(raw["source"], f"{at}.source"),
        status=_status(raw, at),
        note=_cites(str(raw.get("note", "")), f"{at}.note"),
    )


def _str(data: dict[str, Any], key: str, where: str) -> str:
    value = data.get(key)
    if not isinstance(value, str) or not value:
        raise InputError(f"{where}.{key}", value, "is missing or not text")
    return value


def _str_list(data: dict[str, Any], key: str, where: str) -> list[str]:
    value = data.get(key)
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise InputError(f"{where}.{key}", value, "is not a list of names")
    return value


def _list(data: dict[str, Any], key: str, where: str) -> list[dict[str, Any]]:
    value = data.get(key, [])
    if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
        raise InputError(f"{where}.{key}", value, "is not a list of tables")
    return value


def _choice(data: dict[str, Any], key: str, options: tuple[str, ...], where: str, default: str | None = None) -> str:
    value = data.get(key, default)
    if value not in options:
        raise InputError(f"{where}.{key}", value, f"is not one of {', '.join(options)}")
    return str(value)


# --------------------------------------------------------------------------- binding (kinetics)


@dataclass(frozen=True, slots=True, kw_only=True)
class BindingEquation:
    """One published fu,inc relation from ``binding.toml``: coefficients and stated domain, each sourced."""

    id: str
    title: str
    system: str
    equation: str
    source: str
    status: str
    note: str
    values: tuple[Sourced, ...]

    def item(self, name: str) -> Sourced:
        for v in self.values:
            if v.name == name:
                return v
        raise KeyError(f"{self.id}: {name}")

    def number(self, name: str) -> float:
        return float(self.item(name).value)

    def span(self, name: str) -> tuple[float, float]:
        low, high = self.item(name).value
        return float(low), float(high)


@lru_cache(maxsize=1)
def load_binding() -> tuple[BindingEquation, ...]:
    """The nonspecific-binding equations (Austin 2002, Hallifax & Houston 2006, Kilford 2008)."""
    data = _read(tables_dir() / "binding.toml", "binding")
    out = []
    for i, raw in enumerate(_list(data, "equation", "binding")):
        at = f"binding.equation[{i}]"
        values = []
        for key, item in raw.items():
            if not isinstance(item, dict):
                continue
            entry = _sourced(raw, key, at)
            v = entry.value
            ok = (isinstance(v, (int, float)) and not isinstance(v, bool)) or (
                isinstance(v, list) and len(v) == 2 and all(isinstance(x, (int, float)) for x in v) and v[0] < v[1]
            )
            if not ok:
                raise InputError(f"{at}.{key}.value", v, "is not a number or a [low, high] pair")
            values.append(entry)
        out.append(
            BindingEquation(
                id=_str(raw, "id", at),
                title=_str(raw, "title", at),
                system=_choice(raw, "system", ("microsomes", "hepatocytes"), at),
                equation=_str(raw, "equation", at),
                source=_cites(_str(raw, "source", at), f"{at}.source"),
                status=_status(raw, at),
                note=str(raw.get("note", "")),
                values=tuple(values),
            )
        )
    return tuple(out)
