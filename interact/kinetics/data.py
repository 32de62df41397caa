"""Incubation data: a substrate x inhibitor grid of initial velocities, read from CSV.

CSV layout (documented in the README, "Fitting incubation data"):

- a substrate of zero is allowed (a blank, velocity zero by the model);
- a header row naming the columns by the rules of :mod:`interact.columns` (names
  without regard to case, spaces or underscores; the same aliases as every other
  table): ``substrate`` (or ``s``), ``inhibitor`` (or ``i``), ``velocity`` (or
  ``v``, ``rate``), and optionally ``depletion`` (percent of substrate consumed,
  or ``turnover``); ``conc`` is refused here as ambiguous (two concentrations);
- the unit may follow a name in parentheses or brackets: ``substrate (uM)``,
  ``velocity [pmol/min/mg]``, ``depletion (%)``; otherwise it is given to the
  reader (``--substrate-unit`` on the command line);
- lines starting with ``#`` and blank lines are skipped; replicates are rows
  with the same concentrations.

Concentrations are converted once to micromolar; velocities keep their unit.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Final

import numpy as np
from numpy.typing import NDArray

from .. import units
from ..columns import ALIASES, find_columns, read_columns, read_rows
from ..errors import InputError, UnitError

__all__ = [
    "IC50Data",
    "IncubationData",
    "columns_of",
    "incubation_data",
    "parse_ic50_csv",
    "parse_incubation_csv",
    "read_ic50_csv",
    "read_incubation_csv",
]


@dataclass(frozen=True, slots=True, kw_only=True)
class IncubationData:
    """Initial velocities over a substrate x inhibitor grid.

    ``substrate_um`` and ``inhibitor_um`` are micromolar; ``velocity`` is in
    ``velocity_unit`` (free text, empty when not stated).  A substrate given in
    a unit that is not molar (ppm, mg/L) keeps its numbers: ``substrate_unit``
    then names that unit (Km is reported in it) and ``substrate_um`` holds the
    values in it despite its name; a molar substrate is converted to uM.  ``depletion_pct``
    holds the percentage of substrate consumed per row when measured.
    ``lines`` are the source line numbers of the rows (for messages).
    """

    substrate_um: tuple[float, ...]
    inhibitor_um: tuple[float, ...]
    velocity: tuple[float, ...]
    velocity_unit: str = ""
    depletion_pct: tuple[float, ...] | None = None
    lines: tuple[int, ...] = ()
    source: str = ""
    substrate_unit: str = "uM"

    @property
    def substrate_is_molar(self) -> bool:
        return self.substrate_unit == "uM"

    @property
    def n(self) -> int:
        return len(self.velocity)

    def arrays(self) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64]]:
        """(S in uM, I in uM, v) as float arrays."""
        return (
            np.asarray(self.substrate_um, dtype=float),
            np.asarray(self.inhibitor_um, dtype=float),
            np.asarray(self.velocity, dtype=float),
        )

    def line_of(self, index: int) -> int:
        return self.lines[index] if self.lines else index + 1

    @property
    def inhibitor_levels(self) -> tuple[float, ...]:
        return tuple(sorted(set(self.inhibitor_um)))

    @property
    def substrate_levels(self) -> tuple[float, ...]:
        return tuple(sorted(set(self.substrate_um)))


def incubation_data(
    substrate_um: Sequence[float],
    inhibitor_um: Sequence[float],
    velocity: Sequence[float],
    *,
    velocity_unit: str = "",
    depletion_pct: Sequence[float] | None = None,
    source: str = "",
    lines: Sequence[int] = (),
    substrate_unit: str = "uM",
) -> IncubationData:
    """Build validated :class:`IncubationData` from arrays (concentrations in uM).

    Raises
    ------
    InputError
        Unequal lengths, non-finite values, negative concentrations, depletion outside 0-100 %.
    """
    s = [float(v) for v in substrate_um]
    i = [float(v) for v in inhibitor_um]
    v = [float(x) for x in velocity]
    if not (len(s) == len(i) == len(v)):
        raise InputError("data", f"{len(s)}/{len(i)}/{len(v)} values", "need equal numbers of substrate, inhibitor and velocity values")
    line_nos = tuple(lines) if lines else tuple(range(1, len(s) + 1))
    dep = None if depletion_pct is None else [float(x) for x in depletion_pct]
    for k in range(len(s)):
        where = f"row {k + 1}" if not lines else f"line {line_nos[k]}"
        _check(s[k], f"substrate ({where})", low_open=False)
        _check(i[k], f"inhibitor ({where})", low_open=False)
        if not math.isfinite(v[k]):
            raise InputError(f"velocity ({where})", v[k], "is not a finite number")
        if dep is not None and not (math.isfinite(dep[k]) and 0.0 <= dep[k] <= 100.0):
            raise InputError(f"depletion ({where})", dep[k], "is not a percentage between 0 and 100")
    if not s:
        raise InputError("data", "no rows", "expected at least one row of substrate, inhibitor and velocity")
    return IncubationData(
        substrate_um=tuple(s),
        inhibitor_um=tuple(i),
        velocity=tuple(v),
        velocity_unit=velocity_unit,
        depletion_pct=None if dep is None else tuple(dep),
        lines=line_nos,
        source=source,
        substrate_unit=substrate_unit,
    )


def _check(value: float, field: str, *, low_open: bool) -> None:
    if not math.isfinite(value):
        raise InputError(field, value, "is not a finite number")
    if value < 0 or (low_open and value == 0):
        raise InputError(field, value, "must be above zero" if low_open else "must not be negative")


def read_incubation_csv(
    path: str | Path,
    *,
    substrate_unit: str | None = None,
    inhibitor_unit: str | None = None,
    velocity_unit: str | None = None,
    require_inhibitor: bool = True,
) -> IncubationData:
    """Read an incubation CSV (layout in the module docstring).

    Units given here override none found in the header; a header unit that
    disagrees with a given unit is an error (the file is ambiguous).

    Raises
    ------
    InputError
        Unreadable file, missing columns or units, or a bad row (the message
        names the line number, the column and the value).
    """
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8-sig")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError("data", str(p), f"could not be read ({getattr(exc, 'strerror', None) or exc.__class__.__name__})") from None
    return parse_incubation_csv(
        text,
        source=p.name,
        substrate_unit=substrate_unit,
        inhibitor_unit=inhibitor_unit,
        velocity_unit=velocity_unit,
        require_inhibitor=require_inhibitor,
    )


_GRID: Final = ("substrate", "inhibitor", "velocity", "depletion")


def parse_incubation_csv(
    text: str,
    *,
    source: str = "data",
    substrate_unit: str | None = None,
    inhibitor_unit: str | None = None,
    velocity_unit: str | None = None,
    require_inhibitor: bool = True,
) -> IncubationData:
    """Parse incubation CSV text; see :func:`read_incubation_csv`."""
    needed = ("substrate", "inhibitor", "velocity") if require_inhibitor else ("substrate", "velocity")
    table = read_columns(text, _GRID, required=needed, source=source, what="incubation data")
    cols, header_line = table.columns, table.header_line
    s_factor, s_unit = _substrate_unit(cols["substrate"].unit, substrate_unit, header_line)
    i_factor = _unit_factor("inhibitor", cols["inhibitor"].unit, inhibitor_unit, header_line) if "inhibitor" in cols else 1.0
    v_unit = _velocity_unit(cols["velocity"].unit, velocity_unit, header_line)
    if "depletion" in cols and cols["depletion"].unit not in ("", "%", "percent"):
        raise InputError(f"depletion (line {header_line})", cols["depletion"].unit, "is not a percentage; expected 'depletion (%)'")
    s_vals = [x * s_factor for x in table.numbers("substrate")]
    i_vals = [x * i_factor for x in table.numbers("inhibitor")] if "inhibitor" in cols else [0.0] * len(table.rows)
    return incubation_data(
        s_vals,
        i_vals,
        table.numbers("velocity"),
        velocity_unit=v_unit,
        depletion_pct=table.numbers("depletion") if "depletion" in cols else None,
        source=source,
        lines=[line for line, _ in table.rows],
        substrate_unit=s_unit,
    )


def _unit_factor(column: str, header_unit: str, given: str | None, line: int) -> float:
    """Factor converting the column's numbers to micromolar."""
    unit = header_unit or (given or "")
    if header_unit and given and header_unit.replace(" ", "") != given.replace(" ", ""):
        raise InputError(f"{column} unit", given, f"differs from the unit in the header (line {line}): '{header_unit}'")
    if not unit:
        raise InputError(f"{column} unit", "none", f"is not stated; put it in the header like '{column} (uM)' or pass --{column}-unit uM")
    try:
        q = units.parse(f"1 {unit}", "molar_concentration", field=f"{column} unit")
    except UnitError:
        raise UnitError(f"{column} unit", unit, "is not a molar concentration unit; expected e.g. uM, nM or mM") from None
    return units.magnitude(q, "uM")


