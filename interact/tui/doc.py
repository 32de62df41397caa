"""A small text document laid out by hand: paragraphs and tables wrapped to a width.

Rich's general renderer costs tens of milliseconds for the answer panel; this
builder wraps with :mod:`textwrap` and aligns table columns itself, so the
panel can be redrawn on every keystroke.
"""

from __future__ import annotations

import textwrap
from dataclasses import dataclass, field

from rich.segment import Segment
from rich.style import Style

__all__ = ["Doc"]

Span = tuple[str, Style]


@dataclass(slots=True)
class _Para:
    spans: list[Span]
    indent: int
    hanging: int


@dataclass(slots=True)
class _Table:
    headers: tuple[str, ...]
    rows: list[tuple[str, ...]]
    styles: dict[tuple[int, int], Style]
    indent: int


@dataclass(slots=True)
class _Pre:
    text: str
    style: Style


@dataclass(slots=True)
class Doc:
    """Blocks of styled text; :meth:`lines` lays them out at a width."""

    blocks: list[_Para | _Table | _Pre] = field(default_factory=list)

    def para(self, *spans: str | Span, indent: int = 0, hanging: int = 0) -> Doc:
        """A paragraph of spans (plain strings take no style); ``hanging`` indents the wrapped lines."""
        self.blocks.append(_Para([(s, Style()) if isinstance(s, str) else s for s in spans], indent, hanging))
        return self

    def pre(self, text: str, style: Style | None = None) -> Doc:
        """Lines kept exactly as given (a text plot); too-long lines are cut by the view."""
        self.blocks.append(_Pre(text, style or Style()))
        return self

    def blank(self) -> Doc:
        return self.para("")

    def table(
        self,
        headers: tuple[str, ...],
        rows: list[tuple[str, ...]],
        styles: dict[tuple[int, int], Style] | None = None,
        indent: int = 0,
    ) -> Doc:
        self.blocks.append(_Table(headers, rows, styles or {}, indent))
        return self

    def extend(self, other: Doc) -> Doc:
        self.blocks.extend(other.blocks)
        return self

    def lines(self, width: int) -> list[list[Segment]]:
        """The document laid out at ``width``; a block laid out before at this width gives the same line objects."""
        width = max(width, 20)
        out: list[list[Segment]] = []
        for b in self.blocks:
            out.extend(_block_lines(b, width))
        return out

    def plain(self, width: int = 100) -> str:
        return "\n".join("".join(s.text for s in line).rstrip() for line in self.lines(width))


#: blocks laid out before, by content and width: a keystroke changes a few numbers of the answer, and the
#: blocks that did not change keep their lines (and DocumentView their painted strips); wrapping every block
#: again cost about half of the answer's redraw (measured with cProfile on the demo at 160x50)
_LAID_OUT: dict[tuple[object, ...], list[list[Segment]]] = {}
_LAID_OUT_MAX = 2048


def _block_lines(b: _Para | _Table | _Pre, width: int) -> list[list[Segment]]:
    key: tuple[object, ...]
    if isinstance(b, _Para):
        key = ("p", tuple(b.spans), b.indent, b.hanging, width)
    elif isinstance(b, _Pre):
        key = ("r", b.text, b.style, width)
    else:
        key = ("t", b.headers, tuple(b.rows), tuple(sorted(b.styles.items())), b.indent, width)
    lines = _LAID_OUT.get(key)
    if lines is None:
        if isinstance(b, _Para):
            lines = _wrap_spans(b.spans, width - b.indent, b.indent, b.hanging)
        elif isinstance(b, _Pre):
            lines = [[Segment(line, b.style)] for line in b.text.rstrip("\n").split("\n")]
        else:
            lines = _table_lines(b, width)
        if len(_LAID_OUT) >= _LAID_OUT_MAX:
            _LAID_OUT.clear()
        _LAID_OUT[key] = lines
    return lines


def _wrap_spans(spans: list[Span], width: int, indent: int, hanging: int) -> list[list[Segment]]:
    """Wrap styled spans word by word."""
    words: list[tuple[str, Style, bool]] = []  # (word, style, space before)
    pending = False
    for text, style in spans:
        if not text:
            continue
        for i, w in enumerate(text.split(" ")):
            if w == "":
                pending = pending or i > 0 or text.startswith(" ")
                continue
            words.append((w, style, pending or i > 0))
            pending = False
        pending = text.endswith(" ")
    if not words:
        return [[Segment(" " * indent)]] if indent else [[]]
    lines: list[list[Segment]] = []
    line: list[Segment] = [Segment(" " * indent)] if indent else []
    used = 0
    room = width
    first = True
    for w, style, space in words:
        need = len(w) + (1 if space and used else 0)
        if used and used + need > room:
            lines.append(line)
            line = [Segment(" " * (indent + hanging))]
            used = 0
            room = width - hanging
            first = False
            need = len(w)
        elif space and used:
            line.append(Segment(" ", style))
        while len(w) > room:  # a word longer than the line
            line.append(Segment(w[:room], style))
            lines.append(line)
            line = [Segment(" " * (indent + hanging))]
            w = w[room:]
            room = width - hanging
            used = 0
        line.append(Segment(w, style))
        used += len(w) + (1 if space and used else 0)
    del first
    lines.append(line)
    return lines


def _table_lines(t: _Table, width: int) -> list[list[Segment]]:
    cols = len(t.headers)
    widths = [len(h) for h in t.headers]
    for row in t.rows:
        for i in range(cols):
            widths[i] = max(widths[i], len(row[i]) if i < len(row) else 0)
    budget = width - t.indent - (cols - 1)
    while sum(widths) > budget and max(widths) > 6:
        widths[widths.index(max(widths))] -= 1
    bold = Style(bold=True)
    out: list[list[Segment]] = []

    def emit(cells: tuple[str, ...], row_index: int) -> None:
        wrapped = [textwrap.wrap(c, widths[i]) or [""] for i, c in enumerate(cells)]
        for k in range(max(len(w) for w in wrapped)):
            line: list[Segment] = [Segment(" " * t.indent)] if t.indent else []
            for i, w in enumerate(wrapped):
                text = (w[k] if k < len(w) else "").ljust(widths[i]) + (" " if i < cols - 1 else "")
                style = bold if row_index < 0 else t.styles.get((row_index, i), Style())
                line.append(Segment(text, style))
            out.append(line)

    emit(t.headers, -1)
    for n, row in enumerate(t.rows):
        emit(tuple(row) + ("",) * (cols - len(row)), n)
    return out
