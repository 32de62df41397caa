"""Cheng-Prusoff conversion of IC50 to Ki, and the unbound correction.

Cheng Y, Prusoff WH. Biochem Pharmacol 1973;22:3099-3108.  With substrate
concentration S and Michaelis constant Km (same units as IC50):

- competitive:    IC50 = Ki (1 + S/Km)                    (Clin Pharmacol Ther 2015;98:321, Table 3 footnote: seen)
- noncompetitive: IC50 = Ki                                (from memory)
- uncompetitive:  IC50 = Ki (1 + Km/S)                     (textbook page: seen)
- mixed:          IC50 = (Km + S) / (Km/Ki + S/(alpha Ki)) (from memory; algebra checked:
                  alpha -> infinity gives the competitive form, alpha = 1 the noncompetitive)

Ki for mixed inhibition is the competitive constant Kic; Kiu = alpha x Kic.
"""

from __future__ import annotations

from typing import Final

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = ["CHENG_PRUSOFF_SOURCE", "ki_from_ic50", "unbound"]

CHENG_PRUSOFF_SOURCE: Final = "[@chengprusoff1973]"
"""A citation marker: outputs resolve it to the author-year form and list the full citation."""


def ki_from_ic50(
    ic50: ArrayLike,
    mechanism: str,
    substrate: ArrayLike | None = None,
    km: ArrayLike | None = None,
    alpha: ArrayLike | None = None,
) -> NDArray[np.float64]:
    """Ki from IC50 for the stated mechanism (all concentrations in one unit).

    Parameters
    ----------
    ic50, substrate, km
        IC50, substrate concentration in the IC50 assay, and Km, same unit (uM).
    mechanism
        ``competitive``, ``noncompetitive``, ``uncompetitive`` or ``mixed``.
    alpha
        Mixed inhibition only: Kiu / Kic.

    Returns
    -------
    Ki in the unit of ``ic50`` (for mixed inhibition, Kic).
    """
    ic = np.asarray(ic50, dtype=float)
    if mechanism == "noncompetitive":
        return ic
    if substrate is None or km is None:
        raise ValueError(f"{mechanism} conversion needs substrate and km")  # guarded by scenario validation
    s = np.asarray(substrate, dtype=float)
    k = np.asarray(km, dtype=float)
    if mechanism == "competitive":
        return ic / (1.0 + s / k)
    if mechanism == "uncompetitive":
        return ic / (1.0 + k / s)
    if mechanism == "mixed":
        if alpha is None:
            raise ValueError("mixed conversion needs alpha")
        a = np.asarray(alpha, dtype=float)
        return ic * (k + s / a) / (k + s)
    raise ValueError(f"unknown mechanism {mechanism!r}")


def unbound(constant: ArrayLike, fu_inc: ArrayLike) -> NDArray[np.float64]:
    """Unbound constant: K,u = K x fu,inc (Ki, KI, EC50 or Km alike)."""
    return np.asarray(constant, dtype=float) * np.asarray(fu_inc, dtype=float)