def _substrate_unit(header_unit: str, given: str | None, line: int) -> tuple[float, str]:
    """(factor, unit): molar units convert to uM; any other unit (ppm, mg/L) is kept as given, factor 1."""
    try:
        return _unit_factor("substrate", header_unit, given, line), "uM"
    except UnitError as exc:
        if exc.field != "substrate unit":
            raise
        unit = (header_unit or given or "").strip()
        if not unit or any(c in unit for c in "\n\r\t\x1b"):
            raise
        return 1.0, unit  # Km is then reported in the substrate's own unit


def _velocity_unit(header_unit: str, given: str | None, line: int) -> str:
    if header_unit and given and header_unit.replace(" ", "") != given.replace(" ", ""):
        raise InputError("velocity unit", given, f"differs from the unit in the header (line {line}): '{header_unit}'")
    return header_unit or (given or "")  # a label only: velocity units do not change Ki


@dataclass(frozen=True, slots=True, kw_only=True)
class IC50Data:
    """Activity against inhibitor concentration (uM) for an IC50 curve."""

    inhibitor_um: tuple[float, ...]
    response: tuple[float, ...]
    response_unit: str = ""
    lines: tuple[int, ...] = ()
    source: str = ""


def columns_of(text: str, source: str = "data") -> tuple[str, ...]:
    """The recognised column names of a CSV header (for choosing between grid and IC50 modes)."""
    rows = read_rows(text, source)
    if not rows:
        return ()
    return tuple(find_columns(rows[0][1], (*_GRID, "activity"), source=source, line=rows[0][0]))


