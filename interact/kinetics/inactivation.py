"""Time-dependent (mechanism-based) inhibition: kobs, then kinact and KI.

Two steps, as the pre-incubation (dilution) design is analysed in practice
(Lee et al. 2024: "pre-incubation with NADPH ... fit kobs = kinact x I/(KI + I)", seen):

1. For each inhibitor concentration, the natural log of the remaining activity
   falls linearly with pre-incubation time: ln A(t) = ln A0 - kobs t.  kobs is
   minus the slope of an ordinary least-squares line (common practice); its
   standard error is the usual s / sqrt(Sxx).
2. kobs rises hyperbolically with the inhibitor concentration:
   kobs = kinact x [I] / (KI + [I]), fitted by nonlinear least squares with an
   analytic Jacobian (scipy.optimize.least_squares).  Standard errors are the
   asymptotic ones, sqrt(diag(s^2 (J^T J)^-1)) with s^2 = RSS/(n - p); 95 %
   intervals are Wald intervals with Student's t on n - p degrees of freedom.

Optionally the vehicle (zero-concentration) loss of activity is subtracted
from every kobs before step 2 (common practice when the vehicle arm decays).

Units: times in minutes, concentrations in uM (unbound if the incubation was
corrected for binding), kobs and kinact in 1/min.  The least squares run
through the shared engine of the reversible-inhibition fitting
(:mod:`interact.kinetics.engine`: analytic Jacobian, asymptotic standard
errors, Wald and profile-likelihood intervals); :func:`fit_with_sigma` here only
passes per-point standard deviations to it as weights.  Model functions take
``(theta, x)``, as every model of the engine does.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Final

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import FitError, InputError
from .engine import CurveModel, Estimate, FitResult, fit_curve

__all__ = [
    "HYPERBOLA_EQUATION",
    "CurveFit",
    "Estimate",
    "InactivationFit",
    "KobsFit",
    "fit_inactivation",
    "fit_inactivation_raw",
    "fit_kobs",
    "fit_kobs_series",
    "fit_with_sigma",
    "guess_inactivation",
    "kobs_hyperbola",
]

HYPERBOLA_EQUATION: Final = "kobs = kinact x [I] / (KI + [I])"
LOG_LINEAR_EQUATION: Final = "ln(activity) = ln(A0) - kobs x t"

Array = NDArray[np.float64]


#: the fit result of the shared least-squares engine (:mod:`interact.kinetics.engine`)
CurveFit = FitResult


def _t_quantile(level: float, df: int) -> float | None:
    if df <= 0:
        return None
    from scipy.stats import t

    return float(t.ppf(0.5 + level / 2.0, df))


def _checked(values: ArrayLike, field: str, *, positive: bool = False, nonnegative: bool = False) -> Array:
    try:
        a = np.asarray(values, dtype=float)
    except (TypeError, ValueError):
        raise InputError(field, values, "is not a sequence of numbers") from None
    if a.ndim != 1:
        raise FitError(f"{field}: expected a one-dimensional sequence of numbers, got shape {a.shape}")
    bad = ~np.isfinite(a)
    if positive:
        bad |= a <= 0
    if nonnegative:
        bad |= a < 0
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        need = "a positive finite number" if positive else ("a finite number >= 0" if nonnegative else "a finite number")
        raise InputError(f"{field}[{i}]", float(a[i]), f"is not {need}")
    return a


def fit_with_sigma(model: CurveModel, x: Array, y: Array, start: Sequence[float], sigma: Array | None, level: float) -> FitResult:
    """The shared engine's :func:`~interact.kinetics.engine.fit_curve` with optional per-point standard deviations.

    ``sigma`` becomes the weights 1/sigma^2 (the engine minimises sum(((y - f)/sigma)^2), with the
    covariance scaled by the residual variance as usual: relative weights); Wald and profile intervals
    are computed for every parameter.
    """
    weights = None if sigma is None else 1.0 / sigma**2
    return fit_curve(model, x, y, [list(start)], profile=tuple(range(len(start))), level=level, sample_weights=weights)


# --------------------------------------------------------------------------- step 1: kobs


@dataclass(frozen=True, slots=True, kw_only=True)
class KobsFit:
    """Log-linear loss of activity at one inhibitor concentration."""

    concentration_um: float
    kobs_per_min: float
    std_error: float | None
    intercept: float
    n: int
    r_squared: float | None
    time_min: tuple[float, ...]
    log_activity: tuple[float, ...]
    equation: str = LOG_LINEAR_EQUATION


def fit_kobs(time_min: ArrayLike, activity: ArrayLike, *, concentration_um: float = float("nan")) -> KobsFit:
    """kobs from ln(remaining activity) against pre-incubation time (ordinary least squares).

    Parameters
    ----------
    time_min
        Pre-incubation times, min (at least two distinct values).
    activity
        Remaining activity at each time, any positive scale (percent of
        control, fraction, raw rate): only its logarithm's slope is used.
    concentration_um
        The inhibitor concentration of this series (uM), carried along.

    Returns
    -------
    KobsFit
        kobs = -slope (1/min) with its standard error s/sqrt(Sxx) (None with
        fewer than three points).
    """
    t = _checked(time_min, "time_min", nonnegative=True)
    a = _checked(activity, "activity", positive=True)
    if t.shape != a.shape:
        raise FitError(f"time_min and activity differ in length ({t.size} and {a.size})")
    if np.unique(t).size < 2:
        raise FitError(f"kobs at {concentration_um:g} uM needs at least two distinct pre-incubation times")
    from scipy.stats import linregress  # ordinary least squares line with its slope's standard error

    y = np.log(a)
    line = linregress(t, y)
    slope, intercept = float(line.slope), float(line.intercept)
    n = t.size
    se = float(line.stderr) if n > 2 else None
    r2 = float(line.rvalue) ** 2 if np.ptp(y) > 0 else None
    return KobsFit(
        concentration_um=float(concentration_um),
        kobs_per_min=-slope,
        std_error=se,
        intercept=intercept,
        n=n,
        r_squared=r2,
        time_min=tuple(float(v) for v in t),
        log_activity=tuple(float(v) for v in y),
    )


def fit_kobs_series(concentration_um: ArrayLike, time_min: ArrayLike, activity: ArrayLike) -> tuple[KobsFit, ...]:
    """One :func:`fit_kobs` per distinct concentration (long-format data), in rising concentration."""
    c = _checked(concentration_um, "concentration_um", nonnegative=True)
    t = _checked(time_min, "time_min", nonnegative=True)
    a = _checked(activity, "activity", positive=True)
    if not (c.shape == t.shape == a.shape):
        raise FitError(f"concentration_um, time_min and activity differ in length ({c.size}, {t.size}, {a.size})")
    return tuple(fit_kobs(t[c == level], a[c == level], concentration_um=float(level)) for level in np.unique(c))


# --------------------------------------------------------------------------- step 2: kinact, KI


def kobs_hyperbola(concentration_um: ArrayLike, kinact: ArrayLike, ki_um: ArrayLike) -> Array:
    """kobs = kinact x [I] / (KI + [I]) (Lee et al. 2024), vectorised."""
    c = np.asarray(concentration_um, dtype=float)
    return np.asarray(kinact, dtype=float) * c / (np.asarray(ki_um, dtype=float) + c)


def _share(x: Array, d: Array) -> Array:
    """x / d, taken as 0 where x = 0 (its limit at a zero concentration when a fit tries a constant of 0: no 0/0)."""
    return np.divide(x, d, out=np.zeros(np.broadcast(x, d).shape), where=x != 0)


def _hyp(th: Array, x: Array) -> Array:
    return th[0] * _share(x, th[1] + x)


def _hyp_jac(th: Array, x: Array) -> Array:
    share = _share(x, th[1] + x)
    return np.column_stack((share, -th[0] * _share(share, th[1] + x)))


_INACTIVATION: Final = CurveModel(
    name="inactivation hyperbola",
    parameters=("kinact", "KI"),
    function=_hyp,
    jacobian=_hyp_jac,
    lower=(0.0, 0.0),
    upper=(math.inf, math.inf),
    units=("1/min", "uM"),
    equation=HYPERBOLA_EQUATION,
)


def guess_hyperbola(x: ArrayLike, rise: ArrayLike) -> tuple[float, float]:
    """Starting values for rise = top x / (half + x): 1.2 x the largest rise, and the x nearest half of it."""
    c = np.asarray(x, dtype=float)
    r = np.asarray(rise, dtype=float)
    top = 1.2 * float(r.max()) if r.max() > 0 else 1.0
    pos = c > 0
    if not pos.any():
        return top, 1.0
    idx = int(np.argmin(np.abs(r[pos] - top / 2)))
    return top, float(c[pos][idx])


def guess_inactivation(concentration_um: ArrayLike, kobs_per_min: ArrayLike) -> tuple[float, float]:
    """Starting values (kinact, KI): 1.2 x the largest kobs, and the concentration nearest half of it."""
    return guess_hyperbola(concentration_um, kobs_per_min)


@dataclass(frozen=True, slots=True, kw_only=True)
class InactivationFit:
    """kinact and KI with the data they came from."""

    kinact: Estimate
    ki: Estimate
    fit: CurveFit
    concentration_um: tuple[float, ...]
    kobs_per_min: tuple[float, ...]
    efficiency: Estimate
    kobs_fits: tuple[KobsFit, ...] = ()
    vehicle_kobs_per_min: float | None = None
    notes: tuple[str, ...] = ()

    @property
    def kinact_per_h(self) -> float:
        return 60.0 * self.kinact.value

    @property
    def ki_um(self) -> float:
        return self.ki.value

    @property
    def success(self) -> bool:
        return self.fit.success


def fit_inactivation(
    concentration_um: ArrayLike,
    kobs_per_min: ArrayLike,
    *,
    sigma: ArrayLike | None = None,
    start: tuple[float, float] | None = None,
    level: float = 0.95,
) -> InactivationFit:
    """kinact (1/min) and KI (uM) from kobs against inhibitor concentration.

    Parameters
    ----------
    concentration_um
        Inhibitor concentrations, uM (> 0; at least three distinct values).
    kobs_per_min
        Observed inactivation rate constants, 1/min (vehicle loss already
        subtracted if wanted).
    sigma
        Optional standard deviations of kobs (e.g. the step-1 standard errors).
    start
        Starting (kinact, KI); by default from :func:`guess_inactivation`.
    """
    c = _checked(concentration_um, "concentration_um", positive=True)
    k = _checked(kobs_per_min, "kobs_per_min")
    if c.shape != k.shape:
        raise FitError(f"concentration_um and kobs_per_min differ in length ({c.size} and {k.size})")
    if np.unique(c).size < 3:
        raise FitError("kinact and KI need kobs at three or more distinct inhibitor concentrations")
    s = None if sigma is None else _checked(sigma, "sigma", positive=True)
    if s is not None and s.shape != c.shape:
        raise FitError(f"sigma has {s.size} values for {c.size} points")
    fit = fit_with_sigma(_INACTIVATION, c, k, start or guess_inactivation(c, k), s, level)
    kin, ki = fit.estimates
    notes = []
    if ki.value > 3.0 * float(c.max()):
        notes.append(
            f"KI ({ki.value:.3g} uM) lies above three times the highest concentration ({c.max():.3g} uM): kinact and KI "
            "are poorly defined apart; their ratio kinact/KI is the better-determined quantity"
        )
    return InactivationFit(
        kinact=kin,
        ki=ki,
        fit=fit,
        efficiency=_efficiency(kin, ki, fit),
        concentration_um=tuple(float(v) for v in c),
        kobs_per_min=tuple(float(v) for v in k),
        notes=tuple(notes),
    )


def _efficiency(kin: Estimate, ki: Estimate, fit: CurveFit) -> Estimate:
    """kinact/KI (1/min/uM) with a delta-method standard error from the fit's covariance."""
    value = kin.value / ki.value if ki.value > 0 else float("inf")
    se = lo = hi = None
    if fit.covariance is not None and ki.value > 0 and math.isfinite(value):
        g = np.array([1.0 / ki.value, -kin.value / ki.value**2])
        var = float(g @ np.asarray(fit.covariance) @ g)
        if var >= 0:
            se = math.sqrt(var)
            tq = _t_quantile(fit.level, fit.df)
            if tq is not None:
                lo, hi = value - tq * se, value + tq * se
    return Estimate(name="kinact/KI", value=value, unit="1/min/uM", std_error=se, ci_low=lo, ci_high=hi)


