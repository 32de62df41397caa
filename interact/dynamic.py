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

import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Final
from warnings import catch_warnings, simplefilter

import numpy as np
from numpy.typing import NDArray

from . import units
from .errors import FromMemoryWarning, InputError, ModelLimitWarning, emit_warnings
from .exposure import Setting
from .prediction import refuse_routes
from .tables import load_physiology

if TYPE_CHECKING:
    import pint

    from .assessment import Assessment

__all__ = [
    "MODES",
    "EnzymeCourse",
    "TimeCourse",
    "simulate",
    "time_course_arrays",
]

MODES: Final = ("regimen", "constant", "profile")
#: victim hepatic extraction assumed when not given (affects curve shape and Cmax, not the steady-state AUC ratio)
DEFAULT_EXTRACTION: Final = 0.3
LN2: Final = math.log(2.0)
_MAX_WASHOUT_H: Final = 120 * 24.0

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


# --------------------------------------------------------------------------- perpetrator


def _geometric(t: float, tau: float, m: int, k: float) -> float:
    """sum_{i=0}^{m-1} exp(-k (t - i tau)) for t >= (m - 1) tau (doses given so far)."""
    if m <= 0:
        return 0.0
    last = (m - 1) * tau
    q = math.exp(-k * tau)
    return math.exp(-k * (t - last)) * ((1.0 - q**m) / (1.0 - q) if q < 1.0 else float(m))


def _geometric_v(t: Array, tau: float, m: Array, k: float) -> Array:
    last = (m - 1) * tau
    q = math.exp(-k * tau)
    out = np.exp(-k * (t - last)) * (1.0 - q**m) / (1.0 - q)
    return np.where(m > 0, out, 0.0)


def _ss_shape(ka: float, ke: float, tau: float) -> tuple[float, float]:
    """Peak of the steady-state one-compartment oral curve per unit D/V, and its time."""
    a = ka * (1.0 - math.exp(-ke * tau))
    b = ke * (1.0 - math.exp(-ka * tau))
    tmax = math.log(a / b) / (ka - ke)
    tmax = min(max(tmax, 0.0), tau)
    shape = ka / (ka - ke) * (math.exp(-ke * tmax) / (1.0 - math.exp(-ke * tau)) - math.exp(-ka * tmax) / (1.0 - math.exp(-ka * tau)))
    return shape, tmax


@dataclass(frozen=True, slots=True, kw_only=True)
class _Perp:
    mode: str
    oral: bool
    dose: float  # umol
    tau: float
    n_doses: int
    stop: float
    ka: float
    ke: float
    vf: float  # L (V/F, or V for intravenous)
    fu: float
    portal: float  # Fa Fg / (Qh Rb), 1/(L/h)
    enterocyte: float  # fu_gut Fa / Qent, 1/(L/h)
    cmax: float
    # per species (index 0 = parent): (unbound fraction, Cmax_species / Cmax_parent)
    metabolites: tuple[tuple[float, float], ...]
    const_inlet: tuple[float, ...]
    const_ent: tuple[float, ...]
    profile_t: Array | None = None
    profile_c: Array | None = None

    def doses_by(self, t: float) -> int:
        """Doses given at or before t (t at a dose time counts that dose)."""
        if t < -1e-9:
            return 0
        return min(math.floor(t / self.tau + 1e-9) + 1, self.n_doses)

    def sites(self, t: float, m: int, on: bool) -> tuple[list[float], list[float]]:
        """Unbound liver-inlet and enterocyte concentrations (uM) per species at time t."""
        n = 1 + len(self.metabolites)
        if t < -1e-9:
            return [0.0] * n, [0.0] * n
        if self.mode == "constant":
            if not on:
                return [0.0] * n, [0.0] * n
            return list(self.const_inlet), list(self.const_ent)
        g = self.dose * _geometric(t, self.tau, m, self.ka) if self.oral else 0.0
        if self.mode == "profile":
            assert self.profile_t is not None and self.profile_c is not None
            c = float(np.interp(t, self.profile_t, self.profile_c))
        elif self.oral:
            c = (
                self.dose
                / self.vf
                * self.ka
                / (self.ka - self.ke)
                * (_geometric(t, self.tau, m, self.ke) - _geometric(t, self.tau, m, self.ka))
            )
        else:
            c = self.dose / self.vf * _geometric(t, self.tau, m, self.ke)
        inlet = [self.fu * (c + self.portal * self.ka * g)]
        ent = [self.enterocyte * self.ka * g if self.oral else self.fu * c]
        for fu_m, scale in self.metabolites:
            cm = fu_m * scale * c
            inlet.append(cm)
            ent.append(cm)
        return inlet, ent

    def plasma_v(self, t: Array) -> tuple[Array, Array, Array]:
        """Vectorised parent plasma total, liver inlet unbound and enterocyte (uM) on a time grid."""
        m = np.where(t < -1e-9, 0, np.minimum(np.floor(t / self.tau + 1e-9) + 1, self.n_doses)).astype(float)
        if self.mode == "constant":
            on = (t >= -1e-9) & (t < self.stop - 1e-9)
            inlet = np.where(on, self.const_inlet[0], 0.0)
            ent = np.where(on, self.const_ent[0], 0.0)
            return np.where(on, self.cmax, 0.0), inlet, ent
        g = self.dose * _geometric_v(t, self.tau, m, self.ka) if self.oral else np.zeros_like(t)
        if self.mode == "profile":
            assert self.profile_t is not None and self.profile_c is not None
            c = np.interp(t, self.profile_t, self.profile_c)
        elif self.oral:
            c = (
                self.dose
                / self.vf
                * self.ka
                / (self.ka - self.ke)
                * (_geometric_v(t, self.tau, m, self.ke) - _geometric_v(t, self.tau, m, self.ka))
            )
        else:
            c = self.dose / self.vf * _geometric_v(t, self.tau, m, self.ke)
        c = np.where(t < 0, 0.0, c)
        inlet = self.fu * (c + self.portal * self.ka * g)
        ent = self.enterocyte * self.ka * g if self.oral else self.fu * c
        return c, inlet, ent


