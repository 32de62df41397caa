"""The time course in the command line, the reports and the dose timing; the invented example scenario.

The example (interact/examples/tdi_inducer.toml) is invented and serves only as
an input: assertions here check structure and internal consistency (the same
numbers in every output, the cautions present, the limits of the dose timing),
never its values against a published figure.
"""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from interact import assess, load_scenario
from interact.cli import main
from interact.dosing import timing_advice
from interact.dynamic import simulate
from interact.report.figures import figure_bytes, timecourse_figure
from interact.report.timecourse import format_timecourse, timecourse_to_dict
from interact.scenario import dumps_scenario, loads_scenario

EXAMPLE = Path(__file__).resolve().parents[2] / "interact" / "examples" / "tdi_inducer.toml"


@pytest.fixture(scope="module")
def course():  # type: ignore[no-untyped-def]
    a = assess(load_scenario(EXAMPLE), warn=False)  # its kdeg values are from memory (checked in tests/api/test_warnings.py)
    return a, simulate(a, warn=False)


def test_example_is_marked_invented_and_round_trips() -> None:
    s = load_scenario(EXAMPLE)
    assert s.invented and "invented" in s.perpetrator.name.lower()
    assert "INVENTED" in EXAMPLE.read_text(encoding="utf-8")
    again = loads_scenario(dumps_scenario(s))
    assert again == s
    assert again.perpetrator.half_life is not None and again.victim.hepatic_extraction == 0.4


def test_example_gives_every_mechanism_the_net_and_the_course(course) -> None:  # type: ignore[no-untyped-def]
    a, tc = course
    crit = {r.criterion for r in a.screen}
    assert {"tdi-liver", "induction-liver", "induction-fold-change", "reversible-liver", "reversible-gut"} <= crit
    assert set(a.prediction.mechanisms) == {"reversible", "time-dependent", "induction"}
    assert tc.steady and tc.onset_h is not None and tc.offset_h is not None
    assert tc.offset_h > 24.0  # enzyme resynthesis, not the perpetrator's own washout alone


def test_assess_text_has_course_and_timing(capsys: pytest.CaptureFixture[str], course) -> None:  # type: ignore[no-untyped-def]
    _, tc = course
    assert main(["assess", str(EXAMPLE), "--width", "140"]) == 0
    out = capsys.readouterr().out
    for needle in (
        "Time course (dynamic check)",
        "AUC ratio, dynamic steady state",
        "Start:",
        "Stop:",
        "time-dependent alone",
        "induction alone",
        "not a prescription",
        "kdeg CYP3A (liver)",
    ):
        assert needle in out, needle
    assert f"{tc.steady_state_ratio:.3g}" in out


def test_assess_json_carries_course_summary(capsys: pytest.CaptureFixture[str], course) -> None:  # type: ignore[no-untyped-def]
    _, tc = course
    assert main(["assess", str(EXAMPLE), "--format", "json"]) == 0
    data = json.loads(capsys.readouterr().out)
    t = data["time_course"]
    assert t["steady_state_auc_ratio"] == pytest.approx(tc.steady_state_ratio, rel=1e-9)
    assert t["static_auc_ratio"] == pytest.approx(data["auc_ratio"]["total"], rel=1e-12)
    assert "curves" not in t and t["dose_timing"]
    assert any(s["status"] == "from memory" for s in t["settings"])


