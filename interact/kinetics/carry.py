"""Reading time-dependent-inhibition and induction data.

CSV text (not files: the shell reads the file and hands over the text):

- pre-incubation data: columns ``inhibitor`` (or ``i``, or the generic ``conc``),
  ``time`` (or ``t``, ``preincubation``) and ``activity`` (or ``remaining``,
  ``percent``, ``response``); a unit may follow a name in parentheses or brackets,
  ``inhibitor (nM)``, ``time [h]``; defaults uM and min;
- induction data: columns ``inducer`` (or the generic ``concentration``, ``conc``)
  and ``fold_change`` (or ``fold``, ``mrna``); default uM.

The header rules, aliases and line-numbered errors are those of every table
(:mod:`interact.columns`); lines starting with ``#`` are comments.  The fitted
constants go into a scenario through the one writer of fits,
:func:`interact.kinetics.scenario_update.carry_constants_text`.
"""

from __future__ import annotations

from dataclasses import dataclass

from .. import units
from ..columns import read_columns

__all__ = ["ColumnData", "parse_fold_change_csv", "parse_preincubation_csv"]


@dataclass(frozen=True, slots=True, kw_only=True)
class ColumnData:
    """Numeric columns read from CSV text, in canonical units (uM, min, plain numbers)."""

    columns: dict[str, tuple[float, ...]]
    units: dict[str, str]
    source: str
    n: int


def _parse(text: str, spec: dict[str, tuple[str, str, str]], source: str, what: str) -> ColumnData:
    """spec: result name -> (column of :data:`interact.columns.ALIASES`, kind for units.parse or "", canonical unit)."""
    table = read_columns(
        text, [column for column, _, _ in spec.values()], required=[c for c, _, _ in spec.values()], source=source, what=what
    )
    cols: dict[str, tuple[float, ...]] = {}
    unit_used: dict[str, str] = {}
    for name, (column, kind, canon_unit) in spec.items():
        col = table.columns[column]
        factor = 1.0
        if kind and col.unit:
            q = units.parse(f"1 {col.unit}", kind, field=f"{source}: column {col.header!r}")
            factor = units.magnitude(q, canon_unit)
        unit_used[name] = col.unit or canon_unit
        cols[name] = tuple(x * factor for x in table.numbers(column))
    return ColumnData(columns=cols, units=unit_used, source=source, n=len(table.rows))


def parse_preincubation_csv(text: str, *, source: str = "data") -> ColumnData:
    """Pre-incubation data: ``inhibitor`` (uM), ``time`` (min), ``activity`` (any positive scale)."""
    spec = {
        "inhibitor": ("inhibitor", "molar_concentration", "uM"),
        "time": ("time", "time", "min"),
        "activity": ("activity", "", ""),
    }
    return _parse(text, spec, source, "pre-incubation data")


def parse_fold_change_csv(text: str, *, source: str = "data") -> ColumnData:
    """Induction data: the inducer's ``concentration`` (uM) and ``fold_change`` over vehicle."""
    spec = {"concentration": ("inducer", "molar_concentration", "uM"), "fold_change": ("fold_change", "", "")}
    return _parse(text, spec, source, "induction data")
