"""A scrolling view of a :class:`~interact.tui.doc.Doc`, drawn line by line.

Updating it lays the document out once at the view's width and repaints,
without a screen layout pass: that keeps the answer panel cheap to refresh on
every keystroke (a Static with automatic height would be measured and laid
out again each time).
"""

from __future__ import annotations

from rich.segment import Segment
from rich.style import Style
from textual.geometry import Size
from textual.scroll_view import ScrollView
from textual.strip import Strip

from .doc import Doc

__all__ = ["DocumentView"]


class DocumentView(ScrollView, can_focus=True):
    """Read-only document (the answer), scrollable with the keyboard when focused."""

    def __init__(self, *, id: str) -> None:
        super().__init__(id=id)
        self._document = Doc()
        self._lines: list[Strip] = []
        self._width = 0
        self._base = Style()
        self._laid_out = False
        #: the painted strip of each laid-out line, by the line object's id (with the line, which keeps the id taken)
        self._strips: dict[int, tuple[list[Segment], Strip]] = {}

    def show(self, document: Doc) -> None:
        self._document = document
        self._laid_out = False
        self._render_document()

    @property
    def document(self) -> Doc:
        """The document last given to :meth:`show` (what the view shows, or will show once visible)."""
        return self._document

    @property
    def plain_text(self) -> str:
        """The document as plain text at the current width (for tests and copying)."""
        if not self._laid_out:  # hidden (another tab): lay out at the last width so the text is the current one
            return "\n".join("".join(s.text for s in line).rstrip() for line in self._document.lines(self._width or 80))
        return "\n".join(strip.text.rstrip() for strip in self._lines)

    def _render_document(self) -> None:
        width = self.scrollable_content_region.width or self.size.width
        if width <= 0:
            # hidden (the answer tab while the plots or the fitting view show): laid out when shown again.
            # Returning without marking it kept the old answer on screen after "use the fitted Ki"
            return
        self._laid_out = True
        self._width = width
        style = self.rich_style
        # a line that did not change keeps its Strip: building strips was most of the cost of a keystroke
        # (about 0.3 ms each, 18 ms for the answer at 160x50; measured with cProfile). Doc.lines gives the same
        # line object for a block laid out before at this width, so the line's id finds its strip.
        old = self._strips if style == self._base else {}
        self._base = style
        # strips of recent documents are kept too (typing and deleting a digit goes back to an earlier answer)
        strips: dict[int, tuple[list[Segment], Strip]] = dict(old) if len(old) < 2000 else {}
        lines = []
        for line in self._document.lines(width):
            known = strips.get(id(line)) or old.get(id(line))
            strip = known[1] if known is not None else Strip(line).apply_style(style)
            strips[id(line)] = (line, strip)
            lines.append(strip)
        self._strips = strips
        before = self._lines
        self._lines = lines or [Strip.blank(width)]
        # keep the scroll height when the document shrinks a little (a changed number re-wrapping a line):
        # a new virtual size costs a layout of the whole screen, blank lines at the end cost nothing
        height = len(self._lines)
        if self.virtual_size.width == width and height <= self.virtual_size.height < height + 20:
            height = self.virtual_size.height
        size = Size(width, height)
        if self.virtual_size != size:
            self.virtual_size = size
            self.refresh()
            return
        # repaint only the runs of lines that changed (the same Strip object is the same line)
        after = self._lines
        start = None
        for y in range(max(len(before), len(after)) + 1):
            same = y < len(before) and y < len(after) and before[y] is after[y]
            end = y >= len(before) and y >= len(after)
            if start is None and not same and not end:
                start = y
            elif start is not None and (same or end):
                self.refresh_lines(start, y - start)
                start = None

    def on_resize(self) -> None:
        if not self._laid_out or (self.scrollable_content_region.width or self.size.width) != self._width:
            self._render_document()

    def on_show(self) -> None:
        if not self._laid_out:
            self._render_document()

    def on_mount(self) -> None:
        self.watch(self.app, "theme", lambda _: self._render_document(), init=False)

    def render_line(self, y: int) -> Strip:
        if not self._laid_out:
            self._render_document()
        scroll_x, scroll_y = self.scroll_offset
        index = scroll_y + y
        width = self.scrollable_content_region.width
        if index >= len(self._lines):
            return Strip.blank(width, self._base)
        return self._lines[index].crop_extend(scroll_x, scroll_x + width, self._base)
