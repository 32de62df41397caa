"""Batch screening: every perpetrator of one table against every victim of another.

Each row is validated exactly as a scenario file would be (the same reader,
the same messages), then the mechanistic static model is evaluated for all
pairs at once on numpy arrays, in chunks that bound memory, with the same
equations and order of operations as :func:`interact.assessment.assess`, so
that every pair's result equals ``assess()`` on that pair alone (a test
holds them equal).

Tables are CSV (a header line, ``#`` comment lines allowed) or TOML
(``[[perpetrator]]`` / ``[[victim]]`` entries with the same keys).  A column
name may carry its unit in parentheses, ``cmax (ng/mL)``; cells are then plain
numbers.  Without a unit in the header, each cell carries its own
(``812 ng/mL``).  The columns are listed in :data:`PERPETRATOR_COLUMNS` and
:data:`VICTIM_COLUMNS` and documented in README.md ("Batch screening").

Scope (kept simple on purpose): one reversible inhibition constant per
perpetrator and target (``ki TARGET`` with ``fu_inc TARGET``, or ``ki_u
TARGET``), no metabolites, no time-dependent inhibition or induction; use a
scenario file for those.
"""

from __future__ import annotations

import csv
import dataclasses
import functools
import io
import math
import os
import re
from collections.abc import Callable, Iterable, Iterator, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Final

import numpy as np
import pint
from numpy.typing import NDArray

from . import model, units
from .arrays import band_codes, band_labels
from .columns import split_header
from .constants import resolve_constants
from .dosing import ACTIONS, RegimenPlan, choose_regimens, plan_for_victim
from .errors import InputError, InteractError, Problem, ScenarioError
from .exposure import resolve_exposure, resolve_settings
from .files import loads_toml, read_text
from .genotype import phenotype_options
from .prediction import liver_ratio, routes_of
from .scenario import VICTIM_ROUTES, Perpetrator, Scenario, Victim, section_from_dict
from .screening import screen
from .steps import StepTable
from .tables import Classes, RuleSet, load_classes, load_rules, load_targets, resolve_target

__all__ = [
    "COLUMN_KEYS",
    "FLAGS",
    "OUTPUT_COLUMNS",
    "PERPETRATOR_COLUMNS",
    "VICTIM_COLUMNS",
    "BadRowsError",
    "BatchResult",
    "PerpetratorTable",
    "RowProblem",
    "VictimTable",
    "evaluate_pairs",
    "fits_in_memory",
    "flag_text",
    "load_perpetrators",
    "load_victims",
    "loads_perpetrators",
    "loads_victims",
    "pair_ratios",
    "pair_scenario",
    "perpetrator_subset",
    "ranking",
    "read_table",
    "result_rows",
    "stream_chunks",
    "worst_pairs",
]

#: perpetrator columns: (name, unit kind or type, required, meaning)
PERPETRATOR_COLUMNS: Final = (
    ("name", "text", True, "compound name"),
    ("dose", "dose, e.g. (mg)", True, "highest dose"),
    ("molar mass", "(g/mol)", False, "needed when dose or a concentration is a mass"),
    ("cmax", "concentration, e.g. (uM) or (ng/mL)", True, "total plasma Cmax at steady state"),
    ("fu_p", "fraction", True, "unbound fraction in plasma"),
    ("fu_p measured", "true/false", False, "a measured fu,p may stand below the rule set's floor"),
    ("route", "oral/intravenous", False, "default oral"),
    ("rb", "number", False, "blood-to-plasma ratio (default from the tables)"),
    ("fa_fg", "fraction", False, "Fa x Fg for the hepatic inlet (default from the tables)"),
    ("fa", "fraction", False, "Fa for the enterocyte (default from the tables)"),
    ("ka", "rate, e.g. (1/min)", False, "absorption rate (default from the tables)"),
    ("ki TARGET", "concentration, e.g. (uM)", False, "in vitro Ki on TARGET (an enzyme or transporter)"),
    ("fu_inc TARGET", "fraction", False, "unbound fraction in the incubation for that Ki (default 1)"),
    ("ki_u TARGET", "concentration, e.g. (uM)", False, "unbound Ki on TARGET (instead of ki with fu_inc)"),
)

#: victim columns: (name, unit kind or type, required, meaning)
VICTIM_COLUMNS: Final = (
    ("name", "text", True, "drug name"),
    ("dose", "dose, e.g. (mg)", True, "usual dose"),
    ("interval", "time, e.g. (h)", True, "usual dosing interval"),
    ("fg", "fraction", False, "intestinal availability (1 when not given: no gut-wall interaction)"),
    ("route", "oral/intravenous", False, "default oral"),
    ("strengths", "dose, e.g. (mg), separated by ';'", False, "available unit strengths"),
    ("half_life", "time, e.g. (h)", False, "elimination half-life: interval changes are judged on peak and trough"),
    ("nti", "true/false", False, "narrow therapeutic index"),
    ("no_effect_lower", "AUC ratio", False, "lower no-effect boundary (default 0.8)"),
    ("no_effect_upper", "AUC ratio", False, "upper no-effect boundary (default 1.25)"),
    ("fm ENZYME", "fraction", False, "fraction of clearance through ENZYME"),
    ("efflux TRANSPORTER", "fraction", False, "fraction of the oral dose TRANSPORTER (P-gp, BCRP) returns to the gut lumen"),
    ("uptake TRANSPORTER", "fraction", False, "fraction of systemic clearance that depends on hepatic uptake by TRANSPORTER"),
    ("secretion TRANSPORTER", "fraction", False, "fraction of renal clearance secreted by TRANSPORTER (needs renal_fraction)"),
    ("renal_fraction", "fraction", False, "fraction of systemic clearance that is renal"),
    ("phenotype ENZYME", "text or number", False, "metaboliser phenotype on that pathway (poor, intermediate, ...) or a relative activity"),
)

#: flags, as bits of :attr:`BatchResult.flags`
FLAGS: Final = (
    "fg not given: no gut-wall interaction predicted",
    "fu,p raised to the floor",
    "narrow therapeutic index: any change only with therapeutic drug monitoring",
    "a victim pathway is not inhibited by this perpetrator",
    "basic model flags a study",
)

OUTPUT_COLUMNS: Final = (
    "rank",
    "perpetrator",
    "victim",
    "Imax,u (uM)",
    "Iin,max,u (uM)",
    "Igut (uM)",
    "I,ent (uM)",
    "basic models",
    "AUCR gut",
    "AUCR liver",
    "AUCR kidney",
    "AUCR",
    "phenotype",
    "exposure vs normal",
    "class",
    "study indicated (mechanistic model)",
    "action",
    "flags",
)

#: the keys of :meth:`BatchResult.columns`, one per entry of :data:`OUTPUT_COLUMNS` (same order), then ``flag_bits``
COLUMN_KEYS: Final = (
    "rank",
    "perpetrator",
    "victim",
    "imax_u_um",
    "iin_max_u_um",
    "igut_um",
    "i_ent_um",
    "basic_models",
    "auc_ratio_gut",
    "auc_ratio_liver",
    "auc_ratio_kidney",
    "auc_ratio",
    "phenotype",
    "exposure_vs_normal",
    "class",
    "study_indicated",
    "action",
    "flags",
)

_PAIRS_PER_CHUNK: Final = 262_144
MAX_ROWS: Final = 1_000_000


@dataclass(frozen=True, slots=True, kw_only=True)
class RowProblem:
    """One unusable row of a batch table: the table (``source``), its line (or spreadsheet row, or record number) and what is wrong."""

    source: str
    line: int
    message: str

    def __str__(self) -> str:
        return f"{self.source} line {self.line}: {self.message}"


class BadRowsError(InputError):
    """One or more rows of a table are unusable; each is named with its line."""

    def __init__(self, problems: tuple[RowProblem, ...], source: str) -> None:
        self.problems = problems
        n = len(problems)
        shown = "; ".join(f"line {p.line}: {p.message}" for p in problems[:3])
        more = f" (and {n - 3} more)" if n > 3 else ""
        InteractError.__init__(
            self,
            f"{source}: {n} bad row{'s' if n != 1 else ''}: {shown}{more}; fix them, or use --on-error skip to leave them out and list them",  # noqa: E501
        )
        self.field = source
        self.value = None
        self.expected = f"{n} bad rows"


