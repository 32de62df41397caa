"""Benchmark of the terminal app, in a real pseudo-terminal (run by hand; not a timed test).

1. Keystroke to painted answer, at 80x24 and 160x50.  The app runs in a
   pseudo-terminal of that size with Textual's real (Linux) driver, exactly as
   a user starts it; this script writes key bytes into the terminal and reads
   what the app writes back.  The edited field is the demo's fu,inc of the
   first target: "0.55" -> Backspace -> "0.5" -> "5" -> "0.55" ..., each key a
   valid new value that changes the answer (the victim's Fg is edited once
   before, so the title's unsaved marker does not toggle).  The app logs the
   monotonic time of each frame it writes to the terminal, with the number of
   evaluations so far; a keystroke's latency runs from the write of its byte
   to the end of the last frame of its evaluation (the answer painted).
   The floor, alternated with the app in the same run at the same size: a
   minimal Textual app (one line of typed text over a one-line result) that
   handles the same keys and rewrites both lines, i.e. Textual's own path from
   key bytes to a painted frame, without the scenario form or the answer.
   Goal: p95 < 50 ms.
2. Time to first screen: wall time from starting a Python process to the first
   painted frame (headless, 80x24), for the interact app on the demo and for a
   minimal Textual app that shows one label, alternated (median of 7 each).
   Goal: ratio < 1.5.  The app paints the form first and loads the engine in a
   thread, so the time until the answer is on screen is reported as well.

    python tests/bench/bench_tui.py [--keys 60] [--rounds 3]

The machine may be shared (2 cores here): the medians and the ratios measured
in the same run are the figures to read.
"""

from __future__ import annotations

import argparse
import os
import pty
import random
import select
import statistics
import struct
import subprocess
import sys
import tempfile
import termios
import time
from fcntl import ioctl
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
STARTS = 7

#: run inside the pseudo-terminal: the app (or the floor) with a log line per frame written
CHILD = r"""
import os, sys, time
which, log_path = sys.argv[1], sys.argv[2]
log = open(log_path, "w", buffering=1)
from textual.app import App

def logged(app_class, generation):
    class Logged(app_class):
        def _display(self, screen, renderable):
            super()._display(screen, renderable)
            if renderable is not None and not self._batch_count:
                log.write(f"frame {generation(self)} {time.monotonic()}\n")
    return Logged

if which == "floor":
    from textual.widgets import Static
    class Floor(App):
        CSS = "Static { height: 1; }"
        def compose(self):
            self.text, self.n = "0.55", 0
            yield Static(self.text, id="value")
            yield Static("result 0", id="result")
        def on_mount(self):
            self.call_after_refresh(lambda: log.write("ready\n"))
        def on_key(self, event):
            self.text = self.text[:-1] if event.key == "backspace" else self.text + (event.character or "")
            self.n += 1
            self.query_one("#value").update(self.text)
            self.query_one("#result").update(f"result {self.n}: {len(self.text)}")
    logged(Floor, lambda app: app.n)().run()
else:
    import copy
    from interact.tui.app import InteractApp
    class Ready(InteractApp):
        def _core_loaded(self):
            super()._core_loaded()
            data = copy.deepcopy(self.data)
            data["victim"]["fg"] = 0.5  # the title's unsaved marker stays on from here
            self.update(data)
            state = self.form.select("perpetrator.inhibits[0].fu_inc")
            state.cursor = len(state.text)
            self.call_after_refresh(self._bench_ready)
        def _bench_ready(self):
            if os.environ.get("BENCH_TUI_PROFILE"):  # --profile: where the milliseconds of the keys go
                import cProfile, atexit
                profile = cProfile.Profile()
                profile.enable()
                atexit.register(lambda: (profile.disable(), profile.dump_stats(os.environ["BENCH_TUI_PROFILE"])))
            log.write("ready\n")
    logged(Ready, lambda app: app.generation)().run()
"""


