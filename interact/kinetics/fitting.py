"""Global fit of a substrate x inhibitor grid to every inhibition model, and a verdict.

All models are fitted to all rows at once (a global fit, not one curve per
inhibitor level), by the least-squares engine in :mod:`.engine` with the
analytic Jacobians of the rate laws (:mod:`.ratelaws`).  Inhibition constants
are fitted as their reciprocals (1/Ki >= 0), so a constant the data cannot
bound runs onto the bound 1/Ki = 0 and is reported as unbounded instead of
receiving a fake standard error.

Model selection: AICc with Akaike weights (Burnham & Anderson, *Model
selection and multimodel inference*, 2nd ed. 2002, sections 2.4 and 2.9 -
from memory; the reading of delta-AICc below 2 as "substantial support" is
theirs) and the extra-sum-of-squares F test for nested pairs (Bates & Watts
1988, section 3.5; common practice in enzyme kinetics).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace
from typing import Final

import numpy as np
from numpy.typing import NDArray

from ..errors import FitError, FitWarning, InputError, emit_warnings
from .data import IncubationData
from .engine import WEIGHTS, CurveModel, Estimate, FitResult, extra_sum_of_squares, fit_curve, fit_point

__all__ = [
    "ERROR_MODELS",
    "FIT_WEIGHTS",
    "MODELS",
    "ErrorModel",
    "FTest",
    "ModelComparison",
    "RankedModel",
    "Verdict",
    "choose_error_model",
    "fit_inhibition",
    "fit_substrate_inhibition",
    "guess_inhibition",
    "guess_michaelis_menten",
    "inhibition_model",
    "inverse_constants",
    "spearman",
]

Array = NDArray[np.float64]

#: the models of a global fit; "none" is Michaelis-Menten without inhibition
MODELS: Final = ("none", "competitive", "noncompetitive", "uncompetitive", "mixed")
LABELS: Final = {
    "none": "no inhibition (Michaelis-Menten)",
    "competitive": "competitive",
    "noncompetitive": "noncompetitive",
    "uncompetitive": "uncompetitive",
    "mixed": "mixed",
}
EQUATIONS: Final = {
    "none": "v = Vmax S / (Km + S)",
    "competitive": "v = Vmax S / (Km (1 + I/Ki) + S)",
    "noncompetitive": "v = Vmax S / ((Km + S)(1 + I/Ki))",
    "uncompetitive": "v = Vmax S / (Km + S (1 + I/Ki))",
    "mixed": "v = Vmax S / (Km (1 + I/Kic) + S (1 + I/Kiu))",
}
#: nested pairs (reduced, full) for the extra-sum-of-squares F test
NESTED: Final = (
    ("none", "competitive"),
    ("none", "noncompetitive"),
    ("none", "uncompetitive"),
    ("none", "mixed"),
    ("competitive", "mixed"),
    ("noncompetitive", "mixed"),
    ("uncompetitive", "mixed"),
)
#: weighting choices of a global fit: "auto" estimates the error model (:func:`choose_error_model`), the
#: others force a fixed scheme (:data:`~interact.kinetics.engine.WEIGHTS`)
FIT_WEIGHTS: Final = ("auto", *WEIGHTS)
#: variance models: Var(v) = sigma^2 g(f)^2 with g = 1 (constant), f (proportional) or f^theta (power)
ERROR_MODELS: Final = ("constant", "proportional", "power")
_FLOOR_FRACTION: Final = 0.02  # fitted values below 2 % of the largest are floored in g (blank rows, f = 0)
OUTLIER_T: Final = 3.0  # |externally studentised residual| flagged as a possible outlier (common practice)
DEPLETION_KINETIC_PCT: Final = 10.0  # Lee et al. 2024: < 10 % turnover for kinetic constants (seen)
DEPLETION_LIMIT_PCT: Final = 20.0  # FDA: substrate depletion <= 20 % (from memory)


# --------------------------------------------------------------------------- models


def inverse_constants(name: str, theta: Sequence[float]) -> tuple[float, float]:
    """(1/Kic, 1/Kiu) of the model ``name`` at its fitting parameters ``theta`` (0 for a route the model lacks)."""
    if name == "none":
        return 0.0, 0.0
    if name == "competitive":
        return theta[2], 0.0
    if name == "noncompetitive":
        return theta[2], theta[2]
    if name == "uncompetitive":
        return 0.0, theta[2]
    return theta[2], theta[3]


class _Grid:
    """The grid's arrays and their product S x I, computed once per data set (x is never modified)."""

    __slots__ = ("i", "s", "si", "x")

    def __init__(self) -> None:
        self.x: Array | None = None

    def of(self, x: Array) -> _Grid:
        if self.x is not x:
            self.x, self.s, self.i = x, x[0], x[1]
            self.si = self.s * self.i
        return self


def _denominator(name: str, grid: _Grid, u: list[float]) -> tuple[Array, Array | None]:
    """D = Km (1 + I/Kic) + S (1 + I/Kiu) in 1/K form, and (1 + I/Kic) when it is not 1."""
    km = u[1]
    if name == "none":
        return grid.s + km, None
    if name == "competitive":
        a = grid.i * u[2]
        a += 1.0
        return a * km + grid.s, a
    if name == "uncompetitive":
        d = grid.si * u[2]
        d += grid.s
        d += km
        return d, None
    kc = u[2]
    ku = u[2] if name == "noncompetitive" else u[3]
    a = grid.i * kc
    a += 1.0
    d = a * km
    d += grid.si * ku
    d += grid.s
    return d, a


def _nonzero(d: Array, u: list[float]) -> Array:
    """The denominator with its zeros set to 1: d = 0 only where [S] = 0 and Km (or a trial Km) is 0, where the rate
    and its derivatives are 0 (the numerator holds [S]); avoids 0/0 for a trial Km of 0 on rows without substrate.
    With Km > 0 and no negative constant, d >= Km > 0 everywhere and the array is not scanned (a measured saving)."""
    if u[1] > 0.0 and min(u) >= 0.0:
        return d
    return d if d.all() else np.where(d == 0.0, 1.0, d)


def _function(name: str):  # type: ignore[no-untyped-def]
    grid = _Grid()

    def f(u: Array, x: Array) -> Array:
        g = grid.of(x)
        ul = u.tolist()
        d, _ = _denominator(name, g, ul)
        return (ul[0] * g.s) / _nonzero(d, ul)

    return f


def _jacobian(name: str):  # type: ignore[no-untyped-def]
    both = _fused(name)

    def jac(u: Array, x: Array) -> Array:
        return both(u, x)[1]

    return jac