# --------------------------------------------------------------------------- reading


_TRUE = {"true", "yes", "y", "1"}
_FALSE = {"false", "no", "n", "0", ""}


@dataclass(frozen=True, slots=True, kw_only=True)
class _Column:
    header: str
    key: str  # normalised key, e.g. "ki", "fm", "cmax"
    target: str | None
    unit: str | None


_PERP_KEYS: Final = {
    "name": "name",
    "dose": "dose",
    "molar mass": "molar_mass",
    "molar_mass": "molar_mass",
    "mw": "molar_mass",
    "cmax": "cmax",
    "fu_p": "fu_plasma",
    "fu_plasma": "fu_plasma",
    "fu_p measured": "fu_plasma_measured",
    "fu_plasma_measured": "fu_plasma_measured",
    "route": "route",
    "rb": "blood_plasma_ratio",
    "blood_plasma_ratio": "blood_plasma_ratio",
    "fa_fg": "fa_fg",
    "fa": "fa",
    "ka": "ka",
}
_VICTIM_KEYS: Final = {
    "name": "name",
    "dose": "dose",
    "interval": "interval",
    "fg": "fg",
    "route": "route",
    "strengths": "strengths",
    "half_life": "half_life",
    "nti": "narrow_therapeutic_index",
    "narrow_therapeutic_index": "narrow_therapeutic_index",
    "no_effect_lower": "no_effect_lower",
    "no_effect_upper": "no_effect_upper",
    "renal_fraction": "renal_fraction",
}
_UNIT_KINDS: Final = {
    "dose": "dose",
    "molar_mass": "molar_mass",
    "cmax": "concentration",
    "ka": "rate",
    "ki": "concentration",
    "ki_u": "concentration",
    "interval": "time",
    "half_life": "time",
    "strengths": "dose",
}
_PER_TARGET: Final = {"perpetrator": ("ki", "ki_u", "fu_inc"), "victim": ("fm", "phenotype", "efflux", "uptake", "secretion")}
#: the victim's route columns and the object-drug route each names (interact.scenario.VICTIM_ROUTES)
_ROUTE_COLUMNS: Final = {"efflux": "intestinal efflux", "uptake": "hepatic uptake", "secretion": "renal secretion"}


def _columns(headers: list[str], side: str, source: str) -> list[_Column]:
    keys = _PERP_KEYS if side == "perpetrator" else _VICTIM_KEYS
    out: list[_Column] = []
    seen: dict[tuple[str, str | None], str] = {}
    for raw in headers:
        words, unit = split_header(raw)  # "cmax (ng/mL)" or "cmax [ng/mL]", as in every table
        low = " ".join(words.lower().split())
        target: str | None = None
        key = keys.get(low)
        if key is None:
            first, _, rest = low.partition(" ")
            if first in _PER_TARGET[side] and rest:
                t = resolve_target(words.split(None, 1)[1])
                if t is None:
                    known = ", ".join(x.name for x in load_targets())
                    raise InputError(f"{source}: column", raw, f"names an unknown target; expected one of {known}")
                key, target = first, t.name
        if key is None:
            expected = ", ".join(c[0] for c in (PERPETRATOR_COLUMNS if side == "perpetrator" else VICTIM_COLUMNS))
            raise InputError(f"{source}: column", raw, f"is not a known {side} column; expected {expected}")
        if unit is not None and key in _UNIT_KINDS:
            try:
                units.parse(f"1 {unit}", _UNIT_KINDS[key], field=f"{source}: column {raw}")
            except InputError as exc:
                raise InputError(f"{source}: column", raw, f"has a unit that is not {exc.expected.split('expected ', 1)[-1]}") from None
        elif unit is not None:
            raise InputError(f"{source}: column", raw, "takes no unit (it is a fraction, number, flag or text)")
        if (key, target) in seen:
            raise InputError(f"{source}: column", raw, f'repeats column "{seen[(key, target)]}"')
        seen[(key, target)] = raw
        out.append(_Column(header=raw, key=key, target=target, unit=unit))
    for name, _, required, _ in PERPETRATOR_COLUMNS if side == "perpetrator" else VICTIM_COLUMNS:
        if not required:
            continue
        want = keys[name]
        if required and not any(c.key == want for c in out):
            raise InputError(f"{source}: columns", ", ".join(headers), f'lack the required column "{name}"')
    return out


def _rows_csv(text: str) -> tuple[list[str], list[tuple[int, list[str]]]]:
    lines = text.splitlines()
    numbered = [(i + 1, line) for i, line in enumerate(lines) if line.strip() and not line.lstrip().startswith("#")]
    if not numbered:
        return [], []
    reader = csv.reader(io.StringIO("\n".join(line for _, line in numbered)))
    parsed = list(reader)
    header = [h.strip() for h in parsed[0]]
    return header, [(numbered[k][0], row) for k, row in enumerate(parsed[1:], start=1)]


def _rows_toml(text: str, side: str, source: str) -> tuple[list[str], list[tuple[int, dict[str, Any]]]]:
    data = loads_toml(text, source)
    entries = data.get(side)
    if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
        raise InputError(source, side, f"has no [[{side}]] entries; expected one [[{side}]] table per row")
    starts = [i + 1 for i, line in enumerate(text.splitlines()) if re.match(rf"^\s*\[\[\s*{side}\s*\]\]", line)]
    headers: list[str] = []
    for e in entries:
        for k in e:
            if k not in headers:
                headers.append(k)
    return headers, [(starts[k] if k < len(starts) else 0, e) for k, e in enumerate(entries)]


def _cell_text(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, pint.Quantity):  # from records: any registry, read back through its text
        return f"{float(value.magnitude)!r} {value.units:~}"
    return str(value).strip()


def _row_dict(cols: list[_Column], cells: dict[str, Any], side: str) -> tuple[dict[str, Any], dict[str, str]]:
    """A scenario-style dict for one row and a map from scenario key paths to column headers."""
    out: dict[str, Any] = {}
    where: dict[str, str] = {}
    per_target: dict[str, dict[str, Any]] = {}
    for c in cols:
        raw = cells.get(c.header)
        text = "" if raw is None else _cell_text(raw)
        if text == "":
            continue
        if c.key in ("fu_plasma_measured", "narrow_therapeutic_index"):
            low = text.lower()
            out[c.key] = True if low in _TRUE else False if low in _FALSE else text
            where[f"{side}.{c.key}"] = c.header
            continue
        if c.key == "strengths":
            parts = [p.strip() for p in re.split(r"[;|]", text) if p.strip()]
            out["strengths"] = [f"{p} {c.unit}" if c.unit else p for p in parts]
            for k in range(len(parts)):
                where[f"{side}.strengths[{k}]"] = c.header
            where[f"{side}.strengths"] = c.header
            continue
        value: Any = f"{text} {c.unit}" if c.unit else text
        if c.key in ("blood_plasma_ratio", "no_effect_lower", "no_effect_upper"):
            try:
                value = float(text)
            except ValueError:
                value = text
        if c.target is not None:
            per_target.setdefault(c.target, {})[c.key] = value
            continue
        out[c.key] = value
        where[f"{side}.{c.key}"] = c.header
    if "no_effect_lower" in out or "no_effect_upper" in out:
        lo, hi = out.pop("no_effect_lower", 0.8), out.pop("no_effect_upper", 1.25)
        out["no_effect_boundary"] = [lo, hi]
        where[f"{side}.no_effect_boundary"] = "no_effect_lower / no_effect_upper"
    headers_of = {(c.key, c.target): c.header for c in cols}
    if side == "perpetrator":
        items = []
        for target, d in per_target.items():
            if "ki" in d and "ki_u" in d:
                items.append({"target": target, "ki": d["ki"], "ki_u_conflict": True})
            elif "ki_u" in d:
                item = {"target": target, "ki": d["ki_u"], "fu_inc": 1.0}
                if "fu_inc" in d:
                    item["fu_inc_conflict"] = True
                items.append(item)
            elif "ki" in d:
                items.append({"target": target, "ki": d["ki"], **({"fu_inc": d["fu_inc"]} if "fu_inc" in d else {})})
            else:
                items.append({"target": target, "fu_inc_alone": True})
            k = len(items) - 1
            where[f"perpetrator.inhibits[{k}].ki"] = headers_of.get(("ki", target)) or headers_of.get(("ki_u", target), "")
            where[f"perpetrator.inhibits[{k}].fu_inc"] = headers_of.get(("fu_inc", target), "")
            where[f"perpetrator.inhibits[{k}]"] = where[f"perpetrator.inhibits[{k}].ki"] or where[f"perpetrator.inhibits[{k}].fu_inc"]
        if items:
            out["inhibits"] = items
        where["perpetrator.inhibits"] = "ki / ki_u columns"
    else:
        with_fm = [t for t, d in per_target.items() if "fm" in d]
        out["pathways"] = [{"enzyme": t, "fm": per_target[t]["fm"]} for t in with_fm]
        for k, t in enumerate(with_fm):
            where[f"victim.pathways[{k}].fm"] = where[f"victim.pathways[{k}].enzyme"] = headers_of[("fm", t)]
            where[f"victim.pathways[{k}]"] = headers_of[("fm", t)]
        for key, route in _ROUTE_COLUMNS.items():
            for t in [t for t, d in per_target.items() if key in d]:
                k = len(out["pathways"])
                out["pathways"].append({"transporter": t, "route": route, "fraction": per_target[t][key]})
                for part in ("", ".transporter", ".route", ".fraction"):
                    where[f"victim.pathways[{k}]{part}"] = headers_of[(key, t)]
        where["victim.pathways"] = "fm, efflux, uptake and secretion columns"
        phen = [t for t, d in per_target.items() if "phenotype" in d]
        if phen:
            out["phenotypes"] = []
            for k, t in enumerate(phen):
                text = str(per_target[t]["phenotype"])
                try:
                    out["phenotypes"].append({"enzyme": t, "activity": float(text)})
                except ValueError:
                    out["phenotypes"].append({"enzyme": t, "phenotype": text})
                for key in ("", ".enzyme", ".phenotype", ".activity"):
                    where[f"victim.phenotypes[{k}]{key}"] = headers_of[("phenotype", t)]
    return out, where


