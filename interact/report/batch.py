"""Writing batch-screen results: CSV, JSON (streamed), Markdown and .xlsx workbooks."""

from __future__ import annotations

import csv
import json
from typing import Any, Final, TextIO

import numpy as np

from ..batch import OUTPUT_COLUMNS, BatchResult, result_rows
from ..cautions import CAUTION_LINE
from ..errors import InputError
from ..results import BATCH_SCHEMA
from .document import Note, Section, Table, md_escape, render_text, speak, terminal_safe
from .numbers import fmt, fmt_ratio

__all__ = ["BATCH_FORMATS", "results_workbook", "write_results"]

BATCH_FORMATS = ("csv", "json", "markdown", "table", "xlsx")

#: the columns of the terminal table and the Markdown file, rounded; CSV and JSON carry every column in full
SHOWN: Final = (
    "rank",
    "perpetrator",
    "victim",
    "Iin,max,u (uM)",
    "AUCR gut",
    "AUCR liver",
    "AUCR",
    "class",
    "study indicated (mechanistic model)",
    "basic models",
    "action",
    "flags",
)
_RATIOS: Final = ("AUCR gut", "AUCR liver", "AUCR")


def _basic_rounded(cell: str) -> str:
    """'R1 CYP3A 3.459 STUDY; ...' with each value rounded like every other ratio."""
    out = []
    for entry in cell.split("; "):
        words = entry.split(" ")
        at = len(words) - (2 if words[-1] == "STUDY" else 1)
        try:
            words[at] = fmt_ratio(float(words[at]))
        except (ValueError, IndexError):
            pass  # not a number where one is expected: shown as written
        out.append(" ".join(words))
    return "; ".join(out)


def _rounded(col: str, cell: str) -> str:
    if not cell:
        return cell
    if col == "basic models":
        return _basic_rounded(cell)
    if col in _RATIOS:
        return fmt_ratio(float(cell))
    if col.endswith("(uM)"):
        return fmt(float(cell))
    return cell


def _md(text: str) -> str:
    return md_escape(text)


def write_results(result: BatchResult, handle: TextIO, fmt_name: str = "csv", *, top: int | None = None, width: int = 100) -> int:
    """Write the ranked results to an open text ``handle`` as ``csv``, ``json``, ``markdown`` or ``table``; returns rows written.

    Numbers are written in full precision for CSV and JSON (concentrations in
    uM, ratios dimensionless) and rounded like every report (``numbers.fmt``,
    ``fmt_ratio``) in Markdown and in the terminal ``table``.
    """
    count = 0
    if fmt_name == "csv":
        w = csv.writer(handle, lineterminator="\n")
        w.writerow(OUTPUT_COLUMNS)
        safe = terminal_safe  # names reach a terminal when the CSV goes to standard output
        w.writerows((r[0], safe(r[1]), safe(r[2]), *r[3:]) for r in result_rows(result, top))
        count = result.pairs if top is None else min(top, result.pairs)
    elif fmt_name == "json":
        head = {
            "schema": BATCH_SCHEMA,
            "rules": result.rules.id,
            "pairs": result.pairs,
            "perpetrators": len(result.perpetrators.rows),
            "victims": len(result.victims.rows),
            "skipped_rows": [str(s) for s in (*result.perpetrators.skipped, *result.victims.skipped)],
            "caution": CAUTION_LINE,
        }
        handle.write(json.dumps(head, indent=1)[:-2] + ',\n "results": [\n')
        keys = [c.split(" (")[0].replace(",", "_").replace(" ", "_").lower() for c in OUTPUT_COLUMNS]
        first = True
        for row in result_rows(result, top):
            d: dict[str, Any] = dict(zip(keys, row, strict=True))
            d["rank"] = int(d["rank"])
            for k in ("imax_u", "iin_max_u", "igut", "i_ent", "aucr_gut", "aucr_liver", "aucr"):
                d[k] = float(d[k]) if d[k] else None
            d["study_indicated"] = d["study_indicated"] == "yes"
            d["flags"] = [f for f in d["flags"].split("; ") if f]
            handle.write(("" if first else ",\n") + "  " + json.dumps(d, allow_nan=False))
            first = False
            count += 1
        handle.write("\n ]\n}\n")
    elif fmt_name == "markdown":
        handle.write(f"# interact batch screen ({_md(result.rules.id)})\n\n> **Caution:** {CAUTION_LINE}\n\n")
        terms = result.rules.terms  # a document for reading: the rule set's words (the CSV and JSON keys stay)
        handle.write(
            speak(
                f"{result.pairs:,} pairs: {len(result.perpetrators.rows)} perpetrators x {len(result.victims.rows)} victims, "
                "worst first (largest |log AUCR|).\n\n",
                terms,
            )
        )
        idx = [OUTPUT_COLUMNS.index(c) for c in SHOWN]
        names = (OUTPUT_COLUMNS.index("perpetrator"), OUTPUT_COLUMNS.index("victim"))
        handle.write("| " + " | ".join(speak(h, terms) for h in SHOWN) + " |\n|" + "|".join("---" for _ in SHOWN) + "|\n")
        for row in result_rows(result, top):
            cells = (row[i] if i in names else speak(_rounded(OUTPUT_COLUMNS[i], row[i]), terms) for i in idx)
            handle.write("| " + " | ".join(_md(c) for c in cells) + " |\n")
            count += 1
        skipped = (*result.perpetrators.skipped, *result.victims.skipped)
        if skipped:
            handle.write("\n## Rows left out\n\n" + "".join(f"- {_md(str(s))}\n" for s in skipped))
    elif fmt_name == "table":
        # for a person at a terminal: the main columns, rounded like every other output, in the rule set's words
        terms = result.rules.terms
        col = {c: OUTPUT_COLUMNS.index(c) for c in OUTPUT_COLUMNS}
        basic_flag = "basic model flags a study"
        rows = []
        for row in result_rows(result, top):
            flags = [f for f in row[col["flags"]].split("; ") if f]
            rows.append(
                (
                    row[col["rank"]],
                    row[col["perpetrator"]],
                    row[col["victim"]],
                    _rounded("AUCR", row[col["AUCR"]]),
                    row[col["class"]],
                    row[col["study indicated (mechanistic model)"]],
                    "yes" if basic_flag in flags else "no",
                    row[col["action"]],
                    speak("; ".join(f for f in flags if f != basic_flag), terms) or "-",
                )
            )
        headers = tuple(
            speak(h, terms)
            for h in (
                "rank",
                "perpetrator",
                "victim",
                "AUCR",
                "class",
                "study: mechanistic model",
                "study: basic models",
                "action",
                "flags",
            )
        )
        intro = speak(
            f"{result.pairs:,} pairs: {len(result.perpetrators.rows)} perpetrators x {len(result.victims.rows)} victims, "
            f"rule set {result.rules.id}, worst first (largest |log AUCR|). 'study' says whether a clinical study is indicated "
            "by the mechanistic static model (AUCR against its cutoff) and by any basic static model. "
            "Every column in full precision: --format csv, or -o FILE.csv.",
            terms,
        )
        sections = [Section(title="", blocks=(intro, Note(text=CAUTION_LINE), Table(headers=headers, rows=tuple(rows))))]
        handle.write(render_text(sections, width=width))
        count = len(rows)
    else:
        raise InputError("format", fmt_name, "is not csv, json, markdown or table")
    return count