def _fused(name: str):  # type: ignore[no-untyped-def]
    grid = _Grid()
    p = 2 if name == "none" else (4 if name == "mixed" else 3)

    def both(u: Array, x: Array) -> tuple[Array, Array]:
        gr = grid.of(x)
        ul = u.tolist()
        d, a = _denominator(name, gr, ul)
        d = _nonzero(d, ul)
        out = np.empty((p, d.size))
        g = np.divide(gr.s, d, out=out[0])
        f = g * ul[0]
        fd = f / d
        if a is None:
            np.negative(fd, out=out[1])
        else:
            np.multiply(fd, a, out=out[1])
            np.negative(out[1], out=out[1])
        if name == "competitive":
            np.multiply(fd, gr.i, out=out[2])
            out[2] *= -ul[1]
        elif name == "uncompetitive":
            np.multiply(fd, gr.si, out=out[2])
            np.negative(out[2], out=out[2])
        elif name == "noncompetitive":
            np.multiply(fd, gr.i * ul[1] + gr.si, out=out[2])
            np.negative(out[2], out=out[2])
        elif name == "mixed":
            np.multiply(fd, gr.i, out=out[2])
            out[2] *= -ul[1]
            np.multiply(fd, gr.si, out=out[3])
            np.negative(out[3], out=out[3])
        return f, out.T

    return both


_NPAR: Final = {"none": 2, "competitive": 3, "noncompetitive": 3, "uncompetitive": 3, "mixed": 4}


def inhibition_model(
    name: str,
    velocity_unit: str = "",
    *,
    vmax_max: float = math.inf,
    km_max: float = math.inf,
    kappa_max: float = math.inf,
    km_unit: str = "uM",
) -> CurveModel:
    """The fitting model for ``name`` (one of :data:`MODELS`), in 1/Ki form.

    Fitting parameters: Vmax, Km (uM) and, per inhibition route, 1/Ki (1/uM);
    the estimates are reported as Vmax, Km, Ki (or Kic, Kiu for mixed), in uM.
    ``vmax_max``, ``km_max`` and ``kappa_max`` (on 1/Ki) cap the parameters, so that a
    model the data drive towards a degenerate limit (Km and Ki to zero, say) stops on
    a cap and is reported as not identifiable.
    """
    if name not in MODELS:
        raise InputError("models", name, f"is not one of {', '.join(MODELS)}")
    const = {"none": (), "competitive": ("Ki",), "noncompetitive": ("Ki",), "uncompetitive": ("Ki",), "mixed": ("Kic", "Kiu")}[name]
    p = 2 + len(const)
    return CurveModel(
        name=name,
        parameters=("vmax", "km", *(f"1/{c}" for c in const)),
        function=_function(name),
        jacobian=_jacobian(name),
        lower=(0.0,) * p,
        upper=(vmax_max, km_max, *(kappa_max,) * len(const)),
        reported=("value", "value", *("inverse",) * len(const)),
        reported_names=("Vmax", "Km", *const),
        units=(velocity_unit, km_unit, *("uM",) * len(const)),
        equation=EQUATIONS[name],
        function_jacobian=_fused(name),
    )


# --------------------------------------------------------------------------- starting values


def guess_michaelis_menten(substrate_um: Sequence[float] | Array, velocity: Sequence[float] | Array) -> tuple[float, float]:
    """Starting (Vmax, Km) from the Hanes-Woolf line S/v = S/Vmax + Km/Vmax.

    Falls back to (1.1 max v, median S) when the line is unusable.
    """
    s = np.asarray(substrate_um, dtype=float)
    v = np.asarray(velocity, dtype=float)
    ok = (v > 0) & (s > 0)
    fallback = (1.1 * float(np.max(v)) if np.any(ok) else 1.0, float(np.median(s)))
    if np.count_nonzero(ok) < 2 or np.unique(s[ok]).size < 2:
        return fallback
    slope, intercept = np.polyfit(s[ok], s[ok] / v[ok], 1)
    if slope <= 0 or intercept <= 0:
        return fallback
    return float(1.0 / slope), float(intercept / slope)


def guess_inhibition(data: IncubationData) -> dict[str, tuple[tuple[float, ...], ...]]:
    """Starting vectors (fitting scale, 1/Ki) for every model, from linear forms.

    The double-reciprocal form of the mixed law is linear in its coefficients,
    1/v = (Km/Vmax)(1/S) + 1/Vmax + (Km/(Vmax Kic))(I/S) + (1/(Vmax Kiu)) I,
    so one weighted linear regression (rows weighted by v, the usual
    correction for the reciprocal transform) gives every model a start; a
    second start per model uses 1/Ki = 1/(median inhibitor level).
    """
    s, i, v = data.arrays()
    ok = (v > 0) & (s > 0)
    base = i == np.min(i)
    vmax, km = guess_michaelis_menten(s[base], v[base])
    nonzero = i[i > 0]
    k_typ = 1.0 / float(np.median(nonzero)) if nonzero.size else 1.0
    kc = ku = k_typ
    if np.count_nonzero(ok) >= 4 and nonzero.size:
        a = np.column_stack((1.0 / s[ok], np.ones(np.count_nonzero(ok)), i[ok] / s[ok], i[ok])) * v[ok, None]
        coef, *_ = np.linalg.lstsq(a, v[ok] / v[ok], rcond=None)
        c_s, c_0, c_is, c_i = (float(c) for c in coef)
        if c_0 > 0 and c_s > 0:
            vmax, km = 1.0 / c_0, c_s / c_0
            kc = c_is / c_s if c_is > 0 else 0.01 * k_typ
            ku = c_i / c_0 if c_i > 0 else 0.01 * k_typ
    both = 0.5 * (kc + ku)
    return {
        "none": ((vmax, km),),
        "competitive": ((vmax, km, max(kc, 0.01 * k_typ)), (vmax, km, k_typ)),
        "noncompetitive": ((vmax, km, both), (vmax, km, k_typ)),
        "uncompetitive": ((vmax, km, max(ku, 0.01 * k_typ)), (vmax, km, k_typ)),
        "mixed": ((vmax, km, kc, ku), (vmax, km, k_typ, k_typ)),
    }


# --------------------------------------------------------------------------- error models


@dataclass(frozen=True, slots=True, kw_only=True)
class ErrorModel:
    """The variance model chosen for a data set, with the candidates it was chosen from.

    ``candidates`` holds (name, exponent theta, log-likelihood, AICc) for constant, proportional and
    power, each fitted to the fullest mean model requested; ``weights`` are the resulting weights
    1/g(f)^2 (geometric mean 1) used for every mechanism, so that their RSS, F tests and AICc compare.
    """

    name: str
    exponent: float
    candidates: tuple[tuple[str, float, float, float], ...]
    weights: Array
    model: str
    left_out: int = 0  # rows at zero substrate, left out of the comparison

    @property
    def text(self) -> str:
        parts = "; ".join(
            f"{n}{f' (theta {th:.2f})' if n == 'power' else ''}: AICc {a:.2f}" for n, th, _, a in self.candidates if math.isfinite(a)
        )
        theta = f", exponent theta {self.exponent:.2f}" if self.name == "power" else ""
        variance = {"constant": "sigma^2", "proportional": "sigma^2 f^2", "power": "sigma^2 f^(2 theta)"}[self.name]
        how = "unweighted least squares" if self.name == "constant" else "iteratively reweighted least squares"
        return (
            f"Error model: {self.name}{theta} (Var(v) = {variance}), chosen by AICc on the {self.model} model from {parts}"
            + (f" ({self.left_out} row(s) at zero substrate left out of this comparison)" if self.left_out else "")
            + f"; fitted by {how}."
        )