def _validate(side: str, data: dict[str, Any], where: dict[str, str]) -> Perpetrator | Victim:
    """The row as a Perpetrator or Victim, validated by the scenario reader (messages name the column)."""
    problems: list[str] = []
    if side == "perpetrator":
        for k, item in enumerate(data.get("inhibits", [])):
            col = where.get(f"perpetrator.inhibits[{k}]", "")
            if item.pop("ki_u_conflict", False):
                problems.append(f"column '{col}': gives both ki and ki_u for {item['target']}; expected one of them")
            if item.pop("fu_inc_conflict", False):
                problems.append(
                    f"column '{where.get(f'perpetrator.inhibits[{k}].fu_inc')}': fu_inc does not apply to ki_u (already unbound)"
                )
            if item.pop("fu_inc_alone", False):
                problems.append(f"column '{col}': fu_inc {item['target']} is given without ki {item['target']}")
                item["ki"] = "1 uM"  # placeholder so that the rest of the row is still checked
    try:
        section = section_from_dict(side, data)
    except ScenarioError as exc:
        for p in exc.problems:
            problems.append(_explain(p, where, side))
        raise InputError("row", "", "; ".join(problems)) from None
    if problems:
        raise InputError("row", "", "; ".join(problems))
    return section


def _explain(p: Problem, where: dict[str, str], side: str) -> str:
    probe = p.field
    while probe and probe not in where:
        probe = re.sub(r"(\[\d+\]|\.[^.\[]*)$", "", probe) if ("." in probe or "[" in probe) else ""
    col = where.get(probe)
    msg = p.message
    if p.field == f"{side}.inhibits":
        return "no ki or ki_u value: expected at least one inhibition constant"
    return f"column '{col}': {msg}" if col else f"{p.field.removeprefix(side + '.')}: {msg}"


@dataclass(frozen=True, slots=True, kw_only=True)
class PerpetratorTable:
    """Validated perpetrators with the per-perpetrator floats the pair model needs (concentrations in uM)."""

    rows: tuple[Perpetrator, ...]
    lines: tuple[int, ...]
    targets: tuple[str, ...]  # one column per target, in first-seen order
    imax_u_um: NDArray[np.float64]
    inlet_um: NDArray[np.float64]
    enterocyte_um: NDArray[np.float64]
    gut_lumen_um: NDArray[np.float64]
    ki_u_um: NDArray[np.float64]  # (n, targets); NaN where not given
    fu_floored: NDArray[np.bool_]
    basic: tuple[str, ...]
    basic_flag: NDArray[np.bool_]
    skipped: tuple[RowProblem, ...]
    source: str


@dataclass(frozen=True, slots=True, kw_only=True)
class VictimTable:
    """A validated victim (object drug) table.

    The rows and their lines; fm per enzyme (fraction), Fg, route, regimen plans and phenotypes
    as arrays over victims.
    """

    rows: tuple[Victim, ...]
    lines: tuple[int, ...]
    enzymes: tuple[str, ...]
    fm: NDArray[np.float64]  # (n, enzymes); 0 where not given
    has_pathway: NDArray[np.bool_]  # (n, enzymes)
    fg: NDArray[np.float64]
    fg_given: NDArray[np.bool_]
    oral: NDArray[np.bool_]
    plans: tuple[RegimenPlan, ...]  # each victim's regimen candidates and boundaries (interact.dosing)
    plan_groups: tuple[tuple[int, ...], ...]  # victims whose plans give the dose rule the same inputs, in table order
    activity: NDArray[np.float64]  # (n, enzymes): the victim's phenotype activity on each pathway (1 = normal)
    genotype: NDArray[np.float64]  # exposure without a precipitant relative to a normal metaboliser (1 without phenotypes)
    phenotype: tuple[str, ...]  # the phenotype label of each victim ("" for none)
    nti: NDArray[np.bool_]
    skipped: tuple[RowProblem, ...]
    source: str
    #: transporter routes (transporter, route) with the fraction the model takes: efflux of the oral dose (0 for an
    #: intravenous victim), uptake of systemic clearance, secretion of systemic clearance (renal fraction x share)
    routes: tuple[tuple[str, str], ...] = ()
    route_fraction: NDArray[np.float64] | None = None  # (n, routes); 0 where not given
    has_route: NDArray[np.bool_] | None = None  # (n, routes): the victim lists the route
    renal: NDArray[np.float64] | None = None  # (n,): fraction of systemic clearance that is renal (0 where not given)


def _rows_records(table: Any, source: str) -> tuple[list[str], list[tuple[int, dict[str, Any]]]]:
    """Rows given as records (mappings of column to value) or a pandas DataFrame; row numbers count from 1.

    Missing values (``None``, NaN, pandas' NA) are left out, as an empty CSV cell is; numpy scalars
    become Python values.
    """
    if hasattr(table, "to_dict") and hasattr(table, "columns"):  # a pandas DataFrame (duck-typed: pandas is optional)
        table = table.to_dict("records")
    if isinstance(table, Mapping):
        raise InputError(source, type(table).__name__, "is one mapping; expected a list of records (one mapping per row) or a DataFrame")
    headers: list[str] = []
    entries: list[tuple[int, dict[str, Any]]] = []
    for k, record in enumerate(table, start=1):
        if not isinstance(record, Mapping):
            raise InputError(f"{source} row {k}", record, "is not a mapping of column names to values")
        row: dict[str, Any] = {}
        for key, value in record.items():
            if not isinstance(key, str):
                raise InputError(f"{source} row {k}", key, "is not a column name (text)")
            if isinstance(value, np.generic):
                value = value.item()
            if value is None or (isinstance(value, float) and math.isnan(value)) or type(value).__name__ in ("NAType", "NaTType"):
                continue
            row[key] = value
            if key not in headers:
                headers.append(key)
        entries.append((k, row))
    return headers, entries


def _xlsx_extent(data: bytes, sheet: str | None, source: str) -> int:
    book = _open_workbook(data, source)
    try:
        ws = _sheet(book, sheet, source)
        return max(int(ws.max_row or 0) - 1, 0)
    finally:
        book.close()


