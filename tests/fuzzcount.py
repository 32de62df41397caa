"""Counts of the cases the standing fuzz suite generates (tests/fuzz), reported at the end of every run."""

from __future__ import annotations

from collections import Counter

#: cases generated per input path, filled by the fuzz tests
CASES: Counter[str] = Counter()
#: of those, the cases that ended in a result (the rest ended in a named error)
RESULTS: Counter[str] = Counter()
