"""The source registry: every cited key is defined, every defined key is cited, statuses rest on the right kind of
source, and every output resolves what it cites (no internal code, a references section listing exactly what is cited).
"""

from __future__ import annotations

import ast
import json
import re
import tomllib
from collections.abc import Iterator
from datetime import UTC, datetime
from pathlib import Path

import pytest

import interact
from interact import assess
from interact.errors import InputError
from interact.report.assessment import format_assessment
from interact.report.document import md_escape
from interact.report.html import render_report_html, render_report_markdown, report_parts
from interact.report.tables import format_tables
from interact.scenario import demo_path, load_scenario
from interact.sources import MARKER, PRIMARY_KINDS, full_citation, load_sources, resolve
from interact.tables import STATUSES, load_rules, rule_set_names, tables_dir
from interact.uncertainty import sensitivity

PACKAGE = Path(interact.__file__).parent
EXAMPLES = sorted(p for p in (PACKAGE / "examples").glob("*.toml") if "[perpetrator]" in p.read_text(encoding="utf-8"))
INTERNAL_CODE = re.compile(r"\bS\d{1,2}\b")


def _table_files() -> list[Path]:
    return sorted(p for p in tables_dir().rglob("*.toml") if p.name != "sources.toml")


def _strings(node: object, path: str = "") -> Iterator[tuple[str, str]]:
    if isinstance(node, str):
        yield path, node
    elif isinstance(node, dict):
        for k, v in node.items():
            yield from _strings(v, f"{path}.{k}" if path else k)
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield from _strings(v, f"{path}[{i}]")


def _entries(node: object, path: str = "") -> Iterator[tuple[str, dict]]:
    """Every table that carries a status, with its path."""
    if isinstance(node, dict):
        if "status" in node:
            yield path, node
        for k, v in node.items():
            yield from _entries(v, f"{path}.{k}" if path else k)
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield from _entries(v, f"{path}[{i}]")


def _keys_in_tables() -> set[str]:
    keys: set[str] = set()
    for path in _table_files():
        for _, text in _strings(tomllib.loads(path.read_text(encoding="utf-8"))):
            keys.update(MARKER.findall(text))
    return keys


def _keys_in_code() -> set[str]:
    keys: set[str] = set()
    for path in PACKAGE.rglob("*.py"):
        keys.update(MARKER.findall(path.read_text(encoding="utf-8")))
    return keys


def test_every_cited_key_is_defined_and_every_defined_key_is_cited() -> None:
    defined = set(load_sources())
    used = _keys_in_tables() | _keys_in_code()
    assert not used - defined, f"cited but not defined in sources.toml: {sorted(used - defined)}"
    assert not defined - used, f"defined in sources.toml but cited nowhere: {sorted(defined - used)}"


