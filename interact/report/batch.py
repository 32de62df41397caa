"""Writing batch-screen results: CSV, JSON (streamed) and Markdown."""

from __future__ import annotations

import csv
import json
from typing import Any, TextIO

from ..batch import OUTPUT_COLUMNS, BatchResult, result_rows
from ..cautions import CAUTION_LINE
from ..errors import InputError
from .document import md_escape, terminal_safe
from .numbers import fmt

__all__ = ["BATCH_FORMATS", "write_results"]

BATCH_FORMATS = ("csv", "json", "markdown")


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
            "schema": "interact.batch/1",
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
