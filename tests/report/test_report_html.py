"""Reports: every section present, user strings escaped, self-contained, SVG well-formed, Markdown tables.

Outside references: Python's own html.parser and xml.etree (standard-library parsers) read the output;
hashlib gives the SHA-256 the provenance must show.
"""

from __future__ import annotations

import base64
import hashlib
import html
import re
import xml.etree.ElementTree as ET
from datetime import UTC, datetime
from html.parser import HTMLParser
from pathlib import Path

import pytest

from interact import assess
from interact.cautions import CAUTIONS, DOSE_CAUTIONS
from interact.cli import main
from interact.report.document import speak
from interact.report.html import render_report_html, render_report_markdown, report_parts
from interact.scenario import demo_path, dumps_scenario, load_scenario, loads_scenario
from interact.tables import load_rules
from interact.uncertainty import run_uncertainty, sensitivity

EVIL = '<script>alert("x")</script> & "quotes" <img src=x onerror=alert(1)>'

SECTIONS = (
    "Summary",
    "Inputs",
    "Rule set",
    "Equations used",
    "Precipitant concentrations (uM)",
    "Basic static models (ich-m12-2024)",
    "Mechanistic static model",
    "Uncertainty of the AUC ratio",
    "Sensitivity",
    "Dose suggestion",
    "Cautions",
    "Provenance",
)


def _evil_scenario_text() -> str:
    s = load_scenario(demo_path())
    from dataclasses import replace

    s = replace(s, title=f"Title {EVIL}", perpetrator=replace(s.perpetrator, name=EVIL), victim=replace(s.victim, name=f"V {EVIL}"))
    return dumps_scenario(s)


def _report(text: str, fmt: str = "html", vary: bool = True) -> tuple[str, bytes]:
    raw = text.encode("utf-8")
    a = assess(loads_scenario(text))
    v = [("perpetrator.inhibits[0].ki", "ci:2 uM,8 uM"), ("perpetrator.cmax", "cv:30%")] if vary else []
    spread = run_uncertainty(a, v, samples=2000, seed=1) if v else None
    parts = report_parts(
        a,
        spread=spread,
        sens=sensitivity(a, v),
        scenario_bytes=raw,
        source_name="evil.toml",
        generated_at=datetime(2026, 1, 2, 3, 4, 5, tzinfo=UTC),
    )
    return (render_report_html(a, parts) if fmt == "html" else render_report_markdown(a, parts)), raw


