"""Significant figures for every shell and report (set in :mod:`interact.numbers`, shared with the core's summaries)."""

from __future__ import annotations

from ..numbers import SIG, fmt, fmt_ratio

__all__ = ["SIG", "fmt", "fmt_ratio"]
