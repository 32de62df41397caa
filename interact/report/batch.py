"""Writing batch-screen results: CSV, JSON (streamed), Parquet, Markdown, a terminal table and .xlsx workbooks.

CSV, JSON and Parquet are written column by column with pyarrow (its CSV and Parquet writers, and its
float-to-text cast for JSON: the shortest text that reads back as the same float, so full precision), in
blocks of ranked pairs, so that the memory the output takes stays bounded by one block whatever the number
of pairs.  Markdown and the terminal table, meant for a person to read, are written row by row from
:func:`interact.batch.result_rows`, rounded.
"""

from __future__ import annotations

import csv
import io
import json
from collections.abc import Callable, Iterable, Iterator
from typing import IO, TYPE_CHECKING, Any, Final

import numpy as np
from numpy.typing import NDArray

from ..batch import FLAGS, OUTPUT_COLUMNS, BatchResult, flag_text, ranking, result_rows
from ..batch_probability import ProbabilityResult, probability_ranking
from ..cautions import CAUTION_LINE
from ..dosing import ACTIONS
from ..errors import InputError
from ..results import BATCH_SCHEMA
from .document import Note, Section, Table, md_escape, render_text, speak, terminal_safe
from .numbers import fmt, fmt_ratio

if TYPE_CHECKING:
    import pyarrow as pa

__all__ = [
    "BATCH_FORMATS",
    "PROBABILITY_FORMATS",
    "probability_batches",
    "result_batches",
    "results_workbook",
    "write_parquet_chunks",
    "write_probabilities",
    "write_results",
]

BATCH_FORMATS = ("csv", "json", "parquet", "markdown", "table", "xlsx")

#: ranked pairs per block written (a block of CSV text is about 30 MB at most)
BLOCK_ROWS = 65_536

#: JSON keys of the output columns, in order
JSON_KEYS = tuple(c.split(" (")[0].replace(",", "_").replace(" ", "_").lower() for c in OUTPUT_COLUMNS)
_TEXT_COLUMNS = ("perpetrator", "victim", "basic models", "phenotype", "class", "action", "flags")
_STUDY = OUTPUT_COLUMNS.index("study indicated (mechanistic model)")

#: the columns of the terminal table and the Markdown file, rounded; CSV and JSON carry every column in full
SHOWN: Final = (
    "rank",
    "perpetrator",
    "victim",
    "Iin,max,u (uM)",
    "AUCR gut",
    "AUCR liver",
    "AUCR kidney",
    "AUCR",
    "class",
    "study indicated (mechanistic model)",
    "basic models",
    "action",
    "flags",
)
_RATIOS: Final = ("AUCR gut", "AUCR liver", "AUCR kidney", "AUCR")


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


def _numbers(values: NDArray[np.float64]) -> pa.Array:
    """A float64 column; a non-finite value is missing (an empty cell, JSON null), never written as nan or inf."""
    import pyarrow as pa

    return pa.array(values, type=pa.float64(), mask=~np.isfinite(values))


def _strings(values: list[str]) -> pa.Array:
    import pyarrow as pa

    return pa.array(values, type=pa.string())


