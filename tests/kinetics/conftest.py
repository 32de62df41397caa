"""Shared helpers for the kinetics checks: reading the outside reference files in tests/data."""

from __future__ import annotations

import csv
import math
from pathlib import Path

import numpy as np

DATA = Path(__file__).resolve().parents[1] / "data"


def read_table(name: str) -> list[dict[str, str]]:
    """Rows of a reference CSV in tests/data (its first line is the '# source' line)."""
    lines = (DATA / name).read_text(encoding="utf-8").splitlines()
    assert lines[0].startswith("#"), f"{name} lost its source line"
    return list(csv.DictReader(lines[1:]))


def columns(name: str, *cols: str) -> tuple[np.ndarray, ...]:
    rows = read_table(name)
    return tuple(np.array([float(r[c]) for r in rows]) for c in cols)


def lre(value: float, certified: float) -> float:
    """Log relative error: the number of matching significant digits (NIST StRD practice)."""
    if value == certified:
        return 15.0
    return -math.log10(abs(value - certified) / abs(certified))