class _Collector(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[str] = []
        self.attrs: list[tuple[str, str | None]] = []
        self.h2: list[str] = []
        self._in_h2 = False
        self.text: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append(tag)
        self.attrs.extend(attrs)
        self._in_h2 = tag == "h2"

    def handle_endtag(self, tag: str) -> None:
        self._in_h2 = False

    def handle_data(self, data: str) -> None:
        self.text.append(data)
        if self._in_h2:
            self.h2.append(data)


def test_user_strings_are_escaped_everywhere() -> None:
    page, _ = _report(_evil_scenario_text())
    assert "<script" not in page.lower()
    assert "<img" not in page.lower()
    assert html.escape(EVIL) in page
    p = _Collector()
    p.feed(page)
    assert "script" not in p.tags and "img" not in p.tags
    assert not any(name.startswith("on") for name, _ in p.attrs)
    # the names come back as text, unchanged, once the HTML is parsed
    assert any(EVIL in t for t in p.text)


def test_every_section_and_provenance() -> None:
    text = Path(demo_path()).read_text(encoding="utf-8")
    page, raw = _report(text)
    p = _Collector()
    p.feed(page)
    for title in SECTIONS:
        assert title in p.h2, title
    assert hashlib.sha256(raw).hexdigest() in page
    assert "2026-01-02T03:04:05+00:00" in page
    assert "INVENTED scenario" in page
    assert "interact 0." in page and "classes table" in page
    terms = load_rules().terms  # the default rule set, ICH M12: its words (precipitant, object drug)
    for caution in (*CAUTIONS, *DOSE_CAUTIONS):
        assert html.escape(speak(caution, terms)) in page  # in full
    assert "Iin,max,u" in page and "Cheng" in page  # equations
    assert "@media print" in page


def test_self_contained_and_svg_well_formed() -> None:
    page, _ = _report(Path(demo_path()).read_text(encoding="utf-8"))
    # nothing loaded from elsewhere; the charts' clip paths refer to fragments of the page itself (url(#id))
    assert "<link" not in page and "@import" not in page and not re.search(r"url\((?!#)", page)
    # nothing is fetched: no link or source attribute names a URL; the SVG namespace name and the sources' addresses,
    # printed as text in the references, are the only URLs on the page
    assert not re.search(r"(href|src)\s*=\s*[\"']?https?:", page)
    urls = set(re.findall(r"https?://[^\s\"'<>]+", page)) - {"http://www.w3.org/2000/svg", "http://www.w3.org/1999/xlink"}
    references = page[page.index("<h2>References</h2>") :]
    assert urls and all(u in references for u in urls)
    assert "default-src 'none'" in page
    svgs = re.findall(r"<svg.*?</svg>", page, flags=re.S)
    assert len(svgs) == 3  # histogram, tornado, fm curves
    for svg in svgs:
        root = ET.fromstring(svg)
        assert root.tag.endswith("svg")
        assert root.findall(".//{http://www.w3.org/2000/svg}rect")


def test_without_distributions_the_report_says_so() -> None:
    page, _ = _report(Path(demo_path()).read_text(encoding="utf-8"), vary=False)
    assert "No input distributions were declared" in page
    assert "x/÷ 2" in page  # the tornado's default swing is stated
    assert len(re.findall(r"<svg", page)) == 2


def test_markdown_renders_tables_and_embeds_charts() -> None:
    md, raw = _report(_evil_scenario_text(), fmt="md")
    lines = md.splitlines()
    headers = [k for k, ln in enumerate(lines) if ln.startswith("| ") and k + 1 < len(lines) and re.fullmatch(r"\|(---\|)+", lines[k + 1])]
    assert len(headers) >= 8
    for k in headers:  # every row of a table has as many cells as its header
        n = lines[k].count(" | ")
        j = k + 2
        while j < len(lines) and lines[j].startswith("| "):
            assert lines[j].replace("\\|", "").count(" | ") == n, lines[j]
            j += 1
    for title in SECTIONS:
        assert f"## {title}" in md
    images = re.findall(r"data:image/svg\+xml;base64,([A-Za-z0-9+/=]+)\)", md)
    assert len(images) == 3
    for data in images:
        ET.fromstring(base64.b64decode(data))
    assert hashlib.sha256(raw).hexdigest() in md


def test_cli_report_html_and_md(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scen = tmp_path / "s.toml"
    scen.write_text(_evil_scenario_text(), encoding="utf-8")
    out = tmp_path / "out.html"
    assert main(["report", str(scen), "-o", str(out), "--vary", "victim.fg=uniform:0.3,0.6", "--samples", "500"]) == 0
    page = out.read_text(encoding="utf-8")
    assert page.startswith("<!DOCTYPE html>") and hashlib.sha256(scen.read_bytes()).hexdigest() in page
    md = tmp_path / "out.md"
    assert main(["report", str(scen), "-o", str(md)]) == 0
    assert md.read_text(encoding="utf-8").startswith("# interact report:")
    # each written file is named on standard error
    assert capsys.readouterr().err.splitlines() == [f"interact: output written to {p.resolve()}" for p in (out, md)]
    assert main(["report", str(tmp_path / "missing.toml"), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("interact: ") and err.count("\n") == 1
    assert out.read_text(encoding="utf-8") == page  # a failed run leaves the earlier file alone


def test_sensitivity_rows_read_as_the_user_wrote_the_inputs(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # the demo (invented) gives its dose in mg and Cmax in µg/mL: the swing is shown in those units, with readable labels
    out = tmp_path / "r.md"
    assert main(["report", str(demo_path()), "-o", str(out)]) == 0
    text = out.read_text(encoding="utf-8")
    sens = text[text.index("## Sensitivity") : text.index("## Sensitivity") + 4000]
    dose = next(line for line in sens.splitlines() if line.startswith("| Dose of "))
    cmax = next(line for line in sens.splitlines() if line.startswith("| Cmax of Corvexazole"))
    assert dose.split("|")[2].strip().endswith(" mg") and "umol" not in sens
    assert cmax.split("|")[2].strip().endswith(" µg/mL")
    # 150 mg swung x/÷ 2 by default: 75 to 300 mg
    assert dose.split("|")[2].strip() == "75.0 to 300 mg"
    assert "perpetrator.inhibits[" not in sens  # labels, not file paths
