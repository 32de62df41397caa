"""Benchmark (run by hand, not a test): cold start and assess() latency.

    python tests/bench/bench_core.py

Cold start of `interact demo --format json` (a fresh process) as a ratio to
`python -c "import numpy, pint; pint.UnitRegistry()"` measured in the same run
(goal: at most 1.0), and the in-process median latency of assess() on the
demo scenario (goal: under 1 ms).
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import time


def _cold(cmd: list[str], runs: int) -> float:
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main() -> None:
    runs = 7
    floor = _cold([sys.executable, "-c", "import numpy, pint; pint.UnitRegistry()"], runs)
    tool = _cold([sys.executable, "-m", "interact", "demo", "--format", "json"], runs)
    print(f"cold start: interact demo --format json {tool * 1e3:.0f} ms; numpy+pint floor {floor * 1e3:.0f} ms; ratio {tool / floor:.2f}")

    from interact import assess, load_scenario
    from interact.scenario import demo_path

    s = load_scenario(demo_path())
    assess(s)
    lat = []
    for _ in range(2000):
        t0 = time.perf_counter()
        assess(s)
        lat.append(time.perf_counter() - t0)
    lat.sort()
    print(f"assess(): median {statistics.median(lat) * 1e3:.3f} ms, p95 {lat[int(0.95 * len(lat))] * 1e3:.3f} ms over {len(lat)} calls")


if __name__ == "__main__":
    main()