def _open_workbook(data: bytes, source: str) -> Any:
    try:
        import openpyxl
    except ImportError:
        raise InputError(source, "xlsx", "needs openpyxl to be read: pip install 'interact[data]' (or pip install openpyxl)") from None
    import zipfile

    try:
        return openpyxl.load_workbook(io.BytesIO(data), read_only=True, data_only=True)
    except (zipfile.BadZipFile, OSError, ValueError, KeyError) as exc:
        raise InputError(source, "xlsx", f"could not be read as an .xlsx workbook ({exc.__class__.__name__})") from None


def _sheet(book: Any, sheet: str | None, source: str) -> Any:
    if sheet is None:
        return book.worksheets[0]
    if sheet in book.sheetnames:
        return book[sheet]
    raise InputError(f"{source}: --sheet", sheet, f"is not a sheet of this workbook; expected one of {', '.join(book.sheetnames)}")


def _rows_xlsx(data: bytes, sheet: str | None, source: str) -> tuple[list[str], list[tuple[int, dict[str, Any]]]]:
    """Rows of one sheet of an .xlsx workbook (openpyxl), numbered as the spreadsheet numbers them.

    The first sheet unless ``sheet`` names one.  As in CSV: empty rows and rows whose first cell
    starts with ``#`` are skipped, the first remaining row is the header, an empty cell is a missing value.
    """
    book = _open_workbook(data, source)
    try:
        ws = _sheet(book, sheet, source)
        headers: list[str] = []
        entries: list[tuple[int, dict[str, Any]]] = []
        for number, row in enumerate(ws.iter_rows(values_only=True), start=1):
            cells = ["" if v is None else v for v in row]
            if all(isinstance(v, str) and not v.strip() for v in cells) or (
                cells and isinstance(cells[0], str) and cells[0].lstrip().startswith("#")
            ):
                continue
            if not headers:
                headers = [str(v).strip() for v in cells]
                while headers and not headers[-1]:
                    headers.pop()
                continue
            extra = [v for v in cells[len(headers) :] if not (isinstance(v, str) and not v.strip())]
            if extra:
                entries.append((number, {"__error__": f"has a value beyond the {len(headers)} header columns"}))
                continue
            entries.append(
                (number, {h: v for h, v in zip(headers, cells, strict=False) if h and not (isinstance(v, str) and not v.strip())})
            )
        return headers, entries
    finally:
        book.close()


def _read(
    table: Any, side: str, source: str, fmt_name: str | None, sheet: str | None = None
) -> tuple[list[_Column], list[tuple[int, dict[str, Any]]]]:
    if isinstance(table, bytes):  # a spreadsheet (.xlsx)
        headers, entries = _rows_xlsx(table, sheet, source)
        if not headers:
            raise InputError(source, "", f"has no header row; expected a sheet with columns such as {PERPETRATOR_COLUMNS[0][0]}, ...")
        return _columns(headers, side, source), entries
    if not isinstance(table, str):
        headers, entries = _rows_records(table, source)
        if not headers:
            raise InputError(source, "no columns", "has no rows with values; expected records with columns such as name, ...")
        return _columns(headers, side, source), entries
    text = table
    kind = fmt_name or ("toml" if source.lower().endswith(".toml") else "csv")
    if kind == "toml":
        headers, entries = _rows_toml(text, side, source)
        cols = _columns(headers, side, source)
        return cols, entries
    headers, rows = _rows_csv(text)
    if not headers:
        raise InputError(source, "", f"has no header line; expected CSV with columns such as {PERPETRATOR_COLUMNS[0][0]}, ...")
    cols = _columns(headers, side, source)
    out = []
    for line, cells in rows:
        if len(cells) > len(headers):
            out.append((line, {"__error__": f"has {len(cells)} cells but the header has {len(headers)} columns"}))
            continue
        out.append((line, {h: (cells[k] if k < len(cells) else "") for k, h in enumerate(headers)}))
    return cols, out


def _parse_rows(
    text: Any, side: str, source: str, on_error: str, fmt_name: str | None, sheet: str | None = None
) -> tuple[list[Any], list[int], list[_Column], list[RowProblem]]:
    if on_error not in ("fail", "skip"):
        raise InputError("on_error", on_error, "is not 'fail' or 'skip'")
    if isinstance(text, str):
        text = text.removeprefix("\ufeff")  # a byte-order mark is dropped
    cols, entries = _read(text, side, source, fmt_name, sheet)
    if len(entries) > MAX_ROWS:
        raise InputError(source, len(entries), f"rows is more than the {MAX_ROWS:,} a table may have")
    valid: list[Any] = []
    lines: list[int] = []
    problems: list[RowProblem] = []
    for line, cells in entries:
        if "__error__" in cells:
            problems.append(RowProblem(source=source, line=line, message=cells["__error__"]))
            continue
        unknown = [k for k in cells if k not in {c.header for c in cols}]
        if unknown:
            problems.append(RowProblem(source=source, line=line, message=f"unknown key '{unknown[0]}'"))
            continue
        data, where = _row_dict(cols, cells, side)
        try:
            valid.append(_validate(side, data, where))
            lines.append(line)
        except InputError as exc:
            problems.append(RowProblem(source=source, line=line, message=exc.expected))
    if problems and on_error == "fail":
        raise BadRowsError(tuple(problems), source)
    if not valid:
        if problems:  # every row bad: say why, as a failing run would
            n = len(problems)
            shown = "; ".join(f"line {p.line}: {p.message}" for p in problems[:3]) + (f" (and {n - 3} more)" if n > 3 else "")
            raise InputError(source, f"{n} rows", f"has no valid {side} row; every row is bad: {shown}")
        raise InputError(source, "no rows", f"has no valid {side} row")
    return valid, lines, cols, problems


def loads_perpetrators(
    text: str | bytes | Iterable[Mapping[str, Any]] | Any,
    rules: RuleSet | str | None = None,
    *,
    source: str = "perpetrators.csv",
    on_error: str = "fail",
    fmt_name: str | None = None,
    sheet: str | None = None,
) -> PerpetratorTable:
    """Read and validate a perpetrator table; compute each perpetrator's concentrations and basic-model values.

    Parameters
    ----------
    text
        The table as CSV or TOML text, the bytes of an .xlsx workbook, or records: a list of mappings (column name to value) or a
        pandas DataFrame, with the columns of :data:`PERPETRATOR_COLUMNS` (a unit in the header,
        ``cmax (ng/mL)``, or in each value, ``"812 ng/mL"``; a pint Quantity is accepted as a value).
        Rows of records are numbered from 1 in messages.
    rules
        Rule set (name, path or :class:`~interact.tables.RuleSet`) for the fu,p floor and basic models.
    source
        Name used in messages (a file name, or e.g. ``"records"``).
    on_error
        ``fail`` (any bad row raises, naming each with its line) or ``skip`` (bad rows are left
        out and listed in ``skipped``).
    fmt_name
        ``csv`` or ``toml`` for text (default: from the ``source`` suffix).
    sheet
        For a spreadsheet (``text`` given as the bytes of an .xlsx file): the sheet to read
        (default: the first).  Rows are numbered as the spreadsheet numbers them.

    Returns
    -------
    PerpetratorTable
        Concentrations in uM (Imax,u, Iin,max,u, Igut, I,ent) and unbound Ki in uM per target.
    """
    rule_set = rules if isinstance(rules, RuleSet) else load_rules(rules)
    rows, lines, cols, problems = _parse_rows(text, "perpetrator", source, on_error, fmt_name, sheet)
    targets = tuple(dict.fromkeys(c.target for c in cols if c.target is not None and c.key in ("ki", "ki_u")))
    n = len(rows)
    ki_u = np.full((n, len(targets)), np.nan)
    imax_u = np.empty(n)
    inlet = np.empty(n)
    ent = np.empty(n)
    igut = np.empty(n)
    floored = np.zeros(n, dtype=bool)
    basic: list[str] = []
    basic_flag = np.zeros(n, dtype=bool)
    victim = Victim(name="-", dose=units.parse("1 mg", "dose", field="-"), interval=units.parse("24 h", "time", field="-"))
    for i, p in enumerate(rows):
        s = Scenario(title="row", perpetrator=p, victim=victim)
        settings = resolve_settings(s, rule_set)
        species, fus = resolve_exposure(s, rule_set, settings)
        constants = resolve_constants(s)
        sp = species[0]
        imax_u[i], inlet[i], ent[i], igut[i] = sp.unbound_cmax_um, sp.unbound_inlet_um, sp.enterocyte_um, sp.gut_lumen_um
        floored[i] = fus[0].origin == "floor"
        for c in constants:
            if c.ki_u_um is not None and c.target in targets:
                ki_u[i, targets.index(c.target)] = c.ki_u_um
        results = screen(rule_set, constants, species, oral=p.route == "oral", kdeg_liver={})
        basic.append("; ".join(f"{r.label} {r.target} {r.value:.4g}{' STUDY' if r.indicated else ''}" for r in results))
        basic_flag[i] = any(r.indicated for r in results)
    return PerpetratorTable(
        rows=tuple(rows),
        lines=tuple(lines),
        targets=targets,
        imax_u_um=imax_u,
        inlet_um=inlet,
        enterocyte_um=ent,
        gut_lumen_um=igut,
        ki_u_um=ki_u,
        fu_floored=floored,
        basic=tuple(basic),
        basic_flag=basic_flag,
        skipped=tuple(problems),
        source=source,
    )