def _variance_weights(fitted: Array, theta: float) -> Array:
    f = np.abs(np.asarray(fitted, dtype=float))
    g = np.maximum(f, _FLOOR_FRACTION * float(np.max(f)) if np.max(f) > 0 else 1.0) ** theta
    w = 1.0 / g**2
    return np.asarray(w / math.exp(float(np.mean(np.log(w)))))


def _power_exponent(resid: Array, fitted: Array, rows: NDArray[np.bool_]) -> float:
    """Pseudo-likelihood estimate of theta from ``rows`` (Carroll & Ruppert 1988, section 3.3 - from memory)."""
    from scipy.optimize import minimize_scalar

    f = np.abs(fitted)
    logf = np.log(np.maximum(f, _FLOOR_FRACTION * float(np.max(f))))[rows]
    r2 = np.asarray(resid, dtype=float)[rows] ** 2
    n = r2.size
    sum_logf = float(np.sum(logf))
    minus_2logf = -2.0 * logf

    def neg(theta: float) -> float:
        s2 = float(r2 @ np.exp(theta * minus_2logf)) / n
        return 0.5 * n * math.log(max(s2, 1e-300)) + theta * sum_logf

    return float(minimize_scalar(neg, bounds=(0.0, 3.0), method="bounded", options={"xatol": 1e-6}).x)


def _irls(model: CurveModel, x: Array, v: Array, start: FitResult, kind: str, rows: NDArray[np.bool_]) -> tuple[Array, float, Array, bool]:
    """Weighted fit with weights from the variance model, re-estimated from the fitted values until stable.

    Returns the fitted values, theta, the weights and whether every step converged.
    """
    theta, u = 1.0, np.asarray(start.theta)
    f = np.asarray(start.fitted)
    w = np.ones_like(v)
    ok = True
    for _ in range(12):
        if kind == "power":
            theta = _power_exponent(v - f, f, rows)
        w = _variance_weights(f, theta)
        u_new, f_new, ok = fit_point(model, x, v, u, sample_weights=w)
        if not ok:
            break
        done = np.max(np.abs(f_new - f)) <= 1e-9 * float(np.max(np.abs(f)))
        u, f = u_new, f_new
        if done:
            break
    if ok and kind == "power":  # the weights belong to the final fitted values
        theta = _power_exponent(v - f, f, rows)
    w = _variance_weights(f, theta)
    return f, theta, w, ok


def choose_error_model(fullest: FitResult, x: Array, v: Array, model: CurveModel) -> ErrorModel:
    """Fit constant, proportional and power variance models to the fullest mean model; choose by AICc.

    The weights are estimated by iteratively reweighted (generalised) least squares: fit, compute
    g(f) from the fitted values (theta by pseudo-likelihood for the power model), refit with weights
    1/g^2, repeat (Carroll & Ruppert, *Transformation and weighting in regression*, 1988, chapter 2 -
    from memory).  The Gaussian log-likelihood with Var_i = sigma^2 g_i^2 is then compared by AICc,
    counting theta as a parameter for the power model.  The fullest model is used so that lack of fit
    of a too-simple mechanism is not mistaken for a change of spread with the mean.
    """
    # rows at zero substrate (blanks) have f = 0 whatever the constants: they say nothing about the spread
    # around the curve, so theta and the likelihoods compared are computed on the other rows
    rows = np.asarray(x[0] > 0)
    p = fullest.n_params
    candidates = [("constant", 0.0, *_likelihood(np.asarray(fullest.fitted), p, v, np.ones_like(v), rows, 0))]
    weights = {"constant": np.ones_like(v)}
    theta_of = {"constant": 0.0}
    if fullest.success and np.all(np.asarray(fullest.fitted) >= 0) and np.count_nonzero(rows) > p + 3:
        for kind in ("proportional", "power"):
            fitted, theta, w, ok = _irls(model, x, v, fullest, kind, rows)
            if ok:
                th = theta if kind == "power" else 1.0
                candidates.append((kind, th, *_likelihood(fitted, p, v, w, rows, int(kind == "power"))))
                weights[kind] = w
                theta_of[kind] = th
    best = min(candidates, key=lambda c: c[3] if math.isfinite(c[3]) else math.inf)
    return ErrorModel(
        name=best[0],
        exponent=theta_of[best[0]],
        candidates=tuple(candidates),
        weights=weights[best[0]],
        model=fullest.model,
        left_out=int(np.count_nonzero(~rows)),
    )


def _likelihood(fitted: Array, n_params: int, v: Array, w: Array, rows: NDArray[np.bool_], extra: int) -> tuple[float, float]:
    """Gaussian log-likelihood and AICc on ``rows`` with Var_i = sigma^2 / w_i, sigma^2 at its ML value."""
    r = (v - fitted)[rows]
    wr = w[rows]
    n = r.size
    s2 = float(np.sum(wr * r**2)) / n
    if not s2 > 0:
        return math.inf, -math.inf
    ll = -0.5 * n * (math.log(2.0 * math.pi * s2) + 1.0) + 0.5 * float(np.sum(np.log(wr)))
    k = n_params + 1 + extra
    aicc = -2.0 * ll + 2.0 * k + (2.0 * k * (k + 1) / (n - k - 1) if n - k - 1 > 0 else math.inf)
    return ll, aicc


def _residual_structure_warning(fit: FitResult | None, data: IncubationData, weights: str, error: ErrorModel | None) -> tuple[str, ...]:
    """Warn when the weighted residuals' spread still changes with the fitted value (Spearman test, p < 0.01).

    |weighted residual| against the fitted value is a Glejser-type check of heteroscedasticity
    (common practice); a significant trend means the weighting in use does not match the error structure.
    """
    if fit is None or not fit.success or fit.n < 8:
        return ()
    f = np.asarray(fit.fitted)
    r = np.asarray(fit.residuals)
    w = error.weights if error is not None else _fixed_weights(weights, np.asarray(data.velocity), f)
    e = np.abs(r) * np.sqrt(w)
    if np.ptp(f) == 0 or np.ptp(e) == 0:
        return ()
    rho, p = spearman(f, e)
    if not (p < 0.01):
        return ()
    how = "grows" if rho > 0 else "shrinks"
    used = f"the {error.name} error model" if error is not None else f"weights {weights}"
    hint = "let the error model be estimated (--weights auto)" if error is None else "check for outliers or a missing mechanism"
    return (
        f"The spread of the weighted residuals still {how} with the fitted velocity (Spearman rho {rho:.2f}, p = {p:.2g}): "
        f"{used} does not capture the error structure; {hint}.",
    )


