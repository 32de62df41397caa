"""Reading a rule-set TOML file into a :class:`~interact.tables.RuleSet`: every value's type, range, finiteness,
source and status checked, all problems at once with their key paths and lines (through
:class:`~interact.scenario_fields.FieldReader`, the checks the scenario reader uses too).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Any

from .errors import InputError, ScenarioError
from .files import loads_toml, read_text
from .scenario import BLOOD_PLASMA_RANGE
from .scenario_fields import FieldReader
from .tables import (
    _CRITERION_KEYS,
    _CUTOFF_RANGE,
    _PHYSIOLOGY_KINDS,
    _RULE_KEYS,
    _SOURCED_KEYS,
    _TERMS_KEYS,
    CONCENTRATIONS,
    FORMS,
    MECHANISMS,
    STATUSES,
    Criterion,
    RuleSet,
    Sourced,
    Terms,
    _cites,
)

__all__ = ["read_rule_set"]

Check = Callable[[dict[str, Any], str], Any]


class _RulesReader(FieldReader):
    """The field reader with the rule set's own shapes: sourced values, criteria, terms, physiology."""

    def sourced(self, table: dict[str, Any], key: str, at: str, check: Check | None = None, *, required: bool = True) -> Sourced | None:
        """A ``{value, source, status, note}`` table; ``check(raw, path)`` converts and checks the value."""
        full = f"{at}.{key}" if at else key
        raw = table.get(key)
        if raw is None:
            if required:
                self.fail(full, "is missing; expected a table with value, source and status")
            return None
        if self.table(raw, full, _SOURCED_KEYS) is None:
            return None
        if "value" not in raw:
            self.fail(f"{full}.value", "is missing")
            return None
        value = check(raw, full) if check else raw["value"]
        source = raw.get("source")
        if not isinstance(source, str) or not source.strip():
            self.fail(f"{full}.source", "is missing; every reference value names its source")
        status = raw.get("status")
        if status not in STATUSES:
            self.fail(f"{full}.status", f"{status!r} is not one of {', '.join(STATUSES)}")
        note = raw.get("note", "")
        if not isinstance(note, str):
            self.fail(f"{full}.note", "is not text")
        for part, text in (("source", source), ("note", note)):
            self.cited(text, f"{full}.{part}")
        if value is None:
            return None
        return Sourced(name=key, value=value, source=str(source or ""), status=str(status or ""), note=str(note))

    def cited(self, text: object, full: str) -> None:
        """Every citation marker (``[@lee2024]``) in ``text`` names a source of reference_tables/sources.toml."""
        if isinstance(text, str) and "[@" in text:
            try:
                _cites(text, full)
            except InputError as exc:
                self.fail(full, f"{exc.value} {exc.expected}")

    def terms(self, raw: object) -> Terms:
        """The ``[terms]`` table: the words the guidance uses for the two drugs."""
        if raw is None or self.table(raw, "terms", _TERMS_KEYS) is None:
            return Terms()
        assert isinstance(raw, dict)
        words = {}
        for key in ("precipitant", "object"):
            value = raw.get(key)
            if not isinstance(value, str) or not value.strip() or not value.replace(" ", "").replace("-", "").isalpha():
                self.fail(f"terms.{key}", f"{value!r} is not a word or two (letters, spaces, hyphens)")
                value = Terms().precipitant if key == "precipitant" else Terms().object
            words[key] = value.strip()
        status = raw.get("status", "")
        if status and status not in STATUSES:
            self.fail("terms.status", f"{status!r} is not one of {', '.join(STATUSES)}")
        self.cited(raw.get("source", ""), "terms.source")
        return Terms(precipitant=words["precipitant"], object=words["object"], source=str(raw.get("source", "")), status=str(status))

    def bounded(self, low: float, high: float, low_open: bool = True) -> Check:
        """A check of a number in (low, high] (or [low, high])."""
        return lambda raw, full: self.number(raw, "value", full, low=low, high=high, low_open=low_open)

    def boolean(self, raw: dict[str, Any], full: str) -> bool | None:
        value = raw["value"]
        if not isinstance(value, bool):
            self.fail(f"{full}.value", f"{value!r} is not true or false")
            return None
        return value

    def physiology_value(self, kind: str) -> Check:
        """A check of one physiology value by its kind: a fraction, the blood-to-plasma ratio or a quantity's text."""

        def check(raw: dict[str, Any], full: str) -> Any:
            if kind == "fraction":
                return self.fraction(raw, "value", full)
            if kind == "ratio":
                return self.number(raw, "value", full, low=BLOOD_PLASMA_RANGE[0], high=BLOOD_PLASMA_RANGE[1], low_open=False)
            value = raw["value"]
            if not isinstance(value, str):
                self.fail(f"{full}.value", f'{value!r} is not a quantity with its unit, e.g. "97 L/h"')
                return None
            return value if self.quantity(raw, "value", full, kind) is not None else None

        return check

    def choice(self, table: dict[str, Any], key: str, options: tuple[str, ...], at: str, default: str | None = None) -> str:
        value = table.get(key, default)
        if value not in options:
            self.fail(f"{at}.{key}", f"{value!r} is not one of {', '.join(options)}")
            return options[0]
        return str(value)

    def criterion(self, raw: dict[str, Any], at: str) -> Criterion:
        """One ``[[criteria]]`` entry."""
        form = self.choice(raw, "form", FORMS, at)
        comparison = self.choice(raw, "comparison", (">=", "<="), at, default=">=")
        groups = raw.get("groups")
        if not isinstance(groups, list) or not groups or not all(isinstance(g, str) and g for g in groups):
            self.fail(f"{at}.groups", f'{groups!r} is not a list of group names, e.g. ["cyp"]')
            groups = []
        equation = raw.get("equation", "")
        if not isinstance(equation, str):
            self.fail(f"{at}.equation", "is not text")
        low, high, low_open = _CUTOFF_RANGE[form]
        cutoff = self.sourced(raw, "cutoff", at, self.bounded(low, high, low_open))
        multiplier = self.sourced(raw, "multiplier", at, self.bounded(0.0, 1000.0), required=False)
        return Criterion(
            id=self.text(raw, "id", at, required=True),
            label=self.text(raw, "label", at, required=True),
            groups=tuple(groups),
            mechanism=self.choice(raw, "mechanism", MECHANISMS, at),
            form=form,
            concentration=self.choice(raw, "concentration", CONCENTRATIONS, at),
            equation=str(equation),
            cutoff=cutoff or Sourced(name="cutoff", value=math.nan, source="", status=""),
            multiplier=multiplier,
            comparison=comparison,
            oral_only=self.flag(raw, "oral_only", at),
            gut_wall_only=self.flag(raw, "gut_wall_only", at),
        )

    def physiology(self, phys: object) -> list[Sourced]:
        """The ``[physiology]`` table: values the rule set fixes in place of physiology.toml's."""
        out: list[Sourced] = []
        if self.table(phys, "physiology", tuple(_PHYSIOLOGY_KINDS)) is not None:
            assert isinstance(phys, dict)
            for key in phys:
                if key in _PHYSIOLOGY_KINDS:
                    item = self.sourced(phys, key, "physiology", self.physiology_value(_PHYSIOLOGY_KINDS[key]))
                    if item is not None:
                        out.append(item)
        return out


