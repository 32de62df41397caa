"""Helpers for driving the terminal app headless with Pilot."""

from __future__ import annotations

import asyncio
import functools
import io
from collections.abc import Callable, Coroutine
from typing import Any

from rich.console import Console


def asynctest(fn: Callable[..., Coroutine[Any, Any, None]]) -> Callable[..., None]:
    """Run an async test function with asyncio (no pytest plugin needed); fixtures pass through."""

    @functools.wraps(fn)
    def wrapper(*args: Any, **kwargs: Any) -> None:
        asyncio.run(fn(*args, **kwargs))

    return wrapper


def text_of(app: Any, selector: str) -> str:
    """The plain text a Static shows."""
    widget = (app.screen if hasattr(app, "screen") else app).query_one(selector)
    if hasattr(widget, "plain_text"):
        return " ".join(widget.plain_text.split())
    console = Console(width=200, file=io.StringIO(), record=True, color_system=None)
    console.print(widget.content)
    return console.export_text()


async def replace_text(pilot: Any, app: Any, key: str, text: str, *, typed: int = 1) -> None:
    """Select a field and put ``text`` in it; the last ``typed`` characters go through real key presses.

    (Typing every character through Pilot costs tens of milliseconds a key; the
    keystroke that completes the edit is the one that matters.)  An empty
    ``text`` clears the field with Ctrl+U.
    """
    state = await app.reveal(key)
    app.form.focus()
    await pilot.pause()
    if not text:
        state.cursor = len(state.text)
        await pilot.press("ctrl+u")
        await pilot.pause()
        return
    head, tail = (text[:-typed], text[-typed:]) if typed else (text, "")
    state.text = head
    state.cursor = len(head)
    await pilot.press(*list(tail))
    await pilot.pause()


async def type_path(pilot: Any, app: Any, path: str) -> None:
    """Fill the file-name prompt and press Enter."""
    from textual.widgets import Input

    box = app.screen.query_one(Input)
    box.value = path
    await pilot.press("enter")
    await pilot.pause()