def _ranks(a: Array) -> Array:
    """Ranks 1..n with ties given their average rank."""
    order = np.argsort(a, kind="mergesort")
    ranks = np.empty(a.size)
    ranks[order] = np.arange(1, a.size + 1)
    values, inverse = np.unique(a, return_inverse=True)
    if values.size < a.size:  # average the ranks of tied values
        ranks = (np.bincount(inverse, weights=ranks) / np.bincount(inverse))[inverse]
    return ranks


def spearman(x: Array, y: Array) -> tuple[float, float]:
    """Spearman's rank correlation and its two-sided p value (t approximation with n - 2 df).

    The same statistic and p value as ``scipy.stats.spearmanr`` (checked in the tests); written here
    because importing scipy.stats costs about 0.8 s on the command line's cold start.
    """
    from scipy.special import stdtr

    rx, ry = _ranks(np.asarray(x, dtype=float)), _ranks(np.asarray(y, dtype=float))
    rho = float(np.corrcoef(rx, ry)[0, 1])
    n = rx.size
    if abs(rho) >= 1.0:
        return rho, 0.0
    t_val = rho * math.sqrt((n - 2) / ((1.0 - rho) * (1.0 + rho)))
    return rho, float(2.0 * stdtr(n - 2, -abs(t_val)))


def _fixed_weights(weights: str, y: Array, f: Array) -> Array:
    with np.errstate(divide="ignore", invalid="ignore"):
        if weights == "1/y":
            return np.asarray(1.0 / y)
        if weights == "1/y2":
            return np.asarray(1.0 / y**2)
        if weights == "poisson":
            return np.asarray(1.0 / np.maximum(f, 1e-300))
    return np.ones_like(y)


# --------------------------------------------------------------------------- results


@dataclass(frozen=True, slots=True, kw_only=True)
class RankedModel:
    """A model's place in the comparison."""

    model: str
    aicc: float
    delta_aicc: float
    weight: float
    bic: float
    rss: float
    n_params: int


@dataclass(frozen=True, slots=True, kw_only=True)
class FTest:
    """Extra-sum-of-squares F test of a reduced model against a fuller one."""

    reduced: str
    full: str
    f: float
    df_num: int
    df_den: int
    p_value: float

    @property
    def significant(self) -> bool:
        return self.p_value < 0.05


@dataclass(frozen=True, slots=True, kw_only=True)
class Verdict:
    """The mechanism the data support, how strongly, and what is not identifiable.

    ``support`` is the chosen model's own Akaike weight.  When the chosen model
    stands for a group (a mixed fit that collapses onto it, or a mixed fit not
    significantly better), ``group`` names the models counted together and
    ``group_support`` is their summed weight; ``strength`` then describes the
    group and the text says so.  ``inhibition_shown`` is False when the model
    without inhibition is not rejected: nothing is then carried into a scenario.
    """

    model: str
    mechanism: str | None
    strength: str
    support: float
    text: str
    unidentifiable: tuple[str, ...] = ()
    group: tuple[str, ...] = ()
    group_support: float | None = None
    inhibition_shown: bool = False


@dataclass(frozen=True, slots=True, kw_only=True)
class ModelComparison:
    """Every model fitted to one data set, ranked, tested and judged."""

    data: IncubationData
    weights: str
    fits: tuple[FitResult, ...]
    ranking: tuple[RankedModel, ...]
    f_tests: tuple[FTest, ...]
    verdict: Verdict
    warnings: tuple[str, ...]
    substrate_inhibition: FitResult | None = None
    substrate_inhibition_test: FTest | None = None
    level: float = 0.95
    error_model: ErrorModel | None = None

    def fit(self, model: str) -> FitResult:
        for f in self.fits:
            if f.model == model:
                return f
        raise KeyError(model)

    @property
    def models(self) -> tuple[str, ...]:
        return tuple(f.model for f in self.fits)

    @property
    def chosen(self) -> FitResult:
        return self.fit(self.verdict.model)

    @property
    def ki(self) -> Estimate | None:
        """The inhibition constant to carry forward: Ki, or Kic for mixed (None without inhibition)."""
        chosen = self.chosen
        for name in ("Ki", "Kic"):
            if name in chosen.names:
                return chosen.estimate(name)
        return None

    @property
    def alpha(self) -> float | None:
        """Kiu / Kic for a mixed verdict, else None."""
        if self.verdict.model != "mixed":
            return None
        c = self.chosen
        return c.value("Kiu") / c.value("Kic")

    def __repr__(self) -> str:
        from ..results import comparison_repr

        return comparison_repr(self)

    def _repr_html_(self) -> str:
        """Ranking, verdict, carried constant, warnings and caution as HTML (shown by Jupyter)."""
        from ..results import comparison_html

        return comparison_html(self)


# --------------------------------------------------------------------------- fitting


def _check_design(data: IncubationData) -> str:
    """Refuse degenerate data; return a description when there is a single inhibitor level (else "")."""
    s, i, v = data.arrays()
    where = data.source or "data"
    if np.all(v == 0):
        raise InputError(f"{where}: velocity", "every value is 0", "cannot be fitted; expected measured rates above zero")
    if np.all(v <= 0):
        raise InputError(f"{where}: velocity", "no value above 0", "cannot be fitted; expected measured rates above zero")
    if np.ptp(v) == 0:
        raise InputError(
            f"{where}: velocity", f"every value is {v[0]:g}", "shows no change with substrate; expected rates that vary with concentration"
        )
    if np.unique(s).size < 3:
        raise FitError(
            f"{where}: {np.unique(s).size} substrate level(s); a Michaelis-Menten fit needs at least 3 distinct substrate concentrations"
        )
    if np.unique(i).size < 2:
        if i[0] == 0:
            return "the data have no inhibitor (a plain substrate-velocity curve)"
        return (
            f"one inhibitor level only ({i[0]:g} uM, no control without inhibitor): Km and Vmax are apparent values at that "
            "level; inhibition models need a control and one or more levels"
        )
    return ""