def read_rule_set(path: str) -> RuleSet:
    """Read and validate the rule set at ``path``; raises :class:`~interact.errors.ScenarioError` with every problem."""
    text = read_text(path, "rules")
    data = loads_toml(text, path)
    r = _RulesReader(text)
    r.table(data, "", _RULE_KEYS)
    criteria = [
        r.criterion(raw, f"criteria[{i}]") for i, raw in r.items(data, "criteria", "") if r.table(raw, f"criteria[{i}]", _CRITERION_KEYS)
    ]
    physiology = r.physiology(data.get("physiology", {}))
    rules = dict(
        id=r.text(data, "id", "", required=True),
        title=r.text(data, "title", "", required=True),
        version=r.text(data, "version", ""),
        table_version=r.text(data, "table_version", ""),
        fu_plasma_floor=r.sourced(data, "fu_plasma_floor", "", r.bounded(0.0, 1.0)),
        fu_plasma_floor_measured_exempt=r.sourced(data, "fu_plasma_floor_measured_exempt", "", r.boolean),
        aucr_inhibition_cutoff=r.sourced(data, "aucr_inhibition_cutoff", "", r.bounded(1.0, 1e6, False)),
        aucr_induction_cutoff=r.sourced(data, "aucr_induction_cutoff", "", r.bounded(0.0, 1.0)),
        source=r.text(data, "source", ""),
        terms=r.terms(data.get("terms")),
    )
    r.cited(rules["source"], "source")
    if r.problems:
        raise ScenarioError(tuple(r.problems), source=f"rules {path}")
    return RuleSet(path=path, criteria=tuple(criteria), physiology=tuple(physiology), **rules)  # type: ignore[arg-type]
