"""Figures as matplotlib objects: each drawing function returns a Figure or draws into a given ax, never touching the backend.

Inputs are invented scenarios (the demo, the tdi_inducer example) and the nlstools vmkmki data set (tests/data);
the checks are invariants: what is drawn equals the data it was given.
"""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from conftest import DATA
from matplotlib.figure import Figure

from interact import assess, demo_path, load_scenario
from interact.kinetics.data import read_incubation_csv
from interact.kinetics.diagnostics import diagnostic_plots
from interact.kinetics.fitting import fit_inhibition
from interact.report import figures
from interact.uncertainty import run_uncertainty, sensitivity

PACKAGE = Path(figures.__file__).resolve().parents[1]
EXAMPLE = PACKAGE / "examples" / "tdi_inducer.toml"


@pytest.fixture(scope="module")
def demo():  # type: ignore[no-untyped-def]
    a = assess(load_scenario(demo_path()), warn=False)
    vary = [("perpetrator.cmax", "cv:40%"), ("victim.pathways[0].fm", "uniform:0.6,0.95")]
    return a, run_uncertainty(a, vary, samples=2000, seed=1), sensitivity(a, vary)


def test_histogram_draws_every_sample_and_the_percentiles(demo) -> None:  # type: ignore[no-untyped-def]
    _, r, _ = demo
    fig = figures.histogram_figure(r)
    assert isinstance(fig, Figure)
    ax = fig.axes[0]
    assert sum(p.get_height() for p in ax.patches) == r.samples
    drawn = {round(line.get_xdata()[0], 12) for line in ax.lines}
    assert all(round(r.percentile(q), 12) in drawn for q in (5.0, 50.0, 95.0))


def test_tornado_bars_run_from_the_point_to_each_end(demo) -> None:  # type: ignore[no-untyped-def]
    a, _, s = demo
    fig = figures.tornado_figure(s, a.dose.boundary)
    patches = fig.axes[0].patches
    shown = list(s.bars)[:15]
    assert len(patches) == 2 * len(shown)
    ends = sorted(round(p.get_x() + p.get_width(), 9) for p in patches)
    assert ends == sorted(round(v, 9) for b in shown for v in (b.aucr_low, b.aucr_high))


def test_draws_into_a_given_ax_and_fm_curves_match(demo) -> None:  # type: ignore[no-untyped-def]
    _, _, s = demo
    host = Figure()
    left, right = host.subplots(1, 2)
    assert figures.fm_curves_figure(s, ax=right) is host
    assert not left.lines and len(right.lines) >= len(s.curves)
    for line, curve in zip(right.lines, s.curves, strict=False):
        np.testing.assert_array_equal(line.get_ydata(), curve.aucr)


def test_fit_and_timecourse_figures(tmp_path: Path) -> None:
    data = read_incubation_csv(DATA / "nlstools_vmkmki.csv", substrate_unit="uM", inhibitor_unit="uM")
    comp = fit_inhibition(data, warn=False)
    fig = figures.fit_diagnostics_figure(comp)
    assert len(fig.axes) == 3
    first = diagnostic_plots(comp)[0]
    points = [s for s in first.series if s.kind == "points"]
    assert [tuple(line.get_xdata()) for line in fig.axes[0].lines if line.get_marker() == "o"] == [tuple(p.x) for p in points]
    from interact.dynamic import simulate

    a = assess(load_scenario(EXAMPLE), warn=False)
    course = simulate(a, days=10, warn=False)  # the drawing is checked here; the warnings in tests/api/test_warnings.py
    tfig = figures.timecourse_figure(course, title="x")
    assert len(tfig.axes) == 2
    np.testing.assert_array_equal(tfig.axes[1].lines[0].get_ydata(), np.asarray(course.exposure_ratio))
    for suffix in (".svg", ".png", ".pdf"):
        out = figures.save_figure(tfig, tmp_path / f"course{suffix}")
        assert out.stat().st_size > 1000
    with pytest.raises(Exception, match="unsupported suffix"):
        figures.save_figure(tfig, tmp_path / "course.gif")


def test_no_backend_switch_and_no_pyplot() -> None:
    """In a fresh interpreter with a chosen backend: every figure function and save_figure leave it as it was."""
    code = f"""
import matplotlib, sys, tempfile, pathlib
matplotlib.use("pdf")
sys.path.insert(0, {str(Path(__file__).resolve().parents[1])!r})
from interact import assess, demo_path, load_scenario
from interact.report import figures
from interact.uncertainty import run_uncertainty, sensitivity
a = assess(load_scenario(demo_path()), warn=False)
vary = [("perpetrator.cmax", "cv:40%")]
r = run_uncertainty(a, vary, samples=200)
s = sensitivity(a, vary)
figs = [figures.histogram_figure(r), figures.tornado_figure(s), figures.fm_curves_figure(s)]
d = pathlib.Path(tempfile.mkdtemp())
for k, f in enumerate(figs):
    figures.save_figure(f, d / f"f{{k}}.png")
assert matplotlib.get_backend().lower() == "pdf", matplotlib.get_backend()
assert "matplotlib.pyplot" not in sys.modules
print("ok")
"""
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120, check=False)
    assert done.stdout.strip() == "ok", done.stderr


def test_the_package_never_switches_the_backend_or_uses_pyplot() -> None:
    offenders = []
    for path in PACKAGE.rglob("*.py"):
        text = path.read_text(encoding="utf-8")
        if re.search(r"matplotlib\.use\(|import matplotlib\.pyplot|from matplotlib import pyplot", text):
            offenders.append(path.name)
    assert offenders == []


def test_sobol_figure_draws_both_indices(demo) -> None:  # type: ignore[no-untyped-def]
    _, _, s = demo
    fig = figures.sobol_figure(s)
    widths = sorted(round(p.get_width(), 12) for p in fig.axes[0].patches)
    assert widths == sorted(round(v, 12) for v in (*s.variance.first_order, *s.variance.total_order))
    from interact.uncertainty import sensitivity

    a, _, _ = demo
    with pytest.raises(Exception, match="no variance-based indices"):
        figures.sobol_figure(sensitivity(a))