def fit_inhibition(
    data: IncubationData,
    models: Sequence[str] = MODELS,
    *,
    weights: str = "auto",
    level: float = 0.95,
    profile: bool = True,
    warn: bool = True,
) -> ModelComparison:
    """Fit every requested model to the whole grid and compare them.

    Parameters
    ----------
    data
        Substrate and inhibitor in uM, velocities in any unit.
    models
        Names from :data:`MODELS` (default: all five).
    weights
        ``"auto"`` (default): choose the error model (constant, proportional or power variance) by
        AICc on the fullest mechanism, estimate its weights by iteratively reweighted least squares and
        fit every mechanism with them (:func:`choose_error_model`); or one of
        :data:`~interact.kinetics.engine.WEIGHTS` to force a fixed scheme.
    level
        Confidence level of the intervals (default 0.95).
    profile
        Compute profile-likelihood intervals for the inhibition constants.
    warn
        Also emit each design warning through Python's ``warnings.warn``, as an
        ``interact.errors.FitWarning`` (the shells pass False and print ``warnings`` themselves).

    Returns
    -------
    ModelComparison
        Fits, AICc ranking with Akaike weights, F tests, verdict, design warnings.

    Raises
    ------
    InputError
        Unknown model or weighting, weights needing positive velocities.
    FitError
        A design that cannot be fitted (fewer than 3 substrate levels).

    Notes
    -----
    Degenerate velocities (all zero, none above zero, all equal) raise :class:`InputError`.  A single
    inhibitor level is fitted with the model without inhibition only (plain Michaelis-Menten), and the
    verdict says so; the model without inhibition is always fitted, because inhibition is reported only
    when it is rejected.
    """
    single_level = _check_design(data)
    grid = _GlobalFit.of_data(data, _models_to_fit(models, weights, single_level), level)
    x, v, i = grid.x, grid.v, grid.x[1]
    error_model: ErrorModel | None = None
    sample_weights: Array | None = None
    if weights == "auto":
        first = grid.fit_all("none", None, False, 0)
        error_model = choose_error_model(first[grid.order[-1]], x, v, grid.model(grid.order[-1]))
        sample_weights = error_model.weights
        fits = grid.fit_all("none", sample_weights, profile, 1 if error_model.name == "power" else 0, first)
    else:
        fits = grid.fit_all(weights, None, profile, 0)
    fit_tuple = tuple(fits[m] for m in grid.order)
    ranking = _rank(fit_tuple)
    f_tests = _f_tests(fits)
    sub_fit, sub_test = (
        fit_substrate_inhibition(data, weights="none" if weights == "auto" else weights, sample_weights=sample_weights)
        if np.count_nonzero(i == np.min(i)) >= 5
        else (None, None)
    )
    verdict = _verdict(fits, ranking, f_tests, single_level)
    if single_level:
        verdict = _plain_verdict(verdict, fits["none"], sub_fit, sub_test, data.substrate_unit)
    warnings = _design_warnings(data, fits, verdict, weights, sub_fit, sub_test, sample_weights)
    warnings += _residual_structure_warning(fits.get(verdict.model), data, weights, error_model)
    if warn:
        emit_warnings((FitWarning, w) for w in warnings)
    return ModelComparison(
        data=data,
        weights=weights if error_model is None else f"{error_model.name} error model (estimated)",
        error_model=error_model,
        fits=fit_tuple,
        ranking=ranking,
        f_tests=f_tests,
        verdict=verdict,
        warnings=warnings,
        substrate_inhibition=sub_fit,
        substrate_inhibition_test=sub_test,
        level=level,
    )


def _models_to_fit(models: Sequence[str], weights: str, single_level: str) -> tuple[str, ...]:
    """The models of a global fit in :data:`MODELS` order: the requested ones, always with "none" (checked)."""
    chosen = tuple(dict.fromkeys(models))
    if not chosen:
        raise InputError("models", "none given", f"expected one or more of {', '.join(MODELS)}")
    for m in chosen:
        if m not in MODELS:
            raise InputError("models", m, f"is not one of {', '.join(MODELS)}")
    if weights not in FIT_WEIGHTS:
        raise InputError("weights", weights, f"is not one of {', '.join(FIT_WEIGHTS)}")
    if single_level:
        return ("none",)
    return tuple(m for m in MODELS if m in chosen or m == "none")  # the test of "no inhibition" needs "none"


@dataclass(frozen=True, slots=True, kw_only=True)
class _GlobalFit:
    """One data set's global-fit setup: arrays, starting values, profile step hints and the parameter caps."""

    data: IncubationData
    x: Array
    v: Array
    order: tuple[str, ...]
    starts: dict[str, tuple[tuple[float, ...], ...]]
    hints: float
    caps: tuple[float, float, float]
    level: float

    @staticmethod
    def of_data(data: IncubationData, order: tuple[str, ...], level: float) -> _GlobalFit:
        s, i, v = data.arrays()
        # caps far outside any sensible value (10^4 x the data): reaching one means "not identifiable", not a result
        positive_i = i[i > 0]
        caps = (
            1e4 * float(np.max(np.abs(v))) or math.inf,
            1e4 * float(np.max(s)),
            1e4 / float(np.min(positive_i)) if positive_i.size else math.inf,
        )
        return _GlobalFit(
            data=data, x=np.vstack((s, i)), v=v, order=order, starts=guess_inhibition(data), hints=_step_hints(i), caps=caps, level=level
        )

    def model(self, name: str) -> CurveModel:
        vmax_max, km_max, kappa_max = self.caps
        unit = self.data.velocity_unit
        return inhibition_model(name, unit, vmax_max=vmax_max, km_max=km_max, kappa_max=kappa_max, km_unit=self.data.substrate_unit)

    def fit_all(
        self, label: str, sample_weights: Array | None, with_profiles: bool, extra: int, warm: dict[str, FitResult] | None = None
    ) -> dict[str, FitResult]:
        """Every model of ``order`` fitted with the same weights (``warm``: earlier fits whose optima start these)."""
        out: dict[str, FitResult] = {}
        for name in self.order:
            model = self.model(name)
            st = list(self.starts[name])
            if warm is not None and warm[name].success:  # the unweighted optimum starts the weighted fit (fewer steps)
                st.insert(0, warm[name].theta)
            if name == "mixed":
                st.extend(_mixed_starts(out))
            # Km and Vmax get profile intervals in the model without inhibition (a plain Michaelis-Menten fit
            # reports them); the inhibition models profile their inhibition constants
            prof = (tuple(range(2, len(model.parameters))) if name != "none" else (0, 1)) if with_profiles else ()
            out[name] = fit_curve(
                model,
                self.x,
                self.v,
                st,
                weights=label,
                profile=prof,
                level=self.level,
                step_hints=(1.0, 1.0, *([self.hints] * (len(model.parameters) - 2))),
                sample_weights=sample_weights,
                extra_params=extra,
            )
        return out


def _step_hints(i: Array) -> float:
    nonzero = i[i > 0]
    return 1.0 / float(np.median(nonzero)) if nonzero.size else 1.0


def _mixed_starts(fits: dict[str, FitResult]) -> list[tuple[float, ...]]:
    out: list[tuple[float, ...]] = []
    if "competitive" in fits and fits["competitive"].success:
        vm, km, kc = fits["competitive"].theta
        out.append((vm, km, kc, 0.0))  # on the bound: stays there unless the data pull it off
    if "uncompetitive" in fits and fits["uncompetitive"].success:
        vm, km, ku = fits["uncompetitive"].theta
        out.append((vm, km, 0.0, ku))
    if "noncompetitive" in fits and fits["noncompetitive"].success:
        vm, km, k = fits["noncompetitive"].theta
        out.append((vm, km, k, k))
    return out


