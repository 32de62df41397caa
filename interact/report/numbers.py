"""Significant figures, set in one place for every shell and report."""

from __future__ import annotations

import math
from typing import Final

__all__ = ["SIG", "fmt", "fmt_ratio"]

#: significant figures shown for concentrations, constants and ratios
SIG: Final = 3


def fmt(value: float | None, sig: int = SIG) -> str:
    """A number with ``sig`` significant figures, plain notation where readable."""
    if value is None:
        return "-"
    if math.isinf(value):
        return "unbounded" if value > 0 else "-unbounded"
    if math.isnan(value):
        return "not a number"
    if value == 0:
        return "0"
    # the order of magnitude after rounding: 9.9996 rounds to 10.0, not "10.00"
    mag = math.floor(math.log10(abs(float(f"{value:.{sig - 1}e}"))))
    if mag >= 6 or mag <= -4:
        return f"{value:.{sig - 1}e}"
    decimals = max(sig - 1 - mag, 0)
    return f"{value:.{decimals}f}"


def fmt_ratio(value: float | None) -> str:
    """A ratio (R value, AUCR) with enough digits to compare with 1.02 or 1.25."""
    if value is None:
        return "-"
    if math.isfinite(value) and 0.9 < value < 1.1:
        return f"{value:.4f}"
    return fmt(value, SIG)