def result_batches(
    result: BatchResult,
    top: int | None = None,
    *,
    block: int = BLOCK_ROWS,
    clean: Callable[[str], str] = str,
    study_text: bool = False,
    texts: dict[str, pa.Array] | None = None,
    ranked: bool = True,
) -> Iterator[pa.RecordBatch]:
    """The ranked results (worst first; ``top`` limits the count) as pyarrow record batches of ``block`` rows.

    With ``ranked`` false, every pair in table order (perpetrator by perpetrator) with an empty ``rank``: the rows
    of one chunk of a streamed screen (:func:`write_parquet_chunks`).

    Columns are :data:`~interact.batch.OUTPUT_COLUMNS`: ``rank`` int64, numbers float64 (concentrations in uM,
    ratios dimensionless; a non-finite value is null), text as strings, ``study indicated (mechanistic model)`` bool (``yes``/``no``
    with ``study_text``).  ``clean`` is applied to the names; ``texts`` replaces the dictionary of a text
    column (one entry per perpetrator, victim, class, action or flag bits).  The rows are those of
    :func:`interact.batch.result_rows`, in the same order.
    """
    import pyarrow as pa

    p, v = result.perpetrators, result.victims
    n_v = len(v.rows)
    order = ranking(result, top) if ranked else np.arange(result.total.size)
    # each text column is a small dictionary (one entry per table row or per label) gathered by index (pyarrow take)
    dictionaries = {
        "perpetrator": _strings([clean(r.name) for r in p.rows]),
        "victim": _strings([clean(r.name) for r in v.rows]),
        "basic models": _strings(list(p.basic)),
        "phenotype": _strings(list(v.phenotype)),
        "class": _strings(list(result.band_names)),
        "action": _strings(list(ACTIONS)),
        "flags": _strings([flag_text(k) for k in range(1 << len(FLAGS))]),
        **(texts or {}),
    }
    yes_no = _strings(["no", "yes"])
    per_p = (p.imax_u_um, p.inlet_um, p.gut_lumen_um, p.enterocyte_um)
    per_pair = (result.gut.ravel(), result.liver.ravel(), result.kidney.ravel(), result.total.ravel())
    exposure = result.exposure.ravel()
    band, study, action, bits = result.band.ravel(), result.study.ravel(), result.action.ravel(), result.flags.ravel()
    for start in range(0, order.size, block):
        idx = order[start : start + block]
        ii, jj = np.divmod(idx, n_v)
        columns = [
            pa.array(np.arange(start + 1, start + 1 + idx.size, dtype=np.int64)) if ranked else pa.nulls(idx.size, pa.int64()),
            dictionaries["perpetrator"].take(ii),
            dictionaries["victim"].take(jj),
            *(_numbers(a[ii]) for a in per_p),
            dictionaries["basic models"].take(ii),
            *(_numbers(a[idx]) for a in per_pair),
            dictionaries["phenotype"].take(jj),
            _numbers(exposure[idx]),
            dictionaries["class"].take(band[idx]),
            yes_no.take(study[idx].astype(np.int8)) if study_text else pa.array(study[idx]),
            dictionaries["action"].take(action[idx]),
            dictionaries["flags"].take(bits[idx]),
        ]
        yield pa.RecordBatch.from_arrays(columns, names=list(OUTPUT_COLUMNS))


def _byte_writer(handle: IO[Any]) -> Callable[[Any], Any]:
    """Write bytes to ``handle``: a binary file directly, a text file through its byte buffer, a StringIO as text."""
    if isinstance(handle, io.TextIOBase):
        buffer = getattr(handle, "buffer", None)
        if buffer is not None:
            handle.flush()
            return buffer.write  # type: ignore[no-any-return]
        return lambda data: handle.write(bytes(data).decode("utf-8"))
    return handle.write


def _write_csv(result: BatchResult, handle: IO[Any], top: int | None) -> int:
    import pyarrow.csv as pa_csv

    header = io.StringIO()
    csv.writer(header, lineterminator="\n").writerow(OUTPUT_COLUMNS)  # the header line as the csv module quotes it
    write = _byte_writer(handle)
    write(header.getvalue().encode("utf-8"))
    options = pa_csv.WriteOptions(include_header=False, quoting_style="needed")  # every text value quoted (RFC 4180)
    count = 0
    # names lose terminal control sequences: the CSV may go to standard output
    for batch in result_batches(result, top, clean=terminal_safe, study_text=True):
        sink = io.BytesIO()
        pa_csv.write_csv(batch, sink, options)
        write(sink.getbuffer())
        count += batch.num_rows
    return count


def _write_parquet(result: BatchResult, handle: IO[Any], top: int | None) -> int:
    return _parquet_batches(result_batches(result, top), handle)


def _parquet_batches(batches: Iterable[pa.RecordBatch], handle: IO[Any]) -> int:
    import pyarrow.parquet as pq

    if isinstance(handle, io.TextIOBase) and getattr(handle, "buffer", None) is None:
        raise InputError("format", "parquet", "is binary; write it to a file (-o results.parquet)")
    if isinstance(handle, io.TextIOBase):
        handle.flush()
        handle = handle.buffer  # type: ignore[attr-defined]
    count = 0
    writer = None
    try:
        for batch in batches:
            if writer is None:
                writer = pq.ParquetWriter(handle, batch.schema)
            writer.write_batch(batch)
            count += batch.num_rows
    finally:
        if writer is not None:
            writer.close()
    return count


def write_parquet_chunks(chunks: Iterable[tuple[int, BatchResult]], handle: IO[Any]) -> int:
    """A streamed screen (:func:`interact.batch.stream_chunks`) to Parquet, chunk after chunk; returns rows written.

    Rows come in table order (perpetrator by perpetrator) with an empty ``rank``: ranking every pair would need
    them all in memory.  Sort the file by ``exposure vs normal`` (largest ``|log|`` first), or keep the worst
    pairs with ``--top N``, which is ranked.
    """

    def batches() -> Iterator[pa.RecordBatch]:
        for _, chunk in chunks:
            yield from result_batches(chunk, ranked=False)

    return _parquet_batches(batches(), handle)