def _substrate_model(velocity_unit: str, substrate_unit: str = "uM") -> CurveModel:
    def f(u: Array, s: Array) -> Array:
        return u[0] * s / (u[1] + s * (1.0 + s * u[2]))

    def jac(u: Array, s: Array) -> Array:
        d = u[1] + s * (1.0 + s * u[2])
        v = u[0] * s / d
        return np.column_stack((s / d, -v / d, -v * s**2 / d))

    def both(u: Array, s: Array) -> tuple[Array, Array]:
        d = u[1] + s * (1.0 + s * u[2])
        g = s / d
        v = u[0] * g
        out = np.empty((s.size, 3))
        out[:, 0] = g
        out[:, 1] = -v / d
        out[:, 2] = out[:, 1] * s**2
        return v, out

    return CurveModel(
        name="substrate-inhibition",
        parameters=("vmax", "km", "1/Ksi"),
        function=f,
        jacobian=jac,
        function_jacobian=both,
        lower=(0.0, 0.0, 0.0),
        upper=(math.inf,) * 3,
        reported=("value", "value", "inverse"),
        reported_names=("Vmax", "Km", "Ksi"),
        units=(velocity_unit, substrate_unit, substrate_unit),
        equation="v = Vmax S / (Km + S (1 + S/Ksi))",
    )


def fit_substrate_inhibition(
    data: IncubationData, *, weights: str = "none", leave_one_out: bool = False, sample_weights: Array | None = None
) -> tuple[FitResult | None, FTest | None]:
    """Substrate inhibition on the uninhibited curve (rows at the lowest inhibitor level).

    Fits the Haldane form v = Vmax S/(Km + S(1 + S/Ksi)) and tests it against
    Michaelis-Menten on the same rows with the F test.  Returns (None, None)
    when there are too few rows or substrate levels.
    """
    s, i, v = data.arrays()
    base = i == np.min(i)
    sb, vb = s[base], v[base]
    if np.unique(sb).size < (3 if leave_one_out else 4) or sb.size < (4 if leave_one_out else 5):
        return None, None
    vmax, km = guess_michaelis_menten(sb, vb)
    model = _substrate_model(data.velocity_unit, data.substrate_unit)
    starts = [(vmax, km, 0.1 / float(np.max(sb))), (vmax, km, 1.0 / float(np.max(sb)))]
    sub = fit_curve(model, sb, vb, starts, weights=weights)
    mm = fit_curve(
        inhibition_model("none", data.velocity_unit, km_unit=data.substrate_unit),
        np.vstack((sb, np.zeros_like(sb))),
        vb,
        [(vmax, km)],
        weights=weights,
    )
    if not (sub.success and mm.success) or sub.df < 1:
        return sub, None
    return sub, _f_test("none", mm, "substrate-inhibition", sub)


def _substrate_inhibition_warning(
    data: IncubationData, sub_fit: FitResult, sub_test: FTest, weights: str, sample_weights: Array | None = None
) -> str:
    """The substrate-inhibition warning, naming the row that drives it and saying whether the data fall.

    The data "fall" when the mean velocity at the highest substrate level is below the highest level mean
    of the control curve; otherwise the better Haldane fit only says the curve saturates more sharply
    than a hyperbola.  The row named is the one whose removal weakens the evidence most (leave-one-out
    refits of both models on the control rows; the F statistic without it is reported).
    """
    s, i, v = data.arrays()
    base = np.flatnonzero(i == np.min(i))
    sb, vb = s[base], v[base]
    su = data.substrate_unit
    levels = np.unique(sb)
    means = np.array([vb[sb == lv].mean() for lv in levels])
    falls = bool(means[-1] < means.max())
    worst_k, worst_p = -1, sub_test.p_value
    for k in range(base.size):
        keep = np.arange(base.size) != k
        sub = data_subset(data, base[keep])
        sw = None if sample_weights is None else np.asarray(sample_weights)[base[keep]]
        _, t2 = fit_substrate_inhibition(sub, weights=weights, leave_one_out=True, sample_weights=sw)
        p2 = t2.p_value if t2 is not None else 1.0
        if p2 > worst_p:
            worst_k, worst_p = k, p2
    ksi = sub_fit.value("Ksi")
    what = (
        f"Velocity falls at high substrate without inhibitor: substrate inhibition (Ksi {ksi:.3g} {su}"
        if falls
        else f"The control curve shows sharper saturation than hyperbolic (the substrate-inhibition form fits better, Ksi {ksi:.3g} {su}"
    )
    text = f"{what}, F test p = {sub_test.p_value:.2g}); the inhibition models assume none."
    if not falls:
        text += " The velocities do not fall at high substrate, so this is not evidence of substrate inhibition as such."
    if worst_k >= 0:
        k = int(base[worst_k])
        text += (
            f" The row that drives it most is line {data.line_of(k)} (S = {s[k]:g} {su}, v = {v[k]:g}): without it the F test "
            f"gives p = {worst_p:.2g}."
        )
    return text


def data_subset(data: IncubationData, rows: Sequence[int] | Array) -> IncubationData:
    """The rows ``rows`` of ``data`` (line numbers kept for messages)."""
    idx = [int(k) for k in rows]
    pick = lambda xs: tuple(xs[k] for k in idx)  # noqa: E731
    return IncubationData(
        substrate_um=pick(data.substrate_um),
        inhibitor_um=pick(data.inhibitor_um),
        velocity=pick(data.velocity),
        velocity_unit=data.velocity_unit,
        depletion_pct=None if data.depletion_pct is None else pick(data.depletion_pct),
        lines=pick(data.lines) if data.lines else tuple(k + 1 for k in idx),
        source=data.source,
        substrate_unit=data.substrate_unit,
    )


def _f_test(reduced_name: str, reduced: FitResult, full_name: str, full: FitResult) -> FTest:
    f_val, p_val = extra_sum_of_squares(reduced.rss, reduced.df, full.rss, full.df)
    return FTest(reduced=reduced_name, full=full_name, f=f_val, df_num=reduced.df - full.df, df_den=full.df, p_value=p_val)


def _f_tests(fits: dict[str, FitResult]) -> tuple[FTest, ...]:
    out = []
    for reduced, full in NESTED:
        if reduced in fits and full in fits and fits[reduced].success and fits[full].success:
            out.append(_f_test(reduced, fits[reduced], full, fits[full]))
    return tuple(out)


