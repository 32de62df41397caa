"""SVG snapshots of the terminal app at fixed sizes (pytest-textual-snapshot).

They catch unintended changes of layout and wording; after an intended change,
look at the new screens and update with ``pytest tests/tui --snapshot-update``.
The screens show the invented demo scenario (an input, not a check value).
"""

from __future__ import annotations

from typing import Any

from interact.tui.app import InteractApp


def test_demo_at_80_by_24(snap_compare: Any) -> None:
    assert snap_compare(InteractApp(), terminal_size=(80, 24))


def test_invalid_unit_marks_the_answer_not_updated(snap_compare: Any) -> None:
    async def break_unit(pilot: Any) -> None:
        app = pilot.app
        state = await app.reveal("perpetrator.cmax")
        state.text = "1.6 ug/m"
        state.cursor = len(state.text)
        await pilot.press("k")
        await pilot.pause()

    assert snap_compare(InteractApp(), terminal_size=(110, 32), run_before=break_unit)


def test_plots_at_120_by_40(snap_compare: Any) -> None:
    assert snap_compare(InteractApp(), press=["f4"], terminal_size=(120, 40))


def test_light_theme_at_100_by_30(snap_compare: Any) -> None:
    async def light(pilot: Any) -> None:
        pilot.app.theme = "textual-light"
        await pilot.pause()

    assert snap_compare(InteractApp(), terminal_size=(100, 30), run_before=light)
