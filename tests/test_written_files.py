"""Every command that writes a file says where (one line on standard error, the absolute path), and standard output
stays the result.  Scenarios: the built-in invented demo and the invented example interact/examples/tdi_inducer.toml."""

from __future__ import annotations

import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from interact.cli import main
from interact.scenario import demo_path

EXAMPLE = Path(__file__).resolve().parents[1] / "interact" / "examples" / "tdi_inducer.toml"


@pytest.mark.parametrize(
    "args",
    [
        ["assess", str(demo_path()), "--format", "json"],
        ["assess", str(demo_path()), "--format", "markdown"],
        ["uncertainty", str(demo_path()), "--vary", "victim.fg=uniform:0.3,0.6", "--samples", "200"],
        ["timecourse", str(EXAMPLE), "--days", "10"],
    ],
    ids=lambda a: "-".join(a[:1] + a[2:4]),
)
def test_output_file_is_named(args: list[str], tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    target = tmp_path / "out.txt"
    assert main([*args, "-o", str(target)]) == 0
    captured = capsys.readouterr()
    assert captured.out == ""
    assert captured.err.splitlines()[-1] == f"interact: output written to {target.resolve()}"
    assert target.stat().st_size > 0


def test_timecourse_plot_is_named(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    plot = tmp_path / "course.svg"
    assert main(["timecourse", str(EXAMPLE), "--days", "10", "--plot", str(plot)]) == 0
    captured = capsys.readouterr()
    assert f"interact: plot written to {plot.resolve()}" in captured.err.splitlines()
    assert ET.parse(plot).getroot().tag == "{http://www.w3.org/2000/svg}svg"
    assert captured.out  # the text result still goes to standard output


def test_constants_given_are_shown_as_written(capsys: pytest.CaptureFixture[str]) -> None:
    # tdi_inducer.toml (invented) gives kinact = "0.006 1/min" and KI = "1.8 uM": shown so under "constant given",
    # not converted to 1/h (the unbound value beside it is the engine's, in uM)
    assert main(["assess", str(EXAMPLE), "--width", "400"]) == 0
    out = capsys.readouterr().out
    row = next(line for line in out.splitlines() if "kinact" in line and "time-dependent" in line)
    assert "kinact 0.006 1/min" in row and "0.360 1/h" not in row
