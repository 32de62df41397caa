"""The command line, run in-process."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from interact import __version__
from interact.cli import main


def test_demo_text(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["demo"]) == 0
    out = capsys.readouterr().out
    for heading in (
        "\nSummary\n=======",
        "\nInputs\n",
        "\nPrecipitant concentrations (uM)\n",  # ICH M12's word; the unit keeps its case
        "\nBasic static models",
        "\nMechanistic static model\n",
        "\nDose suggestion\n",
        "\nCautions\n",
        "\nProvenance\n",
    ):
        assert heading in out
    assert "not clinical advice" in out
    assert "INVENTED" in out


def test_demo_json_fields(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["demo", "--format", "json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["schema"] == "interact.assessment/1"
    assert {"gut", "liver", "total", "ceiling_total", "band"} <= set(data["auc_ratio"])
    assert data["concentrations_um"][0]["imax_u"] > 0
    for row in data["screen"]:
        assert {"value", "cutoff", "study_indicated", "equation", "cutoff_status"} <= set(row)
    assert data["dose"]["cautions"]
    assert data["cautions"]


def test_markdown_and_output_file(tmp_path: Path) -> None:
    out = tmp_path / "a.md"
    assert main(["demo", "--format", "markdown", "-o", str(out)]) == 0
    text = out.read_text(encoding="utf-8")
    assert text.startswith("# interact assessment")
    assert "| target | test | value |" in text


def test_assess_file_and_rules(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    from interact.scenario import demo_path

    assert main(["assess", str(demo_path()), "--rules", "fda-2020", "--format", "json"]) == 0
    assert json.loads(capsys.readouterr().out)["rules"]["id"] == "fda-2020"


def test_errors_are_one_line_exit_2(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["assess", str(tmp_path / "nope.toml")]) == 2
    err = capsys.readouterr().err
    assert err.startswith("interact: scenario: ") and err.count("\n") == 1
    bad = tmp_path / "bad.toml"
    bad.write_text('title="x"\n[perpetrator]\nname="P"\ndose="1 kg"\n', encoding="utf-8")
    assert main(["assess", str(bad)]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err and "perpetrator.cmax" in err
    assert main(["demo", "--rules", "nonexistent"]) == 2
    assert "rules" in capsys.readouterr().err


def test_tables_and_version(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["tables"]) == 0
    out = capsys.readouterr().out
    assert "FROM MEMORY" in out and "seen in source" in out and "ich-m12-2024" in out
    with pytest.raises(SystemExit):
        main(["--version"])
    assert __version__ in capsys.readouterr().out


def test_fm_command(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["fm", "--observed", "5"]) == 0
    assert "fm = 0.800" in capsys.readouterr().out
    assert main(["fm", "--observed", "0.5"]) == 2