def loads_victims(
    text: str | bytes | Iterable[Mapping[str, Any]] | Any,
    *,
    source: str = "victims.csv",
    on_error: str = "fail",
    fmt_name: str | None = None,
    sheet: str | None = None,
) -> VictimTable:
    """Read and validate a victim table.

    ``text`` is CSV or TOML text, or records (a list of mappings or a pandas DataFrame) with the
    columns of :data:`VICTIM_COLUMNS`; the other arguments are those of :func:`loads_perpetrators`.
    """
    rows, lines, cols, problems = _parse_rows(text, "victim", source, on_error, fmt_name, sheet)
    enzymes = tuple(dict.fromkeys(c.target for c in cols if c.key == "fm" and c.target is not None))
    n = len(rows)
    fm = np.zeros((n, len(enzymes)))
    has = np.zeros((n, len(enzymes)), dtype=bool)
    classes = load_classes()
    default = (classes.no_effect_lower, classes.no_effect_upper)
    plans = []
    activity = np.ones((n, len(enzymes)))
    labels = []
    routes = tuple(dict.fromkeys((pw.enzyme, pw.route) for v in rows for pw in v.pathways if pw.route != "metabolism"))
    route_fraction = np.zeros((n, len(routes)))
    has_route = np.zeros((n, len(routes)), dtype=bool)
    for i, v in enumerate(rows):
        r = routes_of(v)  # the fractions as the model takes them (efflux 0 for an intravenous victim)
        share = dict((*r.efflux, *r.uptake, *r.secretion))
        for pw in v.pathways:
            if pw.route != "metabolism":
                has_route[i, routes.index((pw.enzyme, pw.route))] = True
                route_fraction[i, routes.index((pw.enzyme, pw.route))] = share.get(pw.enzyme, 0.0)
                continue
            k = enzymes.index(pw.enzyme)
            fm[i, k] = pw.fm
            has[i, k] = True
        for c in v.phenotypes:
            if c.phenotype == "all":
                raise InputError(
                    f"{source} line {lines[i]}: phenotype {c.enzyme}", "all", "is not one phenotype; give each phenotype its own row"
                )
            activity[i, enzymes.index(c.enzyme)] = phenotype_options(c)[0][1]
        labels.append(", ".join(f"{c.enzyme} {c.phenotype if c.activity is None else f'a = {c.activity:g}'}" for c in v.phenotypes))
        try:
            plans.append(plan_for_victim(v, default, "default 0.8-1.25, ICH M12 5.3.1"))
        except InputError as exc:
            raise InputError(f"{source} line {lines[i]}: {exc.field}", exc.value, exc.expected) from None
    return VictimTable(
        rows=tuple(rows),
        lines=tuple(lines),
        enzymes=enzymes,
        fm=fm,
        has_pathway=has,
        fg=np.array([1.0 if v.fg is None else v.fg for v in rows]),
        fg_given=np.array([v.fg is not None for v in rows], dtype=bool),
        oral=np.array([v.route == "oral" for v in rows], dtype=bool),
        plans=tuple(plans),
        plan_groups=_plan_groups(plans),
        activity=activity,
        genotype=liver_ratio(fm, activity) if n else np.ones(0),
        phenotype=tuple(labels),
        nti=np.array([v.narrow_therapeutic_index for v in rows], dtype=bool),
        skipped=tuple(problems),
        source=source,
        routes=routes,
        route_fraction=route_fraction,
        has_route=has_route,
        renal=np.array([v.renal_fraction or 0.0 for v in rows]),
    )


def read_table(path: str | Path, field: str = "table") -> str | bytes:
    """A batch table file as :func:`loads_perpetrators` / :func:`loads_victims` take it.

    The bytes of an ``.xlsx`` workbook, else the text of a CSV or TOML file
    (through :func:`interact.files.read_text`, the one reader).

    Raises
    ------
    InputError
        The file cannot be read (named by ``field``, with the path and why).
    """
    target = Path(path)
    if target.suffix.lower() != ".xlsx":
        return read_text(target, field)
    try:
        return target.read_bytes()
    except OSError as exc:
        raise InputError(field, str(path), f"could not be read ({exc.strerror or exc.__class__.__name__})") from None


def load_perpetrators(path: str | Path, rules: RuleSet | str | None = None, **options: Any) -> PerpetratorTable:
    """:func:`loads_perpetrators` of a CSV, TOML or .xlsx file (``options``: ``on_error``, ``sheet``, ``fmt_name``)."""
    return loads_perpetrators(read_table(path), rules, source=str(path), **options)


def load_victims(path: str | Path, **options: Any) -> VictimTable:
    """:func:`loads_victims` of a CSV, TOML or .xlsx file (``options``: ``on_error``, ``sheet``, ``fmt_name``)."""
    return loads_victims(read_table(path), source=str(path), **options)


def pair_scenario(perpetrators: PerpetratorTable, victims: VictimTable, i: int, j: int, rules: str | None = None) -> Scenario:
    """Perpetrator ``i`` and victim ``j`` as a scenario (to assess one pair alone, or save it as a file)."""
    p, v = perpetrators.rows[i], victims.rows[j]
    return Scenario(title=f"{p.name} with {v.name} (from batch tables)", perpetrator=p, victim=v, rules=rules)


# --------------------------------------------------------------------------- evaluating


