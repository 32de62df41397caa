"""Shared helpers for the test suite."""

from __future__ import annotations

import copy
import csv
import os
from pathlib import Path
from typing import Any

import pytest
from hypothesis import settings

# CI runs the property tests with a fixed derivation of examples, so that a submission's
# verdict does not depend on the draw; local runs keep exploring new examples.
settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("CI"):
    settings.load_profile("ci")

DATA = Path(__file__).parent / "data"


def read_checks(name: str) -> list[dict[str, str]]:
    """Rows of a reference CSV in tests/data, skipping its '#' source line."""
    with open(DATA / name, encoding="utf-8") as handle:
        lines = [line for line in handle if not line.startswith("#")]
    return list(csv.DictReader(lines))


def base_dict() -> dict[str, Any]:
    """A minimal valid scenario as plain data (values are arbitrary test inputs, not checks)."""
    return copy.deepcopy(
        {
            "title": "test scenario",
            "perpetrator": {
                "name": "P",
                "molar_mass": "400 g/mol",
                "dose": "100 mg",
                "cmax": "1 uM",
                "fu_plasma": 0.1,
                "inhibits": [{"target": "CYP3A", "ki": "1 uM", "fu_inc": 1.0}],
            },
            "victim": {
                "name": "V",
                "dose": "10 mg",
                "interval": "24 h",
                "fg": 0.5,
                "strengths": ["2.5 mg", "5 mg", "10 mg"],
                "pathways": [{"enzyme": "CYP3A", "fm": 0.8}],
            },
        }
    )


@pytest.fixture
def scenario_dict() -> dict[str, Any]:
    return base_dict()


def pytest_terminal_summary(terminalreporter: Any) -> None:
    """Report how many cases the fuzz suite (tests/fuzz) generated in this run."""
    from fuzzcount import CASES, RESULTS

    if CASES:
        parts = ", ".join(f"{name} {n:,} ({RESULTS[name]:,} results)" for name, n in sorted(CASES.items()))
        terminalreporter.write_line(f"fuzz cases generated: {sum(CASES.values()):,}; the rest of each ended in a named error: {parts}")
