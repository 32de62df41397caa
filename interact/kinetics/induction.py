"""Induction: Emax and EC50 (and optionally a Hill slope) from fold-change mRNA data.

Model (hepatocytes, mRNA fold change over vehicle; Lee et al. 2024 and a textbook page: mRNA is the
endpoint, 48-72 h exposure, several concentrations, seen):

    fold = 1 + Emax x C^h / (EC50^h + C^h)

with Emax the maximal *increase* over vehicle (fold change minus 1), so that
the fitted Emax and EC50 go straight into the mechanistic induction term
1 + d x Emax [I]/(EC50 + [I]) (Fahmi et al. 2008, from memory; algebra: the
enzyme level is the fold change).  ``hill=False`` fixes h = 1, the form the
static models use; a fitted h is reported but the static models cannot use
it (they assume h = 1), which the result says.

Fitted by nonlinear least squares with an analytic Jacobian
(:func:`interact.kinetics.inactivation.fit_with_sigma`, the shared engine); asymptotic standard
errors and Wald intervals on n - p degrees of freedom.  Concentrations in uM
(unbound if corrected for binding in the medium).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final

import numpy as np
from numpy.typing import ArrayLike

from ..errors import FitError
from .engine import CurveModel, extra_sum_of_squares
from .inactivation import Array, CurveFit, Estimate, _checked, _share, fit_with_sigma, guess_hyperbola

__all__ = ["EMAX_EQUATION", "HILL_EQUATION", "InductionFit", "fit_induction", "fold_change_model", "guess_induction"]

EMAX_EQUATION: Final = "fold = 1 + Emax x C / (EC50 + C)"
HILL_EQUATION: Final = "fold = 1 + Emax x C^h / (EC50^h + C^h)"


def fold_change_model(concentration_um: ArrayLike, emax: ArrayLike, ec50_um: ArrayLike, hill: ArrayLike = 1.0) -> Array:
    """Fold change over vehicle at ``concentration_um``: 1 + Emax C^h/(EC50^h + C^h)."""
    c = np.asarray(concentration_um, dtype=float)
    ch = c ** np.asarray(hill, dtype=float)
    return 1.0 + np.asarray(emax, dtype=float) * ch / (np.asarray(ec50_um, dtype=float) ** hill + ch)


def _emax(th: Array, x: Array) -> Array:
    return 1.0 + th[0] * _share(x, th[1] + x)


def _emax_jac(th: Array, x: Array) -> Array:
    share = _share(x, th[1] + x)
    return np.column_stack((share, -th[0] * _share(share, th[1] + x)))


def _hill(th: Array, x: Array) -> Array:
    emax, ec50, h = th
    with np.errstate(divide="ignore"):
        u = np.where(x > 0, (x / ec50) ** h, 0.0)
    return 1.0 + emax * u / (1.0 + u)


def _hill_jac(th: Array, x: Array) -> Array:
    emax, ec50, h = th
    pos = x > 0
    u = np.zeros_like(x)
    u[pos] = (x[pos] / ec50) ** h
    g = u / (1.0 + u)  # fraction of Emax
    dg_du = 1.0 / (1.0 + u) ** 2
    logr = np.zeros_like(x)
    logr[pos] = np.log(x[pos] / ec50)
    d_emax = g
    d_ec50 = emax * dg_du * u * (-h / ec50)
    d_h = emax * dg_du * u * logr
    return np.column_stack((d_emax, d_ec50, d_h))


_EMAX_MODEL: Final = CurveModel(
    name="induction Emax",
    parameters=("Emax", "EC50"),
    function=_emax,
    jacobian=_emax_jac,
    lower=(0.0, 0.0),
    upper=(math.inf, math.inf),
    units=("", "uM"),
    equation=EMAX_EQUATION,
)
_HILL_MODEL: Final = CurveModel(
    name="induction Emax (Hill)",
    parameters=("Emax", "EC50", "h"),
    function=_hill,
    jacobian=_hill_jac,
    lower=(0.0, 1e-12, 0.1),
    upper=(math.inf, math.inf, 10.0),
    units=("", "uM", ""),
    equation=HILL_EQUATION,
)


def guess_induction(concentration_um: ArrayLike, fold: ArrayLike) -> tuple[float, float]:
    """Starting (Emax, EC50): 1.2 x the largest rise over 1, and the concentration nearest half of it."""
    return guess_hyperbola(concentration_um, np.asarray(fold, dtype=float) - 1.0)


@dataclass(frozen=True, slots=True, kw_only=True)
class InductionFit:
    """Emax (increase over vehicle), EC50 and, if fitted, the Hill slope."""

    emax: Estimate
    ec50: Estimate
    hill: Estimate | None
    fit: CurveFit
    concentration_um: tuple[float, ...]
    fold_change: tuple[float, ...]
    notes: tuple[str, ...] = ()
    #: why the data show no induction ("" when they do): the Emax model is not better than fold change 1
    no_effect: str = ""

    @property
    def success(self) -> bool:
        return self.fit.success

    @property
    def max_fold_change(self) -> float:
        """The fitted plateau, 1 + Emax."""
        return 1.0 + self.emax.value


def fit_induction(
    concentration_um: ArrayLike,
    fold_change: ArrayLike,
    *,
    hill: bool = False,
    sigma: ArrayLike | None = None,
    start: tuple[float, ...] | None = None,
    level: float = 0.95,
) -> InductionFit:
    """Fit Emax and EC50 (and h with ``hill=True``) to mRNA fold change over vehicle.

    Parameters
    ----------
    concentration_um
        Inducer concentrations, uM (>= 0; vehicle rows at 0 are allowed).
    fold_change
        mRNA fold change over vehicle at each concentration (> 0; replicates
        as separate rows).
    hill
        Fit a Hill slope h (bounded to 0.1-10) instead of fixing h = 1.
    sigma
        Optional standard deviations per point.
    """
    c = _checked(concentration_um, "concentration_um", nonnegative=True)
    f = _checked(fold_change, "fold_change", positive=True)
    if c.shape != f.shape:
        raise FitError(f"concentration_um and fold_change differ in length ({c.size} and {f.size})")
    p = 3 if hill else 2
    if np.unique(c[c > 0]).size < p + 1:
        raise FitError(f"fitting {p} parameters needs fold changes at {p + 1} or more distinct positive concentrations")
    s = None if sigma is None else _checked(sigma, "sigma", positive=True)
    if s is not None and s.shape != c.shape:
        raise FitError(f"sigma has {s.size} values for {c.size} points")
    g_emax, g_ec50 = guess_induction(c, f)
    notes: list[str] = []
    if hill:
        fit = fit_with_sigma(_HILL_MODEL, c, f, start or (g_emax, g_ec50, 1.0), s, level)
        h_est = fit.estimates[2]
        if abs(h_est.value - 1.0) > 0.05:
            notes.append(
                f"fitted Hill slope {h_est.value:.3g}: the static models assume h = 1, so Emax and EC50 from this fit "
                "are not directly their inputs; refit with h = 1 for them"
            )
    else:
        fit = fit_with_sigma(_EMAX_MODEL, c, f, start or (g_emax, g_ec50), s, level)
        h_est = None
    if float(c.max()) < fit.estimates[1].value:
        notes.append("the highest concentration tested lies below the fitted EC50: Emax is an extrapolation")
    no_effect = _no_induction(f, s, fit)
    if no_effect:
        notes.append(f"no induction shown: {no_effect}")
    return InductionFit(
        emax=fit.estimates[0],
        ec50=fit.estimates[1],
        hill=h_est,
        fit=fit,
        concentration_um=tuple(float(v) for v in c),
        fold_change=tuple(float(v) for v in f),
        notes=tuple(notes),
        no_effect=no_effect,
    )


def _no_induction(fold: Array, sigma: Array | None, fit: CurveFit) -> str:
    """Extra-sum-of-squares F test of "fold change 1 everywhere" (no parameters) against the fitted model.

    Bates & Watts 1988, section 3.5 (common practice); "" when the model is significantly better at 5 %.
    """
    if not fit.success:
        return "the fit did not converge"
    w = 1.0 if sigma is None else 1.0 / sigma
    _, p = extra_sum_of_squares(float(np.sum(((fold - 1.0) * w) ** 2)), fold.size, fit.rss, fit.df)
    if p < 0.05:
        return ""
    return f"the Emax model does not fit better than fold change 1 at every concentration (F test p = {p:.2g})"