@dataclass(frozen=True, slots=True, kw_only=True)
class BatchResult:
    """Results for every pair; arrays are (perpetrators, victims)."""

    perpetrators: PerpetratorTable
    victims: VictimTable
    rules: RuleSet
    gut: NDArray[np.float64]
    liver: NDArray[np.float64]
    kidney: NDArray[np.float64]  # renal secretion at Imax,u (1 for a victim without secretion routes); total = gut x liver x kidney
    total: NDArray[np.float64]  # AUC ratio with / without the precipitant (within the victim's phenotype)
    exposure: NDArray[np.float64]  # with the precipitant relative to a normal metaboliser without it: the dose answers this
    band: NDArray[np.int8]
    action: NDArray[np.int8]
    study: NDArray[np.bool_]
    flags: NDArray[np.uint8]
    band_names: tuple[str, ...]
    #: pairs screened when the arrays hold only some of them (:func:`worst_pairs`); None when they hold every pair
    screened: int | None = None

    @property
    def pairs(self) -> int:
        """The number of pairs screened."""
        return int(self.total.size) if self.screened is None else self.screened

    def columns(self, top: int | None = None) -> dict[str, NDArray[Any]]:
        """The ranked results as named columns (worst pair first), numbers kept as numbers.

        Parameters
        ----------
        top
            Keep only the ``top`` worst pairs (all by default).

        Returns
        -------
        dict of str to ndarray
            ``rank``, ``perpetrator``, ``victim`` (names), ``imax_u_um``, ``iin_max_u_um``,
            ``igut_um``, ``i_ent_um`` (perpetrator concentrations in uM), ``basic_models`` (text),
            ``auc_ratio_gut``, ``auc_ratio_liver``, ``auc_ratio_kidney``, ``auc_ratio`` (dimensionless; the
            product of the three), ``phenotype`` (text),
            ``exposure_vs_normal`` (dimensionless), ``class``,
            ``study_indicated`` (bool), ``action`` and ``flags`` (text; ``flag_bits`` the same as
            bits of :data:`FLAGS`).  The same rows, in the same order, as :func:`result_rows`.
        """
        order = ranking(self, top)
        n_v = len(self.victims.rows)
        ii, jj = np.divmod(order, n_v)
        p = self.perpetrators
        flag_texts = np.array([flag_text(k) for k in range(1 << len(FLAGS))], dtype=object)
        bits = self.flags.ravel()[order]
        return {
            "rank": np.arange(1, order.size + 1),
            "perpetrator": np.array([r.name for r in p.rows], dtype=object)[ii],
            "victim": np.array([r.name for r in self.victims.rows], dtype=object)[jj],
            "imax_u_um": p.imax_u_um[ii],
            "iin_max_u_um": p.inlet_um[ii],
            "igut_um": p.gut_lumen_um[ii],
            "i_ent_um": p.enterocyte_um[ii],
            "basic_models": np.array(p.basic, dtype=object)[ii],
            "auc_ratio_gut": self.gut.ravel()[order],
            "auc_ratio_liver": self.liver.ravel()[order],
            "auc_ratio_kidney": self.kidney.ravel()[order],
            "auc_ratio": self.total.ravel()[order],
            "phenotype": np.array(self.victims.phenotype, dtype=object)[jj],
            "exposure_vs_normal": self.exposure.ravel()[order],
            "class": np.array(self.band_names, dtype=object)[self.band.ravel()[order]],
            "study_indicated": self.study.ravel()[order],
            "action": np.array(ACTIONS, dtype=object)[self.action.ravel()[order]],
            "flags": flag_texts[bits],
            "flag_bits": bits,
        }

    def to_records(self, top: int | None = None) -> np.ndarray:
        """:meth:`columns` as a numpy structured array (text columns as Python objects)."""
        cols = self.columns(top)
        records = np.empty(cols["rank"].size, dtype=[(k, v.dtype) for k, v in cols.items()])
        for k, v in cols.items():
            records[k] = v
        return records

    def to_pandas(self, top: int | None = None) -> Any:
        """:meth:`columns` as a pandas DataFrame (needs pandas: ``pip install interact[data]``)."""
        from .results import data_frame

        return data_frame(self.columns(top))


def _chunks(n_p: int, n_v: int) -> Iterator[tuple[int, int]]:
    step = max(1, _PAIRS_PER_CHUNK // max(n_v, 1))
    for start in range(0, n_p, step):
        yield start, min(n_p, start + step)


def pair_ratios(
    perpetrators: PerpetratorTable,
    victims: VictimTable,
    *,
    progress: Callable[[int, int], None] | None = None,
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], NDArray[np.float64]]:
    """Gut, liver, kidney and total AUC ratios of the mechanistic static model for every pair, vectorised (total = gut x
    liver x kidney; the kidney ratio is 1 for a victim without renal secretion routes).

    :func:`interact.model.evaluate` with perpetrators along axis 0 and victims along axis 1 (in chunks
    of perpetrators): each perpetrator's Ki,u per target (reversible inhibition) at Iin,max,u and, on the
    gut-wall enzyme, at I,ent; each victim's fm per enzyme (times its phenotype activity in the weighted
    sum) and Fg (1 for an intravenous victim, and where the perpetrator does not act on the gut wall).

    ``progress(done_pairs, all_pairs)`` is called after each chunk.
    """
    n_p, n_v = len(perpetrators.rows), len(victims.rows)
    gut = np.empty((n_p, n_v))
    liver = np.empty((n_p, n_v))
    named = (*victims.enzymes, *(t for t, _ in victims.routes))
    targets = list(perpetrators.targets) + list(dict.fromkeys(e for e in named if e not in perpetrators.targets))
    ki_u = np.where(np.isnan(perpetrators.ki_u_um), np.inf, perpetrators.ki_u_um)  # not given: [I]/Ki,u = 0 exactly
    gut_col = _gut_column(perpetrators)
    perp_gut = ~np.isnan(perpetrators.ki_u_um[:, gut_col]) if gut_col >= 0 else np.zeros(n_p, dtype=bool)
    fg = np.where(victims.oral, victims.fg, 1.0)[None, :]  # Fg = 1 gives a gut ratio of exactly 1 (intravenous victim)
    pathways = [
        model.Pathway(target=targets.index(e), organ="liver", fraction=victims.fm[None, :, k], scale=victims.activity[None, :, k])
        for k, e in enumerate(victims.enzymes)
    ]
    pathways += _route_pathways(victims, targets)
    kidney = np.empty((n_p, n_v))
    done = 0
    for a0, a1 in _chunks(n_p, n_v):
        acting = [model.Acting(target=t, species=0, ki_u=ki_u[a0:a1, t, None]) for t in range(len(perpetrators.targets))]
        organs = list(pathways)
        if gut_col >= 0:  # no gut-wall constant for a perpetrator: Fg = 1, a gut ratio of exactly 1, as assess() has none
            organs.insert(0, model.Pathway(target=gut_col, organ="gut", fraction=np.where(perp_gut[a0:a1, None], fg, 1.0)))
        sites = {
            "liver": (perpetrators.inlet_um[a0:a1, None],),
            "gut": (perpetrators.enterocyte_um[a0:a1, None],),
            "kidney": (perpetrators.imax_u_um[a0:a1, None],),
        }
        r = model.evaluate(acting, organs, sites, {}, include=("reversible",))
        liver[a0:a1] = r.liver
        gut[a0:a1] = r.gut
        kidney[a0:a1] = r.kidney
        done += (a1 - a0) * n_v
        if progress is not None:
            progress(done, n_p * n_v)
    return gut, liver, kidney, gut * liver * kidney


def _route_pathways(victims: VictimTable, targets: list[str]) -> list[model.Pathway]:
    """The victims' transporter routes as model pathways (as :func:`interact.prediction.route_pathways`, on arrays)."""
    out = []
    for r, (t, route) in enumerate(victims.routes):
        assert victims.route_fraction is not None
        f = victims.route_fraction[None, :, r]
        organ = VICTIM_ROUTES[route]
        out.append(model.Pathway(target=targets.index(t), organ=organ, fraction=1.0 - f if organ == "gut" else f))
    return out


def _gut_column(perpetrators: PerpetratorTable) -> int:
    """The perpetrator column of the gut-wall enzyme (CYP3A), or -1."""
    for k, t in enumerate(perpetrators.targets):
        target = resolve_target(t)
        if target is not None and target.gut_wall:
            return k
    return -1


#: peak memory per pair of evaluate_pairs plus ranking, bytes: about 43 measured with tests/bench/bench_batch.py
#: (41 MiB traced for 1,000,000 pairs), with room for the ranking's sort keys and the writer's blocks
BYTES_PER_PAIR: Final = 64
#: the share of the machine's free memory a batch may plan to use
_MEMORY_SHARE: Final = 0.5


def _free_memory_bytes() -> int:
    """Free physical memory (the system's available pages), or 4 GiB when the system does not say."""
    try:
        return int(os.sysconf("SC_AVPHYS_PAGES")) * int(os.sysconf("SC_PAGE_SIZE"))
    except (AttributeError, ValueError, OSError):
        return 4 * 2**30


def fits_in_memory(n_perpetrators: int, n_victims: int) -> bool:
    """Whether every pair's results fit in half the free memory (:data:`BYTES_PER_PAIR` each)."""
    return n_perpetrators * n_victims * BYTES_PER_PAIR <= _MEMORY_SHARE * _free_memory_bytes()


def check_pair_budget(n_perpetrators: int, n_victims: int) -> None:
    """Refuse, before any work, a batch whose pairs would not fit in half the free memory."""
    if fits_in_memory(n_perpetrators, n_victims):
        return
    n = n_perpetrators * n_victims
    need = n * BYTES_PER_PAIR
    free = _free_memory_bytes()
    raise InputError(
        "pairs",
        f"{n_perpetrators:,} perpetrators x {n_victims:,} victims = {n:,}",
        f"would need about {need / 2**30:,.1f} GiB, more than half the {free / 2**30:,.1f} GiB of free memory; "
        "keep only the worst pairs (--top N) or write Parquet (-o FILE.parquet), which are streamed in chunks, "
        "or split the tables and screen the parts one after another",
    )