#: the formats of a probabilistic screen's results
PROBABILITY_FORMATS: Final = ("csv", "parquet")


def probability_batches(result: ProbabilityResult, top: int | None = None, *, block: int = BLOCK_ROWS) -> Iterator[pa.RecordBatch]:
    """A probabilistic screen's pairs, most probable dose change first, as pyarrow record batches.

    Columns: ``rank``, ``perpetrator``, ``victim``, the point screen's ``AUCR``, ``exposure vs normal``, ``class`` and
    ``action``, then ``P(<class>)`` for every class (they sum to 1 per pair) and ``P(dose change)`` (any action but
    "no change"), fractions of ``samples`` draws.
    """
    import pyarrow as pa

    point = result.point
    p, v = point.perpetrators, point.victims
    n_v = len(v.rows)
    order = probability_ranking(result, top)
    names = (
        ["rank", "perpetrator", "victim", "AUCR", "exposure vs normal", "class", "action"]
        + [f"P({c})" for c in point.band_names]
        + ["P(dose change)"]
    )
    perpetrator, victim = _strings([terminal_safe(r.name) for r in p.rows]), _strings([terminal_safe(r.name) for r in v.rows])
    classes, actions = _strings(list(point.band_names)), _strings(list(ACTIONS))
    cp = result.class_probability.reshape(-1, len(point.band_names))
    for start in range(0, order.size, block):
        idx = order[start : start + block]
        ii, jj = np.divmod(idx, n_v)
        columns = [
            pa.array(np.arange(start + 1, start + 1 + idx.size, dtype=np.int64)),
            perpetrator.take(ii),
            victim.take(jj),
            _numbers(point.total.ravel()[idx]),
            _numbers(point.exposure.ravel()[idx]),
            classes.take(point.band.ravel()[idx]),
            actions.take(point.action.ravel()[idx]),
            *(pa.array(cp[idx, k]) for k in range(cp.shape[1])),
            pa.array(result.change_probability.ravel()[idx]),
        ]
        yield pa.RecordBatch.from_arrays(columns, names=names)


def write_probabilities(result: ProbabilityResult, handle: IO[Any], fmt_name: str = "csv", *, top: int | None = None) -> int:
    """Write a probabilistic screen (:func:`probability_batches`) as ``csv`` or ``parquet``; returns rows written.

    A CSV starts with ``#`` comment lines: the caution, the varied quantities, samples and seed.
    """
    if fmt_name == "parquet":
        return _parquet_batches(probability_batches(result, top), handle)
    if fmt_name != "csv":
        raise InputError("--format", fmt_name, f"is not one of {', '.join(PROBABILITY_FORMATS)} for a probabilistic screen (--samples)")
    import pyarrow.csv as pa_csv

    write = _byte_writer(handle)
    head = (
        f"# {CAUTION_LINE}\n# varied: {result.variation.describe()}; {result.samples:,} samples per pair, seed {result.seed}; "
        "P(...) are fractions of the samples\n"
    )
    count = 0
    for batch in probability_batches(result, top):
        sink = io.BytesIO()
        if count == 0:
            write(head.encode("utf-8"))
            header = io.StringIO()
            csv.writer(header, lineterminator="\n").writerow(batch.schema.names)
            write(header.getvalue().encode("utf-8"))
        pa_csv.write_csv(batch, sink, pa_csv.WriteOptions(include_header=False, quoting_style="needed"))
        write(sink.getbuffer())
        count += batch.num_rows
    return count