def _fast_forcing(perp: _Perp):  # type: ignore[no-untyped-def]
    """``t -> (liver-inlet, enterocyte)`` unbound concentrations per species; the same as
    :meth:`_Perp.sites` (a test keeps them equal), specialised for speed in the ODE's right-hand side."""
    if perp.mode != "regimen":

        def generic(t: float) -> tuple[list[float], list[float]]:
            return perp.sites(t, perp.doses_by(t), t < perp.stop - 1e-9)

        return generic
    exp = math.exp
    ka, ke, tau, n = perp.ka, perp.ke, perp.tau, perp.n_doses
    inv_tau = 1.0 / tau
    qa, qe = exp(-ka * tau), exp(-ke * tau)
    geo_a = [(1.0 - qa**m) / (1.0 - qa) for m in range(n + 1)]
    geo_e = [(1.0 - qe**m) / (1.0 - qe) for m in range(n + 1)]
    dose, fu, oral = perp.dose, perp.fu, perp.oral
    coef = dose / perp.vf * (ka / (ka - ke) if oral else 1.0)
    portal = perp.portal * ka * dose
    ent = perp.enterocyte * ka * dose
    mets = [fu_m * scale for fu_m, scale in perp.metabolites]
    zero = [0.0] * (1 + len(mets))

    def regimen(t: float) -> tuple[list[float], list[float]]:
        if t < -1e-9:
            return zero, zero
        m = int(t * inv_tau + 1e-9) + 1
        if m > n:
            m = n
        dt = t - (m - 1) * tau
        s_e = exp(-ke * dt) * geo_e[m]
        if oral:
            s_a = exp(-ka * dt) * geo_a[m]
            c = coef * (s_e - s_a)
            inlet = [fu * c + fu * portal * s_a]
            gut = [ent * s_a]
        else:
            c = coef * s_e
            inlet = [fu * c]
            gut = [fu * c]
        for k in mets:
            inlet.append(k * c)
            gut.append(k * c)
        return inlet, gut

    return regimen


# --------------------------------------------------------------------------- enzyme terms


@dataclass(frozen=True, slots=True, kw_only=True)
class _Site:
    enzyme: str
    site: str
    fm: float  # liver: the pathway's fm; gut: 0 (enters through Fg)
    kdeg: float | None
    inv_ki: tuple[tuple[int, float], ...]
    inact: tuple[tuple[int, float, float], ...]  # (species, kinact 1/h, KI uM)
    induce: tuple[tuple[int, float, float], ...]  # (species, d x Emax, EC50 uM)

    @property
    def turnover(self) -> bool:
        return self.kdeg is not None and bool(self.inact or self.induce)

    def terms(self, conc: Sequence[float]) -> tuple[float, float, float]:
        """(reversible term, kobs 1/h, induction fold) at the given species concentrations."""
        r = sum(conc[j] * k for j, k in self.inv_ki)
        kobs = sum(kin * conc[j] / (ki + conc[j]) for j, kin, ki in self.inact) if self.kdeg is not None else 0.0
        ind = 1.0 + sum(e * conc[j] / (ec + conc[j]) for j, e, ec in self.induce)
        return 1.0 / (1.0 + r), kobs, ind