def count_rows(text: str | bytes, source: str, side: str, *, sheet: str | None = None) -> int:
    """The number of rows a table holds (before validation; cheap): to refuse a batch beyond memory before reading it.

    For an .xlsx workbook (bytes), the sheet's extent as the workbook records it, less the header row.
    """
    if isinstance(text, bytes):
        return _xlsx_extent(text, sheet, source)
    if source.lower().endswith(".toml"):
        return len(re.findall(rf"(?m)^\s*\[\[\s*{side}\s*\]\]", text))
    lines = sum(1 for line in text.splitlines() if line.strip() and not line.lstrip().startswith("#"))
    return max(lines - 1, 0)  # less the header


def evaluate_pairs(
    perpetrators: PerpetratorTable,
    victims: VictimTable,
    rules: RuleSet | str | None = None,
    *,
    progress: Callable[[int, int], None] | None = None,
) -> BatchResult:
    """Every pair: AUC ratios (:func:`pair_ratios`), class band, study verdict, suggested action and flags."""
    rule_set = rules if isinstance(rules, RuleSet) else load_rules(rules)
    classes = load_classes()
    n_p, n_v = len(perpetrators.rows), len(victims.rows)
    check_pair_budget(n_p, n_v)
    gut, liver, kidney, exposure = pair_ratios(perpetrators, victims, progress=progress)
    total = exposure
    phen = np.array([bool(v.phenotypes) for v in victims.rows], dtype=bool)
    if phen.any():
        # a victim with a phenotype: the liver ratio above is relative to a normal metaboliser without the precipitant;
        # within the phenotype it is that over the genotype effect alone (interact.genotype)
        liver = liver.copy()
        liver[:, phen] /= victims.genotype[None, phen]
        total = gut * liver * kidney  # the kidney term does not depend on the genotype
    if not np.isfinite(total).all():  # never a blank ratio: the input ranges keep every ratio finite, so this names a pair if not
        i, j = (int(k) for k in np.argwhere(~np.isfinite(total))[0])
        raise InputError(
            f"pair {perpetrators.rows[i].name} x {victims.rows[j].name}",
            float(total[i, j]),
            "is not a finite AUC ratio; check this perpetrator's Ki and concentrations and the victim's fm values",
        )
    band, study = _band_and_study(total, classes, rule_set)
    action = np.empty(total.shape, dtype=np.int8)
    for js in victims.plan_groups:  # victims whose plans decide alike, at once over all their pairs
        plan = victims.plans[js[0]]
        if js[-1] - js[0] + 1 == len(js):  # a run of victims: views, not copies
            cols: slice | list[int] = slice(js[0], js[-1] + 1)
        else:
            cols = list(js)
        if len(js) == n_v:
            action = choose_regimens(plan, exposure, gut).action  # every victim: no copy
        else:
            action[:, cols] = choose_regimens(plan, exposure[:, cols], gut[:, cols]).action
    # per-perpetrator and per-victim bits first, then broadcast once
    e_cols = victims.enzymes
    t_index = [perpetrators.targets.index(e) if e in perpetrators.targets else -1 for e in e_cols]
    gut_col = _gut_column(perpetrators)
    perp_gut = ~np.isnan(perpetrators.ki_u_um[:, gut_col]) if gut_col >= 0 else np.zeros(n_p, dtype=bool)
    p_bits = (perpetrators.fu_floored.astype(np.uint8) << 1) | (perpetrators.basic_flag.astype(np.uint8) << 4)
    # a victim pathway without a Ki of this perpetrator: bit masks of enzymes (victim has, perpetrator acts on)
    has_ki = np.zeros((n_p, len(e_cols)), dtype=bool)
    for k, t in enumerate(t_index):
        if t >= 0:
            has_ki[:, k] = ~np.isnan(perpetrators.ki_u_um[:, t])
    weights = (1 << np.arange(len(e_cols), dtype=np.int64)) if e_cols else np.zeros(0, dtype=np.int64)
    p_mask = has_ki.astype(np.int64) @ weights if e_cols else np.zeros(n_p, dtype=np.int64)
    v_mask = victims.has_pathway.astype(np.int64) @ weights if e_cols else np.zeros(n_v, dtype=np.int64)
    # the bits that depend on both sides, per kind of perpetrator (its gut-wall Ki and its enzyme mask) and victim
    kinds, kind_of = np.unique(np.column_stack([perp_gut.astype(np.int64), p_mask]), axis=0, return_inverse=True)
    by_kind = (victims.nti.astype(np.uint8) << 2)[None, :] | ((kinds[:, :1] != 0) & (victims.oral & ~victims.fg_given)[None, :]).astype(
        np.uint8
    )
    by_kind |= ((v_mask[None, :] & ~kinds[:, 1:]) != 0).astype(np.uint8) << 3
    flags = by_kind[kind_of.ravel()]
    if p_bits.any():
        flags |= p_bits[:, None]
    for r, (name, _) in enumerate(victims.routes):  # a transporter route without a Ki of this perpetrator
        assert victims.has_route is not None
        col = perpetrators.targets.index(name) if name in perpetrators.targets else -1
        acts = ~np.isnan(perpetrators.ki_u_um[:, col]) if col >= 0 else np.zeros(n_p, dtype=bool)
        flags |= (victims.has_route[None, :, r] & ~acts[:, None]).astype(np.uint8) << 3
    return BatchResult(
        perpetrators=perpetrators,
        victims=victims,
        rules=rule_set,
        gut=gut,
        liver=liver,
        kidney=kidney,
        total=total,
        exposure=exposure,
        band=band,
        action=action,
        study=study,
        flags=flags,
        band_names=band_labels(classes),
    )


def perpetrator_subset(table: PerpetratorTable, rows: slice | NDArray[np.intp]) -> PerpetratorTable:
    """The perpetrators ``rows`` (a slice, or indices in table order) with their per-perpetrator arrays.

    The skipped rows stay with the whole table.
    """
    index = np.arange(len(table.rows))[rows]
    return dataclasses.replace(
        table,
        rows=tuple(table.rows[i] for i in index),
        lines=tuple(table.lines[i] for i in index),
        imax_u_um=table.imax_u_um[rows],
        inlet_um=table.inlet_um[rows],
        enterocyte_um=table.enterocyte_um[rows],
        gut_lumen_um=table.gut_lumen_um[rows],
        ki_u_um=table.ki_u_um[rows],
        fu_floored=table.fu_floored[rows],
        basic=tuple(table.basic[i] for i in index),
        basic_flag=table.basic_flag[rows],
        skipped=(),
    )


#: pairs evaluated at once when a screen is streamed (about 100 MB of arrays)
STREAM_PAIRS: Final = 1 << 20


def _stream_pairs(asked: int | None) -> int:
    """Pairs per streamed chunk: as asked, else :data:`STREAM_PAIRS` within the memory budget."""
    if asked is not None:
        return max(1, asked)
    return max(1, min(STREAM_PAIRS, int(_MEMORY_SHARE * _free_memory_bytes() / BYTES_PER_PAIR)))


