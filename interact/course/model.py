"""Building the time course's model from an assessment: inputs checked, perpetrator, enzyme sites, victim, span.

Everything here is arithmetic done once; :mod:`interact.course.solve` integrates the result and
:mod:`interact.course.summary` reads it.  The model itself is described in :mod:`interact.dynamic`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Final

import numpy as np

from .. import units
from ..constants import kdeg_per_h
from ..errors import FromMemoryWarning, InputError, WarningList
from ..exposure import Setting
from ..tables import load_physiology
from .forcing import Array, PerpetratorCourse, ss_shape
from .sites import EnzymeSite, enzyme_sites

if TYPE_CHECKING:
    import pint

    from ..assessment import Assessment

MODES: Final = ("regimen", "constant", "profile")
#: victim hepatic extraction assumed when not given (affects curve shape and Cmax, not the steady-state AUC ratio)
DEFAULT_EXTRACTION: Final = 0.3
LN2: Final = math.log(2.0)
#: the time course's budget: beyond these it refuses before starting (memory and time grow with each interval)
MAX_INTERVALS: Final = 10_000
_MAX_WASHOUT_H: Final = 120 * 24.0
#: the range of time and rate inputs the solver handles accurately and fast (hours, 1/h)
_TIME_RANGE_H: Final = (1.0 / 60.0, 24.0 * 366.0)
_RATE_RANGE_PER_H: Final = (1e-3, 1e3)
_FOLLOWS = "the range the time course can follow"


@dataclass(frozen=True, slots=True, kw_only=True)
class VictimCourse:
    """The object drug per unit dose: oral absorption, gut wall, well-stirred liver (rates 1/h, flows L/h, volume L)."""

    oral: bool
    tau: float
    ka: float
    k: float  # elimination rate constant at baseline
    qh: float
    clint0: float
    vol: float
    fg0: float
    f0: float  # bioavailability at baseline
    gut_factor: float  # 1/Fg0 - 1 when the gut wall is modelled, else 0
    other: float  # 1 - sum fm: clearance not by the followed enzymes


@dataclass(frozen=True, slots=True, kw_only=True)
class CourseModel:
    """Everything the solver and the summary need, with the settings, notes and warnings collected on the way."""

    mode: str
    perp: PerpetratorCourse
    sites: tuple[EnzymeSite, ...]
    victim: VictimCourse
    stop: float  # h, end of dosing
    end: float  # h, end of the follow-up
    window: float  # h, the exposure-ratio window
    t_start: float  # h, a victim dose time one window before the first perpetrator dose
    settings: list[Setting]
    kdeg_used: tuple[Setting, ...]
    notes: list[str]
    warnings: WarningList


def bounded(field: str, value: float, low: float, high: float, unit: str, why: str = _FOLLOWS) -> None:
    """Refuse, with the field named, a time or rate outside the range the time course handles."""
    if not (math.isfinite(value) and low <= value <= high):
        raise InputError(field, f"{value:.4g} {unit}", f"is outside {low:.4g}-{high:.4g} {unit}, {why}")


def _hours(q: pint.Quantity | None) -> float | None:
    return None if q is None else units.magnitude(q, "h")


def lcm_window(tau_v: float, tau_p: float) -> float:
    """Shortest multiple of the victim's interval that is also a multiple of the perpetrator's (within 1 min), <= 1 week."""
    a, b = round(tau_v * 60), round(tau_p * 60)
    if a > 0 and b > 0 and abs(a - tau_v * 60) < 1e-6 and abs(b - tau_p * 60) < 1e-6:
        lcm = a * b // math.gcd(a, b) / 60.0
        if lcm <= 168.0 + 1e-9:
            return lcm
    return tau_v * math.ceil(tau_p / tau_v - 1e-9)


def _intervals(a: Assessment, mode: str, days: float, washout_days: float | None) -> tuple[float, float | None, float, float]:
    """The perpetrator's interval and half-life and the victim's interval and half-life (h), checked."""
    if mode not in MODES:
        raise InputError("mode", mode, f"is not one of {', '.join(MODES)}")
    if not (isinstance(days, (int, float)) and math.isfinite(days) and 0 < days <= 365):
        raise InputError("days", days, "is not a number of days in (0, 365]")
    if washout_days is not None and not (math.isfinite(washout_days) and 0 < washout_days <= 365):
        raise InputError("washout_days", washout_days, "is not a number of days in (0, 365]")
    p, v = a.scenario.perpetrator, a.scenario.victim
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
    for name, hours in (
        ("perpetrator.interval", tau_p),
        ("victim.interval", tau_v),
        ("perpetrator.half_life", half_p),
        ("victim.half_life", half_v),
    ):
        if hours is not None:
            bounded(name, hours, *_TIME_RANGE_H, "h", "the range the time course can follow (1 min to a year)")
    stop = 24.0 * days
    for name, tau, count in (
        ("perpetrator.interval", tau_p, stop / tau_p),
        ("victim.interval", tau_v, (stop + 24.0 * (washout_days or 0.0)) / tau_v),
    ):
        if count > MAX_INTERVALS:
            raise InputError(
                name,
                f"{tau:.4g} h",
                f"is too short for a time course of {days:g} days: {count:,.0f} dosing intervals, more than the "
                f"{MAX_INTERVALS:,} it follows; expected a longer interval or fewer --days",
            )
    return tau_p, half_p, tau_v, half_v


def _profile(profile: tuple[Sequence[float], Sequence[float]] | None) -> tuple[Array, Array]:
    """The user's plasma profile (times h, parent total uM), checked."""
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
    return profile_t, profile_c