def _rank(fits: tuple[FitResult, ...]) -> tuple[RankedModel, ...]:
    ok = [f for f in fits if f.success and f.aicc < math.inf]
    if not ok:
        return ()
    best = min(f.aicc for f in ok)
    if best == -math.inf:  # exact fits (noise-free data): share the weight among them
        rel = [1.0 if f.aicc == best else 0.0 for f in ok]
    else:
        rel = [math.exp(-0.5 * (f.aicc - best)) for f in ok]
    total = sum(rel)
    ranked = [
        RankedModel(
            model=f.model,
            aicc=f.aicc,
            delta_aicc=0.0 if f.aicc == best else f.aicc - best,
            weight=r / total,
            bic=f.bic,
            rss=f.rss,
            n_params=f.n_params,
        )
        for f, r in zip(ok, rel, strict=True)
    ]
    return tuple(sorted(ranked, key=lambda r: r.aicc))


def _at_bound(fit: FitResult, name: str) -> bool:
    e = fit.estimate(name)
    return e.at_bound or e.value == math.inf


def _plain_verdict(verdict: Verdict, mm: FitResult, sub: FitResult | None, test: FTest | None, unit: str) -> Verdict:
    """The verdict of a plain Michaelis-Menten fit, with the substrate-inhibition alternative compared honestly."""
    if not mm.success:
        return verdict
    km = mm.estimate("Km")
    text = verdict.text + f" Km = {km.value:.3g} {unit}"
    if km.profile_low is not None and km.profile_high is not None:
        text += f" ({mm.level:.0%} profile interval {km.profile_low:.3g} to {km.profile_high:.3g} {unit})"
    text += "."
    if sub is None or test is None or not math.isfinite(sub.aicc) or not math.isfinite(mm.aicc):
        text += " The substrate-inhibition alternative was not fitted (it needs at least 4 substrate levels and 5 rows)."
        return replace(verdict, text=text)
    best = min(mm.aicc, sub.aicc)
    rel_mm, rel_si = math.exp(-0.5 * (mm.aicc - best)), math.exp(-0.5 * (sub.aicc - best))
    w_mm = rel_mm / (rel_mm + rel_si)
    if test.significant:
        text += (
            f" The substrate-inhibition form (Ksi {sub.value('Ksi'):.3g} {unit}) fits significantly better (F test p = "
            f"{test.p_value:.2g}; Akaike weights {w_mm:.2f} Michaelis-Menten, {1 - w_mm:.2f} substrate inhibition): Km and Vmax "
            "from the hyperbola are doubtful; see the warnings."
        )
    else:
        text += (
            f" The substrate-inhibition form does not fit significantly better (F test p = {test.p_value:.2g}; Akaike weights "
            f"{w_mm:.2f} Michaelis-Menten, {1 - w_mm:.2f} substrate inhibition)."
        )
    return replace(verdict, text=text)


def _group_label(chosen: str, group: tuple[str, ...], collapsed: str | None) -> str:
    if collapsed:
        return f"{chosen}-type models together ({chosen}, and mixed with {collapsed} unbounded)"
    return f"{' and '.join(group)} together"


def _collapse(
    best: str,
    fits: dict[str, FitResult],
    tests: tuple[FTest, ...],
    weight: dict[str, float],
    rank_of: dict[str, RankedModel],
    notes: list[str],
    unidentifiable: list[str],
) -> tuple[str, tuple[str, ...], str | None]:
    """(chosen model, group counted with it, the mixed constant that runs away) for the best-ranked ``best``.

    A mixed fit that collapses onto a one-constant model (Kic or Kiu unbounded), or is not significantly
    better than it, is reported as that simpler model; the reasons go into ``notes`` and ``unidentifiable``.
    """
    chosen = best
    group: tuple[str, ...] = ()
    collapsed: str | None = None
    if best == "mixed":
        mixed = fits["mixed"]
        if _at_bound(mixed, "Kic") and "uncompetitive" in weight:
            chosen, group, collapsed = "uncompetitive", ("uncompetitive", "mixed"), "Kic"
            unidentifiable.append("Kic")
            notes.append(
                "The mixed fit collapses onto the uncompetitive model: its competitive constant Kic runs to infinity "
                "(unbounded), so it is not identifiable."
            )
        elif _at_bound(mixed, "Kiu") and "competitive" in weight:
            chosen, group, collapsed = "competitive", ("competitive", "mixed"), "Kiu"
            unidentifiable.append("Kiu")
            notes.append(
                "The mixed fit collapses onto the competitive model: its uncompetitive constant Kiu runs to infinity "
                "(unbounded), so it is not identifiable."
            )
        else:
            simpler = [t for t in tests if t.full == "mixed" and t.reduced != "none" and not t.significant and t.reduced in weight]
            if simpler:
                pick = min(simpler, key=lambda t: fits[t.reduced].aicc)
                if weight[pick.reduced] > 0 and rank_of[pick.reduced].delta_aicc < 2.0:
                    chosen, group = pick.reduced, (pick.reduced, "mixed")
                    notes.append(
                        f"The mixed model fits slightly better by AICc but not significantly better than {pick.reduced} "
                        f"(F test p = {pick.p_value:.2g}); the simpler mechanism is reported."
                    )
    elif best != "none" and "mixed" in fits and fits["mixed"].success:
        mixed = fits["mixed"]
        collapse = {"uncompetitive": "Kic", "competitive": "Kiu"}.get(best)
        if collapse and _at_bound(mixed, collapse):
            group, collapsed = (best, "mixed"), collapse
            unidentifiable.append(collapse)
            notes.append(f"The mixed fit collapses onto this model ({collapse} unbounded).")
    return chosen, group, collapsed


