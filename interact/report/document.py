"""A small document model (sections of paragraphs and tables) and its renderers.

Every report format (plain text, Markdown, HTML) renders the same sections,
so that what a shell shows and what a file holds never drift apart.
"""

from __future__ import annotations

import re
import textwrap
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from functools import lru_cache

from ..sources import cited_keys, full_citation, load_sources, resolve
from ..tables import Terms

__all__ = [
    "REFERENCES_TITLE",
    "Note",
    "Section",
    "Table",
    "cite",
    "cite_data",
    "keep_together",
    "list_groups",
    "md_escape",
    "render_markdown",
    "render_text",
    "speak",
    "speak_data",
    "speak_sections",
    "terminal_safe",
    "without_empty_columns",
]

REFERENCES_TITLE = "References"

# Escape sequences (ECMA-48: CSI ... final byte, OSC/DCS/SOS/PM/APC ... terminator, two-byte ESC x) and then any
# lone control character: C0 except tab and newline, DEL, C1, and the Unicode bidirectional overrides and isolates,
# which reorder what follows them on screen.
_ESCAPE_SEQUENCE = re.compile(
    r"(?:\x1b\[|\x9b)[0-?]*[ -/]*[@-~]"  # CSI
    r"|(?:\x1b[\]PX^_]|[\x90\x98\x9d\x9e\x9f])[^\x07\x1b\x9c]*(?:\x07|\x1b\\|\x9c)?"  # OSC, DCS, SOS, PM, APC
    r"|\x1b[ -/]*[0-~]?"  # other ESC sequences (and a lone ESC)
)
_CONTROL = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\u200e\u200f\u202a-\u202e\u2066-\u2069]")


def terminal_safe(text: str) -> str:
    """``text`` without terminal escape sequences or control characters (newlines and tabs kept).

    A name ending in an escape sequence (say, the one that conceals what follows) must not hide
    the cautions printed after it.
    """
    if text.isprintable():
        return text
    return _CONTROL.sub("", _ESCAPE_SEQUENCE.sub("", text))


# inline markup, links and images (& < > become entities); an underscore inside a word opens no emphasis (CommonMark's
# flanking rules), so ki_ci stays readable
_MD_SPECIAL = re.compile(r"([\\`*\[\]#!|~]|(?<![A-Za-z0-9])_|_(?![A-Za-z0-9]))")
_MD_ENTITY = re.compile(r"&(?=#\d+;|#[xX][0-9a-fA-F]+;|[A-Za-z][A-Za-z0-9]*;)")
_MD_LINE_START = re.compile(r"^(\s*)([-+]|\d{1,9}[.)])(?=\s|$)")  # a list item: the marker, then a space or the end
_MD_RULE = re.compile(r"^(\s*)([-=])(?=[\s=-]*$)")  # a line of - or = alone: a thematic break or a setext underline


def md_escape(text: str) -> str:
    """``text`` as literal Markdown: HTML neutralised (``< >`` and an ``&`` that would start an entity become
    entities), Markdown punctuation backslash-escaped, line breaks and control characters removed, so that user
    text cannot open a block, a link, an image or raw HTML."""
    flat = terminal_safe(text).replace("\r", " ").replace("\n", " ").replace("\t", " ")
    flat = _MD_ENTITY.sub("&amp;", flat).replace("<", "&lt;").replace(">", "&gt;")
    flat = _MD_SPECIAL.sub(r"\\\1", flat)
    return _MD_RULE.sub(r"\1\\\2", _MD_LINE_START.sub(_escape_marker, flat))


def _escape_marker(m: re.Match[str]) -> str:
    indent, marker = m.group(1), m.group(2)
    return indent + marker[:-1] + "\\" + marker[-1]


@dataclass(frozen=True, slots=True, kw_only=True)
class Table:
    headers: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]


@dataclass(frozen=True, slots=True, kw_only=True)
class Note:
    """A highlighted paragraph (a caution or a verdict)."""

    text: str
    kind: str = "caution"