def _volume(ka: float, ke: float, dose: float, cmax: float, tau: float, oral: bool, settings: list[Setting]) -> tuple[float, float]:
    """The perpetrator's V/F (oral) or V (intravenous) fitted to its steady-state Cmax, and ka (shifted off ke)."""
    if not oral:
        vf = dose / cmax / (1.0 - math.exp(-ke * tau))
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
        return vf, ka
    if abs(ka - ke) < 1e-6 * ka:
        ka *= 1.0 + 1e-4  # the flip-flop singularity: an imperceptible shift keeps the formula finite
    shape, tmax = ss_shape(ka, ke, tau)
    vf = dose * shape / cmax
    note = f"one-compartment oral model; tmax,ss {tmax:.3g} h"
    settings.append(
        Setting(name="perpetrator_vf", label="Perpetrator V/F (fitted to Cmax,ss)", value=vf, unit="L", origin="derived", note=note)
    )
    return vf, ka


def _perpetrator(
    a: Assessment,
    mode: str,
    stop: float,
    tau_p: float,
    half_p: float | None,
    profile_data: tuple[Array, Array] | None,
    settings: list[Setting],
    notes: list[str],
) -> PerpetratorCourse:
    """The perpetrator's doses over the dosing span and the constants of its site concentrations."""
    st = {x.name: x for x in a.settings}
    oral = a.scenario.perpetrator.route == "oral"
    ka = st["absorption_rate"].value * 60.0
    if oral:
        bounded("perpetrator.ka", ka, *_RATE_RANGE_PER_H, "1/h")
    sp = a.species
    dose, cmax = sp[0].dose_umol, sp[0].cmax_um
    ke = LN2 / half_p if half_p is not None else 0.0
    vf = 0.0
    if mode == "regimen":
        assert half_p is not None
        vf, ka = _volume(ka, ke, dose, cmax, tau_p, oral, settings)
        settings.append(Setting(name="perpetrator_half_life", label="Perpetrator half-life", value=half_p, unit="h", origin="given"))
        acc = 1.0 / (1.0 - math.exp(-ke * tau_p))
        if acc > 1.0 + 1e-9:
            notes.append(f"perpetrator accumulation factor {acc:.3g}: steady state after about {5 * half_p / 24:.3g} days")
    if len(sp) > 1 and mode != "constant":
        notes.append("metabolite concentrations follow the parent's profile scaled to their Cmax (formation-rate limited; an assumption)")
    return PerpetratorCourse(
        mode=mode,
        oral=oral,
        dose=dose,
        tau=tau_p,
        n_doses=max(1, math.ceil(stop / tau_p - 1e-9)),
        stop=stop,
        ka=ka,
        ke=ke,
        vf=vf,
        fu=sp[0].fu_plasma_used,
        fa_fg=st["fa_fg"].value,
        fa=st["fraction_absorbed"].value,
        fu_gut=st["fu_gut"].value,
        qh=st["hepatic_blood_flow"].value * 60.0,
        rb=st["blood_plasma_ratio"].value,
        qent=st["enterocytic_blood_flow"].value * 60.0,
        cmax=cmax,
        metabolites=tuple((m.fu_plasma_used, m.cmax_um / cmax) for m in sp[1:]),
        const_inlet=tuple(x.unbound_inlet_um for x in sp),
        const_ent=tuple(x.enterocyte_um for x in sp),
        profile_t=None if profile_data is None else profile_data[0],
        profile_c=None if profile_data is None else profile_data[1],
    )