def read_ic50_csv(path: str | Path, *, inhibitor_unit: str | None = None) -> IC50Data:
    """Read an IC50 CSV: columns ``inhibitor`` and ``response`` (or ``activity``, ``velocity``)."""
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8-sig")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError("data", str(p), f"could not be read ({getattr(exc, 'strerror', None) or exc.__class__.__name__})") from None
    return parse_ic50_csv(text, source=p.name, inhibitor_unit=inhibitor_unit)


def parse_ic50_csv(text: str, *, source: str = "data", inhibitor_unit: str | None = None) -> IC50Data:
    """Parse IC50 CSV text (see :func:`read_ic50_csv`); zero inhibitor rows are controls."""
    table = read_columns(text, ("inhibitor", "activity", "velocity"), required=("inhibitor",), source=source, what="an IC50 curve")
    cols = table.columns
    resp_key = "activity" if "activity" in cols else ("velocity" if "velocity" in cols else None)
    if resp_key is None:
        raise InputError(
            f"{source} header (line {table.header_line})",
            ",".join(table.header),
            "lacks the columns for an IC50 curve; expected inhibitor (with its unit, e.g. 'inhibitor (uM)') and "
            f"response (or {', '.join(n for n in ALIASES['activity'] if n != 'response')}, velocity)",
        )
    factor = _unit_factor("inhibitor", cols["inhibitor"].unit, inhibitor_unit, table.header_line)
    xs = []
    for (line, row), x in zip(table.rows, table.numbers("inhibitor"), strict=True):
        if x < 0:
            raise InputError(f"{source} line {line}, {cols['inhibitor'].header}", row[cols["inhibitor"].index], "must not be negative")
        xs.append(x * factor)
    return IC50Data(
        inhibitor_um=tuple(xs),
        response=tuple(table.numbers(resp_key)),
        response_unit=cols[resp_key].unit,
        lines=tuple(line for line, _ in table.rows),
        source=source,
    )
