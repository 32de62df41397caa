"""A small document model (sections of paragraphs and tables) and its renderers.

Every report format (plain text, Markdown, HTML) renders the same sections,
so that what a shell shows and what a file holds never drift apart.
"""

from __future__ import annotations

import html
import re
import textwrap
from dataclasses import dataclass, field

__all__ = ["Note", "Section", "Table", "md_escape", "render_html_body", "render_markdown", "render_text", "terminal_safe"]

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
    t = terminal_safe
    out: list[str] = []
    for section in sections:
        title = t(section.title)
        out.append("")
        out.append(title.upper() if title else "")
        out.append("=" * min(len(title), width) if title else "")
        for block in section.blocks:
            if isinstance(block, Table):
                safe = Table(headers=tuple(t(h) for h in block.headers), rows=tuple(tuple(t(c) for c in row) for row in block.rows))
                out.extend(_text_table(safe, width))
                out.append("")
            elif isinstance(block, Note):
                prefix = "!! " if block.kind == "caution" else ">> "
                out.extend(textwrap.wrap(t(block.text), width, initial_indent=prefix, subsequent_indent="   "))
            else:
                out.extend(textwrap.wrap(t(block), width) or [""])
    return "\n".join(out).strip("\n") + "\n"


def _md_cell(text: str) -> str:
    return md_escape(text)


def render_markdown(sections: list[Section], title: str = "") -> str:
    out: list[str] = []
    if title:
        out += [f"# {md_escape(title)}", ""]
    for section in sections:
        if section.title:
            out += [f"## {md_escape(section.title)}", ""]
        for block in section.blocks:
            if isinstance(block, Table):
                out.append("| " + " | ".join(_md_cell(h) for h in block.headers) + " |")
                out.append("|" + "|".join("---" for _ in block.headers) + "|")
                for row in block.rows:
                    out.append("| " + " | ".join(_md_cell(c) for c in row) + " |")
                out.append("")
            elif isinstance(block, Note):
                out += [f"> **{'Caution' if block.kind == 'caution' else 'Result'}:** {md_escape(block.text)}", ""]
            else:
                out += [md_escape(block), ""]
    return "\n".join(out).rstrip("\n") + "\n"


def render_html_body(sections: list[Section]) -> str:
    """HTML for the sections; every string is escaped."""
    e = html.escape
    out: list[str] = []
    for section in sections:
        out.append("<section>")
        if section.title:
            out.append(f"<h2>{e(section.title)}</h2>")
        for block in section.blocks:
            if isinstance(block, Table):
                out.append("<table><thead><tr>" + "".join(f"<th>{e(h)}</th>" for h in block.headers) + "</tr></thead><tbody>")
                for row in block.rows:
                    out.append("<tr>" + "".join(f"<td>{e(c)}</td>" for c in row) + "</tr>")
                out.append("</tbody></table>")
            elif isinstance(block, Note):
                out.append(f'<p class="note {e(block.kind)}">{e(block.text)}</p>')
            else:
                out.append(f"<p>{e(block)}</p>")
        out.append("</section>")
    return "\n".join(out)