class Terminal:
    """A child process in a pseudo-terminal of a given size, its output drained as it comes."""

    def __init__(self, which: str, size: tuple[int, int]) -> None:
        self.log = Path(tempfile.mkstemp(prefix="bench-tui-", suffix=".log")[1])
        pid, fd = pty.fork()
        if pid == 0:  # the child: the app, as a terminal user starts it
            os.environ.update(TERM="xterm-256color", COLUMNS=str(size[0]), LINES=str(size[1]))
            os.execv(sys.executable, [sys.executable, "-c", CHILD, which, str(self.log)])
        self.pid, self.fd = pid, fd
        ioctl(fd, termios.TIOCSWINSZ, struct.pack("HHHH", size[1], size[0], 0, 0))
        self.tail = b""  # the last output (shown when the app does not answer)

    def drain(self, seconds: float) -> None:
        end = time.monotonic() + seconds
        while (left := end - time.monotonic()) > 0:
            ready, _, _ = select.select([self.fd], [], [], left)
            if ready:
                try:
                    self.tail = (self.tail + os.read(self.fd, 65536))[-4000:]
                except OSError:
                    return

    def lines(self) -> list[str]:
        return self.log.read_text().splitlines()

    def wait_for(self, test, timeout: float = 60.0) -> None:  # type: ignore[no-untyped-def]
        end = time.monotonic() + timeout
        while time.monotonic() < end:
            if test(self.lines()):
                return
            self.drain(0.002)
        raise TimeoutError(f"the app did not answer; its last output: {self.tail.decode(errors='replace')}")

    def close(self) -> None:
        os.write(self.fd, b"\x11")  # Ctrl+Q
        self.drain(0.3)
        if b"Traceback" in self.tail or b"Error" in self.tail:
            print("the app failed:", self.tail.decode(errors="replace")[-3000:], file=sys.stderr)
        try:
            os.kill(self.pid, 9)
        except ProcessLookupError:
            pass
        os.waitpid(self.pid, 0)
        os.close(self.fd)
        self.log.unlink()


def frames(lines: list[str]) -> list[tuple[int, float]]:
    return [(int(p[1]), float(p[2])) for p in (line.split() for line in lines) if p[0] == "frame"]


def key_latencies(which: str, size: tuple[int, int], keys: int) -> list[float]:
    """Type ``keys`` keys into ``which`` in a pseudo-terminal; each key's time to its last painted frame."""
    term = Terminal(which, size)
    try:
        term.wait_for(lambda lines: "ready" in lines)
        term.drain(0.3)
        out = []
        for i in range(keys):
            before = frames(term.lines())
            gen = max((g for g, _ in before), default=0)
            t0 = time.monotonic()
            os.write(term.fd, b"\x7f" if i % 2 == 0 else b"5")
            term.wait_for(lambda lines, gen=gen: any(g > gen for g, _ in frames(lines)))
            term.drain(0.04 + random.random() * 0.04)  # later frames of the same key (a layout) count too
            out.append(max(t for g, t in frames(term.lines()) if g > gen) - t0)
        return out
    finally:
        term.close()


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


def pct(values: list[float], q: float) -> float:
    s = sorted(values)
    return s[min(len(s) - 1, round(q * (len(s) - 1)))]


def ms(values: list[float]) -> str:
    return f"median {statistics.median(values) * 1000:5.1f} ms, p95 {pct(values, 0.95) * 1000:5.1f} ms, max {max(values) * 1000:5.1f} ms"


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--keys", type=int, default=60, help="keys per run (default 60)")
    parser.add_argument("--rounds", type=int, default=3, help="alternated runs of the app and the floor per size (default 3)")
    parser.add_argument("--profile", metavar="FILE", help="only profile the app's keystrokes at 160x50 (cProfile stats to FILE)")
    args = parser.parse_args()
    if args.profile:
        os.environ["BENCH_TUI_PROFILE"] = str(Path(args.profile).resolve())
        lat = key_latencies("interact", (160, 50), args.keys)
        print(f"profiled {len(lat)} keys at 160x50: {ms(lat)}; stats in {args.profile}")
        return 0
    os.environ["PYTHONPATH"] = str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")
    print(f"{os.cpu_count()} cores; load average {os.getloadavg()[0]:.1f} at the start")
    for size in ((80, 24), (160, 50)):
        app: list[float] = []
        floor: list[float] = []
        for _ in range(args.rounds):  # alternated, so that machine load affects both alike
            floor += key_latencies("floor", size, args.keys)
            app += key_latencies("interact", size, args.keys)
        print(f"keystroke -> painted, {len(app)} keys at {size[0]}x{size[1]}:")
        print(f"  interact: {ms(app)}")
        print(f"  floor:    {ms(floor)}")
        print(
            f"  ratio interact/floor: median {statistics.median(app) / statistics.median(floor):.2f}, "
            f"p95 {pct(app, 0.95) / pct(floor, 0.95):.2f}; goal p95 < 50 ms: {'met' if pct(app, 0.95) < 0.05 else 'MISSED'}"
        )
    mins, apps, answers = [], [], []
    for _ in range(STARTS):  # alternated, so that machine load affects all three alike
        mins.append(first_screen("minimal"))
        apps.append(first_screen("interact"))
        answers.append(first_screen("answer"))
    m, a, r = statistics.median(mins), statistics.median(apps), statistics.median(answers)
    print(
        f"first screen, median of {STARTS}: minimal Textual app {m * 1000:.0f} ms, "
        f"interact on the demo {a * 1000:.0f} ms, ratio {a / m:.2f} (goal < 1.5: {'met' if a / m < 1.5 else 'MISSED'}); "
        f"with the answer on screen {r * 1000:.0f} ms, ratio {r / m:.2f}"
    )
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
