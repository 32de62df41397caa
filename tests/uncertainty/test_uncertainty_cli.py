"""`interact uncertainty` in-process: output formats, seeds, errors as one line with exit status 2."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from interact.cli import main
from interact.scenario import demo_path

DEMO = str(demo_path())


def test_text_output_has_spread_and_cautions(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["uncertainty", DEMO, "--vary", "perpetrator.inhibits[0].ki=cv:30%", "--samples", "2000"]) == 0
    out = capsys.readouterr().out
    assert "Uncertainty of the AUC ratio" in out and "\nSensitivity\n" in out
    assert "not clinical advice" in out
    assert "AUCR >= 2" in out and "Most probable" in out


def test_json_same_seed_same_numbers(capsys: pytest.CaptureFixture[str]) -> None:
    args = [
        "uncertainty",
        DEMO,
        "--vary",
        "perpetrator.cmax=cv:25%",
        "--samples",
        "3000",
        "--seed",
        "7",
        "--method",
        "mc",
        "--format",
        "json",
    ]
    assert main(args) == 0
    one = json.loads(capsys.readouterr().out)
    assert main(args) == 0
    two = json.loads(capsys.readouterr().out)
    assert one == two
    assert one["schema"] == "interact.uncertainty/1" and one["samples"] == 3000 and one["method"] == "mc"
    assert [p["percent"] for p in one["percentiles"]] == [5.0, 50.0, 95.0]
    assert sum(one["classes"].values()) == pytest.approx(1.0)


def test_spec_file(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    spec = tmp_path / "spread.toml"
    spec.write_text('[vary]\n"victim.fg" = "uniform:0.3,0.6"\n[sampling]\nsamples = 800\nseed = 4\n', encoding="utf-8")
    assert main(["uncertainty", DEMO, "--spec", str(spec), "--format", "json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["samples"] == 800 and data["seed"] == 4 and data["varied"][0]["path"] == "victim.fg"


def test_markdown_tables(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["uncertainty", DEMO, "--vary", "victim.fg=uniform:0.3,0.6", "--samples", "500", "--format", "markdown"]) == 0
    out = capsys.readouterr().out
    assert "| percentile | gut AUCR | liver AUCR | kidney AUCR | total AUCR |" in out
    assert "|---|---|---|---|---|" in out


def test_list_inputs(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["uncertainty", DEMO, "--list-inputs"]) == 0
    out = capsys.readouterr().out
    assert "perpetrator.inhibits[0].ki" in out and "victim.pathways[0].fm" in out
    assert "perpetrator.inhibits[2].ic50" not in out  # OATP1B1 does not act on this victim's pathways


@pytest.mark.parametrize(
    "extra",
    [
        ["--vary", "perpetrator.inhibits[0].ki=cv:lots"],
        ["--vary", "nowhere=cv:10%"],
        ["--vary", "perpetrator.cmax"],
        ["--spec", "/nonexistent/spread.toml"],
        ["--samples", "0", "--vary", "perpetrator.cmax=cv:10%"],
        [],
    ],
)
def test_errors_are_one_line_exit_2(extra: list[str], capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["uncertainty", DEMO, *extra]) == 2
    err = capsys.readouterr().err
    assert err.startswith("interact: ") and err.count("\n") == 1