@dataclass(frozen=True, slots=True, kw_only=True)
class Section:
    title: str
    blocks: tuple[str | Table | Note, ...] = field(default_factory=tuple)


def _texts(sections: list[Section]) -> Iterator[str]:
    for section in sections:
        yield section.title
        for block in section.blocks:
            if isinstance(block, Table):
                yield from block.headers
                for row in block.rows:
                    yield from row
            elif isinstance(block, Note):
                yield block.text
            else:
                yield block


def map_text(block: str | Table | Note, f: Callable[[str], str]) -> str | Table | Note:
    """The block with ``f`` applied to every piece of its text (headers and cells of a table, a note's text)."""
    if isinstance(block, Table):
        return Table(headers=tuple(f(h) for h in block.headers), rows=tuple(tuple(f(c) for c in r) for r in block.rows))
    if isinstance(block, Note):
        return Note(text=f(block.text), kind=block.kind)
    return f(block)


def references_section(keys: tuple[str, ...]) -> Section:
    """Full citations of ``keys``, in the order given, each under its short author-year form."""
    sources = load_sources()
    return Section(title=REFERENCES_TITLE, blocks=tuple(f"- {sources[k].short}: {full_citation(k)}" for k in keys))


def cite(sections: list[Section], *, every_source: bool = False) -> list[Section]:
    """Resolve citation markers (``[@lee2024]``) to short author-year forms and end with the references they cite.

    The references section lists exactly the sources cited in ``sections`` (all of the
    registry with ``every_source``).  Idempotent: resolved sections cite nothing further.
    """
    keys = tuple(load_sources()) if every_source else cited_keys(_texts(sections))
    if not keys:
        return sections
    known = load_sources()
    keys = tuple(k for k in keys if k in known)
    out = [Section(title=resolve(sec.title), blocks=tuple(map_text(b, resolve) for b in sec.blocks)) for sec in sections]
    return [*out, references_section(keys)] if keys else out


def without_empty_columns(table: Table) -> Table:
    """The table without columns that hold nothing: an empty header over empty (or "-") cells, or no cell text at all."""
    cols = len(table.headers)

    def cell(row: tuple[str, ...], i: int) -> str:
        return row[i].strip() if i < len(row) else ""

    keep = [
        i
        for i in range(cols)
        if any(cell(r, i) for r in table.rows) and (table.headers[i].strip() or any(cell(r, i) not in ("", "-") for r in table.rows))
    ]
    if len(keep) == cols or not keep:
        return table
    return Table(headers=tuple(table.headers[i] for i in keep), rows=tuple(tuple(cell(r, i) for i in keep) for r in table.rows))


_UNIT_AFTER_NUMBER = re.compile(
    r"(?<=\d) (?=(?:x |/)?(?:[uµnmp]?M|[uµnm]?mol|[uµnm]?g|[um]?L|1/min|1/h|h|min|d|days?|weeks?|%|L/min|L/h|mL/min|"
    r"g/mol|[uµnm]g/mL|mg/mL|cells|fold)\b)"
)


_OPERATOR_BEFORE_NUMBER = re.compile(r"(?<=[<>=]) (?=[-+]?\d)")


def keep_together(text: str) -> str:
    """``text`` with a no-break space between a number and its unit and after a comparison (>= 11), so that a line
    never breaks between them."""
    return _OPERATOR_BEFORE_NUMBER.sub("\u00a0", _UNIT_AFTER_NUMBER.sub("\u00a0", text))


def list_groups(blocks: tuple[str | Table | Note, ...]) -> Iterator[str | Table | Note | list[str]]:
    """The blocks with runs of "- " paragraphs gathered into lists (for renderers that have real lists)."""
    run: list[str] = []
    for b in blocks:
        if isinstance(b, str) and b.startswith("- "):
            run.append(b[2:])
            continue
        if run:
            yield run
            run = []
        yield b
    if run:
        yield run


def _strings(data: object) -> Iterator[str]:
    if isinstance(data, str):
        yield data
    elif isinstance(data, dict):
        for v in data.values():
            yield from _strings(v)
    elif isinstance(data, (list, tuple)):
        for v in data:
            yield from _strings(v)