def _sites(a: Assessment, kdeg: dict[str, tuple[float | None, float | None]], gut_enzyme: str | None) -> list[_Site]:
    out = []
    enzymes = [(pw.enzyme, pw.fm, "liver") for pw in a.scenario.victim.pathways]
    if gut_enzyme is not None:
        enzymes.append((gut_enzyme, 0.0, "gut"))
    for enzyme, fm, site in enzymes:
        acting = [c for c in a.constants if c.target == enzyme]
        k = kdeg.get(enzyme, (None, None))[0 if site == "liver" else 1]
        out.append(
            _Site(
                enzyme=enzyme,
                site=site,
                fm=fm,
                kdeg=k,
                inv_ki=tuple((c.species_index, 1.0 / c.ki_u_um) for c in acting if c.ki_u_um is not None),
                inact=tuple(
                    (c.species_index, c.kinact_per_h, c.ki_inact_u_um)
                    for c in acting
                    if c.kinact_per_h is not None and c.ki_inact_u_um is not None
                ),
                induce=tuple(
                    (c.species_index, c.calibration * c.emax, c.ec50_u_um) for c in acting if c.emax is not None and c.ec50_u_um is not None
                ),
            )
        )
    return out


# --------------------------------------------------------------------------- helpers


#: the time course's budget: beyond these it refuses before starting (memory and time grow with each interval)
MAX_INTERVALS: Final = 10_000
#: the range of time and rate inputs the solver handles accurately and fast (hours, 1/h)
_TIME_RANGE_H: Final = (1.0 / 60.0, 24.0 * 366.0)
_RATE_RANGE_PER_H: Final = (1e-3, 1e3)


def _bounded(field: str, value: float, low: float, high: float, unit: str, why: str) -> None:
    """Refuse, with the field named, a time or rate outside the range the time course handles."""
    if not (math.isfinite(value) and low <= value <= high):
        raise InputError(field, f"{value:.4g} {unit}", f"is outside {low:.4g}-{high:.4g} {unit}, {why}")


def _hours(q: pint.Quantity | None) -> float | None:
    return None if q is None else units.magnitude(q, "h")


def _lcm_window(tau_v: float, tau_p: float) -> float:
    """Shortest multiple of the victim's interval that is also a multiple of the perpetrator's (within 1 min), <= 1 week."""
    a, b = round(tau_v * 60), round(tau_p * 60)
    if a > 0 and b > 0 and abs(a - tau_v * 60) < 1e-6 and abs(b - tau_p * 60) < 1e-6:
        lcm = a * b // math.gcd(a, b) / 60.0
        if lcm <= 168.0 + 1e-9:
            return lcm
    return tau_v * math.ceil(tau_p / tau_v - 1e-9)