def results_workbook(result: BatchResult, *, top: int | None = None, generated_at: str = "") -> bytes:
    """The ranked results as an .xlsx workbook (openpyxl, streamed in write-only mode); returns its bytes.

    Sheets: ``results`` (one row per pair, worst first, numbers as numbers, units in the headers),
    ``inputs`` (each perpetrator's and victim's values as used, with its source line, then the
    provenance: tool, rule set, tables, source files) and ``cautions`` (the cautions and the flags'
    meanings).

    Raises
    ------
    InputError
        When openpyxl is not installed.
    """
    import io
    import math

    try:
        from openpyxl import Workbook
    except ImportError:
        raise InputError("format", "xlsx", "needs openpyxl: pip install 'interact[data]' (or pip install openpyxl)") from None
    from .. import __version__
    from ..batch import COLUMN_KEYS, FLAGS
    from ..cautions import CAUTIONS, DOSE_CAUTIONS
    from ..tables import table_versions

    book = Workbook(write_only=True)
    sheet = book.create_sheet("results")
    sheet.append(list(OUTPUT_COLUMNS))
    cols = result.columns(top)
    data = [cols[k] for k in COLUMN_KEYS]
    for k in range(cols["rank"].size):
        row: list[Any] = []
        for column in data:
            value = column[k]
            if isinstance(value, (float, np.floating)):
                row.append(float(value) if math.isfinite(value) else None)
            elif isinstance(value, (bool, np.bool_)):
                row.append("yes" if value else "no")
            elif isinstance(value, np.integer):
                row.append(int(value))
            else:
                row.append(value)
        sheet.append(row)

    p, v = result.perpetrators, result.victims
    inputs = book.create_sheet("inputs")
    inputs.append(["Perpetrators (precipitants), as used", f"source: {p.source}"])
    inputs.append(
        ["name", "source line", "Imax,u (uM)", "Iin,max,u (uM)", "Igut (uM)", "I,ent (uM)", *(f"Ki,u {t} (uM)" for t in p.targets)]
    )
    for i, r in enumerate(p.rows):
        kis = [None if math.isnan(x) else float(x) for x in p.ki_u_um[i].tolist()]
        inputs.append(
            [r.name, p.lines[i], float(p.imax_u_um[i]), float(p.inlet_um[i]), float(p.gut_lumen_um[i]), float(p.enterocyte_um[i]), *kis]
        )
    inputs.append([])
    inputs.append(["Victims (object drugs), as used", f"source: {v.source}"])
    inputs.append(["name", "source line", "route", "Fg", "phenotype", *(f"fm {e}" for e in v.enzymes)])
    for j, victim in enumerate(v.rows):
        inputs.append(
            [
                victim.name,
                v.lines[j],
                "oral" if v.oral[j] else "intravenous",
                float(v.fg[j]) if v.fg_given[j] else "not given (1)",
                v.phenotype[j],
                *(float(x) for x in v.fm[j].tolist()),
            ]
        )
    inputs.append([])
    inputs.append(["Provenance"])
    inputs.append(["tool", f"interact {__version__}"])
    inputs.append(
        ["rule set", f"{result.rules.title} [{result.rules.id}, version {result.rules.version}, table {result.rules.table_version}]"]
    )
    for name, version in table_versions():
        inputs.append([f"{name} table", version])
    inputs.append(["schema of the results sheet", f"{BATCH_SCHEMA} (columns as in CSV output)"])
    if generated_at:
        inputs.append(["generated", generated_at])
    skipped = (*p.skipped, *v.skipped)
    if skipped:
        inputs.append([])
        inputs.append(["Rows left out"])
        for s in skipped:
            inputs.append([str(s)])

    cautions = book.create_sheet("cautions")
    cautions.append(["Cautions"])
    for c in (CAUTION_LINE, *CAUTIONS, *DOSE_CAUTIONS):
        cautions.append([c])
    cautions.append([])
    cautions.append(["Flags in the results sheet"])
    for f in FLAGS:
        cautions.append([f])
    out = io.BytesIO()
    book.save(out)
    return out.getvalue()
