"""A small document model (sections of paragraphs and tables) and its renderers.

Every report format (plain text, Markdown, HTML) renders the same sections,
so that what a shell shows and what a file holds never drift apart.
"""

from __future__ import annotations

import html
import textwrap
from dataclasses import dataclass, field

__all__ = ["Note", "Section", "Table", "render_html_body", "render_markdown", "render_text"]


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
    out: list[str] = []
    for section in sections:
        out.append("")
        out.append(section.title.upper() if section.title else "")
        out.append("=" * min(len(section.title), width) if section.title else "")
        for block in section.blocks:
            if isinstance(block, Table):
                out.extend(_text_table(block, width))
                out.append("")
            elif isinstance(block, Note):
                prefix = "!! " if block.kind == "caution" else ">> "
                out.extend(textwrap.wrap(block.text, width, initial_indent=prefix, subsequent_indent="   "))
            else:
                out.extend(textwrap.wrap(block, width) or [""])
    return "\n".join(out).strip("\n") + "\n"


def _md_cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def render_markdown(sections: list[Section], title: str = "") -> str:
    out: list[str] = []
    if title:
        out += [f"# {title}", ""]
    for section in sections:
        if section.title:
            out += [f"## {section.title}", ""]
        for block in section.blocks:
            if isinstance(block, Table):
                out.append("| " + " | ".join(_md_cell(h) for h in block.headers) + " |")
                out.append("|" + "|".join("---" for _ in block.headers) + "|")
                for row in block.rows:
                    out.append("| " + " | ".join(_md_cell(c) for c in row) + " |")
                out.append("")
            elif isinstance(block, Note):
                out += [f"> **{'Caution' if block.kind == 'caution' else 'Result'}:** {block.text}", ""]
            else:
                out += [block, ""]
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
