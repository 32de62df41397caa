"""Nonlinear least squares for any model with an analytic Jacobian.

The solver is a compact Levenberg-Marquardt with Marquardt scaling and
Nielsen's damping update (Madsen, Nielsen & Tingleff, *Methods for non-linear
least squares problems*, DTU 2004, section 3.2 - from memory), with simple
box bounds handled by an active set: a parameter sitting on its bound with
the gradient pushing outward is held there for the step.  It runs on numpy
arrays only, which keeps a fit of a 72-point grid well under a millisecond; a
fit that does not converge is retried with ``scipy.optimize.least_squares``
(trust-region reflective) from the same start.

Statistics follow the usual asymptotic theory for nonlinear regression
(Bates & Watts 1988, chapter 2 and section 6.1): with ``s^2 = RSS/(n - p)``,
the covariance is ``s^2 (J^T J)^-1`` from the Jacobian of the (weighted)
residuals at the optimum, the Wald interval is ``estimate +/- t(0.975, n - p) x
SE``, and the profile interval holds every value whose profiled RSS stays
below ``RSS_min (1 + t^2/(n - p))`` (the profile-t statistic of Bates & Watts
section 6.1, seen there as a method; the threshold is the F(1, n - p) form).
Information criteria use the Gaussian log-likelihood with the variance
estimated, counting it as a parameter (k = p + 1), as R's ``logLik.nls`` does
(common practice): AIC = -2 logL + 2k, AICc = AIC + 2k(k + 1)/(n - k - 1)
(Hurvich & Tsai 1989, from memory), BIC = -2 logL + k ln n.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any, Final

import numpy as np
from numpy.typing import NDArray

from ..errors import FitError, InputError

__all__ = [
    "WEIGHTS",
    "CurveModel",
    "Estimate",
    "FitResult",
    "extra_sum_of_squares",
    "finite_difference_jacobian",
    "fit_curve",
    "fit_point",
]

Array = NDArray[np.float64]

#: weighting schemes: none; 1/y (variance proportional to the observation);
#: 1/y2 (constant relative error); poisson (variance proportional to the
#: fitted value, residual (y - f)/sqrt(f), refined with the fit as in
#: R's ``Pur.wt`` example of ``nls``)
WEIGHTS: Final = ("none", "1/y", "1/y2", "poisson")

_TINY: Final = 1e-300


@dataclass(frozen=True, slots=True, kw_only=True)
class CurveModel:
    """A model ``f(theta, x)`` with its Jacobian ``df/dtheta`` (shape ``(n, p)``).

    ``lower``/``upper`` are box bounds on the fitting parameters (empty for
    none).  ``reported`` lists how each fitting parameter is shown: ``"value"``
    as it is, or ``"inverse"`` as its reciprocal (an inhibition constant
    fitted as 1/Ki, so that "no inhibition" is the finite bound 1/Ki = 0).
    """

    name: str
    parameters: tuple[str, ...]
    function: Callable[[Array, Any], Array]
    #: ``(theta, x) -> J``; ``None`` uses central finite differences (:func:`finite_difference_jacobian`)
    jacobian: Callable[[Array, Any], Array] | None = None
    lower: tuple[float, ...] = ()
    upper: tuple[float, ...] = ()
    reported: tuple[str, ...] = ()
    reported_names: tuple[str, ...] = ()
    units: tuple[str, ...] = ()
    equation: str = ""
    #: optional ``(theta, x) -> (f, J)`` computing both at once (faster when they share work)
    function_jacobian: Callable[[Array, Any], tuple[Array, Array]] | None = None

    def shown_name(self, index: int) -> str:
        return self.reported_names[index] if self.reported_names else self.parameters[index]

    def kind(self, index: int) -> str:
        return self.reported[index] if self.reported else "value"


@dataclass(frozen=True, slots=True, kw_only=True)
class Estimate:
    """One fitted constant on the reported scale.

    ``std_error`` is ``None`` when it cannot be estimated (the parameter sits
    on a bound, or the information matrix is singular).  ``ci_low/ci_high``
    are the asymptotic (Wald, t-based) limits; ``profile_low/profile_high``
    the profile-likelihood limits (``None`` when not computed, ``inf`` when
    the profile never crosses the threshold on that side: the data do not
    bound the constant).
    """

    name: str
    value: float
    unit: str = ""
    std_error: float | None = None
    ci_low: float | None = None
    ci_high: float | None = None
    profile_low: float | None = None
    profile_high: float | None = None
    at_bound: bool = False
    identifiable: bool = True
    note: str = ""

    def interval(self) -> tuple[float, float, str] | None:
        """(low, high, method) to carry forward: the profile interval when closed, else the asymptotic one; None when open."""
        for low, high, method in ((self.profile_low, self.profile_high, "profile likelihood"), (self.ci_low, self.ci_high, "asymptotic")):
            if low is not None and high is not None and 0 < low <= self.value <= high < math.inf:
                return low, high, method
        return None

    @property
    def relative_se(self) -> float | None:
        if self.std_error is None or not math.isfinite(self.value) or self.value == 0:
            return None
        return self.std_error / abs(self.value)


@dataclass(frozen=True, slots=True, kw_only=True)
class FitResult:
    """A finished fit: estimates, fit statistics and residual diagnostics.

    ``rss`` is the (weighted) residual sum of squares that was minimised and
    ``residual_sd`` its square root over ``df``; ``residuals`` are raw
    (observed minus fitted); ``studentized`` are externally studentised
    weighted residuals.  ``success`` is False, with ``message`` saying why,
    when the optimiser did not converge; the numbers are then those of the
    last iterate and must not be used.
    """

    model: str
    equation: str
    success: bool
    message: str
    estimates: tuple[Estimate, ...]
    weights: str
    n: int
    n_params: int
    df: int
    rss: float
    residual_sd: float
    log_likelihood: float
    aic: float
    aicc: float
    bic: float
    nfev: int
    fitted: tuple[float, ...]
    residuals: tuple[float, ...]
    studentized: tuple[float, ...]
    leverage: tuple[float, ...]
    theta: tuple[float, ...]
    covariance: tuple[tuple[float, ...], ...] | None = None
    level: float = 0.95
    warnings: tuple[str, ...] = field(default_factory=tuple)

    def estimate(self, name: str) -> Estimate:
        for e in self.estimates:
            if e.name == name:
                return e
        raise KeyError(name)

    def value(self, name: str) -> float:
        return self.estimate(name).value

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(e.name for e in self.estimates)


# --------------------------------------------------------------------------- residuals


def finite_difference_jacobian(function: Callable[[Array, Any], Array], u: Array, x: Any, f0: Array | None = None) -> Array:
    """Central-difference Jacobian ``df/dtheta`` (n x p), step ``eps^(1/3) max(|u_j|, 1e-8)``.

    Used when a model gives no analytic Jacobian; the step is the usual choice balancing truncation
    and rounding error for central differences (Nocedal & Wright, *Numerical Optimization*, 2nd ed.,
    section 8.1 - from memory).  A side where the model is not finite falls back to a one-sided difference.
    """
    u = np.asarray(u, dtype=float)
    if f0 is None:
        f0 = np.asarray(function(u, x), dtype=float)
    out = np.empty((f0.size, u.size))
    for j in range(u.size):
        h = 6.0554544523933395e-06 * max(abs(u[j]), 1e-8)  # eps ** (1/3)
        up, dn = u.copy(), u.copy()
        up[j] += h
        dn[j] -= h
        with np.errstate(all="ignore"):
            fp = np.asarray(function(up, x), dtype=float)
            fm = np.asarray(function(dn, x), dtype=float)
        if np.all(np.isfinite(fp)) and np.all(np.isfinite(fm)):
            out[:, j] = (fp - fm) / (up[j] - dn[j])
        elif np.all(np.isfinite(fp)):
            out[:, j] = (fp - f0) / (up[j] - u[j])
        else:
            out[:, j] = (f0 - fm) / (u[j] - dn[j])
    return out


class _Problem:
    """Weighted residuals r = sqrt(w) (f - y) and their Jacobian."""

    def __init__(self, model: CurveModel, x: Any, y: Array, weights: str, given: Array | None = None) -> None:
        self.model = model
        self.x = x
        self.y = y
        self.poisson = weights == "poisson"
        if given is not None:
            self.sw: Array | None = np.sqrt(given)
        elif weights == "none":
            self.sw = None
        elif weights == "1/y":
            self.sw = 1.0 / np.sqrt(y)
        elif weights == "1/y2":
            self.sw = 1.0 / np.abs(y)
        elif weights == "poisson":
            self.sw = None
        else:  # guarded by fit_curve
            raise ValueError(weights)
        self.nfev = 0

    def fitted(self, u: Array) -> Array:
        return np.asarray(self.model.function(u, self.x), dtype=float)

    def resid(self, u: Array) -> Array:
        self.nfev += 1
        f = self.model.function(u, self.x)
        if self.poisson:
            with np.errstate(divide="ignore", invalid="ignore"):
                return (f - self.y) / np.sqrt(f)
        return f - self.y if self.sw is None else self.sw * (f - self.y)

    def resid_jac(self, u: Array) -> tuple[Array, Array]:
        self.nfev += 1
        fused = self.model.function_jacobian
        if fused is not None:
            f, jac = fused(u, self.x)
        else:
            f = self.fitted(u)
            if self.model.jacobian is None:
                jac = finite_difference_jacobian(self.model.function, u, self.x, f)
            else:
                jac = np.asarray(self.model.jacobian(u, self.x), dtype=float)
        if self.poisson:
            with np.errstate(divide="ignore", invalid="ignore"):
                root = np.sqrt(f)
                r = (f - self.y) / root
                scale = (f + self.y) / (2.0 * f * root)
            return r, jac * scale[:, None]
        if self.sw is None:
            return f - self.y, jac
        return self.sw * (f - self.y), jac * self.sw[:, None]

    def weights_at(self, u: Array) -> Array:
        if self.poisson:
            return 1.0 / self.fitted(u)
        if self.sw is None:
            return np.ones_like(self.y)
        return self.sw**2


@dataclass(slots=True)
class _Solution:
    u: Array
    cost: float
    success: bool
    message: str
    iterations: int
    grad: list[float] | None = None  # J^T r at u (half the gradient of the cost)
    resid: Array | None = None  # r(u) and J(u), kept so that callers need not evaluate them again at u
    jac: Array | None = None


def _lm(
    prob: _Problem,
    u0: Array,
    lo: Array,
    hi: Array,
    fixed: NDArray[np.bool_],
    *,
    max_iter: int = 200,
    ftol: float = 1e-15,
    xtol: float = 1e-13,
    gtol: float = 1e-14,
    mu0: float = 1e-6,
    floor_tol: float = 1e-14,
) -> _Solution:
    """Minimise ||r(u)||^2 by bounded Levenberg-Marquardt (see module docstring).

    The n-vectors live in numpy; the p x p algebra (p is 2 to 4 here) runs on
    Python floats, which is several times faster than numpy at that size.
    """
    del gtol  # the rounding-floor test below subsumes a gradient test
    p = len(u0)
    lo_l = np.asarray(lo, dtype=float).tolist()
    hi_l = np.asarray(hi, dtype=float).tolist()
    ul = np.minimum(np.maximum(np.asarray(u0, dtype=float), lo_l), hi_l).tolist()
    fixed_l = np.asarray(fixed, dtype=bool).tolist()
    bounded = any(math.isfinite(v) for v in lo_l) or any(math.isfinite(v) for v in hi_l)
    base_idx = [k for k in range(p) if not fixed_l[k]]
    if not base_idx:
        return _Solution(np.array(ul), math.nan, True, "all parameters fixed", 0)
    u = np.array(ul)
    r, jac = prob.resid_jac(u)
    cost = float(r @ r)
    if not math.isfinite(cost) or not np.isfinite(jac).all():
        return _Solution(u, math.inf, False, "the model is not finite at the starting values", 0)
    a = (jac.T @ jac).tolist()
    g = (jac.T @ r).tolist()
    dmax = [max(a[k][k], _TINY) for k in range(p)]
    mu = mu0  # damping relative to the Marquardt scaling diag(J^T J)
    nu = 2.0
    fused = prob.model.function_jacobian is not None
    for it in range(1, max_iter + 1):
        if cost == 0.0:
            return _Solution(u, cost, True, "exact fit", it, grad=g, resid=r, jac=jac)
        if bounded:
            idx = [k for k in base_idx if not ((ul[k] <= lo_l[k] and g[k] > 0) or (ul[k] >= hi_l[k] and g[k] < 0))]
            if not idx:
                return _Solution(u, cost, True, "converged at the bounds", it, grad=g, resid=r, jac=jac)
        else:
            idx = base_idx
        q = len(idx)
        gf = [g[k] for k in idx]
        af = [[a[i][j] for j in idx] for i in idx]
        damp = [mu * dmax[k] for k in idx]
        h = _solve_damped(af, gf, damp)
        if h is None:
            mu *= nu
            nu *= 2.0
            continue
        # decrease promised by the linear model for the LM step: -h.g + mu h.D.h (exact for (A + mu D) h = -g)
        promised = 0.0
        for k in range(q):
            promised += -h[k] * gf[k] + damp[k] * h[k] * h[k]
        trial, small, predicted = _trial_point(ul, h, idx, lo_l, hi_l, bounded, xtol, af, gf, promised)
        floor = promised <= floor_tol * cost  # the linear model promises less than rounding (or the caller) needs
        ut = np.array(trial)
        # a model computing f and J together costs little more than f alone: evaluate both at the trial point,
        # so an accepted step (the usual case) does not evaluate f again
        rt, jt = prob.resid_jac(ut) if fused else (prob.resid(ut), None)
        ct = float(rt @ rt)
        if ct != ct:  # NaN: the model is undefined there
            ct = math.inf
        if ct < cost:
            rho = (cost - ct) / predicted if predicted > 0 else 1.0
            reduction = cost - ct
            u, ul, cost = ut, trial, ct
            r, jac = (rt, jt) if jt is not None else prob.resid_jac(u)
            a = (jac.T @ jac).tolist()
            g = (jac.T @ r).tolist()
            if not math.isfinite(sum(g)):
                return _Solution(u, cost, False, "the Jacobian is not finite at the solution", it, grad=g)
            for k in range(p):
                if a[k][k] > dmax[k]:
                    dmax[k] = a[k][k]
            mu *= max(0.1, 1.0 - (2.0 * rho - 1.0) ** 3)
            nu = 2.0
            if reduction <= ftol * cost or small or floor:
                return _Solution(u, cost, True, "converged", it, grad=g, resid=r, jac=jac)
        else:
            if small or floor:
                return _Solution(u, cost, True, "converged (step)", it, grad=g, resid=r, jac=jac)
            mu *= nu
            nu *= 2.0
            if mu > 1e300:
                return _Solution(u, cost, True, "converged (no further decrease possible)", it, grad=g, resid=r, jac=jac)
    return _Solution(u, cost, False, f"did not converge in {max_iter} iterations", max_iter, grad=g, resid=r, jac=jac)


def _trial_point(
    ul: list[float],
    h: list[float],
    idx: list[int],
    lo_l: list[float],
    hi_l: list[float],
    bounded: bool,
    xtol: float,
    af: list[list[float]],
    gf: list[float],
    promised: float,
) -> tuple[list[float], bool, float]:
    """(trial point, step below xtol, decrease predicted by the linear model) of the LM step ``h`` on the free ``idx``.

    A step clipped to the box predicts the decrease of the clipped step, -2 s.g - s.A.s.
    """
    trial = ul[:]
    clipped = False
    small = True
    for n_k, k in enumerate(idx):
        t = trial[k] + h[n_k]
        if bounded:
            if t < lo_l[k]:
                t, clipped = lo_l[k], True
            elif t > hi_l[k]:
                t, clipped = hi_l[k], True
        if abs(t - ul[k]) > xtol * (abs(ul[k]) + xtol):
            small = False
        trial[k] = t
    if not clipped:
        return trial, small, promised
    sf = [trial[k] - ul[k] for k in idx]
    predicted = 0.0
    q = len(idx)
    for i in range(q):
        row = af[i]
        acc = 0.0
        for j in range(q):
            acc += row[j] * sf[j]
        predicted += -2.0 * sf[i] * gf[i] - sf[i] * acc
    return trial, small, predicted


def _solve_damped(a: list[list[float]], g: list[float], damping: list[float]) -> list[float] | None:
    """Solve (A + diag(damping)) h = -g on Python floats; None when not positive definite.

    Closed forms for 1-3 unknowns (Cramer's rule on the symmetric matrix), Cholesky above.
    """
    n = len(g)
    if n <= 3:
        if n == 1:
            m11 = a[0][0] + damping[0]
            return [-g[0] / m11] if m11 > 0.0 and m11 != math.inf else None
        if n == 2:
            m11, m12, m22 = a[0][0] + damping[0], a[0][1], a[1][1] + damping[1]
            det = m11 * m22 - m12 * m12
            if not (m11 > 0.0 and det > 0.0 and math.isfinite(det)):
                return None
            return [(-g[0] * m22 + g[1] * m12) / det, (g[0] * m12 - g[1] * m11) / det]
        m11, m12, m13 = a[0][0] + damping[0], a[0][1], a[0][2]
        m22, m23, m33 = a[1][1] + damping[1], a[1][2], a[2][2] + damping[2]
        c11 = m22 * m33 - m23 * m23
        c12 = m13 * m23 - m12 * m33
        c13 = m12 * m23 - m13 * m22
        det = m11 * c11 + m12 * c12 + m13 * c13
        minor2 = m11 * m22 - m12 * m12
        if not (m11 > 0.0 and minor2 > 0.0 and det > 0.0 and math.isfinite(det)):
            return None
        c22 = m11 * m33 - m13 * m13
        c23 = m12 * m13 - m11 * m23
        c33 = minor2
        g1, g2, g3 = -g[0], -g[1], -g[2]
        return [
            (c11 * g1 + c12 * g2 + c13 * g3) / det,
            (c12 * g1 + c22 * g2 + c23 * g3) / det,
            (c13 * g1 + c23 * g2 + c33 * g3) / det,
        ]
    chol = [[0.0] * n for _ in range(n)]
    for i in range(n):
        ci = chol[i]
        ai = a[i]
        for j in range(i + 1):
            cj = chol[j]
            acc = ai[j] + (damping[i] if i == j else 0.0)
            for k in range(j):
                acc -= ci[k] * cj[k]
            if i == j:
                if not acc > 0.0 or acc == math.inf:
                    return None
                ci[i] = math.sqrt(acc)
            else:
                ci[j] = acc / cj[j]
    y = [0.0] * n
    for i in range(n):
        acc = -g[i]
        ci = chol[i]
        for k in range(i):
            acc -= ci[k] * y[k]
        y[i] = acc / ci[i]
    x = [0.0] * n
    for i in range(n - 1, -1, -1):
        acc = y[i]
        for k in range(i + 1, n):
            acc -= chol[k][i] * x[k]
        x[i] = acc / chol[i][i]
    return x


def _degenerate(prob: _Problem, sol: _Solution, lo: Array, hi: Array) -> bool:
    """True when the free parameters' Jacobian at a 'converged' point is numerically rank-deficient."""
    if not sol.success or not math.isfinite(sol.cost) or sol.cost == 0.0:
        return False
    free = ~(((sol.u <= lo) | (sol.u >= hi)) & (np.isfinite(lo) | np.isfinite(hi)))
    if not free.any():
        return False
    jac = (sol.jac if sol.jac is not None else prob.resid_jac(sol.u)[1])[:, free]
    if not np.isfinite(jac).all():
        return True
    norms = np.sqrt(np.einsum("ij,ij->j", jac, jac))
    if not norms.all():  # a parameter the model does not depend on here
        return True
    sv = np.linalg.svd(jac / norms, compute_uv=False)
    return bool(sv[-1] < 1e-10 * sv[0])


def _scipy_fallback(prob: _Problem, u0: Array, lo: Array, hi: Array) -> _Solution:
    from scipy.optimize import least_squares

    bounded = bool(np.any(np.isfinite(lo)) or np.any(np.isfinite(hi)))
    start = np.clip(u0, lo, hi)
    if bounded:  # trf wants a strictly feasible start
        span = np.where(np.isfinite(hi - lo), hi - lo, 1.0)
        start = np.clip(start, lo + 1e-10 * span, hi - 1e-10 * span)

    def fun(u: Array) -> Array:
        r = prob.resid(u)
        return np.where(np.isfinite(r), r, 1e150)

    def jac(u: Array) -> Array:
        return np.nan_to_num(prob.resid_jac(u)[1], nan=0.0, posinf=0.0, neginf=0.0)

    try:
        res = least_squares(
            fun,
            start,
            jac=jac,
            bounds=(lo, hi) if bounded else (-np.inf, np.inf),
            method="trf",
            x_scale="jac",
            xtol=1e-14,
            ftol=1e-14,
            gtol=1e-14,
            max_nfev=2000,
        )
    except (ValueError, np.linalg.LinAlgError) as exc:
        return _Solution(u0, math.inf, False, f"scipy least_squares failed: {exc}", 0)
    r = prob.resid(res.x)
    cost = float(r @ r) if np.all(np.isfinite(r)) else math.inf
    return _Solution(np.asarray(res.x, dtype=float), cost, bool(res.success) and math.isfinite(cost), str(res.message), int(res.nfev))


# --------------------------------------------------------------------------- profile


def _profile_side(
    prob: _Problem,
    u_hat: Array,
    cost_hat: float,
    j: int,
    direction: int,
    step0: float,
    tq: float,
    s2: float,
    lo: Array,
    hi: Array,
    fixed: NDArray[np.bool_],
    trend: Array | None = None,
) -> float:
    """The profile limit of parameter ``j`` on one side (fitting scale); +/-inf or the bound when open.

    ``trend`` is d(u)/d(u_j) along the asymptotic profile trace (cov[:, j] / cov[j, j]), used to
    start the first conditional fit close to its optimum.
    """
    mask = fixed.copy()
    mask[j] = True
    bound = lo[j] if direction < 0 else hi[j]
    centre = float(u_hat[j])
    trace: list[tuple[float, Array]] = [(centre, u_hat)]

    def tau(val: float, start: Array) -> tuple[float, Array, float]:
        u0 = start.copy()
        if len(trace) == 1 and trend is not None:  # first step: follow the asymptotic profile trace
            guess = u_hat + trend * (val - centre)
            if np.all(np.isfinite(guess)):
                u0 = np.minimum(np.maximum(guess, lo), hi)
        elif len(trace) >= 2:  # extrapolate the profile trace linearly from the two nearest points
            (v1, u1), (v2, u2) = sorted(trace, key=lambda p: abs(p[0] - val))[:2]
            if v1 != v2:
                guess = u1 + (val - v1) / (v1 - v2) * (u1 - u2)
                if np.all(np.isfinite(guess)):
                    u0 = np.minimum(np.maximum(guess, lo), hi)
        u0[j] = val
        sol = _lm(prob, u0, lo, hi, mask, max_iter=100, ftol=1e-10, xtol=1e-9, gtol=1e-10, mu0=1e-6, floor_tol=1e-10)
        t = math.sqrt(max(sol.cost - cost_hat, 0.0) / s2) if math.isfinite(sol.cost) else math.inf
        trace.append((val, sol.u))
        slope = sol.grad[j] / (s2 * t) if sol.grad is not None and 0 < t < math.inf else math.nan
        return t, sol.u, slope

    # Safeguarded Newton on tau(value) = tq.  By the envelope theorem the derivative of the
    # profiled cost is 2 (J^T r)_j at the conditional optimum, so d tau / d value = (J^T r)_j / (s2 tau).
    val = centre + direction * step0
    tol = 1e-7 * tq  # endpoint to about 7 digits of the threshold (held to lmfit conf_interval in the tests)
    inside_val, inside_tau, inside_u = centre, 0.0, u_hat
    outside: tuple[float, float] | None = None
    for _ in range(60):
        at_bound = (direction < 0 and val <= bound) or (direction > 0 and val >= bound)
        if at_bound:
            val = float(bound)
        t, u_new, slope = tau(val, inside_u)
        if abs(t - tq) <= tol:
            return val
        if t < tq:
            if at_bound:
                return float(bound)  # open on this side: the data do not bound the parameter
            inside_val, inside_tau, inside_u = val, t, u_new
        else:
            outside = (val, t)
        newton = val + (tq - t) / slope if slope * direction > 0 and math.isfinite(slope) else None
        if outside is None:
            span = abs(val - centre)
            if newton is None or (newton - val) * direction <= 0:
                newton = val + direction * 2.0 * span
            new = val + direction * min(abs(newton - val), 4.0 * span)
            if abs(new - centre) > 1e8 * (abs(centre) + step0):
                return direction * math.inf
        else:
            o_val, o_tau = outside
            lo_v, hi_v = sorted((inside_val, o_val))
            if abs(hi_v - lo_v) <= 1e-10 * (abs(val) + 1e-300):
                return val
            if newton is not None and lo_v < newton < hi_v:
                new = newton
            else:  # regula falsi inside the bracket
                new = inside_val + (tq - inside_tau) * (o_val - inside_val) / (o_tau - inside_tau)
                if not lo_v < new < hi_v:
                    new = 0.5 * (lo_v + hi_v)
        val = new
    return val


# --------------------------------------------------------------------------- public


def extra_sum_of_squares(rss_reduced: float, df_reduced: int, rss_full: float, df_full: int) -> tuple[float, float]:
    """(F, p) of the extra-sum-of-squares F test of a reduced model against a fuller one that nests it.

    F = ((RSS_r - RSS_f) / (df_r - df_f)) / (RSS_f / df_f) on (df_r - df_f, df_f) degrees of freedom (Bates & Watts
    1988, section 3.5; common practice).  An exact fit of the fuller model gives F = inf and p = 0 unless the
    reduced model is exact too (p = 1).
    """
    from scipy.special import fdtrc

    df_num = df_reduced - df_full
    drop = max(rss_reduced - rss_full, 0.0)
    if rss_full <= 0:
        return (math.inf, 0.0) if drop > 0 else (0.0, 1.0)
    f_val = (drop / df_num) / (rss_full / df_full)
    return f_val, float(fdtrc(df_num, df_full, f_val))


def fit_point(
    model: CurveModel, x: Any, y: Array, start: Sequence[float] | Array, *, sample_weights: Array | None = None
) -> tuple[Array, Array, bool]:
    """The least-squares estimate alone: (theta, fitted values, converged), without statistics or intervals.

    The same solver and fallback as :func:`fit_curve`; for inner loops (iteratively reweighted fits) that
    need only the optimum.
    """
    yv = np.asarray(y, dtype=float)
    p = len(model.parameters)
    lo, hi = _bounds(model)
    given = None if sample_weights is None else np.asarray(sample_weights, dtype=float)
    prob = _Problem(model, x, yv, "none", given)
    u0 = np.asarray(start, dtype=float)
    with np.errstate(all="ignore"):
        sol = _lm(prob, u0, lo, hi, np.zeros(p, dtype=bool))
        if not sol.success or _degenerate(prob, sol, lo, hi):
            retry = _scipy_fallback(prob, u0, lo, hi)
            if retry.success and (retry.cost < sol.cost or not sol.success):
                sol = retry
        fitted = prob.fitted(sol.u)
    return sol.u, fitted, bool(sol.success and math.isfinite(sol.cost))


def fit_curve(
    model: CurveModel,
    x: Any,
    y: Sequence[float] | Array,
    starts: Sequence[Sequence[float]] | Array,
    *,
    weights: str = "none",
    profile: Sequence[int] = (),
    level: float = 0.95,
    step_hints: Sequence[float] | None = None,
    sample_weights: Sequence[float] | Array | None = None,
    extra_params: int = 0,
) -> FitResult:
    """Fit ``model`` to ``(x, y)`` from one or more starting vectors.

    Parameters
    ----------
    model
        The model, its Jacobian and bounds.
    x
        Whatever ``model.function`` takes as its second argument (an array).
    y
        Observations, shape ``(n,)``.
    starts
        One starting vector, or several (the lowest RSS wins).
    weights
        One of :data:`WEIGHTS`.
    profile
        Indices of parameters whose profile-likelihood interval is computed.
    level
        Confidence level of the intervals.
    step_hints
        Optional scale per parameter used to step the profile where no
        standard error exists (a parameter on its bound).
    sample_weights
        Known weights ``w_i`` (variance proportional to ``1/w_i``), for instance from a fitted
        variance model; they replace ``weights`` (which then only labels the result).
    extra_params
        Parameters estimated outside this fit (a variance exponent), counted in AIC, AICc and BIC.

    Raises
    ------
    InputError
        Unknown weighting, non-finite data, too few observations, or weights
        that need positive observations.
    """
    from scipy.special import stdtrit

    yv, start_list, given = _checked_inputs(model, y, starts, weights, level, sample_weights)
    n, p = yv.size, len(model.parameters)
    lo, hi = _bounds(model)
    prob = _Problem(model, x, yv, weights, given)
    fixed = np.zeros(p, dtype=bool)
    best = _best_solution(prob, start_list, lo, hi, fixed)
    u, cost, df = best.u, best.cost, n - p
    tq = float(stdtrit(df, 0.5 + level / 2.0))
    if not math.isfinite(cost):
        return _failed(model, prob, u, weights, n, p, df, best.message or "the model could not be evaluated", level)

    r, jac = (best.resid, best.jac) if best.resid is not None and best.jac is not None else prob.resid_jac(u)
    s2 = cost / df
    exact = cost <= 1e-30 * max(float(yv @ yv), 1e-300)  # noise-free data: no residual variance to work with
    on_bound = ((u <= lo) | (u >= hi)) & (np.isfinite(lo) | np.isfinite(hi))
    free = ~on_bound
    cov_u, leverage = (None, np.zeros(n)) if exact else _covariance(jac, free, s2)
    hint = _profile_steps(jac, s2, [j for j in profile if cov_u is None or not free[j]], step_hints)

    fitted = prob.fitted(u)
    loglik, aic, aicc, bic = _criteria(cost, n, p + 1 + extra_params, prob.weights_at(u), weights != "none" or given is not None, exact)
    stud = np.zeros(n) if exact else _studentized(r, leverage, cost, df)
    profiles = {} if exact else _profiles(prob, u, cost, profile, cov_u, free, hint, tq, s2, lo, hi, fixed)
    estimates = tuple(_estimate(model, j, u, cov_u, free[j], on_bound[j], tq, profiles.get(j), lo[j], hi[j]) for j in range(p))
    cov_rep, warnings = _reported_covariance(model, u, cov_u, free, exact)
    return FitResult(
        model=model.name,
        equation=model.equation,
        success=bool(best.success),
        message=best.message,
        estimates=estimates,
        weights=weights,
        n=n,
        n_params=p,
        df=df,
        rss=cost,
        residual_sd=math.sqrt(s2),
        log_likelihood=loglik,
        aic=aic,
        aicc=aicc,
        bic=bic,
        nfev=prob.nfev,
        fitted=tuple(fitted.tolist()),
        residuals=tuple((yv - fitted).tolist()),
        studentized=tuple(stud.tolist()),
        leverage=tuple(leverage.tolist()),
        theta=tuple(u.tolist()),
        covariance=cov_rep,
        level=level,
        warnings=warnings,
    )


def _bounds(model: CurveModel) -> tuple[Array, Array]:
    """The model's box bounds as arrays (infinite where none is given)."""
    p = len(model.parameters)
    lo = np.asarray(model.lower, dtype=float) if model.lower else np.full(p, -np.inf)
    hi = np.asarray(model.upper, dtype=float) if model.upper else np.full(p, np.inf)
    return lo, hi


def _reported_covariance(
    model: CurveModel, u: Array, cov_u: Array | None, free: NDArray[np.bool_], exact: bool
) -> tuple[tuple[tuple[float, ...], ...] | None, tuple[str, ...]]:
    """The covariance on the reported scale (1/K -> K: derivative -1/u^2) when every parameter is free, and the warnings."""
    cov_rep = None
    if cov_u is not None and free.all():
        d = np.array([(-1.0 / u[j] ** 2 if model.kind(j) == "inverse" else 1.0) for j in range(u.size)])
        cov_rep = tuple(tuple(float(v) for v in row) for row in (cov_u * np.outer(d, d)))
    if exact:
        return cov_rep, (f"{model.name}: the model fits the data exactly; standard errors and intervals are not defined",)
    if cov_u is None:
        return cov_rep, (f"{model.name}: the information matrix is singular; standard errors cannot be estimated",)
    return cov_rep, ()


def _checked_inputs(
    model: CurveModel,
    y: Sequence[float] | Array,
    starts: Sequence[Sequence[float]] | Array,
    weights: str,
    level: float,
    sample_weights: Sequence[float] | Array | None,
) -> tuple[Array, Array, Array | None]:
    """(observations, starting vectors, known weights) of :func:`fit_curve`, checked; InputError names the bad argument."""
    if weights not in WEIGHTS:
        raise InputError("weights", weights, f"is not one of {', '.join(WEIGHTS)}")
    yv = np.asarray(y, dtype=float)
    if yv.ndim != 1 or not np.all(np.isfinite(yv)):
        raise InputError("y", "data", "must be a one-dimensional array of finite numbers")
    start_list = np.atleast_2d(np.asarray(starts, dtype=float))
    p = len(model.parameters)
    if start_list.shape[1] != p:
        raise FitError(f"{model.name}: {start_list.shape[1]} starting values for {p} parameters")
    n = yv.size
    if n <= p:
        raise InputError("data", f"{n} observations", f"are too few for the {model.name} model; expected more than {p}")
    if weights in ("1/y", "1/y2", "poisson") and np.any(yv <= 0):
        bad = int(np.flatnonzero(yv <= 0)[0])
        raise InputError("weights", weights, f"needs positive observations; observation {bad + 1} is {yv[bad]:g} (use weights none)")
    if not 0 < level < 1:
        raise InputError("level", level, "is not between 0 and 1")
    given = None
    if sample_weights is not None:
        given = np.asarray(sample_weights, dtype=float)
        if given.shape != yv.shape or not np.all(np.isfinite(given)) or np.any(given <= 0):
            raise InputError("sample_weights", "array", f"must hold {n} finite weights above zero")
    return yv, start_list, given


def _best_solution(prob: _Problem, start_list: Array, lo: Array, hi: Array, fixed: NDArray[np.bool_]) -> _Solution:
    """The lowest-cost converged solution, trying the starts from the best-looking one; scipy as the fallback."""

    def start_cost(st: Array) -> float:
        rr = prob.resid(np.minimum(np.maximum(st, lo), hi))
        c = float(rr @ rr)
        return c if math.isfinite(c) else math.inf

    best: _Solution | None = None
    ordered = sorted(start_list, key=start_cost) if len(start_list) > 1 else list(start_list)
    for start in ordered:
        if best is not None and best.success:
            break  # the best-looking start converged; others only as fallbacks
        with np.errstate(all="ignore"):
            sol = _lm(prob, start, lo, hi, fixed)
            if not sol.success or _degenerate(prob, sol, lo, hi):
                # scipy's trust-region reflective from the ORIGINAL start (a diverged iterate is a bad place to
                # restart from: NIST MGH10 start 1); also when the solution is a flat, rank-deficient point
                # (NIST BoxBOD start 1), where the lower cost wins
                retry = _scipy_fallback(prob, np.asarray(start, dtype=float), lo, hi)
                if retry.success and (retry.cost < sol.cost or not sol.success):
                    retry.message = f"{sol.message}; retried with scipy from the start: {retry.message}"
                    sol = retry
        if best is None or (sol.success, -sol.cost) > (best.success, -best.cost):
            best = sol
    assert best is not None
    return best


def _profile_steps(jac: Array, s2: float, needed: list[int], step_hints: Sequence[float] | None) -> Array:
    """Step scales for the profile where no standard error exists (unconstrained curvature, else the hints)."""
    hint = np.full(jac.shape[1], np.nan)
    if needed:
        try:
            hint = np.sqrt(np.abs(np.diag(np.linalg.pinv(jac.T @ jac)) * s2))
        except np.linalg.LinAlgError:
            pass
        if step_hints is not None:
            hint = np.where(np.isfinite(hint) & (hint > 0), hint, np.asarray(step_hints, dtype=float))
    return hint


def _covariance(jac: Array, free: NDArray[np.bool_], s2: float) -> tuple[Array | None, Array]:
    """(covariance of the fitting parameters, NaN rows for those on a bound; leverages) from the Jacobian's SVD."""
    p = jac.shape[1]
    cov_u: Array | None = None
    leverage = np.zeros(jac.shape[0])
    jf = jac[:, free]
    if jf.size:
        uu, sv, vt = np.linalg.svd(jf, full_matrices=False)
        if sv.size and sv[-1] > sv[0] * 1e-12 and sv[-1] > 0:
            cf = (vt.T / sv**2) @ vt * s2
            if free.all():
                cov_u = cf
            else:
                cov_u = np.full((p, p), np.nan)
                cov_u[np.ix_(free, free)] = cf
            leverage = np.sum(uu**2, axis=1)
    return cov_u, leverage


def _criteria(cost: float, n: int, k: int, w: Array, weighted: bool, exact: bool) -> tuple[float, float, float, float]:
    """Gaussian log-likelihood (variance estimated), AIC, AICc and BIC with ``k`` parameters (module docstring)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        loglik = (
            -0.5 * n * (math.log(2.0 * math.pi * cost / n) + 1.0) + (0.5 * float(np.sum(np.log(w))) if weighted else 0.0)
            if not exact
            else math.inf
        )
    aic = -2.0 * loglik + 2.0 * k
    aicc = aic + (2.0 * k * (k + 1) / (n - k - 1) if n - k - 1 > 0 else math.inf)
    bic = -2.0 * loglik + k * math.log(n)
    return loglik, aic, aicc, bic


def _studentized(r: Array, leverage: Array, cost: float, df: int) -> Array:
    """Externally studentised residuals (0 where not defined)."""
    n = r.size
    with np.errstate(divide="ignore", invalid="ignore"):
        one_h = np.clip(1.0 - leverage, 1e-12, None)
        s_i2 = (cost - r**2 / one_h) / (df - 1) if df > 1 else np.full(n, np.nan)
        stud = r / np.sqrt(np.clip(s_i2, _TINY, None) * one_h)
    return np.where(np.isfinite(stud), stud, 0.0)


def _profiles(
    prob: _Problem,
    u: Array,
    cost: float,
    profile: Sequence[int],
    cov_u: Array | None,
    free: NDArray[np.bool_],
    hint: Array,
    tq: float,
    s2: float,
    lo: Array,
    hi: Array,
    fixed: NDArray[np.bool_],
) -> dict[int, tuple[float, float]]:
    """Profile-likelihood limits (fitting scale) of each parameter in ``profile``."""
    profiles: dict[int, tuple[float, float]] = {}
    for j in profile:
        se_j = math.sqrt(cov_u[j, j]) if cov_u is not None and free[j] and cov_u[j, j] > 0 else float(hint[j])
        if not math.isfinite(se_j) or se_j <= 0:
            se_j = max(abs(float(u[j])) * 0.5, 1e-12)
        trend = None
        if cov_u is not None and free[j] and cov_u[j, j] > 0:
            trend = np.nan_to_num(cov_u[:, j] / cov_u[j, j], nan=0.0)
        low = _profile_side(prob, u, cost, j, -1, tq * se_j, tq, s2, lo, hi, fixed, trend)
        high = _profile_side(prob, u, cost, j, +1, tq * se_j, tq, s2, lo, hi, fixed, trend)
        profiles[j] = (low, high)
    return profiles


def _estimate(
    model: CurveModel,
    j: int,
    u: Array,
    cov: Array | None,
    free: bool,
    on_bound: bool,
    tq: float,
    prof: tuple[float, float] | None,
    lo: float,
    hi: float,
) -> Estimate:
    name = model.shown_name(j)
    unit = model.units[j] if model.units else ""
    uj = float(u[j])
    se_u = math.sqrt(cov[j, j]) if cov is not None and free and cov[j, j] >= 0 else None
    inverse = model.kind(j) == "inverse"
    if inverse:
        value = math.inf if uj == 0 else 1.0 / uj
        se = se_u / uj**2 if se_u is not None and uj != 0 else None
    else:
        value, se = uj, se_u
    ci_low = ci_high = None
    if se is not None and math.isfinite(value):
        ci_low, ci_high = value - tq * se, value + tq * se
        if inverse or (math.isfinite(lo) and lo >= 0):
            ci_low = max(ci_low, 0.0)
    p_low = p_high = None
    if prof is not None:
        a, b = prof
        if inverse:
            p_low = 0.0 if b == math.inf else (math.inf if b == 0 else 1.0 / b)
            p_high = math.inf if a <= 0 else 1.0 / a
        else:
            p_low, p_high = a, b
    identifiable = not on_bound and se is not None
    note = ""
    if on_bound:
        if inverse and uj == 0:
            note = "runs to infinity: not identifiable (the data show no inhibition through this route)"
        elif inverse:
            note = "runs to zero (stopped at the cap): not identifiable, the model degenerates on these data"
        else:
            note = "on its bound: not identifiable from these data"
    elif se is None:
        note = "standard error not estimable (singular information matrix)"
    elif p_high == math.inf:
        note = "profile interval open above: the data do not bound it"
        identifiable = False
    return Estimate(
        name=name,
        value=value,
        unit=unit,
        std_error=se,
        ci_low=ci_low,
        ci_high=ci_high,
        profile_low=p_low,
        profile_high=p_high,
        at_bound=bool(on_bound),
        identifiable=identifiable,
        note=note,
    )


def _failed(model: CurveModel, prob: _Problem, u: Array, weights: str, n: int, p: int, df: int, message: str, level: float) -> FitResult:
    with np.errstate(all="ignore"):
        fitted = prob.fitted(u)
    inf = math.inf
    return FitResult(
        model=model.name,
        equation=model.equation,
        success=False,
        message=message,
        estimates=tuple(Estimate(name=model.shown_name(j), value=float(u[j]), identifiable=False, note="fit failed") for j in range(p)),
        weights=weights,
        n=n,
        n_params=p,
        df=df,
        rss=inf,
        residual_sd=inf,
        log_likelihood=-inf,
        aic=inf,
        aicc=inf,
        bic=inf,
        nfev=prob.nfev,
        fitted=tuple(float(v) for v in fitted),
        residuals=tuple(0.0 for _ in range(n)),
        studentized=tuple(0.0 for _ in range(n)),
        leverage=tuple(0.0 for _ in range(n)),
        theta=tuple(float(v) for v in u),
        level=level,
        warnings=(f"{model.name}: {message}",),
    )
