"""A one-line text box that applies keys in the order they arrive."""

from __future__ import annotations

from textual import events
from textual.widgets import Input

__all__ = ["TextBox"]


class TextBox(Input):
    """Textual's Input, running its own editing keys (Ctrl+U, Ctrl+K, Home, Backspace, Enter...) in its key handler.

    Input leaves those keys to its bindings, which Textual runs only after the key has bubbled up to the app; by
    then characters queued behind the key (a paste, a fast typist, ``tmux send-keys``) were already inserted, so
    "Ctrl+U then a name" deleted the name. The form (:class:`~interact.tui.form_view.FormView`) avoids the same
    reordering by handling its keys in ``on_key``; here the box's own bindings run there, before the next key.
    """

    async def _on_key(self, event: events.Key) -> None:
        for binding in self._bindings.key_to_bindings.get(event.key, ()):
            if await self.app.run_action(binding.action, self):
                event.stop()
                event.prevent_default()  # Input's own handler (printable characters) and the bubbling binding
                return
