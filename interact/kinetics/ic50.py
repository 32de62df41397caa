"""IC50 from an activity-versus-inhibitor curve, and Ki from it by Cheng-Prusoff.

Four-parameter log-logistic model (the ``LL.4`` form of the R package drc,
Ritz et al. PLoS One 2015;10:e0146021, from memory):

    f(x) = bottom + (top - bottom) / (1 + exp(hill (ln x - ln IC50)))

``IC50`` is the concentration halfway between top and bottom (the relative
IC50); with a positive ``hill`` the response falls with concentration.  The
three-parameter variant fixes ``bottom`` (usually 0, complete inhibition),
which makes IC50 the concentration that halves the control activity.  Rows at
zero inhibitor are allowed (they sit at ``top``).

The Ki then follows from :func:`~interact.kinetics.conversion.ki_from_ic50`
(Cheng & Prusoff, Biochem Pharmacol 1973;22:3099) for the stated mechanism,
substrate concentration and Km; for fixed S and Km the relation is linear in
IC50, so its interval maps the IC50 interval exactly.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..errors import FitError, InputError
from ..scenario import MECHANISMS
from .conversion import CHENG_PRUSOFF_SOURCE, ki_from_ic50
from .engine import CurveModel, FitResult, extra_sum_of_squares, fit_curve

__all__ = ["IC50Fit", "KiFromIC50", "fit_ic50", "guess_ic50", "ic50_model", "ki_from_ic50_fit"]

Array = NDArray[np.float64]


def _parts(u: Array, x: Array, bottom: float | None) -> tuple[float, float, float, float, Array, Array]:
    if bottom is None:
        hill, low, top, ic50 = u
    else:
        hill, top, ic50 = u
        low = bottom
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        logdiff = np.log(x) - math.log(ic50) if ic50 > 0 else np.full_like(x, np.inf)
        z = np.exp(hill * logdiff)
    return hill, low, top, ic50, z, logdiff


def ic50_model(bottom: float | None = None, response_unit: str = "") -> CurveModel:
    """The 4-parameter (``bottom=None``) or 3-parameter (fixed bottom) log-logistic model."""

    def f(u: Array, x: Array) -> Array:
        _, low, top, _, z, _ = _parts(u, x, bottom)
        with np.errstate(invalid="ignore"):
            return low + (top - low) / (1.0 + z)

    def jac(u: Array, x: Array) -> Array:
        hill, low, top, ic50, z, logdiff = _parts(u, x, bottom)
        with np.errstate(invalid="ignore", over="ignore"):
            q = 1.0 / (1.0 + z)
            zq2 = np.where(np.isfinite(z), z * q * q, 0.0)
            d_hill = np.where(x > 0, -(top - low) * zq2 * logdiff, 0.0)
            d_low = np.where(np.isfinite(z), z * q, 1.0)
            d_top = q
            d_ic50 = (top - low) * zq2 * hill / ic50
        cols = (d_hill, d_low, d_top, d_ic50) if bottom is None else (d_hill, d_top, d_ic50)
        return np.column_stack(cols)

    names = ("hill", "bottom", "top", "IC50") if bottom is None else ("hill", "top", "IC50")
    units = ("", response_unit, response_unit, "uM") if bottom is None else ("", response_unit, "uM")
    p = len(names)
    return CurveModel(
        name="4PL" if bottom is None else "3PL",
        parameters=names,
        function=f,
        jacobian=jac,
        lower=(-math.inf,) * (p - 1) + (0.0,),
        upper=(math.inf,) * p,
        reported_names=names,
        units=units,
        equation=(
            "f = bottom + (top - bottom) / (1 + (I/IC50)^hill)"
            if bottom is None
            else f"f = {bottom:g} + (top - {bottom:g}) / (1 + (I/IC50)^hill)"
        ),
    )


def guess_ic50(inhibitor_um: Array, response: Array, bottom: float | None = None) -> tuple[float, ...]:
    """Starting values: top and bottom from the response range, IC50 where the curve crosses halfway."""
    x, y = np.asarray(inhibitor_um, dtype=float), np.asarray(response, dtype=float)
    control = y[x == x.min()]
    top = float(np.mean(control))
    low = float(np.min(y)) if bottom is None else bottom
    decreasing = np.mean(y[x == x.max()]) < top
    if not decreasing:
        low, top = (float(np.max(y)) if bottom is None else bottom), top
    half = 0.5 * (top + low)
    pos = x > 0
    levels = np.unique(x[pos])
    means = np.array([np.mean(y[x == lv]) for lv in levels])
    ic50 = float(np.exp(np.mean(np.log(levels)))) if levels.size else 1.0
    for k in range(1, levels.size):
        a, b = means[k - 1] - half, means[k] - half
        if a * b <= 0 and a != b:
            t = a / (a - b)
            ic50 = float(np.exp(np.log(levels[k - 1]) + t * (np.log(levels[k]) - np.log(levels[k - 1]))))
            break
    hill = 1.0
    return (hill, low, top, ic50) if bottom is None else (hill, top, ic50)


@dataclass(frozen=True, slots=True, kw_only=True)
class IC50Fit:
    """A fitted concentration-response curve; ``ic50_um`` with its profile interval."""

    fit: FitResult
    bottom_fixed: float | None
    concentration_um: tuple[float, ...]
    response: tuple[float, ...]
    response_unit: str = ""
    source: str = ""

    @property
    def ic50_um(self) -> float:
        return self.fit.value("IC50")

    @property
    def interval_um(self) -> tuple[float | None, float | None]:
        e = self.fit.estimate("IC50")
        if e.profile_low is not None:
            return e.profile_low, e.profile_high
        return e.ci_low, e.ci_high

    @property
    def no_decline(self) -> str:
        """Why the curve shows no inhibition ("" when it declines): flat, or rising with inhibitor.

        The curve declines when the fitted response at the highest inhibitor level is below the
        fitted response at the lowest, and the log-logistic curve fits significantly better than a
        flat line (extra-sum-of-squares F test at 5 %, Bates & Watts 1988 section 3.5, common practice).
        """
        x = np.asarray(self.concentration_um)
        y = np.asarray(self.response)
        if not self.fit.success:
            return "the curve could not be fitted"
        fitted = np.asarray(self.fit.fitted)
        low, high = float(fitted[np.argmin(x)]), float(fitted[np.argmax(x)])
        if high >= low:
            return (
                f"the response does not fall with inhibitor (fitted {low:.3g} at {x.min():.3g} uM, {high:.3g} at {x.max():.3g} uM): "
                "no inhibition is shown, so there is no IC50"
            )
        p = _flat_line_p(y, self.fit)
        if p >= 0.05:
            return f"the curve is not distinguishable from a flat line (F test p = {p:.2g}): no inhibition is shown, so there is no IC50"
        return ""

    @property
    def warnings(self) -> tuple[str, ...]:
        out = list(self.fit.warnings)
        if self.no_decline:
            return (*out, f"No inhibition: {self.no_decline}.")
        x = np.asarray(self.concentration_um)
        ic50 = self.ic50_um
        levels = np.unique(x[x > 0])
        if levels.size and (ic50 > levels.max() or ic50 < levels.min()):
            out.append(
                f"IC50 {ic50:.3g} uM lies outside the tested range {levels.min():.3g}-{levels.max():.3g} uM: it is an extrapolation."
            )
        if levels.size < 5:
            out.append(f"Only {levels.size} inhibitor level(s) above zero; 5 or more spanning the IC50 are common practice for a curve.")
        return tuple(out)


def _flat_line_p(y: Array, fit: FitResult) -> float:
    """p value of the F test of a flat line (the mean) against the fitted curve."""
    return extra_sum_of_squares(float(np.sum((y - y.mean()) ** 2)), y.size - 1, fit.rss, fit.df)[1]


def fit_ic50(
    inhibitor_um: Sequence[float] | Array,
    response: Sequence[float] | Array,
    *,
    bottom: float | None = None,
    weights: str = "none",
    level: float = 0.95,
    response_unit: str = "",
    source: str = "",
) -> IC50Fit:
    """Fit the 4PL (``bottom=None``) or 3PL (``bottom`` fixed, e.g. 0) curve to activity vs inhibitor.

    Parameters
    ----------
    inhibitor_um
        Inhibitor concentrations in uM (zero allowed for controls).
    response
        Activity in any unit (velocity, % of control).
    bottom
        Fixed bottom plateau for the 3-parameter model; ``None`` fits it.

    Raises
    ------
    InputError
        Unequal lengths, negative or non-finite values, fewer than 3 positive inhibitor levels.
    """
    x = np.asarray(inhibitor_um, dtype=float)
    y = np.asarray(response, dtype=float)
    if x.shape != y.shape or x.ndim != 1:
        raise InputError("data", f"{x.size}/{y.size} values", "need equal numbers of inhibitor and response values")
    for k in range(x.size):
        if not (math.isfinite(x[k]) and x[k] >= 0):
            raise InputError(f"inhibitor (row {k + 1})", float(x[k]), "must be a finite concentration of zero or more")
        if not math.isfinite(y[k]):
            raise InputError(f"response (row {k + 1})", float(y[k]), "is not a finite number")
    if np.unique(x[x > 0]).size < 3:
        raise InputError("inhibitor", f"{np.unique(x[x > 0]).size} level(s)", "are too few; an IC50 curve needs at least 3 positive levels")
    if np.all(y == 0):
        raise InputError("response", "every value is 0", "cannot be fitted; expected measured activities above zero")
    if np.ptp(y) == 0:
        raise InputError("response", f"every value is {y[0]:g}", "shows no change with inhibitor; an IC50 curve needs a decline")
    if bottom is not None and not math.isfinite(bottom):
        raise InputError("bottom", bottom, "is not a finite number")
    model = ic50_model(bottom, response_unit)
    start = guess_ic50(x, y, bottom)
    alt = list(start)
    alt[0] = 3.0
    ic50_index = len(start) - 1
    fit = fit_curve(model, x, y, [start, tuple(alt)], weights=weights, profile=(ic50_index,), level=level)
    return IC50Fit(
        fit=fit,
        bottom_fixed=bottom,
        concentration_um=tuple(float(v) for v in x),
        response=tuple(float(v) for v in y),
        response_unit=response_unit,
        source=source,
    )


@dataclass(frozen=True, slots=True, kw_only=True)
class KiFromIC50:
    """Ki by Cheng-Prusoff from a fitted IC50, with the inputs used."""

    ki_um: float
    low_um: float | None
    high_um: float | None
    ic50_um: float
    mechanism: str
    substrate_um: float | None
    km_um: float | None
    alpha: float | None
    source: str = CHENG_PRUSOFF_SOURCE


def ki_from_ic50_fit(
    result: IC50Fit,
    mechanism: str,
    *,
    substrate_um: float | None = None,
    km_um: float | None = None,
    alpha: float | None = None,
) -> KiFromIC50:
    """Cheng-Prusoff Ki for ``mechanism`` from a fitted IC50 (interval mapped from the IC50 interval).

    Raises
    ------
    InputError
        Unknown mechanism, or substrate concentration / Km (or alpha for mixed) missing or not positive.
    FitError
        The curve shows no inhibition (see :attr:`IC50Fit.no_decline`): there is no IC50 to convert.
    """
    if result.no_decline:
        raise FitError(f"no Ki: {result.no_decline}")
    if mechanism not in MECHANISMS:
        raise InputError("mechanism", mechanism, f"is not one of {', '.join(MECHANISMS)}")
    if mechanism != "noncompetitive":
        for name, value in (("substrate_conc", substrate_um), ("km", km_um)):
            if value is None or not math.isfinite(value) or value <= 0:
                raise InputError(name, value, f"is needed above zero (in uM) for the {mechanism} Cheng-Prusoff conversion")
    if mechanism == "mixed" and (alpha is None or not math.isfinite(alpha) or alpha <= 0):
        raise InputError("alpha", alpha, "is needed above zero for the mixed conversion (Kiu = alpha x Kic)")

    def convert(v: float | None) -> float | None:
        if v is None:
            return None
        if math.isinf(v):
            return math.inf
        return float(ki_from_ic50(v, mechanism, substrate_um, km_um, alpha))

    low, high = result.interval_um
    return KiFromIC50(
        ki_um=float(ki_from_ic50(result.ic50_um, mechanism, substrate_um, km_um, alpha)),
        low_um=convert(low),
        high_um=convert(high),
        ic50_um=result.ic50_um,
        mechanism=mechanism,
        substrate_um=substrate_um,
        km_um=km_um,
        alpha=alpha,
    )
