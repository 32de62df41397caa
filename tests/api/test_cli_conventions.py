"""Command-line conventions: `-o -`, bare `interact` without a terminal, `interact new`, rich progress, JSON schemas."""

from __future__ import annotations

import io
import json
import re
import subprocess
import sys
from pathlib import Path

import pytest
from conftest import DATA

from interact import results
from interact.cli import _progress_bar, main
from interact.scenario import load_scenario, starter_path

EXAMPLES = Path(__file__).resolve().parents[2] / "interact" / "examples"
SCHEMAS = {v for k, v in vars(results).items() if k.endswith("_SCHEMA")}


def test_dash_output_writes_to_standard_output(tmp_path, monkeypatch, capsys) -> None:  # type: ignore[no-untyped-def]
    monkeypatch.chdir(tmp_path)
    assert main(["demo", "--format", "json", "-o", "-"]) == 0
    assert json.loads(capsys.readouterr().out)["schema"] == results.ASSESSMENT_SCHEMA
    perps, victims = EXAMPLES / "batch_perpetrators.csv", EXAMPLES / "batch_victims.csv"
    assert main(["screen-batch", str(perps), str(victims), "-o", "-", "--format", "json"]) == 0
    assert json.loads(capsys.readouterr().out)["schema"] == results.BATCH_SCHEMA
    assert not (tmp_path / "-").exists()


def test_bare_command_without_a_terminal_prints_usage_and_exits_2() -> None:
    done = subprocess.run(
        [sys.executable, "-m", "interact"], stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=60, check=False
    )
    assert done.returncode == 2
    assert done.stderr.startswith("usage: interact") and "--help" in done.stderr
    assert done.stdout == ""


def test_new_writes_a_commented_starter_that_loads_and_never_overwrites(tmp_path, capsys) -> None:  # type: ignore[no-untyped-def]
    target = tmp_path / "mine.toml"
    assert main(["new", str(target)]) == 0
    text = target.read_text(encoding="utf-8")
    assert text == starter_path().read_text(encoding="utf-8")
    assert "PLACEHOLDER" in text.upper() and text.count("#") > 10
    scenario = load_scenario(target)
    assert scenario.invented  # placeholder values are marked invented until the user changes them
    assert "placeholders to replace" in capsys.readouterr().err
    assert main(["assess", str(target)]) == 0
    capsys.readouterr()
    target.write_text("# my own work\n", encoding="utf-8")
    assert main(["new", str(target)]) == 2
    assert target.read_text(encoding="utf-8") == "# my own work\n"  # nothing the user saved is lost
    assert "already exists" in capsys.readouterr().err
    assert main(["new", "-"]) == 0
    assert capsys.readouterr().out == starter_path().read_text(encoding="utf-8")


def test_progress_is_silent_off_a_terminal_and_drawn_by_rich_on_one() -> None:
    assert _progress_bar("work", io.StringIO()) is None

    class Terminal(io.StringIO):
        def isatty(self) -> bool:
            return True

    stream = Terminal()
    show = _progress_bar("work", stream)
    assert show is not None
    for done in (0, 50, 100):
        show(done, 100)
    assert "work" in stream.getvalue()


def test_every_json_output_names_its_schema(tmp_path, capsys) -> None:  # type: ignore[no-untyped-def]
    scenario = str(EXAMPLES / "tdi_inducer.toml")
    commands = [
        ["demo", "--format", "json"],
        ["timecourse", scenario, "--format", "json"],
        ["uncertainty", scenario, "--vary", "perpetrator.cmax=cv:30%", "--samples", "200", "--format", "json"],
        ["fit", str(DATA / "nlstools_vmkmki.csv"), "--substrate-unit", "uM", "--inhibitor-unit", "uM", "--format", "json"],
    ]
    seen = []
    for argv in commands:
        assert main(argv) == 0, argv
        data = json.loads(capsys.readouterr().out)
        assert re.fullmatch(r"interact\.[a-z-]+/\d+", data["schema"]), argv
        assert data["schema"] in SCHEMAS
        seen.append(data["schema"])
    assert len(set(seen)) == len(seen)


@pytest.mark.parametrize("name", sorted(k for k in vars(results) if k.endswith("_SCHEMA")))
def test_schema_constants_are_named_after_their_output(name: str) -> None:
    value = getattr(results, name)
    assert value.split(".")[1].split("/")[0].replace("-", "_").upper() + "_SCHEMA" == name
