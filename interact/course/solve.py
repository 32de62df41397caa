"""Integrating the time course's model with scipy's ODE solvers.

The state is y = [victim central amount, its AUC, the amount of each followed enzyme], per unit victim dose.
The victim's gut amount is analytic (absorption is not inhibited): G_v(t) = exp(-ka (t - t_last)) / (1 - exp(-ka tau)).
Gut-wall availability Fg(t) = 1/(1 + (1/Fg0 - 1) a_gut(t)) (its ratio Fg/Fg0 is the static gut term); well-stirred
liver CLint(t) = CLint0 (sum fm a_e(t) + 1 - sum fm), CL_h = Qh CLint/(Qh + CLint), Fh = Qh/(Qh + CLint).
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Callable
from dataclasses import dataclass
from warnings import catch_warnings, simplefilter

import numpy as np

from ..errors import InputError
from .forcing import Array, Forcing
from .model import CourseModel


@dataclass(frozen=True, slots=True, kw_only=True)
class Solution:
    """The state on the output grid (h) from the model's start to its end, and the solver's work."""

    t: Array
    y: Array  # (state, time)
    nfev: int
    solver: str


def right_hand_side(model: CourseModel, forcing: Forcing) -> Callable[[float, Array], list[float]]:
    """dy/dt in plain floats (the solver calls it one time at a time).

    Each enzyme's three terms here are the scalar form of :meth:`~interact.course.sites.EnzymeSite.terms` (which
    uses :mod:`interact.prediction`'s ``reversible_term`` and ``induction_term`` on arrays): a few microseconds a
    call in plain floats against over 100 us through numpy on one-element arrays (see
    :meth:`~interact.course.forcing.PerpetratorCourse.forcing`), at about 17,000 calls for 30 days.
    ``tests/extensions/test_dynamic_profiles.py`` holds the two to the same values.
    """
    vic = model.victim
    flat = [
        (x.site == "liver", x.fm, x.turnover, x.kdeg or 0.0, x.inv_ki, x.inact if x.kdeg is not None else (), x.induce) for x in model.sites
    ]
    has_gut = any(x.site == "gut" for x in model.sites)
    qh, clint0, inv_vol, ka, tau, t_start = vic.qh, vic.clint0, 1.0 / vic.vol, vic.ka, vic.tau, model.t_start
    other, oral, gut_factor, fg0 = vic.other, vic.oral, vic.gut_factor, vic.fg0
    absorb0 = ka / (1.0 - math.exp(-ka * tau))
    exp = math.exp

    def rhs(t: float, y: Array) -> list[float]:
        state = y.tolist()  # plain floats: arithmetic on numpy scalars costs several times more
        conc_l, conc_g = forcing(t)
        liver = other
        gut_a = 1.0
        out = [0.0, state[0] * inv_vol]
        ti = 2
        for is_liver, fm, turnover, kd, inv_ki, inact, induce in flat:
            conc = conc_l if is_liver else conc_g
            r = 1.0
            for j, k in inv_ki:
                r += conc[j] * k
            ind = 1.0
            for j, e, ec in induce:
                ind += e * conc[j] / (ec + conc[j])
            if turnover:
                kobs = 0.0
                for j, kin, ki in inact:
                    kobs += kin * conc[j] / (ki + conc[j])
                amount = state[ti]
                out.append(kd * (ind - amount) - kobs * amount)
                ti += 1
            else:
                amount = ind  # no kdeg: induction instantaneous, inactivation left out (warned)
            if is_liver:
                liver += fm * amount / r
            else:
                gut_a = amount / r
        clint = clint0 * liver
        elim = qh * clint / (qh + clint) * inv_vol * state[0]
        if oral:
            since = (t - t_start) % tau
            if tau - since < 1e-9:
                since = 0.0
            fg = 1.0 / (1.0 + gut_factor * gut_a) if has_gut else fg0
            out[0] = absorb0 * exp(-ka * since) * fg * qh / (qh + clint) - elim
        else:
            out[0] = -elim
        return out

    return rhs


def baseline(model: CourseModel, t: Array) -> Array:
    """The victim's concentration without the perpetrator (analytic periodic steady state, per unit dose) on ``t``."""
    v = model.victim
    tp = np.mod(t - model.t_start, v.tau)
    if v.oral:
        return (
            v.f0
            / v.vol
            * v.ka
            / (v.ka - v.k)
            * (np.exp(-v.k * tp) / (1.0 - math.exp(-v.k * v.tau)) - np.exp(-v.ka * tp) / (1.0 - math.exp(-v.ka * v.tau)))
        )
    return 1.0 / v.vol * np.exp(-v.k * tp) / (1.0 - math.exp(-v.k * v.tau))


