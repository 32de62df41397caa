"""A minimal time course: when the interaction starts, how large it gets, when it fades.

The static models give one number at steady state.  This module follows the
same mechanisms in time, with scipy's ODE solvers, to check that number and to
time a dose change.

Model (all rates in 1/h, concentrations in uM for the perpetrator; the victim
is simulated per unit dose and scaled by its dose, so its curves are in the
dose's unit per litre):

Perpetrator (analytic, linear; superposition of doses, standard one-compartment
pharmacokinetics, common practice):

- oral: gut amount G(t) = sum_i D exp(-ka (t - t_i)); plasma
  C(t) = sum_i (D / (V/F)) ka/(ka - ke) (exp(-ke (t - t_i)) - exp(-ka (t - t_i))),
  with ke = ln 2 / t1/2 and V/F chosen so that the steady-state peak equals the
  scenario's Cmax,ss (tmax,ss from dC/dt = 0);
- intravenous: bolus doses, V from Cmax,ss = (D/V) / (1 - exp(-ke tau));
- inhibitor at each site, as in :mod:`interact.exposure` but in time:
  liver inlet I_h(t) = fu,p (C(t) + Fa Fg ka G(t) / (Qh Rb)); enterocyte
  I_g(t) = fu,gut Fa ka G(t) / Qent (oral; I_g = fu,p C for intravenous);
- a metabolite follows the parent: C_m(t) = Cmax,m C(t) / Cmax,ss (formation-rate
  limited, an assumption), unbound fraction fu,m at every site;
- or ``mode="constant"``: every site concentration held at its static value while
  the perpetrator is given (the constant-infusion check), or ``mode="profile"``:
  a user-given plasma profile of the parent.

Enzyme turnover, per enzyme and site (the turnover model behind the static
inactivation and induction terms; Fahmi et al. 2008 structure, from memory;
algebra checked: its steady state is induction x inactivation):

    dE/dt = kdeg (E0 x induction(I) - E) - kobs(I) E,  E0 = 1
    kobs = sum kinact I/(KI,u + I),  induction = 1 + d sum Emax I/(EC50,u + I)

and the activity left is E x 1/(1 + sum I/Ki,u) (competitive, instantaneous).

Victim: oral first-order absorption (ka), gut-wall availability
Fg(t) = 1/(1 + (1/Fg0 - 1) a_gut(t)) (the "Qgut"-type form whose ratio Fg/Fg0 is
the static gut term), well-stirred liver with intrinsic clearance
CLint(t) = CLint0 (sum fm a_e(t) + 1 - sum fm), CLint0 = Qh E_h/(1 - E_h),
CL_h = Qh CLint/(Qh + CLint), Fh = Qh/(Qh + CLint), volume V = CL_h0 / k with
k = ln 2 / t1/2.  All victim clearance is taken as hepatic (the fm fractions
are fractions of hepatic intrinsic clearance): with this choice the dynamic
steady-state AUC ratio equals the static one exactly when the inhibitor
concentrations are constant, for any extraction ratio (algebra: Fh/CL_h =
1/CLint).

Outputs: curves with and without the perpetrator, the exposure ratio over a
moving window W (the victim's dosing interval, or the shortest common multiple
of both intervals so that the ratio does not ripple), its value at the end of
dosing (the dynamic steady-state ratio, shown beside the static one), the time
to reach and stay within (1 - f) of the final effect, the time for the effect to
fade to within (1 - f) of nothing after stopping (on the log scale), and the
same for each enzyme.  No printing here; :mod:`interact.report.timecourse`
formats a :class:`TimeCourse`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

from . import units
from .course.model import DEFAULT_EXTRACTION, MAX_INTERVALS, MODES
from .errors import InputError, emit_warnings
from .exposure import Setting
from .prediction import refuse_routes

if TYPE_CHECKING:
    from .assessment import Assessment

__all__ = [
    "DEFAULT_EXTRACTION",
    "MAX_INTERVALS",
    "MODES",
    "EnzymeCourse",
    "TimeCourse",
    "simulate",
    "time_course_arrays",
]

Array = NDArray[np.float64]


@dataclass(frozen=True, slots=True, kw_only=True)
class EnzymeCourse:
    """Amount of one enzyme at one site over time, relative to baseline (1 = no change)."""

    enzyme: str
    site: str  # "liver" | "gut"
    kdeg_per_h: float | None
    amount: tuple[float, ...]  # E(t)/E0 on TimeCourse.time_h
    activity: tuple[float, ...]  # E(t)/E0 x reversible term
    amount_at_stop: float  # averaged over the window before the last dose's interval ends
    amount_static: float  # induction x inactivation at the static (peak) concentrations
    onset_h: float | None  # time after start to stay within (1 - f) of the change at stop
    recovery_h: float | None  # time after stop to come back within (1 - f) of that change


@dataclass(frozen=True, slots=True, kw_only=True)
class TimeCourse:
    """The simulated course of one scenario (times in h from the perpetrator's first dose)."""

    mode: str
    time_h: tuple[float, ...]
    stop_h: float
    end_h: float
    victim_with: tuple[float, ...]
    victim_without: tuple[float, ...]
    victim_unit: str
    perpetrator_um: tuple[float, ...]  # parent, total plasma
    inlet_unbound_um: tuple[float, ...]  # parent, liver inlet
    enterocyte_um: tuple[float, ...]  # parent
    exposure_ratio: tuple[float, ...]  # AUC over the preceding window / baseline, on time_h
    window_h: float
    enzymes: tuple[EnzymeCourse, ...]
    steady_state_ratio: float
    steady: bool
    static_ratio: float
    cmax_ratio: float
    peak_ratio: float
    peak_h: float
    after_stop_ratio: float  # the largest change after stopping (a rebound when it is on the other side of 1)
    after_stop_h: float  # when, after stopping
    effect_fraction: float
    onset_h: float | None
    offset_h: float | None
    half_offset_h: float | None  # after stopping, time for half the effect (log scale) to go
    settings: tuple[Setting, ...]
    kdeg_used: tuple[Setting, ...]
    warnings: tuple[str, ...]
    solver: str
    nfev: int
    notes: tuple[str, ...] = field(default_factory=tuple)


def simulate(
    assessment: Assessment,
    *,
    days: float = 30.0,
    washout_days: float | None = None,
    mode: str = "regimen",
    profile: tuple[Sequence[float], Sequence[float]] | None = None,
    effect_fraction: float = 0.9,
    points_per_interval: int = 24,
    method: str = "odeint",
    rtol: float = 1e-6,
    atol: float = 1e-9,
    warn: bool = True,
) -> TimeCourse:
    """Simulate the perpetrator's course and its effect on the victim.

    Parameters
    ----------
    assessment
        The static assessment of the scenario (its concentrations, constants,
        kdeg values and static AUC ratio are reused).
    days
        How long the perpetrator is given, days (> 0).
    washout_days
        How long to follow after the last dose, days; by default long enough
        for five enzyme and perpetrator half-lives (at most 120 days).
    mode
        ``"regimen"`` (one-compartment model at the scenario's dose and
        interval), ``"constant"`` (site concentrations held at their static
        values while dosing) or ``"profile"`` (``profile`` = (times in h,
        total plasma concentrations of the parent in uM) from the first dose,
        covering the whole simulated span).
    effect_fraction
        f in (0, 1): onset is the time to reach and stay within (1 - f) of the
        final effect (log scale), offset the time to fall within (1 - f) of it.
    method, rtol, atol
        ``"odeint"`` (scipy.integrate.odeint: LSODA, switching between stiff and
        non-stiff steps, with every dose time passed as a critical point; the
        fastest here) or a scipy.integrate.solve_ivp method (``"LSODA"``,
        ``"BDF"``, ``"RK45"`` ...); tolerances for either.
    warn
        Also emit each warning of the result through Python's ``warnings`` as an
        ``interact.InteractWarning`` by topic (the shells pass False and print them).

    Raises
    ------
    InputError
        A value the time course needs is missing or unusable (named by its key).
    """
    from .course.model import build
    from .course.solve import integrate
    from .course.summary import summarise

    if not 0.0 < effect_fraction < 1.0:
        raise InputError("effect_fraction", effect_fraction, "is not a fraction in (0, 1), e.g. 0.9")
    refuse_routes(assessment.scenario.victim, "the time course")
    model = build(assessment, days=days, washout_days=washout_days, mode=mode, profile=profile)
    solution = integrate(model, method=method, rtol=rtol, atol=atol, points_per_interval=points_per_interval)
    dose = assessment.scenario.victim.dose
    tc = summarise(
        model,
        solution,
        static_ratio=assessment.prediction.total,
        dose=float(dose.magnitude),
        dose_unit=units.unit_text(dose),
        effect_fraction=effect_fraction,
        days=days,
    )
    if warn:
        emit_warnings(zip(model.warnings.categories, model.warnings, strict=True))
    return tc


def time_course_arrays(tc: TimeCourse) -> dict[str, Array]:
    """Plain arrays for plotting a :class:`TimeCourse` (for the terminal app and SVG output).

    Keys: ``time_day``; ``victim_with`` and ``victim_without`` (victim
    concentration, ``tc.victim_unit``); ``exposure_ratio``; ``perpetrator_um``;
    and ``enzyme:<name>:<site>`` (enzyme amount relative to baseline) per
    simulated enzyme.
    """
    out: dict[str, Array] = {
        "time_day": np.asarray(tc.time_h) / 24.0,
        "victim_with": np.asarray(tc.victim_with),
        "victim_without": np.asarray(tc.victim_without),
        "exposure_ratio": np.asarray(tc.exposure_ratio),
        "perpetrator_um": np.asarray(tc.perpetrator_um),
    }
    for e in tc.enzymes:
        out[f"enzyme:{e.enzyme}:{e.site}"] = np.asarray(e.amount)
    return out
