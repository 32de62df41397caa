"""The HTML report in a real headless browser (Chromium from the system packages; .ci/run installs it when missing).

The page is laid out by the browser at a screen width and at a narrow width.  A script added to a test copy of the
page (the report itself forbids scripts) measures what a reader would see: table cells whose content overflows them,
numbers, units and names broken across lines inside a cell, columns with nothing in them, and a page wider than the
window.  A screenshot is taken and must show the page.  The scenario is the built-in invented demo with its invented
spreads (interact/examples/demo_spread.toml).
"""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from interact.cli import main

ROOT = Path(__file__).resolve().parents[2]
BROWSERS = ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable", "chrome", "headless_shell")

# Runs in the page after layout; writes its findings as JSON into <pre id="layout-check">.
CHECK = r"""
<script>
(function () {
  const out = {overflow: [], broken: [], empty_columns: [], page: {}};
  const token = /(?:[<>=~]\s?)?\d[\d.,]*(?:e[-+]?\d+)?(?:\u00a0[^\s]+)?|\b[A-Z][A-Za-z]*\d[A-Za-z0-9/-]*\b/g;
  for (const cell of document.querySelectorAll("td, th")) {
    if (cell.scrollWidth > cell.clientWidth + 1) {
      out.overflow.push(cell.textContent.slice(0, 80));
    }
    const walker = document.createTreeWalker(cell, NodeFilter.SHOW_TEXT);
    for (let node = walker.nextNode(); node; node = walker.nextNode()) {
      for (const m of node.data.matchAll(token)) {
        const range = document.createRange();
        range.setStart(node, m.index);
        range.setEnd(node, m.index + m[0].length);
        const tops = new Set(Array.from(range.getClientRects()).map(r => Math.round(r.top)));
        if (tops.size > 1) out.broken.push(m[0]);
      }
    }
  }
  for (const table of document.querySelectorAll("table")) {
    const rows = Array.from(table.querySelectorAll("tbody tr"));
    const n = table.querySelectorAll("thead th").length;
    for (let i = 0; i < n; i++) {
      const cells = rows.map(r => (r.children[i] ? r.children[i].textContent.trim() : ""));
      if (rows.length && cells.every(c => c === "")) {
        out.empty_columns.push(table.querySelectorAll("thead th")[i].textContent);
      }
    }
  }
  out.page = {width: document.documentElement.scrollWidth, window: window.innerWidth,
              h1: document.querySelectorAll("h1").length, lists: document.querySelectorAll("ul li").length,
              invented: (document.body.innerText.match(/INVENTED/g) || []).length};
  const pre = document.createElement("pre");
  pre.id = "layout-check";
  pre.textContent = JSON.stringify(out);
  document.body.appendChild(pre);
})();
</script>
"""


def _browser() -> str | None:
    for name in BROWSERS:
        found = shutil.which(name)
        if found:
            return found
    return None


@pytest.fixture(scope="module")
def browser() -> str:
    found = _browser()
    if found is None:
        if os.environ.get("CI"):
            pytest.fail("no headless browser on the CI machine: .ci/run installs Debian's chromium when it is missing")
        pytest.skip(f"no browser found ({', '.join(BROWSERS)}); install Debian's chromium (apt-get install chromium) to run this check")
    return found


@pytest.fixture(scope="module")
def report(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = tmp_path_factory.mktemp("report")
    page = folder / "demo.html"
    spec = ROOT / "interact" / "examples" / "demo_spread.toml"
    assert main(["report", str(ROOT / "interact" / "demo.toml"), "--spec", str(spec), "-o", str(page)]) == 0
    return page


def _run(browser: str, *args: str) -> subprocess.CompletedProcess[str]:
    flags = ["--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars", "--no-first-run", "--disable-extensions"]
    return subprocess.run([browser, *flags, *args], capture_output=True, text=True, timeout=120, check=False)


def _measure(browser: str, page: Path, width: int) -> dict:
    text = page.read_text(encoding="utf-8")
    # the test copy alone may run a script; the report keeps its own policy (no scripts, nothing fetched)
    copy = page.with_name(f"check-{width}.html")
    allowed = text.replace("default-src 'none';", "default-src 'none'; script-src 'unsafe-inline';")
    copy.write_text(allowed.replace("</body>", CHECK + "</body>"), encoding="utf-8")
    done = _run(browser, f"--window-size={width},2000", "--virtual-time-budget=5000", "--dump-dom", copy.as_uri())
    found = re.search(r'<pre id="layout-check">(.*?)</pre>', done.stdout, flags=re.S)
    assert found, f"the browser did not lay out the page: {done.stderr[-800:]}"
    return json.loads(found.group(1).replace("&quot;", '"').replace("&amp;", "&").replace("&lt;", "<").replace("&gt;", ">"))


@pytest.mark.parametrize("width", [1280, 820])
def test_no_cell_overflows_and_nothing_breaks_inside_a_number_or_name(browser: str, report: Path, width: int) -> None:
    seen = _measure(browser, report, width)
    assert seen["overflow"] == [], seen["overflow"]
    assert seen["broken"] == [], seen["broken"]
    assert seen["empty_columns"] == [], seen["empty_columns"]
    assert seen["page"]["width"] <= seen["page"]["window"], seen["page"]  # wide tables scroll in their own box
    assert seen["page"]["h1"] == 1 and seen["page"]["invented"] == 1  # the title and the invented notice once
    assert seen["page"]["lists"] > 10  # warnings, from-memory values and references render as lists


def test_screenshot_shows_the_page(browser: str, report: Path) -> None:
    from matplotlib import image

    shot = report.with_name("demo.png")
    done = _run(browser, "--window-size=1000,3000", f"--screenshot={shot}", report.as_uri())
    assert shot.is_file(), done.stderr[-800:]
    pixels = image.imread(str(shot))
    assert pixels.shape[0] == 3000 and pixels.shape[1] == 1000
    # a real page: mostly white paper with dark text and coloured notes, not a blank or an error screen
    dark = (pixels[..., :3].mean(axis=2) < 0.5).mean()
    assert 0.005 < dark < 0.5, dark


def test_the_check_finds_what_it_looks_for(browser: str, report: Path) -> None:
    # the same page squeezed the way the old style sheet did it (words broken anywhere, tables forced to the page
    # width, an empty column added): the measurements must report each fault
    text = report.read_text(encoding="utf-8")
    squeeze = (
        "td, th { overflow-wrap: anywhere !important; white-space: normal !important; } "
        ".wide { overflow-x: visible !important; } body { max-width: 24rem !important; }"
    )
    squeezed = text.replace("<style>", "<style>" + squeeze, 1)
    squeezed = squeezed.replace("<tr><th>item</th><th>value</th></tr>", "<tr><th>item</th><th>value</th><th>empty</th></tr>", 1)
    bad = report.with_name("squeezed.html")
    bad.write_text(squeezed, encoding="utf-8")
    seen = _measure(browser, bad, 820)
    assert seen["broken"], "a number or name broken across lines was not found"
    assert seen["empty_columns"] == ["empty"]
