"""Reading time-dependent-inhibition and induction data, and carrying fitted constants into a scenario.

CSV text (not files: the shell reads the file and hands over the text):

- pre-incubation data: columns ``inhibitor`` (or ``conc``, ``i``), ``time`` (or
  ``t``, ``preincubation``) and ``activity`` (or ``remaining``, ``percent``); a
  unit may follow a name in parentheses, ``inhibitor (nM)``, ``time (h)``;
  defaults uM and min;
- induction data: columns ``concentration`` (or ``conc``, ``inducer``) and
  ``fold_change`` (or ``fold``, ``mrna``); default uM.

Lines starting with ``#`` are comments.  :func:`carry_constants_text` writes
kinact/ki_inact or emax/ec50 into the target's ``[[perpetrator.inhibits]]``
entry with tomlkit, keeping comments and layout; a replaced value stays
visible in a comment, and the result is validated before it is returned.
"""

from __future__ import annotations

import csv
import io
import math
import re
from dataclasses import dataclass
from typing import Any

import tomlkit

from .. import units
from ..errors import InputError
from ..scenario import loads_scenario
from .data import _check_size
from .scenario_update import inhibition_entry, set_keeping_history

__all__ = ["ColumnData", "carry_constants_text", "parse_fold_change_csv", "parse_preincubation_csv"]

_HEADER = re.compile(r"^\s*([A-Za-z_ %.-]+?)\s*(?:\((.*)\))?\s*$")


@dataclass(frozen=True, slots=True, kw_only=True)
class ColumnData:
    """Numeric columns read from CSV text, in canonical units (uM, min, plain numbers)."""

    columns: dict[str, tuple[float, ...]]
    units: dict[str, str]
    source: str
    n: int


def _parse(text: str, spec: dict[str, tuple[tuple[str, ...], str, str]], source: str) -> ColumnData:
    """spec: canonical name -> (accepted header names, kind for units.parse or "", canonical unit)."""
    text = text.removeprefix("\ufeff")  # a byte-order mark (spreadsheet export) is dropped
    lines = [ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")]
    if not lines:
        raise InputError(source, "empty", "has no data rows; expected a header line and rows of numbers")
    rows = list(csv.reader(io.StringIO("\n".join(lines))))
    header = rows[0]
    found: dict[str, tuple[int, float]] = {}
    unit_used: dict[str, str] = {}
    for idx, raw in enumerate(header):
        m = _HEADER.match(raw)
        if not m:
            continue
        name = m.group(1).strip().lower().replace(" ", "_")
        for canon, (names, kind, canon_unit) in spec.items():
            if name in names:
                factor = 1.0
                unit_text = (m.group(2) or "").strip()
                if kind and unit_text:
                    q = units.parse(f"1 {unit_text}", kind, field=f"{source}: column {raw.strip()!r}")
                    factor = units.magnitude(q, canon_unit)
                unit_used[canon] = unit_text or canon_unit
                found[canon] = (idx, factor)
    missing = [canon for canon in spec if canon not in found]
    if missing:
        want = "; ".join(f"{c}: one of {', '.join(spec[c][0])}" for c in missing)
        raise InputError(f"{source}: header", ",".join(header), f"lacks columns ({want})")
    cols: dict[str, list[float]] = {c: [] for c in spec}
    for line_no, row in enumerate(rows[1:], start=2):
        for canon, (idx, factor) in found.items():
            cell = row[idx].strip() if idx < len(row) else ""
            try:
                value = float(cell)
            except ValueError:
                raise InputError(f"{source}: row {line_no}, column {header[idx].strip()!r}", cell, "is not a number") from None
            if not math.isfinite(value):
                raise InputError(f"{source}: row {line_no}, column {header[idx].strip()!r}", cell, "is not a finite number")
            _check_size(value, f"{source}: row {line_no}, column {header[idx].strip()!r}", cell)
            cols[canon].append(value * factor)
    return ColumnData(columns={k: tuple(v) for k, v in cols.items()}, units=unit_used, source=source, n=len(rows) - 1)


def parse_preincubation_csv(text: str, *, source: str = "data") -> ColumnData:
    """Pre-incubation data: ``inhibitor`` (uM), ``time`` (min), ``activity`` (any positive scale)."""
    return _parse(
        text,
        {
            "inhibitor": (("inhibitor", "conc", "concentration", "i"), "molar_concentration", "uM"),
            "time": (("time", "t", "preincubation", "preincubation_time"), "time", "min"),
            "activity": (("activity", "remaining", "percent", "remaining_activity"), "", ""),
        },
        source,
    )


def parse_fold_change_csv(text: str, *, source: str = "data") -> ColumnData:
    """Induction data: ``concentration`` (uM) and ``fold_change`` over vehicle."""
    return _parse(
        text,
        {
            "concentration": (("concentration", "conc", "inducer", "c"), "molar_concentration", "uM"),
            "fold_change": (("fold_change", "fold", "mrna", "fold_induction"), "", ""),
        },
        source,
    )


def carry_constants_text(
    text: str, *, target: str, values: dict[str, Any], origin: str, source: str = "scenario", remove: tuple[str, ...] = ()
) -> str:
    """The scenario text with ``values`` (e.g. kinact, ki_inact) set on the target's inhibition entry.

    The entry is created when absent.  Every replaced value is kept in a
    comment beside the new one; ``origin`` records where the numbers came
    from.  Keys in ``remove`` that ``values`` does not set (an older fit's interval) are deleted and
    recorded in a comment.  Raises :class:`InputError` for unreadable TOML, an unknown target or
    an update that would make the scenario invalid.
    """
    doc, entry, _ = inhibition_entry(text, target=target, source=source)
    stamp = origin.split(",")[-1].strip() if "," in origin else "fit"
    removed = []
    for key in remove:
        if key in entry and key not in values:
            old = entry[key]
            removed.append(f"{key} = {old.as_string().strip() if hasattr(old, 'as_string') else old}")
            del entry[key]
    for key, value in (*values.items(), ("origin", origin)):
        set_keeping_history(entry, key, value, stamp)
    if removed:
        entry.add(tomlkit.comment(f"removed with the new fit ({stamp}): " + "; ".join(removed)))
    new_text = tomlkit.dumps(doc)
    loads_scenario(new_text, source=source)  # raises ScenarioError (an InputError) listing problems
    return new_text