def fit_inactivation_raw(
    concentration_um: ArrayLike,
    time_min: ArrayLike,
    activity: ArrayLike,
    *,
    subtract_vehicle: bool = True,
    weighted: bool = False,
    level: float = 0.95,
) -> InactivationFit:
    """Both steps from long-format pre-incubation data.

    Rows at concentration 0 form the vehicle arm: with ``subtract_vehicle`` its
    kobs is subtracted from the others (common practice).  With ``weighted``
    the hyperbola is weighted by the step-1 standard errors of kobs.
    """
    series = fit_kobs_series(concentration_um, time_min, activity)
    vehicle = next((s for s in series if s.concentration_um == 0.0), None)
    dosed = [s for s in series if s.concentration_um > 0.0]
    base = vehicle.kobs_per_min if (vehicle is not None and subtract_vehicle) else 0.0
    conc = np.array([s.concentration_um for s in dosed])
    kobs = np.array([s.kobs_per_min - base for s in dosed])
    sigma = None
    if weighted:
        ses = [s.std_error for s in dosed]
        if any(se is None or se <= 0 for se in ses):
            raise FitError("weighting by the kobs standard errors needs three or more time points per concentration")
        sigma = np.array(ses, dtype=float)
    fit = fit_inactivation(conc, kobs, sigma=sigma, level=level)
    notes = list(fit.notes)
    if vehicle is not None and subtract_vehicle and vehicle.kobs_per_min != 0.0:
        notes.append(f"vehicle loss kobs {vehicle.kobs_per_min:.3g} 1/min subtracted from every concentration")
    return InactivationFit(
        kinact=fit.kinact,
        ki=fit.ki,
        fit=fit.fit,
        efficiency=fit.efficiency,
        concentration_um=fit.concentration_um,
        kobs_per_min=fit.kobs_per_min,
        kobs_fits=series,
        vehicle_kobs_per_min=None if vehicle is None else vehicle.kobs_per_min,
        notes=tuple(notes),
    )
