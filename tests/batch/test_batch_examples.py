"""The shipped example tables and uncertainty file (invented data) run through the commands."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

import interact
from interact.cli import main
from interact.scenario import demo_path

EXAMPLES = Path(interact.__file__).parent / "examples"


def test_example_batch_tables(capsys: pytest.CaptureFixture[str]) -> None:
    args = ["screen-batch", str(EXAMPLES / "batch_perpetrators.csv"), str(EXAMPLES / "batch_victims.csv"), "--format", "json"]
    assert main(args) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["pairs"] == 16 and data["skipped_rows"] == []
    assert [r["rank"] for r in data["results"]] == list(range(1, 17))


def test_example_spread_file(capsys: pytest.CaptureFixture[str]) -> None:
    assert (
        main(
            [
                "uncertainty",
                str(demo_path()),
                "--spec",
                str(EXAMPLES / "demo_spread.toml"),
                "--samples",
                "2000",
                "--format",
                "json",
            ]
        )
        == 0
    )
    data = json.loads(capsys.readouterr().out)
    assert len(data["varied"]) == 7 and data["samples"] == 2000 and data["seed"] == 1
