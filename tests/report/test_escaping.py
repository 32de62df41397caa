"""Every output format neutralises user text (issue 11): Markdown escapes HTML and Markdown; terminal text has no escapes.

The hostile names are invented inputs. What counts as an escape sequence is ECMA-48 (CSI, OSC and the other
string controls); what Markdown treats as markup is the CommonMark specification (inline HTML, links, images,
emphasis, code spans, block markers at the start of a line).
"""

from __future__ import annotations

import csv
import io
import re
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from interact.cli import main
from interact.report.document import md_escape, terminal_safe
from interact.scenario import demo_path

CONCEAL = "\x1b[8m"  # ECMA-48 SGR 8: conceal what follows
EXAMPLE = demo_path().parent / "examples" / "tdi_inducer.toml"  # an invented scenario with a time course
HOSTILE_NAME = "<script>alert(1)</script><img src=x onerror=alert(2)> [link](javascript:x) *b* `c` \x1b]0;title\x07" + CONCEAL


def _hostile_scenario(tmp_path: Path) -> Path:
    import tomlkit

    doc = tomlkit.parse(EXAMPLE.read_text(encoding="utf-8"))
    doc["title"] = "T " + HOSTILE_NAME
    doc["perpetrator"]["name"] = "P " + HOSTILE_NAME  # type: ignore[index]
    doc["victim"]["name"] = "V " + HOSTILE_NAME  # type: ignore[index]
    path = tmp_path / "hostile.toml"
    path.write_text(tomlkit.dumps(doc), encoding="utf-8")
    return path


def _no_raw_html_or_links(text: str) -> None:
    assert "<script" not in text and "<img" not in text
    assert "](javascript" not in text.replace("\\](", "")  # an escaped bracket cannot close a link


@pytest.mark.parametrize("command", [["assess"], ["report", "--format", "markdown"], ["timecourse"]])
def test_markdown_outputs_carry_no_html_or_links(tmp_path: Path, capsys: pytest.CaptureFixture[str], command: list[str]) -> None:
    scen = _hostile_scenario(tmp_path)
    argv = [command[0], str(scen), *command[1:]]
    if "--format" not in argv:
        argv += ["--format", "markdown"]
    assert main(argv) == 0
    out = capsys.readouterr().out
    _no_raw_html_or_links(out)
    assert "\x1b" not in out
    assert "&lt;script&gt;" in out


@pytest.mark.parametrize("command", ["assess", "timecourse", "uncertainty"])
def test_terminal_text_has_no_escape_sequences_and_shows_the_cautions(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], command: str
) -> None:
    scen = _hostile_scenario(tmp_path)
    argv = [command, str(scen)]
    if command == "uncertainty":
        argv += ["--vary", "victim.fg=uniform:0.3,0.6", "--samples", "200"]
    assert main(argv) == 0
    out = capsys.readouterr().out
    assert not re.search(r"[\x00-\x08\x0b-\x1f\x7f-\x9f]", out)
    assert "not clinical advice" in out


def test_batch_markdown_escapes_names(tmp_path: Path) -> None:
    perps = tmp_path / "p.csv"
    perps.write_text(
        "name,dose (mg),molar mass (g/mol),cmax (ng/mL),fu_p,route,ki CYP3A (uM)\n"
        '"<script>x</script>|[a](javascript:b)",100,400,400,0.1,oral,1\n',
        encoding="utf-8",
    )
    victims = tmp_path / "v.csv"
    victims.write_text("name,dose (mg),interval (h),fg,fm CYP3A\n<img src=x onerror=y>,10,24,0.5,0.9\n", encoding="utf-8")
    out = tmp_path / "out.md"
    assert main(["screen-batch", str(perps), str(victims), "-o", str(out), "-q"]) == 0
    text = out.read_text(encoding="utf-8")
    _no_raw_html_or_links(text)
    row = next(line for line in text.splitlines() if line.startswith("| 1 "))
    from interact.report.batch import SHOWN

    assert row.count(" | ") == len(SHOWN) - 1  # the name's pipe is escaped: as many cells as the header has


@settings(max_examples=300)
@given(st.text())
def test_md_escape_leaves_no_markup(text: str) -> None:
    out = md_escape(text)
    assert "<" not in out and ">" not in out and "\n" not in out
    for ch in "`*_[]|~!#":
        # each such character is preceded by an odd number of backslashes: it is literal (an underscore inside a
        # word opens no emphasis in CommonMark and is left as it is)
        pattern = r"(?<![A-Za-z0-9])_|_(?![A-Za-z0-9])" if ch == "_" else re.escape(ch)
        for m in re.finditer(pattern, out):
            run = len(out[: m.start()]) - len(out[: m.start()].rstrip("\\"))
            assert run % 2 == 1, (text, out)


@settings(max_examples=300)
@given(st.text(alphabet=st.characters(codec="utf-8")))
def test_terminal_safe_removes_every_control(text: str) -> None:
    out = terminal_safe(text)
    assert not re.search(r"[\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]", out)


def test_width_zero_is_a_named_error(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as info:
        main(["assess", str(demo_path()), "--width", "0"])
    assert info.value.code == 2
    assert "--width" in capsys.readouterr().err


def test_error_messages_and_batch_csv_carry_no_escapes(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scen = tmp_path / "bad.toml"
    scen.write_text('title = "x"\n[perpetrator]\nname = "P"\ndose = "1 \\u001b[8m kg"\n', encoding="utf-8")
    assert main(["assess", str(scen)]) == 2
    assert "\x1b" not in capsys.readouterr().err
    perps = tmp_path / "p.csv"
    perps.write_text(
        "name,dose (mg),molar mass (g/mol),cmax (ng/mL),fu_p,route,ki CYP3A (uM)\nP\x1b[8m,100,400,400,0.1,oral,1\n", encoding="utf-8"
    )
    victims = tmp_path / "v.csv"
    victims.write_text("name,dose (mg),interval (h),fg,fm CYP3A\nV\x9b8m,10,24,0.5,0.9\n", encoding="utf-8")
    assert main(["screen-batch", str(perps), str(victims)]) == 0
    out = capsys.readouterr().out
    assert "\x1b" not in out and "\x9b" not in out
    row = next(csv.DictReader(io.StringIO(out)))  # text values are quoted (RFC 4180): read the cells back
    assert (row["perpetrator"], row["victim"]) == ("P", "V")