def stream_chunks(
    perpetrators: PerpetratorTable,
    victims: VictimTable,
    rules: RuleSet | str | None = None,
    *,
    pairs_per_chunk: int | None = None,
    progress: Callable[[int, int], None] | None = None,
) -> Iterator[tuple[int, BatchResult]]:
    """:func:`evaluate_pairs` for consecutive chunks of perpetrators (each against every victim), with each chunk's first
    perpetrator; memory stays that of one chunk whatever the number of pairs."""
    rule_set = rules if isinstance(rules, RuleSet) else load_rules(rules)
    n_p, n_v = len(perpetrators.rows), len(victims.rows)
    step = max(1, _stream_pairs(pairs_per_chunk) // max(n_v, 1))
    for a in range(0, n_p, step):
        b = min(n_p, a + step)
        yield a, evaluate_pairs(perpetrator_subset(perpetrators, slice(a, b)), victims, rule_set)
        if progress is not None:
            progress(b * n_v, n_p * n_v)


def worst_pairs(
    perpetrators: PerpetratorTable,
    victims: VictimTable,
    top: int,
    rules: RuleSet | str | None = None,
    *,
    pairs_per_chunk: int | None = None,
    progress: Callable[[int, int], None] | None = None,
) -> BatchResult:
    """The ``top`` worst pairs of a screen of any size, in memory bounded by one chunk and the ``top`` pairs.

    The AUC ratios are evaluated chunk by chunk of perpetrators, keeping a running list of the ``top`` worst (by the
    ranking's measure, ties in table order); then the perpetrators in that list are screened again against every
    victim.  The result's :func:`ranking` with ``top`` gives exactly the rows the whole screen's would (every pair
    in the list is one of those pairs, and every other pair of those perpetrators ranks below them);
    :attr:`BatchResult.screened` holds the number of pairs screened.
    """
    rule_set = rules if isinstance(rules, RuleSet) else load_rules(rules)
    n_p, n_v = len(perpetrators.rows), len(victims.rows)
    keep_s = np.zeros(0)
    keep_i = np.zeros(0, dtype=np.int64)
    step = max(1, _stream_pairs(pairs_per_chunk) // max(n_v, 1))
    for a in range(0, n_p, step):
        b = min(n_p, a + step)
        part = perpetrator_subset(perpetrators, slice(a, b))
        *_, exposure = pair_ratios(part, victims)
        if not np.isfinite(exposure).all():
            evaluate_pairs(part, victims, rule_set)  # names the pair, as the whole screen does
        severity = np.abs(np.log(exposure.ravel()))
        local = _worst_first(severity, top)
        s = np.concatenate([keep_s, severity[local]])
        i = np.concatenate([keep_i, local + a * n_v])
        best = np.lexsort((i, -s))[:top]
        keep_s, keep_i = s[best], i[best]
        if progress is not None:
            progress(b * n_v, n_p * n_v)
    chosen = np.unique(keep_i // max(n_v, 1))
    result = evaluate_pairs(perpetrator_subset(perpetrators, chosen), victims, rule_set)
    return dataclasses.replace(
        result, perpetrators=dataclasses.replace(result.perpetrators, skipped=perpetrators.skipped), screened=n_p * n_v
    )


def _study(total: NDArray[np.float64], inhibition: float, induction: float) -> NDArray[np.bool_]:
    """The mechanistic model's study verdict: AUCR at or above the inhibition cutoff, or at or below the induction one."""
    return (total >= inhibition) | (total <= induction)  # type: ignore[no-any-return]


def _band_and_study(total: NDArray[np.float64], classes: Classes, rules: RuleSet) -> tuple[NDArray[np.int8], NDArray[np.bool_]]:
    """Class band codes (:func:`interact.arrays.band_codes`) and study verdicts, for many ratios from one step table."""
    inh, ind = float(rules.aucr_inhibition_cutoff.value), float(rules.aucr_induction_cutoff.value)
    if total.size < 4096:
        return band_codes(total, classes), _study(total, inh, ind)
    steps = _verdict_steps(classes, inh, ind)
    (band, study), _, rest = steps.look_up(total, (0, 1))
    if rest.size:  # at a bound or a cutoff: the comparisons themselves
        r = total.ravel()[rest]
        band[rest], study[rest] = band_codes(r, classes), _study(r, inh, ind)
    return band.reshape(total.shape), study.reshape(total.shape)


@functools.lru_cache(maxsize=8)
def _verdict_steps(classes: Classes, inhibition: float, induction: float) -> StepTable:
    """:func:`_band_and_study` as a step table (:mod:`interact.steps`): both constant between the bounds and cutoffs."""
    points = np.array([b.bound for b in (*classes.inhibition, *classes.induction)] + [inhibition, induction], dtype=float)
    return StepTable.build(points, lambda r: (band_codes(r, classes), _study(r, inhibition, induction)))


def _plan_groups(plans: list[RegimenPlan]) -> tuple[tuple[int, ...], ...]:
    """Victims grouped by what the dose rule reads from their plans (:func:`interact.dosing.choose_regimens`: the
    candidates' exposure factors, kinds and action codes, the intervals, the half-life and the boundaries), so that
    each group's pairs are decided in one call."""
    groups: dict[tuple[Any, ...], list[int]] = {}
    for j, p in enumerate(plans):
        key = (
            p.boundary,
            p.peak_boundary,
            p.trough_boundary,
            p.half_life_h,
            p.usual_interval_h,
            p.factors.tobytes(),
            p.exact.tobytes(),
            p.interval.tobytes(),
            p.codes.tobytes(),
            p.taus_h.tobytes(),
        )
        groups.setdefault(key, []).append(j)
    return tuple(tuple(js) for js in groups.values())


def ranking(result: BatchResult, top: int | None = None) -> NDArray[np.int64]:
    """Flat pair indices (perpetrator x victims + victim), worst first, ties in table order.

    Worst = largest ``|log(exposure vs normal)|``: the AUC ratio itself for a victim without a phenotype; for one with a
    phenotype, the combined drug-drug-gene effect (a poor metaboliser's exposure counts even where the interaction is small).
    """
    return _worst_first(np.abs(np.log(result.exposure.ravel())), top)


def _worst_first(severity: NDArray[np.float64], top: int | None) -> NDArray[np.int64]:
    """Indices of ``severity`` largest first, ties in index order; only the first ``top`` (every tie at the cut is weighed)."""
    if top is not None and top < severity.size:
        cut = np.partition(severity, severity.size - top)[severity.size - top]  # the top-th largest
        part = np.flatnonzero(severity >= cut)
        return part[np.lexsort((part, -severity[part]))][:top]
    return np.argsort(-severity, kind="stable")


# --------------------------------------------------------------------------- output


def flag_text(bits: int) -> str:
    """The names of the flags set in ``bits`` (bit k is ``FLAGS[k]``), joined by "; "."""
    return "; ".join(FLAGS[k] for k in range(len(FLAGS)) if bits >> k & 1)


def _num(x: float) -> str:
    return repr(float(x)) if math.isfinite(x) else ""


def result_rows(result: BatchResult, top: int | None = None) -> Iterator[tuple[str, ...]]:
    """Output rows (see :data:`OUTPUT_COLUMNS`), worst pair first; ``top`` limits the count.

    Built column by column for blocks of ranked pairs (numpy gathers, then one string conversion per column).
    """
    p, v = result.perpetrators, result.victims
    n_v = len(v.rows)
    order = ranking(result, top)
    p_names = [r.name for r in p.rows]
    v_names = [r.name for r in v.rows]
    per_p = [[_num(x) for x in arr.tolist()] for arr in (p.imax_u_um, p.inlet_um, p.gut_lumen_um, p.enterocyte_um)]
    flag_texts = [flag_text(k) for k in range(1 << len(FLAGS))]
    flat_ratios = (result.gut.ravel(), result.liver.ravel(), result.kidney.ravel(), result.total.ravel())
    flat_exposure = result.exposure.ravel()
    flat_band, flat_study, flat_action, flat_flags = (
        result.band.ravel(),
        result.study.ravel(),
        result.action.ravel(),
        result.flags.ravel(),
    )
    block = 65_536
    for start in range(0, order.size, block):
        idx = order[start : start + block]
        ii, jj = np.divmod(idx, n_v)
        il, jl = ii.tolist(), jj.tolist()
        cols = (
            [str(k) for k in range(start + 1, start + 1 + idx.size)],
            [p_names[i] for i in il],
            [v_names[j] for j in jl],
            *([col[i] for i in il] for col in per_p),
            [p.basic[i] for i in il],
            *([_num(x) for x in arr[idx].tolist()] for arr in flat_ratios),
            [v.phenotype[j] for j in jl],
            [_num(x) for x in flat_exposure[idx].tolist()],
            [result.band_names[k] for k in flat_band[idx].tolist()],
            ["yes" if x else "no" for x in flat_study[idx].tolist()],
            [ACTIONS[k] for k in flat_action[idx].tolist()],
            [flag_texts[k] for k in flat_flags[idx].tolist()],
        )
        yield from zip(*cols, strict=True)
