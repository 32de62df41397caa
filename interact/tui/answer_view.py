"""The answer view: the current evaluation as the report's words, redrawn line by line.

It watches the app's evaluation (bound to ``InteractApp.evaluation``); the
document comes from :mod:`interact.tui.results` and is drawn by
:class:`~interact.tui.document_view.DocumentView`, which repaints only the lines
that changed.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual.reactive import var

from .doc import Doc
from .document_view import DocumentView

if TYPE_CHECKING:
    from .state import Evaluation

__all__ = ["NARROW", "AnswerView"]

#: below this terminal width the basic-model table is laid out one line per test
NARROW = 120


class AnswerView(DocumentView):
    """The answer for the current inputs, or the last valid one under a NOT UPDATED banner."""

    evaluation: var[Evaluation | None] = var(None, init=False)

    def __init__(self, *, id: str) -> None:
        super().__init__(id=id)
        self._narrow: bool | None = None
        self.show(Doc().para("Loading the models ... (the answer appears in a moment)"))

    def watch_evaluation(self, evaluation: Evaluation | None) -> None:
        if evaluation is not None:
            self.show(self.document_for(evaluation))

    def document_for(self, ev: Evaluation) -> Doc:
        from .results import compare, render_answer, render_stale

        problems = list(ev.problem_lines) if not ev.valid else []
        doc = render_stale(problems) if problems else Doc()
        a = ev.assessment
        if a is None:
            return doc.para("No valid result yet: fix the problems listed above.")
        comparison = compare(ev.pinned[0], ev.pinned[1], a, ev.valid_data) if ev.pinned is not None else None
        self._narrow = self.app.size.width < NARROW
        return doc.extend(render_answer(a, comparison, narrow=self._narrow, stale=bool(problems)))

    def on_resize(self) -> None:
        # the table layout follows the terminal's width (DocumentView's own handler re-wraps the lines)
        if self.evaluation is not None and self._narrow is not None and self._narrow != (self.app.size.width < NARROW):
            self.show(self.document_for(self.evaluation))