def _settle(t: Array, y: Array, target: float, band: float, start: float, stop: float) -> float | None:
    """Earliest time in [start, stop] after which |y - target| <= band throughout; None if never."""
    sel = (t >= start - 1e-9) & (t <= stop + 1e-9)
    ts, ys = t[sel], y[sel]
    if ts.size == 0:
        return None
    outside = np.abs(ys - target) > band
    if not outside.any():
        return float(ts[0] - start)
    last = int(np.flatnonzero(outside)[-1])
    if last == ts.size - 1:
        return None
    return float(ts[last + 1] - start)


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
    from scipy.integrate import odeint, solve_ivp

    from .assessment import _kdeg, _Warnings

    s = assessment.scenario
    refuse_routes(s.victim, "the time course")
    p = s.perpetrator
    v = s.victim
    warnings = _Warnings()  # texts with their InteractWarning topic
    notes: list[str] = []
    if mode not in MODES:
        raise InputError("mode", mode, f"is not one of {', '.join(MODES)}")
    if not (isinstance(days, (int, float)) and math.isfinite(days) and 0 < days <= 365):
        raise InputError("days", days, "is not a number of days in (0, 365]")
    if washout_days is not None and not (math.isfinite(washout_days) and 0 < washout_days <= 365):
        raise InputError("washout_days", washout_days, "is not a number of days in (0, 365]")
    if not 0.0 < effect_fraction < 1.0:
        raise InputError("effect_fraction", effect_fraction, "is not a fraction in (0, 1), e.g. 0.9")
    tau_p = _hours(p.interval)
    if tau_p is None:
        raise InputError("perpetrator.interval", None, 'is missing; the time course needs the dosing interval, e.g. "24 h"')
    half_p = _hours(p.half_life)
    if half_p is None and mode == "regimen":
        raise InputError("perpetrator.half_life", None, 'is missing; the time course needs the elimination half-life, e.g. "18 h"')
    half_v = _hours(v.half_life)
    if half_v is None:
        raise InputError("victim.half_life", None, 'is missing; the time course needs the victim\'s half-life, e.g. "6 h"')
    tau_v = units.magnitude(v.interval, "h")
    stop = 24.0 * days
    for name, hours in (
        ("perpetrator.interval", tau_p),
        ("victim.interval", tau_v),
        ("perpetrator.half_life", half_p),
        ("victim.half_life", half_v),
    ):
        if hours is not None:
            _bounded(name, hours, *_TIME_RANGE_H, "h", "the range the time course can follow (1 min to a year)")
    for name, count in (("perpetrator.interval", stop / tau_p), ("victim.interval", (stop + 24.0 * (washout_days or 0.0)) / tau_v)):
        if count > MAX_INTERVALS:
            raise InputError(
                name,
                f"{tau_p if name.startswith('perp') else tau_v:.4g} h",
                f"is too short for a time course of {days:g} days: {count:,.0f} dosing intervals, more than the "
                f"{MAX_INTERVALS:,} it follows; expected a longer interval or fewer --days",
            )
    settings: list[Setting] = []

    # -- physiology and the perpetrator
    st = {x.name: x for x in assessment.settings}
    qh = st["hepatic_blood_flow"].value * 60.0  # L/h
    qent = st["enterocytic_blood_flow"].value * 60.0
    ka_p = st["absorption_rate"].value * 60.0
    if p.route == "oral":
        _bounded("perpetrator.ka", ka_p, *_RATE_RANGE_PER_H, "1/h", "the range the time course can follow")
    sp = assessment.species
    parent = sp[0]
    oral = p.route == "oral"
    dose = parent.dose_umol
    cmax = parent.cmax_um
    n_doses = max(1, math.ceil(stop / tau_p - 1e-9))
    ke = LN2 / half_p if half_p is not None else 0.0
    vf = 0.0
    if mode == "regimen":
        assert half_p is not None
        if oral:
            if abs(ka_p - ke) < 1e-6 * ka_p:
                ka_p *= 1.0 + 1e-4  # the flip-flop singularity: an imperceptible shift keeps the formula finite
            shape, tmax = _ss_shape(ka_p, ke, tau_p)
            vf = dose * shape / cmax
            settings.append(
                Setting(
                    name="perpetrator_vf",
                    label="Perpetrator V/F (fitted to Cmax,ss)",
                    value=vf,
                    unit="L",
                    origin="derived",
                    note=f"one-compartment oral model; tmax,ss {tmax:.3g} h",
                )
            )
        else:
            vf = dose / cmax / (1.0 - math.exp(-ke * tau_p))
            settings.append(
                Setting(
                    name="perpetrator_v",
                    label="Perpetrator V (fitted to Cmax,ss)",
                    value=vf,
                    unit="L",
                    origin="derived",
                    note="one-compartment intravenous bolus model",
                )
            )
        settings.append(Setting(name="perpetrator_half_life", label="Perpetrator half-life", value=half_p, unit="h", origin="given"))
        acc = 1.0 / (1.0 - math.exp(-ke * tau_p))
        if acc > 1.0 + 1e-9:
            notes.append(f"perpetrator accumulation factor {acc:.3g}: steady state after about {5 * half_p / 24:.3g} days")
    profile_t = profile_c = None
    if mode == "profile":
        if profile is None:
            raise InputError("profile", None, "is missing; mode 'profile' needs (times in h, plasma concentrations in uM)")
        profile_t = np.asarray(profile[0], dtype=float)
        profile_c = np.asarray(profile[1], dtype=float)
        if profile_t.ndim != 1 or profile_t.shape != profile_c.shape or profile_t.size < 2:
            raise InputError("profile", f"{profile_t.size} times, {profile_c.size} values", "expected two sequences of equal length >= 2")
        if not (np.all(np.isfinite(profile_t)) and np.all(np.isfinite(profile_c)) and np.all(profile_c >= 0)):
            raise InputError("profile", "non-finite or negative values", "expected finite times and concentrations >= 0")
        if np.any(np.diff(profile_t) <= 0) or profile_t[0] > 0:
            raise InputError("profile", f"times from {profile_t[0]:g} h", "expected strictly increasing times starting at or before 0 h")
    fa_fg = st["fa_fg"].value
    fa = st["fraction_absorbed"].value
    rb = st["blood_plasma_ratio"].value
    fu_gut = st["fu_gut"].value
    perp = _Perp(
        mode=mode,
        oral=oral,
        dose=dose,
        tau=tau_p,
        n_doses=n_doses,
        stop=stop,
        ka=ka_p,
        ke=ke,
        vf=vf,
        fu=parent.fu_plasma_used,
        portal=fa_fg / (qh * rb),
        enterocyte=fu_gut * fa / qent,
        cmax=cmax,
        metabolites=tuple((m.fu_plasma_used, m.cmax_um / cmax) for m in sp[1:]),
        const_inlet=tuple(x.unbound_inlet_um for x in sp),
        const_ent=tuple(x.enterocyte_um for x in sp),
        profile_t=profile_t,
        profile_c=profile_c,
    )
    if len(sp) > 1 and mode != "constant":
        notes.append("metabolite concentrations follow the parent's profile scaled to their Cmax (formation-rate limited; an assumption)")

    # -- enzymes
    gut_enzyme = assessment.prediction.gut_enzyme
    fg0 = assessment.prediction.fg_used
    if v.route == "oral" and fg0 < 1e-3:  # the gut term 1/Fg of the curves overflows long before this
        raise InputError("victim.fg", f"{fg0:.3g}", "is below 0.001, the smallest Fg the time course can follow")
    victim_oral = v.route == "oral"
    if not victim_oral or fg0 >= 1.0:
        gut_enzyme = None
    affected = {pw.enzyme for pw in v.pathways} | ({gut_enzyme} if gut_enzyme else set())
    needed = {c.target for c in assessment.constants if c.kinact_per_h is not None or c.emax is not None} & affected
    kdeg, kdeg_used = _kdeg(s, assessment.constants, needed)
    for enzyme, pair in kdeg.items():
        for where, rate in zip(("liver", "gut"), pair, strict=True):
            if rate is not None:
                _bounded(f"turnover.{enzyme}.kdeg_{where}", rate, 1e-4, _RATE_RANGE_PER_H[1], "1/h", "the range the time course can follow")
    sites = _sites(assessment, kdeg, gut_enzyme)
    for site in sites:
        if (site.inact or site.induce) and site.kdeg is None:
            warnings.append(
                f"No {site.site} kdeg for {site.enzyme}: its time-dependent inhibition is left out and its induction "
                "is taken as instantaneous; give it under [[turnover]]."
            )  # AssumptionWarning (the default topic)
    for kd in kdeg_used:
        if kd.from_memory:
            warnings.append(
                f"{kd.label} = {kd.value:.4g} 1/h is from memory ({kd.source}): the onset and offset times scale with 1/kdeg.",
                FromMemoryWarning,
            )
    turn = [i for i, x in enumerate(sites) if x.turnover]
    liver_sites = [x for x in sites if x.site == "liver"]
    gut_site = next((x for x in sites if x.site == "gut"), None)
    fm_sum = sum(x.fm for x in liver_sites)

    # -- the victim
    if v.ka is not None:
        ka_v_q = units.magnitude(v.ka, "1/h")
    else:  # the table's default absorption rate (not the perpetrator's own, which may have been given)
        row = next(x for x in load_physiology() if x.name == "absorption_rate")
        ka_v_q = units.magnitude(units.parse(row.value, "rate", field="physiology.absorption_rate"), "1/h")
    settings.append(
        Setting(
            name="victim_ka",
            label="Victim absorption rate ka",
            value=ka_v_q,
            unit="1/h",
            origin="given" if v.ka is not None else "default",
            source=""
            if v.ka is not None
            else "the default perpetrator ka ([@dmd2019inlet], [@jpetverinurad], [@cpt2015]) reused for the object drug",
            status="" if v.ka is not None else "assumption",
        )
    )
    if v.route == "oral":
        _bounded("victim.ka", ka_v_q, *_RATE_RANGE_PER_H, "1/h", "the range the time course can follow")
    e_h = v.hepatic_extraction if v.hepatic_extraction is not None else DEFAULT_EXTRACTION
    if e_h < 1e-4 or e_h > 0.9999:
        raise InputError("victim.hepatic_extraction", e_h, "is outside 0.0001-0.9999, the range the time course can follow")
    settings.append(
        Setting(
            name="victim_hepatic_extraction",
            label="Victim hepatic extraction E_h",
            value=e_h,
            unit="",
            origin="given" if v.hepatic_extraction is not None else "default",
            source="" if v.hepatic_extraction is not None else "assumed; shapes the curves and Cmax, not the steady-state AUC ratio",
            status="" if v.hepatic_extraction is not None else "assumption",
        )
    )
    settings.append(Setting(name="victim_half_life", label="Victim half-life", value=half_v, unit="h", origin="given"))
    k_v = LN2 / half_v
    clint0 = qh * e_h / (1.0 - e_h)
    cl0 = qh * clint0 / (qh + clint0)
    vol = cl0 / k_v
    fh0 = qh / (qh + clint0)
    f0 = (fg0 if victim_oral else 1.0) * (fh0 if victim_oral else 1.0)
    ka_v = ka_v_q
    if victim_oral and abs(ka_v - k_v) < 1e-6 * ka_v:
        ka_v *= 1.0 + 1e-4
    settings.append(Setting(name="victim_volume", label="Victim volume (from CL_h and half-life)", value=vol, unit="L", origin="derived"))
    auc_tau0 = f0 / cl0  # per unit dose, over one interval at steady state
    gut_factor = (1.0 / fg0 - 1.0) if gut_site is not None else 0.0
    notes.append("all victim clearance is taken as hepatic (well-stirred); fm values are fractions of hepatic intrinsic clearance")
    if not victim_oral and e_h > 0.1:
        notes.append(
            f"intravenous victim with hepatic extraction {e_h:.2g}: blood flow limits the change in clearance, so the "
            "dynamic ratio is smaller than the static one, which assumes low extraction for this route"
        )

    window = _lcm_window(tau_v, tau_p)
    if mode == "constant":
        window = tau_v
    t_start = -window  # a window multiple of the victim's interval, so the victim is at a dose time
    slowest = min([x.kdeg for x in sites if x.turnover and x.kdeg] or [1.0])
    wash = (
        24.0 * washout_days
        if washout_days is not None
        else min(_MAX_WASHOUT_H, max(5.0 / slowest, 5.0 * (half_p or 0.0) + 24.0, 2.0 * window, 48.0))
    )
    end = stop + wash
    end = tau_v * math.ceil(end / tau_v - 1e-9)
    if (end - t_start) / tau_v > MAX_INTERVALS:
        raise InputError(
            "victim.interval",
            f"{tau_v:.4g} h",
            f"is too short for this time course ({(end + window) / 24:.4g} days with follow-up): "
            f"{(end - t_start) / tau_v:,.0f} dosing intervals, more than the {MAX_INTERVALS:,} it follows",
        )
    if mode == "profile":
        assert profile_t is not None
        if profile_t[-1] < end - 1e-9:
            raise InputError(
                "profile",
                f"ends at {profile_t[-1]:g} h",
                f"must cover the simulated span to {end:g} h (dosing {stop:g} h + follow-up)",
            )

    # -- the ODE: y = [victim central amount, AUC, E for each turnover site], per unit victim dose.
    # The victim's gut amount is analytic (absorption is not inhibited): G_v(t) = exp(-ka (t - t_last)) / (1 - exp(-ka tau)).
    n_e = len(turn)
    qv = math.exp(-ka_v * tau_v)
    flat = [(x.site == "liver", x.fm, x.turnover, x.kdeg or 0.0, x.inv_ki, x.inact if x.kdeg is not None else (), x.induce) for x in sites]
    has_gut = gut_site is not None
    other = 1.0 - fm_sum
    inv_vol = 1.0 / vol
    exp = math.exp

    forcing = _fast_forcing(perp)

    def rhs(t: float, y: Array) -> list[float]:
        conc_l, conc_g = forcing(t)
        liver = other
        gut_a = 1.0
        d_e = []
        ti = 0
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
                amount = y[2 + ti]
                d_e.append(kd * (ind - amount) - kobs * amount)
                ti += 1
            else:
                amount = ind  # no kdeg: induction instantaneous, inactivation left out (warned)
            if is_liver:
                liver += fm * amount / r
            else:
                gut_a = amount / r
        clint = clint0 * liver
        elim = qh * clint / (qh + clint) * inv_vol * y[0]
        if victim_oral:
            since = (t - t_start) % tau_v
            if tau_v - since < 1e-9:
                since = 0.0
            fg = 1.0 / (1.0 + gut_factor * gut_a) if has_gut else fg0
            absorb = ka_v * exp(-ka_v * since) / (1.0 - qv) * fg * qh / (qh + clint)
            return [absorb - elim, y[0] * inv_vol, *d_e]
        return [-elim, y[0] * inv_vol, *d_e]

    # initial state at t_start (a victim dose time): the baseline steady state
    if victim_oral:
        c0 = f0 / vol * ka_v / (ka_v - k_v) * (1.0 / (1.0 - math.exp(-k_v * tau_v)) - 1.0 / (1.0 - qv))
    else:
        c0 = 1.0 / vol * math.exp(-k_v * tau_v) / (1.0 - math.exp(-k_v * tau_v))  # trough; the bolus is added below
    y = np.array([c0 * vol, 0.0, *([1.0] * n_e)], dtype=float)

    # segments: start, first dose, stop, end (and, for an intravenous victim, each victim dose: a jump in amount)
    n_v = round((end - t_start) / tau_v)
    victim_times = {round(t_start + j * tau_v, 9) for j in range(n_v)}
    bounds = {round(t_start, 9), 0.0, round(stop, 9), round(end, 9)}
    if not victim_oral:
        bounds |= victim_times
    edges = sorted(b for b in bounds if t_start - 1e-9 <= b <= end + 1e-9)
    kinks = victim_times | ({round(i * tau_p, 9) for i in range(n_doses)} if mode != "constant" else set())
    step = tau_v / max(points_per_interval, 4)
    grid_all = np.union1d(np.round(np.arange(t_start, end + 1e-9, step), 9), np.array(edges))
    ts_all: list[Array] = []
    ys_all: list[Array] = []
    nfev = 0
    for a_, b_ in itertools.pairwise(edges):
        if not victim_oral and round(a_, 9) in victim_times:
            y[0] += 1.0
        grid = grid_all[(grid_all >= a_ - 1e-9) & (grid_all <= b_ + 1e-9)]
        last_seg = b_ >= edges[-1] - 1e-9
        if method == "odeint":
            crit = np.array(sorted(k for k in kinks if a_ < k < b_))
            with catch_warnings():  # a failure is read from info below and raised as a named error
                simplefilter("ignore")
                out, info = odeint(
                    rhs, y, grid, tfirst=True, rtol=rtol, atol=atol, tcrit=crit if crit.size else None, full_output=True, mxstep=50000
                )
            if info["message"] != "Integration successful.":
                raise InputError("time course", f"solver failure at t = {a_:g} h", f"could not be integrated ({info['message']})")
            nfev += int(info["nfe"][-1])
            sol_t, sol_y = grid, out.T
        else:
            sol = solve_ivp(rhs, (a_, b_), y, method=method, t_eval=grid, rtol=rtol, atol=atol)
            if not sol.success:
                raise InputError("time course", f"solver failure at t = {a_:g} h", f"could not be integrated ({sol.message})")
            nfev += int(sol.nfev)
            sol_t, sol_y = sol.t, sol.y
        ts_all.append(sol_t if last_seg else sol_t[:-1])
        ys_all.append(sol_y if last_seg else sol_y[:, :-1])
        y = sol_y[:, -1].copy()
    t = np.concatenate(ts_all)
    Y = np.concatenate(ys_all, axis=1)
    conc_with = Y[0] / vol

    # baseline (analytic periodic steady state)
    tp = np.mod(t - t_start, tau_v)
    if victim_oral:
        conc_without = (
            f0 / vol * ka_v / (ka_v - k_v) * (np.exp(-k_v * tp) / (1.0 - math.exp(-k_v * tau_v)) - np.exp(-ka_v * tp) / (1.0 - qv))
        )
    else:
        conc_without = 1.0 / vol * np.exp(-k_v * tp) / (1.0 - math.exp(-k_v * tau_v))

    # exposure ratio over the moving window
    auc = Y[1]
    base_window = auc_tau0 * window / tau_v
    keep = t >= -1e-9
    tk = t[keep]
    ratio = (auc[keep] - np.interp(tk - window, t, auc)) / base_window
    log_r = np.log(np.maximum(ratio, 1e-300))
    i_stop = int(np.argmin(np.abs(tk - stop)))
    r_ss = float(ratio[i_stop])
    prev = float(np.interp(stop - window, tk, ratio)) if stop - window >= 0 else float("nan")
    ln_ss = math.log(r_ss)
    steady = bool(math.isfinite(prev) and abs(ln_ss - math.log(prev)) <= 0.01 * abs(ln_ss) + 1e-4)
    if not steady:
        warnings.append(
            f"The exposure ratio was still changing at the end of {days:g} days of dosing: the steady state is not reached; "
            "simulate more days.",
            ModelLimitWarning,
        )
    on_sel = tk <= stop + 1e-9
    off_sel = tk >= stop + window - 1e-9  # windows wholly after the last dose interval
    i_peak = int(np.argmax(np.abs(log_r[on_sel])))
    i_after = int(np.argmax(np.abs(log_r[off_sel]))) if off_sel.any() else None
    after_ratio = float(ratio[off_sel][i_after]) if i_after is not None else r_ss
    after_h = float(tk[off_sel][i_after] - stop) if i_after is not None else 0.0
    # the size of the effect: the steady change, or a larger transient one (mechanisms at different speeds)
    scale = max(abs(ln_ss), float(np.abs(log_r[on_sel]).max()), abs(math.log(after_ratio)))
    band = (1.0 - effect_fraction) * scale
    meaningful = scale >= math.log(1.01)
    onset = _settle(tk, log_r, ln_ss, band, 0.0, stop) if meaningful else None
    offset = _settle(tk, log_r, 0.0, band, stop, float(tk[-1])) if meaningful else None
    half_offset = _settle(tk, log_r, 0.0, 0.5 * scale, stop, float(tk[-1])) if meaningful else None
    if meaningful and offset is None:
        warnings.append("The effect had not faded by the end of the follow-up: simulate a longer washout.", ModelLimitWarning)
    if not meaningful:
        notes.append("the dynamic effect stays below 1 %: onset and offset times are not given")
    if (
        meaningful
        and (math.log(after_ratio) * ln_ss < 0 or abs(math.log(after_ratio)) > abs(ln_ss) + band)
        and abs(math.log(after_ratio)) > band
    ):
        warnings.append(
            f"After stopping, exposure moves to {after_ratio:.3g} times baseline about {after_h / 24:.1f} days later "
            f"(steady state while dosing: {r_ss:.3g}): the mechanisms fade at different speeds.",
            ModelLimitWarning,
        )

    # Cmax ratio over the last victim interval before stopping
    last = (t > stop - tau_v - 1e-9) & (t <= stop + 1e-9)
    cmax_ratio = float(conc_with[last].max() / conc_without[last].max())

    # enzymes
    p_c, p_in, p_ent = perp.plasma_v(tk)
    enzymes = []
    static_species = (tuple(x.unbound_inlet_um for x in sp), tuple(x.enterocyte_um for x in sp))
    for ti, si in enumerate(turn):
        x = sites[si]
        full = Y[2 + ti]
        amount = full[keep]
        # onset and recovery on the amount averaged over the window (the gut-wall enzyme pulses with each dose)
        cum = np.concatenate(([0.0], np.cumsum(0.5 * (full[1:] + full[:-1]) * np.diff(t))))
        avg = (cum[keep] - np.interp(tk - window, t, cum)) / window
        e_stop = float(avg[i_stop])
        _, kobs_s, ind_s = x.terms(static_species[0] if x.site == "liver" else static_species[1])
        assert x.kdeg is not None
        e_static = ind_s * x.kdeg / (x.kdeg + kobs_s)
        ln_e = np.log(np.maximum(avg, 1e-300))
        lne_stop = math.log(e_stop)
        bnd = (1.0 - effect_fraction) * abs(lne_stop)
        ok = abs(lne_stop) >= math.log(1.01)
        # activity on the grid (reversible part from the parent profile and metabolites)
        acts = []
        for k_, tt in enumerate(tk):
            cl_, cg_ = forcing(float(tt))
            acts.append(x.terms(cl_ if x.site == "liver" else cg_)[0] * amount[k_])
        enzymes.append(
            EnzymeCourse(
                enzyme=x.enzyme,
                site=x.site,
                kdeg_per_h=x.kdeg,
                amount=tuple(float(a) for a in amount),
                activity=tuple(float(a) for a in acts),
                amount_at_stop=e_stop,
                amount_static=e_static,
                onset_h=_settle(tk, ln_e, lne_stop, bnd, 0.0, stop) if ok else None,
                recovery_h=_settle(tk, ln_e, 0.0, bnd, stop, float(tk[-1])) if ok else None,
            )
        )
    scale = float(v.dose.magnitude)
    if warn:
        emit_warnings(zip(warnings.categories, warnings, strict=True))
    return TimeCourse(
        mode=mode,
        time_h=tuple(float(x) for x in tk),
        stop_h=stop,
        end_h=float(tk[-1]),
        victim_with=tuple(float(x) for x in scale * conc_with[keep]),
        victim_without=tuple(float(x) for x in scale * conc_without[keep]),
        victim_unit=f"{units.unit_text(v.dose)}/L",
        perpetrator_um=tuple(float(x) for x in p_c),
        inlet_unbound_um=tuple(float(x) for x in p_in),
        enterocyte_um=tuple(float(x) for x in p_ent),
        exposure_ratio=tuple(float(x) for x in ratio),
        window_h=window,
        enzymes=tuple(enzymes),
        steady_state_ratio=r_ss,
        steady=steady,
        static_ratio=assessment.prediction.total,
        cmax_ratio=cmax_ratio,
        peak_ratio=float(ratio[on_sel][i_peak]),
        peak_h=float(tk[on_sel][i_peak]),
        after_stop_ratio=after_ratio,
        after_stop_h=after_h,
        effect_fraction=effect_fraction,
        onset_h=onset,
        offset_h=offset,
        half_offset_h=half_offset,
        settings=tuple(settings),
        kdeg_used=tuple(kdeg_used),
        warnings=tuple(warnings),
        solver=(
            f"scipy.integrate.odeint (LSODA), rtol {rtol:g}, atol {atol:g}"
            if method == "odeint"
            else f"scipy.integrate.solve_ivp {method}, rtol {rtol:g}, atol {atol:g}"
        ),
        nfev=nfev,
        notes=tuple(notes),
    )


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