def _sites(a: Assessment, warnings: WarningList) -> tuple[list[EnzymeSite], tuple[Setting, ...]]:
    """The enzyme sites to follow (the victim's pathways in the liver, the gut wall for an oral victim) and the kdeg used."""
    v = a.scenario.victim
    gut_enzyme = a.prediction.gut_enzyme
    fg0 = a.prediction.fg_used
    if v.route == "oral" and fg0 < 1e-3:  # the gut term 1/Fg of the curves overflows long before this
        raise InputError("victim.fg", f"{fg0:.3g}", "is below 0.001, the smallest Fg the time course can follow")
    if v.route != "oral" or fg0 >= 1.0:
        gut_enzyme = None
    affected = {pw.enzyme for pw in v.pathways} | ({gut_enzyme} if gut_enzyme else set())
    needed = {c.target for c in a.constants if c.kinact_per_h is not None or c.emax is not None} & affected
    kdeg, kdeg_used = kdeg_per_h(a.scenario, a.constants, needed)
    for enzyme, pair in kdeg.items():
        for where, rate in zip(("liver", "gut"), pair, strict=True):
            if rate is not None:
                bounded(f"turnover.{enzyme}.kdeg_{where}", rate, 1e-4, _RATE_RANGE_PER_H[1], "1/h")
    sites = enzyme_sites(a, kdeg, gut_enzyme)
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
    return sites, tuple(kdeg_used)


def _victim(
    a: Assessment, qh: float, tau_v: float, half_v: float, sites: list[EnzymeSite], settings: list[Setting], notes: list[str]
) -> VictimCourse:
    """The object drug's absorption, gut wall and well-stirred liver at baseline, per unit dose."""
    v = a.scenario.victim
    oral = v.route == "oral"
    if v.ka is not None:
        ka = units.magnitude(v.ka, "1/h")
    else:  # the table's default absorption rate (not the perpetrator's own, which may have been given)
        row = next(x for x in load_physiology() if x.name == "absorption_rate")
        ka = units.magnitude(units.parse(row.value, "rate", field="physiology.absorption_rate"), "1/h")
    given = v.ka is not None
    default_ka = "the default perpetrator ka ([@dmd2019inlet], [@jpetverinurad], [@cpt2015]) reused for the object drug"
    settings.append(
        Setting(
            name="victim_ka",
            label="Victim absorption rate ka",
            value=ka,
            unit="1/h",
            origin="given" if given else "default",
            source="" if given else default_ka,
            status="" if given else "assumption",
        )
    )
    if oral:
        bounded("victim.ka", ka, *_RATE_RANGE_PER_H, "1/h")
    e_h = v.hepatic_extraction if v.hepatic_extraction is not None else DEFAULT_EXTRACTION
    if e_h < 1e-4 or e_h > 0.9999:
        raise InputError("victim.hepatic_extraction", e_h, f"is outside 0.0001-0.9999, {_FOLLOWS}")
    given = v.hepatic_extraction is not None
    settings.append(
        Setting(
            name="victim_hepatic_extraction",
            label="Victim hepatic extraction E_h",
            value=e_h,
            unit="",
            origin="given" if given else "default",
            source="" if given else "assumed; shapes the curves and Cmax, not the steady-state AUC ratio",
            status="" if given else "assumption",
        )
    )
    settings.append(Setting(name="victim_half_life", label="Victim half-life", value=half_v, unit="h", origin="given"))
    k = LN2 / half_v
    clint0 = qh * e_h / (1.0 - e_h)
    cl0 = qh * clint0 / (qh + clint0)
    fg0 = a.prediction.fg_used
    if oral and abs(ka - k) < 1e-6 * ka:
        ka *= 1.0 + 1e-4
    settings.append(
        Setting(name="victim_volume", label="Victim volume (from CL_h and half-life)", value=cl0 / k, unit="L", origin="derived")
    )
    notes.append("all victim clearance is taken as hepatic (well-stirred); fm values are fractions of hepatic intrinsic clearance")
    if not oral and e_h > 0.1:
        notes.append(
            f"intravenous victim with hepatic extraction {e_h:.2g}: blood flow limits the change in clearance, so the "
            "dynamic ratio is smaller than the static one, which assumes low extraction for this route"
        )
    has_gut = any(x.site == "gut" for x in sites)
    return VictimCourse(
        oral=oral,
        tau=tau_v,
        ka=ka,
        k=k,
        qh=qh,
        clint0=clint0,
        vol=cl0 / k,
        fg0=fg0,
        f0=fg0 * qh / (qh + clint0) if oral else 1.0,
        gut_factor=(1.0 / fg0 - 1.0) if has_gut else 0.0,
        other=1.0 - sum(x.fm for x in sites if x.site == "liver"),
    )


