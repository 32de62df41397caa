"""Initial-rate laws of reversible enzyme inhibition, with analytic Jacobians.

Every function is vectorised: ``s`` (substrate) and ``i`` (inhibitor) are
arrays or scalars in one concentration unit (uM in this package), the
constants are in the same unit, and ``vmax`` sets the velocity unit.  A
constant of ``numpy.inf`` means "no inhibition through that route" and is
handled exactly (the mixed law with ``kic = inf`` is the uncompetitive law).

Equations (Lee et al. Biomolecules 2024;14:99 and a textbook page for the type-by-type
behaviour, seen in source; the algebraic forms below are the standard ones,
re-derived from the mixed law):

- Michaelis-Menten:     v = Vmax S / (Km + S)
- competitive:          v = Vmax S / (Km (1 + I/Ki) + S)            (Km,app = Km (1 + I/Ki))
- noncompetitive:       v = Vmax S / ((Km + S) (1 + I/Ki))           (Vmax,app = Vmax / (1 + I/Ki))
- uncompetitive:        v = Vmax S / (Km + S (1 + I/Ki))             (both apparent constants fall)
- mixed:                v = Vmax S / (Km (1 + I/Kic) + S (1 + I/Kiu))
- substrate inhibition: v = Vmax S / (Km + S (1 + S/Ksi))            (uninhibited curve; Haldane form)

Each ``*_jacobian`` returns an array of shape ``(n, p)`` holding the partial
derivatives of v with respect to the constants, in the order of the
function's arguments after the concentrations.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "competitive",
    "competitive_jacobian",
    "michaelis_menten",
    "michaelis_menten_jacobian",
    "mixed",
    "mixed_jacobian",
    "noncompetitive",
    "noncompetitive_jacobian",
    "substrate_inhibition",
    "substrate_inhibition_jacobian",
    "uncompetitive",
    "uncompetitive_jacobian",
]

Array = NDArray[np.float64]


def _inv(k: ArrayLike) -> Array:
    """1/k with 1/inf = 0 exactly."""
    with np.errstate(divide="ignore"):
        return np.asarray(1.0, dtype=float) / np.asarray(k, dtype=float)


def _mixed_parts(s: ArrayLike, i: ArrayLike, vmax: float, km: float, kc: Array, ku: Array) -> tuple[Array, Array, Array, Array]:
    s_ = np.asarray(s, dtype=float)
    i_ = np.asarray(i, dtype=float)
    a = 1.0 + i_ * kc
    b = 1.0 + i_ * ku
    d = km * a + s_ * b
    return s_, i_, d, vmax * s_ / d


def michaelis_menten(s: ArrayLike, vmax: float, km: float) -> Array:
    """v = Vmax S / (Km + S); S and Km in one unit, v in the unit of Vmax."""
    s_ = np.asarray(s, dtype=float)
    return vmax * s_ / (km + s_)


def michaelis_menten_jacobian(s: ArrayLike, vmax: float, km: float) -> Array:
    """Partial derivatives (dv/dVmax, dv/dKm), shape (n, 2)."""
    s_ = np.atleast_1d(np.asarray(s, dtype=float))
    d = km + s_
    return np.column_stack((s_ / d, -vmax * s_ / d**2))


def mixed(s: ArrayLike, i: ArrayLike, vmax: float, km: float, kic: float, kiu: float) -> Array:
    """v = Vmax S / (Km (1 + I/Kic) + S (1 + I/Kiu)); Kic, Kiu may be ``inf``."""
    return _mixed_parts(s, i, vmax, km, _inv(kic), _inv(kiu))[3]


def mixed_jacobian(s: ArrayLike, i: ArrayLike, vmax: float, km: float, kic: float, kiu: float) -> Array:
    """Partial derivatives (dv/dVmax, dv/dKm, dv/dKic, dv/dKiu), shape (n, 4).

    dv/dKic = v Km I / (Kic^2 D) and dv/dKiu = v S I / (Kiu^2 D), zero at an
    infinite constant.
    """
    kc, ku = _inv(kic), _inv(kiu)
    s_, i_, d, v = _mixed_parts(np.atleast_1d(s), np.atleast_1d(i), vmax, km, kc, ku)
    dv_dkc = -v * km * i_ / d  # derivative with respect to 1/Kic
    dv_dku = -v * s_ * i_ / d
    return np.column_stack((s_ / d, -v * (1.0 + i_ * kc) / d, -dv_dkc * kc**2, -dv_dku * ku**2))


def competitive(s: ArrayLike, i: ArrayLike, vmax: float, km: float, ki: float) -> Array:
    """v = Vmax S / (Km (1 + I/Ki) + S)."""
    return mixed(s, i, vmax, km, ki, np.inf)


def competitive_jacobian(s: ArrayLike, i: ArrayLike, vmax: float, km: float, ki: float) -> Array:
    """Partial derivatives (dv/dVmax, dv/dKm, dv/dKi), shape (n, 3)."""
    return mixed_jacobian(s, i, vmax, km, ki, np.inf)[:, :3]


def uncompetitive(s: ArrayLike, i: ArrayLike, vmax: float, km: float, ki: float) -> Array:
    """v = Vmax S / (Km + S (1 + I/Ki))."""
    return mixed(s, i, vmax, km, np.inf, ki)


def uncompetitive_jacobian(s: ArrayLike, i: ArrayLike, vmax: float, km: float, ki: float) -> Array:
    """Partial derivatives (dv/dVmax, dv/dKm, dv/dKi), shape (n, 3)."""
    return mixed_jacobian(s, i, vmax, km, np.inf, ki)[:, (0, 1, 3)]


def noncompetitive(s: ArrayLike, i: ArrayLike, vmax: float, km: float, ki: float) -> Array:
    """v = Vmax S / ((Km + S)(1 + I/Ki)), the mixed law with Kic = Kiu = Ki."""
    return mixed(s, i, vmax, km, ki, ki)


def noncompetitive_jacobian(s: ArrayLike, i: ArrayLike, vmax: float, km: float, ki: float) -> Array:
    """Partial derivatives (dv/dVmax, dv/dKm, dv/dKi), shape (n, 3)."""
    j = mixed_jacobian(s, i, vmax, km, ki, ki)
    return np.column_stack((j[:, 0], j[:, 1], j[:, 2] + j[:, 3]))


def substrate_inhibition(s: ArrayLike, vmax: float, km: float, ksi: float) -> Array:
    """v = Vmax S / (Km + S (1 + S/Ksi)); Ksi = inf gives Michaelis-Menten."""
    s_ = np.asarray(s, dtype=float)
    return vmax * s_ / (km + s_ * (1.0 + s_ * _inv(ksi)))


def substrate_inhibition_jacobian(s: ArrayLike, vmax: float, km: float, ksi: float) -> Array:
    """Partial derivatives (dv/dVmax, dv/dKm, dv/dKsi), shape (n, 3)."""
    s_ = np.atleast_1d(np.asarray(s, dtype=float))
    k = _inv(ksi)
    d = km + s_ * (1.0 + s_ * k)
    v = vmax * s_ / d
    return np.column_stack((s_ / d, -v / d, v * s_**2 / d * k**2))