def _write_json(result: BatchResult, handle: IO[Any], top: int | None) -> int:
    import pyarrow as pa
    import pyarrow.compute as pc

    write = _byte_writer(handle)
    head = {
        "schema": BATCH_SCHEMA,
        "rules": result.rules.id,
        "pairs": result.pairs,
        "perpetrators": result.pairs // max(1, len(result.victims.rows)),
        "victims": len(result.victims.rows),
        "skipped_rows": [str(s) for s in (*result.perpetrators.skipped, *result.victims.skipped)],
        "caution": CAUTION_LINE,
    }
    write((json.dumps(head, indent=1)[:-2] + ',\n "results": [\n').encode("utf-8"))
    p, v = result.perpetrators, result.victims
    # text columns: each distinct value JSON-encoded once, then gathered by index like the plain text
    texts: dict[str, list[Any]] = {
        "perpetrator": [r.name for r in p.rows],
        "victim": [r.name for r in v.rows],
        "basic models": list(p.basic),
        "phenotype": list(v.phenotype),
        "class": list(result.band_names),
        "action": list(ACTIONS),
        "flags": [[f for f in flag_text(k).split("; ") if f] for k in range(1 << len(FLAGS))],
    }
    as_json = {name: _strings([json.dumps(x, allow_nan=False) for x in values]) for name, values in texts.items()}
    count = 0
    for batch in result_batches(result, top, texts=as_json):
        parts: list[Any] = []
        for k, (name, key) in enumerate(zip(OUTPUT_COLUMNS, JSON_KEYS, strict=True)):
            parts.append((",\n  {" if k == 0 else ", ") + json.dumps(key) + ": ")
            column = batch.column(k)
            if name in _TEXT_COLUMNS:
                parts.append(column)  # already JSON text
            elif k == _STUDY:
                parts.append(pc.if_else(column, "true", "false"))
            else:  # numbers: pyarrow's shortest text that reads back as the same float; missing as null
                parts.append(pc.fill_null(column.cast(pa.string()), "null"))
        parts.append("}")
        rows = pc.binary_join_element_wise(*parts, "")
        _, offsets, data = rows.buffers()  # the rows' text, end to end (int32 offsets: a block is far below 2 GiB)
        bounds = np.frombuffer(offsets, dtype=np.int32)[rows.offset : rows.offset + len(rows) + 1]
        first, last = int(bounds[0]), int(bounds[-1])
        skip = 2 if count == 0 else 0  # the first row has no ",\n" before it
        write(memoryview(data)[first + skip : last])
        count += batch.num_rows
    write(b"\n ]\n}\n")
    return count


def _text_writer(handle: IO[Any]) -> Callable[[str], Any]:
    if isinstance(handle, io.TextIOBase):
        return handle.write
    return lambda text: handle.write(text.encode("utf-8"))


def write_results(result: BatchResult, handle: IO[Any], fmt_name: str = "csv", *, top: int | None = None, width: int = 100) -> int:
    """Write the ranked results to an open ``handle`` as ``csv``, ``json``, ``parquet``, ``markdown`` or ``table``; returns rows written.

    Numbers are written in full precision for CSV, JSON and Parquet (concentrations in uM, ratios dimensionless)
    and rounded like every report (``numbers.fmt``, ``fmt_ratio``) in Markdown and in the terminal ``table``.
    ``handle`` may be a text or a binary file (Parquet needs one with bytes underneath); CSV and JSON go in UTF-8
    bytes through a text file's buffer.
    """
    if fmt_name == "csv":
        return _write_csv(result, handle, top)
    if fmt_name == "json":
        return _write_json(result, handle, top)
    if fmt_name == "parquet":
        return _write_parquet(result, handle, top)
    text_out = _text_writer(handle)
    count = 0
    if fmt_name == "markdown":
        text_out(f"# interact batch screen ({_md(result.rules.id)})\n\n> **Caution:** {CAUTION_LINE}\n\n")
        terms = result.rules.terms  # a document for reading: the rule set's words (the CSV and JSON keys stay)
        text_out(
            speak(
                f"{result.pairs:,} pairs: {result.pairs // max(1, len(result.victims.rows))} perpetrators x "
                f"{len(result.victims.rows)} victims, worst first (largest |log AUCR|).\n\n",
                terms,
            )
        )
        idx = [OUTPUT_COLUMNS.index(c) for c in SHOWN]
        names = (OUTPUT_COLUMNS.index("perpetrator"), OUTPUT_COLUMNS.index("victim"))
        text_out("| " + " | ".join(speak(h, terms) for h in SHOWN) + " |\n|" + "|".join("---" for _ in SHOWN) + "|\n")
        for row in result_rows(result, top):
            cells = (row[i] if i in names else speak(_rounded(OUTPUT_COLUMNS[i], row[i]), terms) for i in idx)
            text_out("| " + " | ".join(_md(c) for c in cells) + " |\n")
            count += 1
        skipped = (*result.perpetrators.skipped, *result.victims.skipped)
        if skipped:
            text_out("\n## Rows left out\n\n" + "".join(f"- {_md(str(s))}\n" for s in skipped))
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
            f"{result.pairs:,} pairs: {result.pairs // max(1, len(result.victims.rows))} perpetrators x "
            f"{len(result.victims.rows)} victims, rule set {result.rules.id}, worst first (largest |log AUCR|). "
            "'study' says whether a clinical study is indicated by the mechanistic static model (AUCR against its cutoff) "
            "and by any basic static model. "
            "Every column in full precision: --format csv, or -o FILE.csv.",
            terms,
        )
        sections = [Section(title="", blocks=(intro, Note(text=CAUTION_LINE), Table(headers=headers, rows=tuple(rows))))]
        text_out(render_text(sections, width=width))
        count = len(rows)
    else:
        raise InputError("format", fmt_name, "is not csv, json, parquet, markdown or table")
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
