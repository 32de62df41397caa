"""Summarising an integrated time course: the exposure ratio over a moving window, onset, offset, enzymes.

The window W is the victim's dosing interval, or the shortest common multiple of both intervals, so that the
ratio does not ripple.  Onset is the time to reach and stay within (1 - f) of the final effect, offset the time to
fade to within (1 - f) of nothing after stopping (on the log scale); the same for each enzyme.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..dynamic import EnzymeCourse, TimeCourse
from ..errors import ModelLimitWarning
from .forcing import Array
from .model import CourseModel
from .solve import Solution, baseline


def settle(t: Array, y: Array, target: float, band: float, start: float, stop: float) -> float | None:
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


@dataclass(frozen=True, slots=True, kw_only=True)
class RatioSummary:
    """The exposure ratio on the output grid (times >= 0) and what is read from it."""

    tk: Array  # h, the output grid from the first dose
    ratio: Array
    i_stop: int
    steady_state: float
    steady: bool
    peak: float
    peak_h: float
    after_stop: float
    after_stop_h: float
    onset_h: float | None
    offset_h: float | None
    half_offset_h: float | None


def exposure_ratio(model: CourseModel, sol: Solution, effect_fraction: float, days: float) -> RatioSummary:
    """The AUC over the preceding window relative to baseline; steady state, peak, rebound, onset and offset."""
    t, auc, stop, window = sol.t, sol.y[1], model.stop, model.window
    v = model.victim
    base_window = v.f0 / (v.qh * v.clint0 / (v.qh + v.clint0)) * window / v.tau  # AUC per unit dose over W at baseline
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
        model.warnings.append(
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
    end = float(tk[-1])
    offset = settle(tk, log_r, 0.0, band, stop, end) if meaningful else None
    if meaningful and offset is None:
        model.warnings.append("The effect had not faded by the end of the follow-up: simulate a longer washout.", ModelLimitWarning)
    if not meaningful:
        model.notes.append("the dynamic effect stays below 1 %: onset and offset times are not given")
    ln_after = math.log(after_ratio)
    if meaningful and (ln_after * ln_ss < 0 or abs(ln_after) > abs(ln_ss) + band) and abs(ln_after) > band:
        model.warnings.append(
            f"After stopping, exposure moves to {after_ratio:.3g} times baseline about {after_h / 24:.1f} days later "
            f"(steady state while dosing: {r_ss:.3g}): the mechanisms fade at different speeds.",
            ModelLimitWarning,
        )
    return RatioSummary(
        tk=tk,
        ratio=ratio,
        i_stop=i_stop,
        steady_state=r_ss,
        steady=steady,
        peak=float(ratio[on_sel][i_peak]),
        peak_h=float(tk[on_sel][i_peak]),
        after_stop=after_ratio,
        after_stop_h=after_h,
        onset_h=settle(tk, log_r, ln_ss, band, 0.0, stop) if meaningful else None,
        offset_h=offset,
        half_offset_h=settle(tk, log_r, 0.0, 0.5 * scale, stop, end) if meaningful else None,
    )


def enzyme_courses(
    model: CourseModel, sol: Solution, rs: RatioSummary, effect_fraction: float, inlet: Array, ent: Array
) -> list[EnzymeCourse]:
    """Each followed enzyme: amount and activity on the grid, amount at stop beside the static one, onset, recovery.

    ``inlet`` and ``ent`` are the species' site concentrations on ``rs.tk`` (uM, species first).
    """
    t, window, stop, tk = sol.t, model.window, model.stop, rs.tk
    keep = t >= -1e-9
    static = (np.asarray(model.perp.const_inlet), np.asarray(model.perp.const_ent))
    out = []
    for ti, x in enumerate(x for x in model.sites if x.turnover):
        full = sol.y[2 + ti]
        amount = full[keep]
        # onset and recovery on the amount averaged over the window (the gut-wall enzyme pulses with each dose)
        cum = np.concatenate(([0.0], np.cumsum(0.5 * (full[1:] + full[:-1]) * np.diff(t))))
        avg = (cum[keep] - np.interp(tk - window, t, cum)) / window
        e_stop = float(avg[rs.i_stop])
        liver = x.site == "liver"
        ln_e = np.log(np.maximum(avg, 1e-300))
        lne_stop = math.log(e_stop)
        bnd = (1.0 - effect_fraction) * abs(lne_stop)
        ok = abs(lne_stop) >= math.log(1.01)
        reversible = x.terms(inlet if liver else ent)[0]  # the reversible part from the parent's profile and metabolites
        out.append(
            EnzymeCourse(
                enzyme=x.enzyme,
                site=x.site,
                kdeg_per_h=x.kdeg,
                amount=tuple(float(a) for a in amount),
                activity=tuple(float(a) for a in reversible * amount),
                amount_at_stop=e_stop,
                amount_static=float(x.steady_amount(static[0] if liver else static[1])),
                onset_h=settle(tk, ln_e, lne_stop, bnd, 0.0, stop) if ok else None,
                recovery_h=settle(tk, ln_e, 0.0, bnd, stop, float(tk[-1])) if ok else None,
            )
        )
    return out


def summarise(
    model: CourseModel, sol: Solution, *, static_ratio: float, dose: float, dose_unit: str, effect_fraction: float, days: float
) -> TimeCourse:
    """The :class:`~interact.dynamic.TimeCourse` of an integrated model; ``dose`` scales the per-unit-dose curves."""
    rs = exposure_ratio(model, sol, effect_fraction, days)
    t, tk, stop, tau = sol.t, rs.tk, model.stop, model.victim.tau
    keep = t >= -1e-9
    conc_with = sol.y[0] / model.victim.vol
    conc_without = baseline(model, t)
    last = (t > stop - tau - 1e-9) & (t <= stop + 1e-9)  # the Cmax ratio over the last victim interval before stopping
    inlet, ent, plasma = model.perp.concentrations(tk)
    return TimeCourse(
        mode=model.mode,
        time_h=tuple(float(x) for x in tk),
        stop_h=stop,
        end_h=float(tk[-1]),
        victim_with=tuple(float(x) for x in dose * conc_with[keep]),
        victim_without=tuple(float(x) for x in dose * conc_without[keep]),
        victim_unit=f"{dose_unit}/L",
        perpetrator_um=tuple(float(x) for x in plasma),
        inlet_unbound_um=tuple(float(x) for x in inlet[0]),
        enterocyte_um=tuple(float(x) for x in ent[0]),
        exposure_ratio=tuple(float(x) for x in rs.ratio),
        window_h=model.window,
        enzymes=tuple(enzyme_courses(model, sol, rs, effect_fraction, inlet, ent)),
        steady_state_ratio=rs.steady_state,
        steady=rs.steady,
        static_ratio=static_ratio,
        cmax_ratio=float(conc_with[last].max() / conc_without[last].max()),
        peak_ratio=rs.peak,
        peak_h=rs.peak_h,
        after_stop_ratio=rs.after_stop,
        after_stop_h=rs.after_stop_h,
        effect_fraction=effect_fraction,
        onset_h=rs.onset_h,
        offset_h=rs.offset_h,
        half_offset_h=rs.half_offset_h,
        settings=tuple(model.settings),
        kdeg_used=model.kdeg_used,
        warnings=tuple(model.warnings),
        solver=sol.solver,
        nfev=sol.nfev,
        notes=tuple(model.notes),
    )
