"""One reader for "column (unit)" tables: the header rules every CSV input shares.

A header cell is a name, optionally followed by its unit in parentheses or brackets:
``substrate (uM)``, ``velocity [pmol/min/mg]``, ``time (h)``.  Names are matched without
regard to case, spaces, underscores or hyphens (:func:`name_key`).  The incubation, IC50,
pre-incubation and induction tables of :mod:`interact.kinetics` use :func:`read_columns` with
the one alias table :data:`ALIASES`; the batch tables use :func:`split_header` for their
headers (their column names are their own: ``ki CYP3A (uM)``).

Generic concentration names (``conc``, ``concentration``, ``c``) mean the table's only
concentration column (the inhibitor of an IC50 or pre-incubation table, the inducer of an
induction table); in a table with two concentration columns (substrate and inhibitor) they
are ambiguous and refused with the names to use instead.

Rows: lines starting with ``#`` and blank lines are skipped; a byte-order mark is dropped;
every message names the source, the line number in the file and the column.
"""

from __future__ import annotations

import csv
import io
import math
import re
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Final

from .errors import InputError

__all__ = [
    "ALIASES",
    "GENERIC_CONCENTRATION",
    "Column",
    "ColumnTable",
    "name_key",
    "read_columns",
    "read_rows",
    "split_header",
]

#: accepted names of each column (as :func:`name_key` writes them), the same for every kinetics table
ALIASES: Final[dict[str, tuple[str, ...]]] = {
    "substrate": ("substrate", "s", "substrateconc", "substrateconcentration"),
    "inhibitor": ("inhibitor", "i", "inhibitorconc", "inhibitorconcentration"),
    "inducer": ("inducer", "inducerconc", "inducerconcentration"),
    "velocity": ("velocity", "v", "rate", "v0"),
    "activity": (
        "activity",
        "response",
        "remaining",
        "remainingactivity",
        "percent",
        "percentofcontrol",
        "%control",
        "signal",
    ),
    "depletion": ("depletion", "turnover", "substratedepletion", "consumed"),
    "time": ("time", "t", "preincubation", "preincubationtime"),
    "fold_change": ("foldchange", "fold", "mrna", "foldinduction"),
}
#: names that stand for a table's only concentration column
GENERIC_CONCENTRATION: Final = ("conc", "concentration", "c")
_CONCENTRATIONS: Final = ("substrate", "inhibitor", "inducer")
_HEADER: Final = re.compile(r"^\s*(.*?)\s*(?:\(\s*([^()]*?)\s*\)|\[\s*([^\[\]]*?)\s*\])?\s*$", re.DOTALL)
_KEY: Final = re.compile(r"[\s_\-]+")
MAX_ROWS: Final = 100_000


def split_header(cell: str) -> tuple[str, str | None]:
    """(name, unit) of a header cell: ``"cmax (ng/mL)"`` and ``"cmax [ng/mL]"`` give ``("cmax", "ng/mL")``.

    The unit is None when the cell states none; the name keeps its own spelling (stripped).
    """
    m = _HEADER.match(cell or "")
    if m is None:  # unbalanced brackets: the whole cell is the name
        return (cell or "").strip(), None
    unit = m.group(2) if m.group(2) is not None else m.group(3)
    return m.group(1), (unit or None)


def name_key(name: str) -> str:
    """The form names are compared in: lower case, without spaces, underscores or hyphens."""
    return _KEY.sub("", name.lower())


@dataclass(frozen=True, slots=True)
class Column:
    """A recognised column: its position, the header cell as written and the unit it states ("" for none)."""

    index: int
    header: str
    unit: str


@dataclass(frozen=True, slots=True)
class ColumnTable:
    """The recognised columns of a table and its data rows (file line number, stripped cells)."""

    source: str
    header_line: int
    header: tuple[str, ...]
    columns: dict[str, Column]
    rows: tuple[tuple[int, tuple[str, ...]], ...]

    def numbers(self, name: str) -> list[float]:
        """The column's cells as finite floats; an empty, unreadable or non-finite cell is an error naming its line."""
        col = self.columns[name]
        out = []
        for line, row in self.rows:
            out.append(number(row[col.index], col.header, line, self.source))
        return out