def _span(
    mode: str, stop: float, tau_v: float, tau_p: float, half_p: float | None, washout_days: float | None, sites: list[EnzymeSite]
) -> tuple[float, float, float]:
    """The exposure window, the start (one window before the first dose) and the end of the follow-up (h)."""
    window = tau_v if mode == "constant" else lcm_window(tau_v, tau_p)
    t_start = -window  # a window multiple of the victim's interval, so the victim is at a dose time
    slowest = min([x.kdeg for x in sites if x.turnover and x.kdeg] or [1.0])
    wash = (
        24.0 * washout_days
        if washout_days is not None
        else min(_MAX_WASHOUT_H, max(5.0 / slowest, 5.0 * (half_p or 0.0) + 24.0, 2.0 * window, 48.0))
    )
    end = tau_v * math.ceil((stop + wash) / tau_v - 1e-9)
    if (end - t_start) / tau_v > MAX_INTERVALS:
        raise InputError(
            "victim.interval",
            f"{tau_v:.4g} h",
            f"is too short for this time course ({(end + window) / 24:.4g} days with follow-up): "
            f"{(end - t_start) / tau_v:,.0f} dosing intervals, more than the {MAX_INTERVALS:,} it follows",
        )
    return window, t_start, end


def build(
    a: Assessment, *, days: float, washout_days: float | None, mode: str, profile: tuple[Sequence[float], Sequence[float]] | None
) -> CourseModel:
    """The time course's model of an assessed scenario; raises :class:`InputError` naming the field it cannot use."""
    tau_p, half_p, tau_v, half_v = _intervals(a, mode, days, washout_days)
    stop = 24.0 * days
    settings: list[Setting] = []
    notes: list[str] = []
    warnings = WarningList()
    profile_data = _profile(profile) if mode == "profile" else None
    perp = _perpetrator(a, mode, stop, tau_p, half_p, profile_data, settings, notes)
    sites, kdeg_used = _sites(a, warnings)
    victim = _victim(a, perp.qh, tau_v, half_v, sites, settings, notes)
    window, t_start, end = _span(mode, stop, tau_v, tau_p, half_p, washout_days, sites)
    if profile_data is not None and profile_data[0][-1] < end - 1e-9:
        raise InputError(
            "profile", f"ends at {profile_data[0][-1]:g} h", f"must cover the simulated span to {end:g} h (dosing {stop:g} h + follow-up)"
        )
    return CourseModel(
        mode=mode,
        perp=perp,
        sites=tuple(sites),
        victim=victim,
        stop=stop,
        end=end,
        window=window,
        t_start=t_start,
        settings=settings,
        kdeg_used=kdeg_used,
        notes=notes,
        warnings=warnings,
    )