def test_assess_without_half_life_says_why(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    text = EXAMPLE.read_text(encoding="utf-8").replace('half_life = "20 h"', "")
    path = tmp_path / "s.toml"
    path.write_text(text, encoding="utf-8")
    assert main(["assess", str(path)]) == 0
    assert "perpetrator.half_life" in capsys.readouterr().out
    assert main(["assess", str(path), "--time-course", "on"]) == 2
    err = capsys.readouterr().err
    assert "perpetrator.half_life" in err and "Traceback" not in err
    assert main(["assess", str(path), "--time-course", "off"]) == 0
    assert "Time course" not in capsys.readouterr().out


def test_timecourse_command_json_plot_and_errors(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    svg = tmp_path / "course.svg"
    assert main(["timecourse", str(EXAMPLE), "--days", "20", "--format", "json", "--plot", str(svg)]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["schema"] == "interact.timecourse/1"
    n = len(data["curves"]["time_h"])
    assert n > 100 and all(len(v) == n for k, v in data["curves"].items() if isinstance(v, list))
    assert data["stop_h"] == 480.0
    root = ET.parse(svg).getroot()
    assert root.tag.endswith("svg") and "not clinical advice" in svg.read_text(encoding="utf-8")  # drawn by matplotlib
    png = tmp_path / "course.png"  # PNG and PDF are drawn by interact.report.figures.timecourse_figure (matplotlib)
    assert main(["timecourse", str(EXAMPLE), "--days", "20", "--plot", str(png)]) == 0
    capsys.readouterr()
    assert png.read_bytes().startswith(b"\x89PNG")
    with pytest.raises(SystemExit) as exc:  # argparse rejects the value with a one-line usage error
        main(["timecourse", str(EXAMPLE), "--days", "0"])
    assert exc.value.code == 2
    assert "outside (0, 365] days" in capsys.readouterr().err
    assert main(["timecourse", str(EXAMPLE), "--constant", "--washout-days", "3"]) == 0
    assert "constant" in capsys.readouterr().out


def test_formats_agree(course) -> None:  # type: ignore[no-untyped-def]
    a, tc = course
    text = format_timecourse(tc, a, "text", width=160)
    md = format_timecourse(tc, a, "markdown")
    data = timecourse_to_dict(tc, a)
    assert "INVENTED" in text and "Caution" in md
    assert data["onset_h"] == tc.onset_h and data["cautions"]
    svg = figure_bytes(timecourse_figure(tc, title="x & y"), "svg").decode("utf-8")
    assert "x &amp; y" in svg and "not clinical advice" in svg


def _advice(**kw: object) -> tuple[str, ...]:
    base = dict(
        action="reduce dose",
        steady_ratio=2.0,
        static_ratio=2.2,
        onset_h=90.0,
        offset_h=130.0,
        peak_ratio=2.0,
        peak_h=600.0,
        boundary=(0.8, 1.25),
        effect_fraction=0.9,
        follow_up_h=300.0,
        mechanisms=("time-dependent",),
        usual_dose=8.0,
        dose_unit="mg",
    )
    base.update(kw)
    return timing_advice(**base)  # type: ignore[arg-type]


def test_timing_advice_covers_start_stop_and_limits() -> None:
    text = " ".join(_advice())
    assert "Start:" in text and "Stop:" in text and "resynthesised" in text and "returning at once risks overexposure" in text
    assert "guide for monitoring, not a schedule" in text
    inducer = " ".join(_advice(action="increase dose", steady_ratio=0.4, static_ratio=0.35, peak_ratio=0.4, mechanisms=("induction",)))
    assert "stepwise" in inducer and "risks toxicity" in inducer
    fast = " ".join(_advice(onset_h=6.0, offset_h=12.0, mechanisms=("reversible",)))
    assert "when the perpetrator is started" in fast and "eliminated" in fast
    assert "return to the usual dose when the perpetrator is stopped" in fast
    halves = " ".join(_advice(half_offset_h=40.0))
    assert "half of it within 1.7 days" in halves
    rebound = " ".join(_advice(steady_ratio=2.0, after_stop_ratio=0.6, after_stop_h=30.0, mechanisms=("reversible", "induction")))
    assert "swings to 0.6" in rebound and "efficacy may be lost" in rebound
    none = _advice(action="no change", steady_ratio=1.1, static_ratio=1.15, peak_ratio=1.1)
    assert any("no dose timing applies" in x for x in none)
    never = " ".join(_advice(offset_h=None))
    assert "had not faded" in never
    overshoot = " ".join(
        _advice(steady_ratio=1.6, static_ratio=1.7, peak_ratio=3.0, peak_h=48.0, mechanisms=("time-dependent", "induction"))
    )
    assert "passes through 3" in overshoot
    disagree = " ".join(_advice(steady_ratio=1.8, static_ratio=3.2))
    assert "disagree" in disagree and "4.44 mg" in disagree
