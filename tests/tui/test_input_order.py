"""Keys sent in one burst (a paste, a fast typist, ``tmux send-keys`` in one call) reach every text box in order.

Textual's Input runs its key bindings (Ctrl+U, Ctrl+K, Home, Backspace...) only after the key has bubbled up to
the app, so characters already queued behind the key were inserted first and then deleted with it. The reference is
the same keys sent one at a time with a pause after each (what the user sees when typing slowly).
"""

from __future__ import annotations

import asyncio
from pathlib import Path
from typing import Any

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from pilot_helpers import asynctest
from textual import events
from textual.app import App, ComposeResult
from textual.widgets import Input

from interact.tui.app import InteractApp
from interact.tui.screens import AskPath
from interact.tui.text_box import TextBox

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")


def burst(app: Any, keys: list[str]) -> None:
    """Queue every key at once, as the terminal driver does for keys that arrive together."""
    for key in keys:
        char = key if len(key) == 1 else None
        app.post_message(events.Key(key, char))


@asynctest
async def test_ctrl_u_then_a_name_typed_at_once_saves_under_that_name(tmp_path: Path) -> None:
    target = tmp_path / "burst.toml"
    app = InteractApp()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("f6")
        await pilot.pause()
        assert isinstance(app.screen, AskPath)
        burst(app, ["ctrl+u", *str(target), "enter"])
        await pilot.pause()
        await pilot.pause()
        assert not isinstance(app.screen, AskPath), app.screen.query_one("#path-note").render()
    assert target.is_file()


async def open_box(pilot: Any, app: InteractApp, which: str) -> Input:
    """Show the text box ``which`` (save, open, or a fitting-view field) and focus it."""
    if which in ("save", "open"):
        await pilot.press("f6" if which == "save" else "ctrl+o")
        await pilot.pause()
        assert isinstance(app.screen, AskPath)
        box = app.screen.query_one(Input)
    else:
        await pilot.press("f4", "f4")  # answer -> plots -> fitting
        await pilot.pause()
        box = app.query_one(f"#{which}", Input)
        box.focus()
    await pilot.pause()
    return box


BOXES = ["save", "open", "fit-path", "fit-unit", "fit-target"]


@pytest.mark.parametrize("which", BOXES)
@asynctest
async def test_ctrl_u_then_text_typed_at_once_keeps_the_text_in_every_box(which: str) -> None:
    app = InteractApp()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        box = await open_box(pilot, app, which)
        burst(app, ["end", "ctrl+u", "a", "b", "c", "home", "x", "ctrl+k", "y"])
        await pilot.pause()
        assert box.value == "xy"


EDIT_KEYS = ["ctrl+u", "ctrl+k", "home", "end", "left", "right", "backspace", "delete", "ctrl+w", "ctrl+a", "ctrl+e"]


class OneBox(App[None]):
    """Only the text box the pop-ups and the fitting view use (a whole app per example would take seconds)."""

    def compose(self) -> ComposeResult:
        yield TextBox(value="start.toml")


@settings(max_examples=25, deadline=None)
@given(st.lists(st.sampled_from([*EDIT_KEYS, "a", "b", "1", "."]), min_size=1, max_size=12))
def test_a_burst_of_keys_edits_the_box_as_the_same_keys_sent_one_by_one(keys: list[str]) -> None:
    async def run(at_once: bool) -> tuple[str, int]:
        app = OneBox()
        async with app.run_test(size=(40, 5)) as pilot:
            await pilot.pause()
            box = app.query_one(TextBox)
            if at_once:
                burst(app, keys)
            else:
                for key in keys:
                    burst(app, [key])
                    await pilot.pause()
            await pilot.pause()
            return box.value, box.cursor_position

    assert asyncio.run(run(at_once=True)) == asyncio.run(run(at_once=False))
