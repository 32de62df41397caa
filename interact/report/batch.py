"""Writing batch-screen results: CSV, JSON (streamed), Markdown and .xlsx workbooks."""

from __future__ import annotations

import csv
import json
from typing import Any, TextIO

import numpy as np

from ..batch import OUTPUT_COLUMNS, BatchResult, result_rows
from ..cautions import CAUTION_LINE
from ..errors import InputError
from ..results import BATCH_SCHEMA
from .document import md_escape, terminal_safe
from .numbers import fmt

__all__ = ["BATCH_FORMATS", "results_workbook", "write_results"]

BATCH_FORMATS = ("csv", "json", "markdown", "xlsx")


def _md(text: str) -> str:
    return md_escape(text)


def write_results(result: BatchResult, handle: TextIO, fmt_name: str = "csv", *, top: int | None = None) -> int:
    """Write the ranked results to an open text ``handle`` as ``csv``, ``json`` or ``markdown``; returns rows written.

    Numbers are written in full precision for CSV and JSON (concentrations in
    uM, ratios dimensionless) and to 3 significant figures in Markdown.
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
        handle.write(
            f"{result.pairs:,} pairs: {len(result.perpetrators.rows)} perpetrators x {len(result.victims.rows)} victims, "
            "worst first (largest |log AUCR|).\n\n"
        )
        shown = ("rank", "perpetrator", "victim", "Iin,max,u (uM)", "AUCR gut", "AUCR liver", "AUCR", "class", "action", "flags")
        idx = [OUTPUT_COLUMNS.index(c) for c in shown]
        handle.write("| " + " | ".join(shown) + " |\n|" + "|".join("---" for _ in shown) + "|\n")
        for row in result_rows(result, top):
            cells = []
            for col in idx:
                cell = row[col]
                if OUTPUT_COLUMNS[col] in ("Iin,max,u (uM)", "AUCR gut", "AUCR liver", "AUCR") and cell:
                    cell = fmt(float(cell))
                cells.append(_md(cell))
            handle.write("| " + " | ".join(cells) + " |\n")
            count += 1
        skipped = (*result.perpetrators.skipped, *result.victims.skipped)
        if skipped:
            handle.write("\n## Rows left out\n\n" + "".join(f"- {_md(str(s))}\n" for s in skipped))
    else:
        raise InputError("format", fmt_name, "is not csv, json or markdown")
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