def _resolve_data(data: object) -> object:
    if isinstance(data, str):
        return resolve(data)
    if isinstance(data, dict):
        return {k: _resolve_data(v) for k, v in data.items()}
    if isinstance(data, (list, tuple)):
        return [_resolve_data(v) for v in data]
    return data


def cite_data(data: dict[str, object]) -> dict[str, object]:
    """JSON-ready ``data`` with citation markers resolved and a ``references`` list of exactly the sources cited.

    Idempotent: references already listed in ``data`` are kept and new ones appended.
    """
    known = load_sources()
    keys = [k for k in cited_keys(_strings(data)) if k in known]
    earlier = data.get("references")
    out = _resolve_data({k: v for k, v in data.items() if k != "references"})
    assert isinstance(out, dict)
    listed = list(earlier) if isinstance(earlier, list) else []
    have = {r.get("cited_as") for r in listed if isinstance(r, dict)}
    out["references"] = listed + [
        {
            "cited_as": known[k].short,
            "citation": full_citation(k),
            "authors": known[k].authors,
            "title": known[k].title,
            "published": known[k].published,
            "year": known[k].year,
            "locator": known[k].locator,
            "doi": known[k].doi or None,
            "url": known[k].url or None,
            "kind": known[k].kind,
            "read": known[k].read,
        }
        for k in keys
        if known[k].short not in have
    ]
    return out


def _plural(noun: str) -> str:
    head, _, last = noun.rpartition(" ")
    return f"{head} {last}s".strip() if head else f"{noun}s"


def _cap(word: str) -> str:
    return word[:1].upper() + word[1:]


@lru_cache(maxsize=8)
def _term_pattern(terms: Terms) -> tuple[re.Pattern[str], dict[str, str]]:
    """One pattern for every older word (longest first) and the replacement of each match, for ``terms``."""
    pairs = (
        ("victim drugs", _plural(terms.object)),
        ("victim drug", terms.object),
        ("victims", _plural(terms.object)),
        ("victim", terms.object),
        ("perpetrators", _plural(terms.precipitant)),
        ("perpetrator", terms.precipitant),
    )
    table: dict[str, str] = {}
    for old, new in pairs:
        article = "an" if new[:1].lower() in "aeiou" else "a"  # "a victim" -> "an object drug"
        table[f"a {old}"] = f"{article} {new}"
        table[f"A {old}"] = f"{_cap(article)} {new}"
        table[old] = new
        table[_cap(old)] = _cap(new)
    words = "|".join(re.escape(w) for w in sorted(table, key=len, reverse=True))
    # not inside a file key (perpetrator.half_life, [victim]): those name what the user typed
    return re.compile(rf"(?<![\[.\w])(?:{words})(?![.\w])"), table


def speak(text: str, terms: Terms, protect: tuple[str, ...] = ()) -> str:
    """``text`` in the rule set's words (ICH M12: precipitant, object drug), leaving the ``protect``ed strings
    (what the user typed: title, drug names, notes) exactly as written."""
    if terms.precipitant == "perpetrator" and terms.object == "victim":
        return text
    if "erpetrator" not in text and "ictim" not in text:
        return text
    pattern, table = _term_pattern(terms)
    keep = sorted({p for p in protect if p}, key=len, reverse=True)
    pieces = re.split("(" + "|".join(re.escape(p) for p in keep) + ")", text) if keep else [text]
    for i in range(0, len(pieces), 2):  # even pieces lie outside the protected strings
        pieces[i] = pattern.sub(lambda m: table[m.group(0)], pieces[i])
    return "".join(pieces)


def speak_sections(sections: list[Section], terms: Terms, protect: tuple[str, ...] = ()) -> list[Section]:
    """The sections in the rule set's words (see :func:`speak`)."""

    def say(t: str) -> str:
        return speak(t, terms, protect)

    return [Section(title=say(s.title), blocks=tuple(map_text(b, say) for b in s.blocks)) for s in sections]