def read_rows(text: str, source: str, *, max_rows: int = MAX_ROWS) -> list[tuple[int, list[str]]]:
    """Non-blank, non-comment CSV rows with their line numbers in the file (the header is the first)."""
    out: list[tuple[int, list[str]]] = []
    reader = csv.reader(io.StringIO(text.removeprefix("\ufeff")))  # a byte-order mark (spreadsheet export) is dropped
    rows = iter(reader)
    while True:
        line = reader.line_num + 1
        try:
            row = next(rows)
        except StopIteration:
            break
        except csv.Error as exc:  # a stray carriage return or NUL inside a field
            raise InputError(
                f"{source} line {reader.line_num}", "CSV", f"could not be read ({exc}); expected plain comma-separated rows"
            ) from None
        if not row or all(not c.strip() for c in row) or row[0].lstrip().startswith("#"):
            continue
        out.append((line, [c.strip() for c in row]))
        if len(out) > max_rows + 1:
            raise InputError(source, f"more than {max_rows} rows", "is too large for this table")
    return out


def _describe(names: Sequence[str]) -> str:
    return "; ".join(f"{n}: {', '.join(ALIASES[n])}" for n in names)


def find_columns(header: Sequence[str], names: Sequence[str], *, source: str, line: int) -> dict[str, Column]:
    """Match header cells to the wanted column ``names`` (keys of :data:`ALIASES`); other cells are ignored.

    Raises :class:`InputError` for a column named twice, or a generic concentration name where the
    wanted columns hold more than one concentration.
    """
    concentrations = [n for n in names if n in _CONCENTRATIONS]
    found: dict[str, Column] = {}
    for k, cell in enumerate(header):
        name, unit = split_header(cell)
        key = name_key(name)
        column = next((n for n in names if key in ALIASES[n]), None)
        if column is None and key in GENERIC_CONCENTRATION and concentrations:
            if len(concentrations) > 1:
                raise InputError(
                    f"{source} header (line {line})",
                    cell,
                    f"is ambiguous: this table has {' and '.join(concentrations)} concentrations; "
                    f"name the column one of {_describe(concentrations)}",
                )
            column = concentrations[0]
        if column is None:
            continue
        if column in found:
            raise InputError(
                f"{source} header (line {line})",
                cell,
                f"names the {column} column again (as '{found[column].header}'); expected one {column} column",
            )
        found[column] = Column(index=k, header=cell.strip(), unit=unit or "")
    return found


def read_columns(text: str, names: Sequence[str], *, required: Sequence[str], source: str, what: str) -> ColumnTable:
    """Read a "column (unit)" CSV table: the header row, the wanted columns and every data row.

    ``what`` describes the table in messages ("incubation data").  Raises :class:`InputError` for an
    empty file, a missing required column (listing the accepted names), no data rows, or a row
    shorter than the columns it needs (naming its line).
    """
    rows = read_rows(text, source)
    if not rows:
        raise InputError(
            source, "empty", f"has no header and no data rows; expected a header naming {', '.join(required)} and rows of numbers"
        )
    header_line, header = rows[0]
    columns = find_columns(header, names, source=source, line=header_line)
    missing = [n for n in required if n not in columns]
    if missing:
        raise InputError(
            f"{source} header (line {header_line})",
            ",".join(header),
            f"lacks the column{'s' if len(missing) > 1 else ''} {', '.join(missing)} for {what} "
            f"(accepted names: {_describe(missing)}); units go in the header, e.g. '{missing[0]} (unit)'",
        )
    if len(rows) == 1:
        raise InputError(source, "no data rows", f"expected rows of {', '.join(required)} under the header")
    width = max(c.index for c in columns.values()) + 1
    for line, row in rows[1:]:
        if len(row) < width:
            raise InputError(f"{source} line {line}", ",".join(row), f"has {len(row)} fields; expected at least {width} (as in the header)")
    return ColumnTable(
        source=source,
        header_line=header_line,
        header=tuple(header),
        columns=columns,
        rows=tuple((line, tuple(row)) for line, row in rows[1:]),
    )


def number(cell: str, column: str, line: int, source: str) -> float:
    """A cell as a finite float within the accepted magnitudes; the error names the source, line and column."""
    from .units import MAGNITUDE_RANGE

    field = f"{source} line {line}, {column}"
    try:
        value = float(cell)
    except ValueError:
        raise InputError(field, cell, "is not a number") from None
    if not math.isfinite(value):
        raise InputError(field, cell, "is not a finite number")
    low, high = MAGNITUDE_RANGE  # near 1e300 a fit's normal equations overflow
    if value and not low <= abs(value) <= high:
        raise InputError(field, cell, f"is beyond the accepted magnitudes ({low:g} to {high:g}); rescale the column's unit")
    return value