def _verdict(fits: dict[str, FitResult], ranking: tuple[RankedModel, ...], tests: tuple[FTest, ...], single_level: str = "") -> Verdict:
    if not ranking:
        first = next(iter(fits.values()))
        return Verdict(
            model=first.model,
            mechanism=None,
            strength="none",
            support=0.0,
            text="No model could be fitted to these data; see the warnings.",
        )
    weight = {r.model: r.weight for r in ranking}
    rank_of = {r.model: r for r in ranking}
    best = ranking[0].model
    notes: list[str] = []
    unidentifiable: list[str] = []
    if single_level:
        text = f"Michaelis-Menten fit only: {single_level}; no inhibition model can be fitted, so no Ki is reported."
        return Verdict(model="none", mechanism=None, strength=_strength(weight["none"]), support=weight["none"], text=text)
    chosen, group, collapsed = _collapse(best, fits, tests, weight, rank_of, notes, unidentifiable)
    support = weight[chosen]
    group_support = sum(weight.get(m, 0.0) for m in group) if group else None
    if chosen == "none":
        alt = ranking[1] if len(ranking) > 1 else None
        text = f"No inhibition shown: the model without inhibition has the lowest AICc (Akaike weight {support:.2f})"
        text += f"; next: {LABELS[alt.model]} (Akaike weight {alt.weight:.2f}, delta AICc {alt.delta_aicc:.1f})." if alt else "."
        return Verdict(model="none", mechanism=None, strength=_strength(support), support=support, text=text)
    against_none = next((t for t in tests if t.reduced == "none" and t.full == chosen), None)
    if against_none is not None and not against_none.significant:
        text = (
            f"No inhibition shown: the model without inhibition is not rejected (F test against the {LABELS[chosen]} "
            f"model, p = {against_none.p_value:.2g}); the {LABELS[chosen]} model's own Akaike weight is {support:.2f}. "
            "No Ki is reported; higher inhibitor concentrations or more replicates would be needed to show inhibition."
        )
        return Verdict(model="none", mechanism=None, strength="none", support=weight.get("none", 0.0), text=text)
    fit = fits[chosen]
    strength = _strength(group_support if group_support is not None else support)
    others = [r for r in ranking if r.model not in (chosen, *group)]
    runner = others[0] if others else None
    text = f"{LABELS[chosen].capitalize()} inhibition: Akaike weight {support:.2f} for the {LABELS[chosen]} model itself"
    if group_support is not None:
        text += f"; {_group_label(chosen, group, collapsed)}: {group_support:.2f}, {strength} support for the group"
    else:
        text += f", {strength} support"
    if runner is not None:
        delta = runner.aicc - fits[chosen].aicc
        if math.isfinite(delta):
            text += f"; next best {LABELS[runner.model]} (Akaike weight {runner.weight:.2f}) at delta AICc {delta:.1f}"
        else:
            text += f"; {LABELS[runner.model]} fits exactly too (noise-free data cannot separate them)"
    text += "."
    if strength == "weak" and runner is not None:
        text += (
            f" The data do not clearly separate {chosen} from {runner.model}; more substrate levels around Km and "
            "inhibitor levels around Ki would help."
        )
    for name in ("Ki", "Kic", "Kiu"):
        if name in fit.names:
            e = fit.estimate(name)
            if e.at_bound and math.isfinite(e.value) and name not in unidentifiable:
                unidentifiable.append(name)
                notes.append(f"{name} ran to zero and stopped at the fitting cap: the {chosen} model degenerates on these data.")
            elif e.profile_high == math.inf and name not in unidentifiable:
                unidentifiable.append(name)
                notes.append(
                    f"{name} has no upper confidence limit (profile never crosses): inhibition is too weak at the "
                    f"concentrations tested to bound it."
                )
    if notes:
        text += " " + " ".join(notes)
    return Verdict(
        model=chosen,
        mechanism=chosen,
        strength=strength,
        support=support,
        text=text,
        unidentifiable=tuple(unidentifiable),
        group=group,
        group_support=group_support,
        inhibition_shown=True,
    )


def _strength(weight: float) -> str:
    """Words for an Akaike weight (thresholds are this tool's convention)."""
    if weight >= 0.9:
        return "strong"
    if weight >= 0.7:
        return "moderate"
    return "weak"


def _lines(data: IncubationData, idx: Sequence[int]) -> str:
    shown = [str(data.line_of(k)) for k in idx[:8]]
    return ", ".join(shown) + (" ..." if len(idx) > 8 else "")


def _design_warnings(
    data: IncubationData,
    fits: dict[str, FitResult],
    verdict: Verdict,
    weights: str,
    sub_fit: FitResult | None,
    sub_test: FTest | None,
    sample_weights: Array | None = None,
) -> tuple[str, ...]:
    out: list[str] = []
    s, i, v = data.arrays()
    su = data.substrate_unit
    for f in fits.values():
        if not f.success:
            out.append(f"The {f.model} fit did not converge ({f.message}); it is left out of the comparison.")
    chosen = fits.get(verdict.model)
    km = chosen.value("Km") if chosen is not None and chosen.success else math.nan
    if math.isfinite(km) and km > 0:
        if s.min() > km:
            out.append(
                f"Lowest substrate concentration {s.min():.3g} {su} is above Km ({km:.3g} {su}): Km and the mechanism are "
                f"poorly defined; include concentrations below Km."
            )
        elif s.max() < km:
            out.append(
                f"Highest substrate concentration {s.max():.3g} {su} is below Km ({km:.3g} {su}): Vmax and the mechanism "
                f"are poorly defined; include concentrations above Km."
            )
        elif s.min() > 0.5 * km or s.max() < 2.0 * km:
            out.append(
                f"Substrate range {s.min():.3g}-{s.max():.3g} {su} spans {s.min() / km:.2g}-{s.max() / km:.2g} x Km; "
                "about 0.2-5 x Km separates the mechanisms better (common practice)."
            )
    levels = np.unique(i[i > 0])
    single = np.unique(i).size < 2
    if not np.any(i == 0) and not single:
        out.append("No control rows without inhibitor: the uninhibited curve is not measured directly.")
    if 0 < levels.size < 3 and not single:
        out.append(f"Only {levels.size} inhibitor level(s) above zero; at least 3 spanning Ki are common practice for a reliable Ki.")
    est = None
    if chosen is not None:
        for name in ("Ki", "Kic", "Kiu"):
            if name in chosen.names and math.isfinite(chosen.value(name)):
                est = chosen.estimate(name)
                break
    if est is not None and levels.size and levels.max() < est.value:
        out.append(
            f"Highest inhibitor concentration {levels.max():.3g} uM is below {est.name} ({est.value:.3g} uM): "
            f"inhibition is slight and {est.name} is poorly defined."
        )
    if data.depletion_pct is not None:
        dep = np.asarray(data.depletion_pct)
        hi = np.flatnonzero(dep > DEPLETION_KINETIC_PCT)
        if hi.size:
            worst = float(dep.max())
            limit = " and above the 20 % limit (FDA, from memory)" if worst > DEPLETION_LIMIT_PCT else ""
            out.append(
                f"Substrate depletion above 10 % on {hi.size} row(s) (lines {_lines(data, hi.tolist())}; up to "
                f"{worst:.3g} %){limit}: "
                "initial-rate conditions are doubtful there ([@lee2024]: keep turnover below 10 % for kinetic constants)."
            )
    else:
        out.append("No depletion column: substrate turnover was not checked (keep it below 10 % for kinetic constants, [@lee2024]).")
    if chosen is not None and chosen.success:
        t = np.asarray(chosen.studentized)
        flagged = np.flatnonzero(np.abs(t) > OUTLIER_T)
        if flagged.size:
            detail = "; ".join(f"line {data.line_of(k)}: v = {v[k]:g}, t = {t[k]:.1f}" for k in flagged[:6])
            out.append(f"Possible outlier(s) by externally studentised residual |t| > {OUTLIER_T:g} in the {chosen.model} fit: {detail}.")
    if sub_fit is not None and sub_test is not None and sub_test.significant and math.isfinite(sub_fit.value("Ksi")):
        out.append(_substrate_inhibition_warning(data, sub_fit, sub_test, "none" if weights == "auto" else weights, sample_weights))
    if weights == "poisson":
        out.append("With Poisson-like weights the weights depend on the fit, so AICc and F tests are approximate.")
    if weights in ("1/y", "1/y2") and np.any(v <= 0):
        out.append("Rows with zero velocity cannot be weighted by 1/y.")
    return tuple(out)
