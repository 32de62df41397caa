"""The source registry (``reference_tables/sources.toml``) and citation markers.

Tables and messages cite a source with a marker ``[@lee2024]`` (the citation
syntax of Pandoc).  Outputs replace each marker by the source's short
author-year form (:func:`resolve`) and end with a references section that
lists, with full citations, exactly the sources whose markers they contain
(:func:`cited_keys`, :func:`full_citation`).  A marker naming no registered
source is an error where the tables are read, so no output can show an
unresolved internal code.
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from dataclasses import dataclass
from functools import lru_cache
from typing import Final

from .errors import InputError
from .tables import read_table, tables_dir

__all__ = [
    "KINDS",
    "MARKER",
    "PRIMARY_KINDS",
    "Source",
    "check_markers",
    "cited_keys",
    "full_citation",
    "load_sources",
    "resolve",
]

PRIMARY_KINDS: Final = ("guidance text", "paper", "journal table", "abstract")
KINDS: Final = (*PRIMARY_KINDS, "secondary summary")
MARKER: Final = re.compile(r"\[@([A-Za-z0-9][A-Za-z0-9_-]*)\]")
_FIELDS: Final = ("short", "authors", "title", "published", "locator", "kind", "read")


@dataclass(frozen=True, slots=True, kw_only=True)
class Source:
    """One published text (or secondary summary) that values and equations rest on."""

    key: str
    short: str
    authors: str
    title: str
    published: str
    year: str
    locator: str
    kind: str
    read: str
    doi: str = ""
    url: str = ""

    @property
    def primary(self) -> bool:
        """True for guidance texts, papers, journal tables and abstracts; False for secondary summaries."""
        return self.kind in PRIMARY_KINDS


@lru_cache(maxsize=1)
def load_sources() -> dict[str, Source]:
    """The registry, by key."""
    data = read_table(tables_dir() / "sources.toml", "sources")
    raw_sources = data.get("source")
    if not isinstance(raw_sources, dict):
        raise InputError("sources.source", raw_sources, "is not a table of sources")
    out: dict[str, Source] = {}
    for key, raw in raw_sources.items():
        at = f"sources.source.{key}"
        if not MARKER.fullmatch(f"[@{key}]"):
            raise InputError(at, key, "is not a valid source key (letters, digits, '-' and '_')")
        if not isinstance(raw, dict):
            raise InputError(at, raw, "is not a table")
        for name in _FIELDS:
            if not isinstance(raw.get(name), str) or not raw[name].strip():
                raise InputError(f"{at}.{name}", raw.get(name), "is missing or not text")
        if raw["kind"] not in KINDS:
            raise InputError(f"{at}.kind", raw["kind"], f"is not one of {', '.join(KINDS)}")
        out[key] = Source(
            key=key,
            short=raw["short"],
            authors=raw["authors"],
            title=raw["title"],
            published=raw["published"],
            year=str(raw.get("year", "not recorded")),
            locator=raw["locator"],
            kind=raw["kind"],
            read=raw["read"],
            doi=str(raw.get("doi", "")),
            url=str(raw.get("url", "")),
        )
    return out


def cited_keys(texts: Iterable[str]) -> tuple[str, ...]:
    """The keys cited by markers in ``texts``, in order of first appearance, each once."""
    seen: dict[str, None] = {}
    for text in texts:
        for m in MARKER.finditer(text):
            seen.setdefault(m.group(1), None)
    return tuple(seen)


def check_markers(text: str, field: str) -> None:
    """Raise :class:`InputError` naming ``field`` if ``text`` cites a key that is not in the registry."""
    known = load_sources()
    for key in cited_keys((text,)):
        if key not in known:
            raise InputError(field, f"[@{key}]", f"cites a source that is not in reference_tables/sources.toml ({len(known)} keys)")


def resolve(text: str) -> str:
    """``text`` with every marker (``[@lee2024]``) replaced by the source's short author-year form."""
    if "[@" not in text:
        return text
    known = load_sources()

    def short(m: re.Match[str]) -> str:
        src = known.get(m.group(1))
        return src.short if src is not None else m.group(0)

    return MARKER.sub(short, text)


def full_citation(key: str) -> str:
    """The full citation of ``key``: authors, title, where published, year, section or table, DOI or URL, kind and what was read."""
    s = load_sources()[key]
    authors = "Authors not recorded" if s.authors == "not recorded" else s.authors
    title = "Title not recorded" if s.title == "not recorded" else s.title
    published = s.published
    if s.year not in ("", "not recorded") and s.year not in published:
        published += f" ({s.year})"
    parts = [authors, title, published, f"Cited for: {s.locator}"]
    if s.doi:
        parts.append(f"doi:{s.doi}")
    if s.url:
        parts.append(s.url)
    parts.append(f"Kind: {s.kind}; read: {s.read}")
    return " ".join(p if p.endswith(".") else p + "." for p in parts)