def _step(
    rhs: Callable[[float, Array], list[float]], y: Array, grid: Array, crit: Array, method: str, rtol: float, atol: float
) -> tuple[Array, Array, int]:
    """One segment between breakpoints: the state on ``grid`` and the number of right-hand-side calls."""
    from scipy.integrate import odeint, solve_ivp

    if method == "odeint":
        with catch_warnings():  # a failure is read from info below and raised as a named error
            simplefilter("ignore")
            out, info = odeint(
                rhs, y, grid, tfirst=True, rtol=rtol, atol=atol, tcrit=crit if crit.size else None, full_output=True, mxstep=50000
            )
        if info["message"] != "Integration successful.":
            raise InputError("time course", f"solver failure at t = {grid[0]:g} h", f"could not be integrated ({info['message']})")
        return grid, out.T, int(info["nfe"][-1])
    sol = solve_ivp(rhs, (grid[0], grid[-1]), y, method=method, t_eval=grid, rtol=rtol, atol=atol)
    if not sol.success:
        raise InputError("time course", f"solver failure at t = {grid[0]:g} h", f"could not be integrated ({sol.message})")
    return sol.t, sol.y, int(sol.nfev)


def integrate(model: CourseModel, *, method: str, rtol: float, atol: float, points_per_interval: int) -> Solution:
    """Integrate from the baseline steady state, segment by segment between start, first dose, stop and end.

    ``method`` is ``"odeint"`` (LSODA with every dose time as a critical point) or a ``solve_ivp`` method.
    """
    v = model.victim
    t_start, end, tau = model.t_start, model.end, v.tau
    n_e = sum(1 for x in model.sites if x.turnover)
    # initial state at t_start (a victim dose time): the baseline steady state
    if v.oral:
        c0 = v.f0 / v.vol * v.ka / (v.ka - v.k) * (1.0 / (1.0 - math.exp(-v.k * tau)) - 1.0 / (1.0 - math.exp(-v.ka * tau)))
    else:
        c0 = 1.0 / v.vol * math.exp(-v.k * tau) / (1.0 - math.exp(-v.k * tau))  # trough; the bolus is added below
    y = np.array([c0 * v.vol, 0.0, *([1.0] * n_e)], dtype=float)
    # an intravenous victim's doses are jumps in amount: each one starts a segment
    victim_times = {round(t_start + j * tau, 9) for j in range(round((end - t_start) / tau))}
    bounds = {round(t_start, 9), 0.0, round(model.stop, 9), round(end, 9)} | (set() if v.oral else victim_times)
    edges = sorted(b for b in bounds if t_start - 1e-9 <= b <= end + 1e-9)
    kinks = victim_times | ({round(i * model.perp.tau, 9) for i in range(model.perp.n_doses)} if model.mode != "constant" else set())
    grid_all = np.union1d(np.round(np.arange(t_start, end + 1e-9, tau / max(points_per_interval, 4)), 9), np.array(edges))
    rhs = right_hand_side(model, model.perp.forcing())
    ts_all: list[Array] = []
    ys_all: list[Array] = []
    nfev = 0
    for a_, b_ in itertools.pairwise(edges):
        if not v.oral and round(a_, 9) in victim_times:
            y[0] += 1.0
        grid = grid_all[(grid_all >= a_ - 1e-9) & (grid_all <= b_ + 1e-9)]
        crit = np.array(sorted(k for k in kinks if a_ < k < b_))
        sol_t, sol_y, calls = _step(rhs, y, grid, crit, method, rtol, atol)
        nfev += calls
        last_seg = b_ >= edges[-1] - 1e-9
        ts_all.append(sol_t if last_seg else sol_t[:-1])
        ys_all.append(sol_y if last_seg else sol_y[:, :-1])
        y = sol_y[:, -1].copy()
    solver = "scipy.integrate.odeint (LSODA)" if method == "odeint" else f"scipy.integrate.solve_ivp {method}"
    return Solution(t=np.concatenate(ts_all), y=np.concatenate(ys_all, axis=1), nfev=nfev, solver=f"{solver}, rtol {rtol:g}, atol {atol:g}")
