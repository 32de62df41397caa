"""Benchmark of the terminal app (run by hand; not a timed test).

1. Edit latency: from a keystroke that completes a valid edit to the updated
   results painted on the (headless) screen, over 100 edits driven with Pilot.
   The field is the demo's fu,inc of the first target: "0.55" -> backspace ->
   "0.5" -> "5" -> "0.55" ..., each keystroke a valid new value (the victim's
   Fg is edited once before, so the title's unsaved marker does not toggle).  The paint
   time is taken from the app's own display call after the recompute of that
   keystroke, so Pilot's wait-for-idle does not count.  Goal: p95 < 50 ms.
2. Time to first screen: wall time from starting a Python process to the first
   painted frame, for the interact app on the demo and for a minimal Textual
   app that shows one label, in the same run (median of 5 each).  Goal: ratio < 1.5.
   The app paints the form first and loads the engine in a thread, so the time
   until the answer is on screen is reported as well.

    python tests/bench/bench_tui.py
"""

from __future__ import annotations

import asyncio
import statistics
import subprocess
import sys
import time
from pathlib import Path

EDITS = 100
STARTS = 5

FIRST_SCREEN = r"""
import sys, time
which = sys.argv[1]
from textual.app import App
if which == "minimal":
    from textual.widgets import Label
    class Minimal(App):
        def compose(self):
            yield Label("interact")
        def on_mount(self):
            self.call_after_refresh(self.done)
        def done(self):
            print(time.time()); self.exit()
    Minimal().run(headless=True, size=(80, 24))
elif which == "interact":
    from interact.tui.app import InteractApp
    class Timed(InteractApp):
        def on_mount(self):
            super().on_mount()
            self.call_after_refresh(self.done)
        def done(self):
            print(time.time()); self.exit()
    Timed().run(headless=True, size=(80, 24))
else:  # the first screen with the answer on it
    from interact.tui.app import InteractApp
    class Answered(InteractApp):
        def _core_loaded(self):
            super()._core_loaded()
            self.call_after_refresh(self.done)
        def done(self):
            print(time.time()); self.exit()
    Answered().run(headless=True, size=(80, 24))
"""


def first_screen(which: str) -> float:
    start = time.time()
    out = subprocess.run([sys.executable, "-c", FIRST_SCREEN, which], capture_output=True, text=True, check=True).stdout
    return float(out.strip().splitlines()[-1]) - start


async def edit_latency(size: tuple[int, int]) -> list[float]:
    from interact.tui.app import InteractApp

    app = InteractApp()
    painted: list[tuple[float, int]] = []
    async with app.run_test(size=size) as pilot:
        original = app._display

        def display(screen, update):  # type: ignore[no-untyped-def]
            painted.append((time.perf_counter(), app.generation))
            return original(screen, update)

        app._display = display  # type: ignore[method-assign]
        await pilot.pause()
        # one edit elsewhere first, so the "unsaved edits" title stays on and only the results change
        fg = await app.reveal("victim.fg")
        app.form.focus()
        fg.cursor = len(fg.text)
        await pilot.press("5")
        row = await app.reveal("perpetrator.inhibits[0].fu_inc")
        app.form.focus()
        await pilot.press("end")
        await pilot.pause()
        out = []
        for i in range(EDITS):
            key = "backspace" if i % 2 == 0 else "5"
            gen = app.generation
            painted.clear()
            t0 = time.perf_counter()
            await pilot.press(key)
            while not any(g > gen for _, g in painted):
                await asyncio.sleep(0.001)
            t1 = next(t for t, g in painted if g > gen)
            assert app.valid, row.text
            out.append(t1 - t0)
    return out


def pct(values: list[float], q: float) -> float:
    s = sorted(values)
    return s[min(len(s) - 1, round(q * (len(s) - 1)))]


def main() -> int:
    sys.path.insert(0, str(Path(__file__).resolve().parents[2]))
    for size in ((80, 24), (160, 50)):
        lat = asyncio.run(edit_latency(size))
        print(
            f"edit -> painted results, {EDITS} edits at {size[0]}x{size[1]}: median {statistics.median(lat) * 1000:.1f} ms, "
            f"p95 {pct(lat, 0.95) * 1000:.1f} ms, max {max(lat) * 1000:.1f} ms"
        )
    mins, apps, answers = [], [], []
    for _ in range(STARTS):  # alternated, so that machine load affects all three alike
        mins.append(first_screen("minimal"))
        apps.append(first_screen("interact"))
        answers.append(first_screen("answer"))
    m, a, r = statistics.median(mins), statistics.median(apps), statistics.median(answers)
    print(
        f"first screen, median of {STARTS}: minimal Textual app {m * 1000:.0f} ms, "
        f"interact on the demo {a * 1000:.0f} ms, ratio {a / m:.2f}; "
        f"with the answer on screen {r * 1000:.0f} ms, ratio {r / m:.2f}"
    )
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