def _output_strings(path: Path) -> Iterator[tuple[int, str]]:
    """String literals of a module that can reach an output (docstrings excluded)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    docstrings = set()
    for node in ast.walk(tree):
        if isinstance(node, (ast.Module, ast.ClassDef, ast.FunctionDef, ast.AsyncFunctionDef)) and node.body:
            first = node.body[0]
            if isinstance(first, ast.Expr) and isinstance(first.value, ast.Constant):
                docstrings.add(id(first.value))
    for node in ast.walk(tree):
        if isinstance(node, ast.Constant) and isinstance(node.value, str) and id(node) not in docstrings:
            yield node.lineno, node.value


def test_no_internal_source_codes_in_tables_or_output_strings() -> None:
    offences = []
    for path in _table_files():
        for where, text in _strings(tomllib.loads(path.read_text(encoding="utf-8"))):
            if INTERNAL_CODE.search(text):
                offences.append(f"{path.name}:{where}: {text}")
    for path in PACKAGE.rglob("*.py"):
        for line, text in _output_strings(path):
            if INTERNAL_CODE.search(text):
                offences.append(f"{path.name}:{line}: {text}")
    assert not offences, offences


def test_every_source_has_a_full_citation() -> None:
    for key, s in load_sources().items():
        assert s.short and s.authors and s.title and s.published and s.locator and s.read, key
        assert s.doi or s.url, f"{key}: neither a DOI nor a URL"
        text = full_citation(key)
        assert s.title.rstrip(".") in text and (s.doi in text if s.doi else s.url in text)
        assert f"Kind: {s.kind}" in text


@pytest.mark.parametrize("path", _table_files(), ids=lambda p: p.name)
def test_status_rests_on_the_right_kind_of_source(path: Path) -> None:
    """'seen in source' needs a primary text cited; 'seen in a secondary source' and 'inferred' cite their text."""
    sources = load_sources()
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    for where, entry in _entries(data):
        status = entry["status"]
        assert status in STATUSES, f"{path.name}:{where}: {status!r}"
        cited = MARKER.findall(str(entry.get("source", "")))
        kinds = {sources[k].kind for k in cited if k in sources}
        if status == "seen in source":
            assert kinds & set(PRIMARY_KINDS), f"{path.name}:{where}: 'seen in source' without a primary text cited"
        elif status in ("seen in a secondary source", "inferred"):
            assert cited, f"{path.name}:{where}: {status!r} without the text it rests on"
    # a gut-wall statement in targets.toml carries its own status pair
    for where, text in _strings(data):
        if where.endswith("gut_wall_source"):
            assert MARKER.findall(text)


def test_values_resting_only_on_summaries_are_not_seen_in_source() -> None:
    sources = load_sources()
    for path in _table_files():
        for where, entry in _entries(tomllib.loads(path.read_text(encoding="utf-8"))):
            cited = MARKER.findall(str(entry.get("source", "")))
            if cited and all(sources[k].kind == "secondary summary" for k in cited):
                assert entry["status"] != "seen in source", f"{path.name}:{where}"


def test_an_unknown_key_in_a_rule_set_file_is_refused(tmp_path: Path) -> None:
    text = (tables_dir() / "rules" / "fda-2020.toml").read_text(encoding="utf-8")
    bad = tmp_path / "mine.toml"
    bad.write_text(text.replace("[@lee2024]: FDA 2020, R1 >= 1.02", "[@nosuch2031]: R1 >= 1.02"), encoding="utf-8")
    with pytest.raises(InputError) as info:
        load_rules(bad)
    assert "criteria[0].cutoff.source" in str(info.value) and "[@nosuch2031]" in str(info.value)


def _references(text: str, heading: str) -> tuple[str, str]:
    at = text.index(heading)
    return text[:at], text[at:]


def _check_resolved(body: str, refs: str, escape=lambda text: text) -> None:  # type: ignore[no-untyped-def]
    """No marker or internal code; the references list exactly the sources the body cites, each in full
    (``escape``: how the format writes literal text, e.g. Markdown's backslash escapes)."""
    assert "[@" not in body + refs
    assert not INTERNAL_CODE.search(body + refs)
    sources = load_sources()
    cited = {k for k, s in sources.items() if escape(s.short) in body}
    listed = {k for k, s in sources.items() if f"- {escape(s.short)}: " in refs}
    assert cited == listed, (sorted(cited - listed), sorted(listed - cited))
    for k in listed:
        assert " ".join(escape(full_citation(k)).split()) in " ".join(refs.split())


@pytest.mark.parametrize("rules", rule_set_names())
@pytest.mark.parametrize("path", [demo_path(), *EXAMPLES], ids=lambda p: Path(p).name)
def test_text_and_markdown_resolve_every_citation(path: Path, rules: str) -> None:
    a = assess(load_scenario(path), rules=rules)
    text = format_assessment(a, "text", width=10_000)
    _check_resolved(*_references(text, "\nReferences\n=========="))
    md = format_assessment(a, "markdown")
    _check_resolved(*_references(md, "\n## References\n"), escape=md_escape)
    # the rule set's guidance and the equations' sources are among those cited
    assert load_sources()[a.rules.source.strip("[@]")].short in text


@pytest.mark.parametrize("rules", rule_set_names())
@pytest.mark.parametrize("path", [demo_path(), *EXAMPLES], ids=lambda p: Path(p).name)
def test_json_lists_exactly_the_sources_it_cites(path: Path, rules: str) -> None:
    a = assess(load_scenario(path), rules=rules)
    data = json.loads(format_assessment(a, "json"))
    refs = data.pop("references")
    body = json.dumps(data)
    assert "[@" not in body and not INTERNAL_CODE.search(body)
    shorts = {s.short for s in load_sources().values() if s.short in body}
    assert {r["cited_as"] for r in refs} == shorts
    assert all(r["citation"] and (r["doi"] or r["url"]) for r in refs)


def test_html_and_markdown_report_end_with_their_references() -> None:
    path = Path(demo_path())
    a = assess(load_scenario(path))
    parts = report_parts(
        a,
        spread=None,
        sens=sensitivity(a, ()),
        scenario_bytes=path.read_bytes(),
        source_name=path.name,
        generated_at=datetime(2026, 12, 1, tzinfo=UTC),
    )
    assert parts[-1].section.title == "References"
    assert sum(p.section.title == "References" for p in parts) == 1
    page = render_report_html(a, parts)
    assert "README" not in page
    body, refs = _references(page, "<h2>References</h2>")
    import html

    assert "<ul><li>" in refs  # the references are a list

    def text(part: str) -> str:
        return html.unescape(re.sub(r"<[^>]+>", " ", part.replace("<li>", "\n- "))).replace("\u00a0", " ")

    _check_resolved(text(body), text(refs))
    md = render_report_markdown(a, parts)
    _check_resolved(*_references(md, "\n## References\n"), escape=md_escape)


def test_tables_command_prints_the_whole_registry() -> None:
    out = format_tables(fmt_name="text")
    assert "[@" not in out and not INTERNAL_CODE.search(out)
    flat = " ".join(out.split())
    for key in load_sources():
        assert " ".join(full_citation(key).split()) in flat, key
    for status in STATUSES:
        assert f"- {status}: " in out


def test_resolve_leaves_text_without_markers_alone() -> None:
    assert resolve("R1 >= 1.02 [not a marker] @x") == "R1 >= 1.02 [not a marker] @x"
    assert resolve("[@lee2024], [@lee2024]") == "Lee et al. 2024, Lee et al. 2024"