def speak_data(data: object, terms: Terms, protect: tuple[str, ...] = ()) -> object:
    """JSON-ready data with its text values (not its keys) in the rule set's words."""
    if isinstance(data, str):
        return speak(data, terms, protect)
    if isinstance(data, dict):
        return {k: speak_data(v, terms, protect) for k, v in data.items()}
    if isinstance(data, list):
        return [speak_data(v, terms, protect) for v in data]
    return data


def _text_table(table: Table, width: int) -> list[str]:
    cols = len(table.headers)
    widths = [max(len(h), 1) for h in table.headers]
    for row in table.rows:
        for i in range(cols):
            widths[i] = max(widths[i], len(row[i]) if i < len(row) else 0)
    # shrink the widest columns when the table is too wide
    budget = width - 2 * (cols - 1) - 2
    while sum(widths) > budget and max(widths) > 12:
        widths[widths.index(max(widths))] -= 1
    lines = []

    def emit(cells: tuple[str, ...]) -> None:
        wrapped = [textwrap.wrap(c, widths[i]) or [""] for i, c in enumerate(cells)]
        height = max(len(w) for w in wrapped)
        for k in range(height):
            parts = [(w[k] if k < len(w) else "").ljust(widths[i]) for i, w in enumerate(wrapped)]
            lines.append(("  " + "  ".join(parts)).rstrip())

    emit(table.headers)
    lines.append("  " + "  ".join("-" * w for w in widths))
    for row in table.rows:
        emit(tuple(row) + ("",) * (cols - len(row)))
    return lines


def render_text(sections: list[Section], width: int = 100) -> str:
    """Plain text for a terminal: every string is passed through :func:`terminal_safe` before it is laid out."""
    sections = cite(sections)
    t = terminal_safe
    out: list[str] = []
    for section in sections:
        title = t(section.title)
        out.append("")
        out.append(title)  # as written: upper-casing would turn a unit such as (uM) into (UM)
        out.append("=" * min(len(title), width) if title else "")
        for block in section.blocks:
            if isinstance(block, Table):
                block = without_empty_columns(block)
                safe = Table(headers=tuple(t(h) for h in block.headers), rows=tuple(tuple(t(c) for c in row) for row in block.rows))
                out.extend(_text_table(safe, width))
                out.append("")
            elif isinstance(block, Note):
                prefix = "!! " if block.kind == "caution" else ">> "
                out.extend(textwrap.wrap(t(block.text), width, initial_indent=prefix, subsequent_indent="   "))
            elif block.startswith("- "):
                # list items (warnings, references): an address or a long name is never cut, at a hyphen or anywhere
                out.extend(textwrap.wrap(t(block), width, subsequent_indent="  ", break_long_words=False, break_on_hyphens=False) or [""])
            else:
                out.extend(textwrap.wrap(t(block), width) or [""])
    return "\n".join(out).strip("\n") + "\n"


def _md_cell(text: str) -> str:
    return md_escape(text)


def render_markdown(sections: list[Section], title: str = "") -> str:
    sections = cite(sections)
    out: list[str] = []
    if title:
        out += [f"# {md_escape(title)}", ""]
    for section in sections:
        if section.title:
            out += [f"## {md_escape(section.title)}", ""]
        for block in section.blocks:
            if isinstance(block, Table):
                block = without_empty_columns(block)
                out.append("| " + " | ".join(_md_cell(h) for h in block.headers) + " |")
                out.append("|" + "|".join("---" for _ in block.headers) + "|")
                for row in block.rows:
                    out.append("| " + " | ".join(_md_cell(c) for c in row) + " |")
                out.append("")
            elif isinstance(block, Note):
                out += [f"> **{'Caution' if block.kind == 'caution' else 'Result'}:** {md_escape(block.text)}", ""]
            elif block.startswith("- "):  # a list item of ours: the marker stays a marker, the text is escaped
                out += ["- " + md_escape(block[2:]), ""]
            else:
                out += [md_escape(block), ""]
    return "\n".join(out).rstrip("\n") + "\n"
