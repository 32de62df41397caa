"""Readable time-course plot: round ticks, legends clear of the data, a reference line at 1, readable units.

The scenario is the invented example interact/examples/tdi_inducer.toml; the tick rule is the usual 1-2-5 series
(common practice for chart axes), with weeks for days.
"""

from __future__ import annotations

import math
import re
import xml.etree.ElementTree as ET
from pathlib import Path

from hypothesis import given
from hypothesis import strategies as st

from interact import assess, load_scenario
from interact.dynamic import simulate
from interact.report.timecourse import nice_ticks, timecourse_svg

EXAMPLE = Path(__file__).resolve().parents[2] / "interact" / "examples" / "tdi_inducer.toml"
NS = "{http://www.w3.org/2000/svg}"


@given(st.floats(-1e3, 1e3), st.floats(1e-3, 1e4), st.booleans(), st.booleans())
def test_ticks_are_round_and_cover_the_range(lo: float, span: float, days: bool, enclose: bool) -> None:
    hi = lo + span
    ticks = nice_ticks(lo, hi, 6, days=days, enclose=enclose)
    assert (ticks == sorted(ticks) and len(ticks) >= 2) or span < 1e-2
    if len(ticks) < 2:
        return
    step = ticks[1] - ticks[0]
    mantissa = step / 10 ** math.floor(math.log10(step))
    assert (days and span >= 14 and round(step) % 7 == 0) or any(abs(mantissa - m) < 1e-6 for m in (1, 2, 5, 10))
    assert all(abs((t - ticks[0]) / step - round((t - ticks[0]) / step)) < 1e-6 for t in ticks)
    assert len(ticks) <= 13
    if enclose:
        assert ticks[0] <= lo + 1e-6 * step and ticks[-1] >= hi - 1e-6 * step
    else:
        assert lo - 1e-6 * step <= ticks[0] and ticks[-1] <= hi + 1e-6 * step


def test_plot_legends_sit_above_the_panels_and_a_line_marks_1() -> None:
    a = assess(load_scenario(EXAMPLE))
    svg = timecourse_svg(simulate(a, days=30), title=a.scenario.title, terms=a.rules.terms)
    root = ET.fromstring(svg)
    panels = [r for r in root.iter(f"{NS}rect") if r.get("stroke") == "#444"]
    assert len(panels) == 2
    tops = sorted(float(p.get("y", 0)) for p in panels)
    texts = list(root.iter(f"{NS}text"))
    legend = [t for t in texts if t.get("fill") == "#222" and t.text and ("enzyme" in t.text or t.text.startswith(("with ", "without ")))]
    assert len(legend) >= 3
    for t in legend:  # each legend entry lies above the panel it labels, never inside it
        y = float(t.get("y", 0))
        assert not any(top <= y <= top + 220 for top in tops)
    # day ticks in weeks
    days = sorted({float(t.text) for t in texts if t.text and re.fullmatch(r"\d+", t.text) and t.get("text-anchor") == "middle"})
    assert {0.0, 7.0, 14.0, 21.0, 28.0} <= set(days)
    # the dotted reference line at a ratio of 1, and the ICH M12 words
    assert any(line.get("stroke-dasharray") == "2 3" for line in root.iter(f"{NS}line"))
    assert "precipitant" in svg and "perpetrator" not in svg
    # concentrations in a unit read as 1 to 1000
    label = next(t.text for t in texts if t.text and "concentration (" in t.text)
    assert re.search(r"\((?:[µunm]g|g)/L\)", label)
