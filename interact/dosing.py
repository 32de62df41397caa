"""Dose suggestion for the victim, fm back-calculation, perpetrator-dose ceiling.

PK principles (from memory; standard linear pharmacokinetics):

- with linear kinetics, the dose that restores the reference exposure is
  dose / AUCR; the interval that does the same is tau x AUCR (same average
  concentration, wider peak-trough swings);
- act only when the AUC ratio lies outside the victim's no-effect boundary
  (S6: ICH M12 5.3.1; default 0.8-1.25).

Every suggestion carries :data:`interact.cautions.DOSE_CAUTIONS`.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Final

from .cautions import DOSE_CAUTIONS, INCREASE_CAUTION
from .errors import InputError

__all__ = [
    "PRACTICAL_INTERVALS_H",
    "DoseLimit",
    "DoseSuggestion",
    "fm_from_observed_ratio",
    "highest_perpetrator_scale",
    "suggest_dose",
    "timing_advice",
]

#: dosing intervals (h) offered when stretching the interval: common practice
PRACTICAL_INTERVALS_H: Final = (4.0, 6.0, 8.0, 12.0, 24.0, 48.0, 72.0, 168.0)
#: a dose is made of up to this many units of one strength: common practice
MAX_UNITS: Final = 4


@dataclass(frozen=True, slots=True, kw_only=True)
class DoseSuggestion:
    """What the model suggests for the victim's regimen, and why."""

    action: str  # "no change" | "reduce dose" | "increase dose" | "avoid or monitor"
    auc_ratio: float
    boundary: tuple[float, float]
    boundary_origin: str
    usual_dose: float
    dose_unit: str
    usual_interval_h: float
    exact_dose: float
    chosen_dose: float | None
    chosen_units: str
    ratio_with_chosen: float | None
    exact_interval_h: float
    chosen_interval_h: float | None
    ratio_with_interval: float | None
    reasons: tuple[str, ...]
    cautions: tuple[str, ...]


def _candidates(strengths: tuple[float, ...]) -> list[tuple[float, str]]:
    out: dict[float, str] = {}
    for k in range(1, MAX_UNITS + 1):
        for s in sorted(strengths):
            dose = round(k * s, 10)
            out.setdefault(dose, f"{k} x {s:g}" if k > 1 else f"{s:g}")
    return sorted(out.items())


def _made_of(units_text: str, dose_unit: str) -> str:
    """' (2 x 2.5 mg)' for a dose of several units; '' for a single unit."""
    return f" ({units_text} {dose_unit})" if " x " in units_text else ""


def suggest_dose(
    *,
    auc_ratio: float,
    usual_dose: float,
    dose_unit: str,
    interval_h: float,
    strengths: tuple[float, ...],
    boundary: tuple[float, float],
    boundary_origin: str,
    narrow_therapeutic_index: bool = False,
    mechanism_parts: tuple[tuple[str, float], ...] = (),
) -> DoseSuggestion:
    """Suggest a victim dose or interval that restores the reference exposure.

    Parameters
    ----------
    auc_ratio
        Predicted AUC ratio (with / without perpetrator).
    usual_dose, dose_unit
        The victim's usual dose and its unit (strengths are in the same unit).
    interval_h
        The usual dosing interval in hours.
    strengths
        Available unit strengths; a dose may be 1 to 4 units of one strength.
        The suggestion is the available dose whose exposure ratio lies inside
        the boundary and closest to 1; failing that, the largest available
        dose not above the exact dose.
    boundary
        The no-effect boundary (lower, upper) of AUC ratios.
    mechanism_parts
        For mixed effects (inhibition and induction), (mechanism, AUC ratio
        with that mechanism alone) pairs: the suggestion then states the net and
        each part, and warns when a part alone lies outside the boundary.
    """
    lower, upper = boundary
    exact = usual_dose / auc_ratio
    exact_tau = interval_h * auc_ratio
    reasons: list[str] = []
    cautions = list(DOSE_CAUTIONS)
    chosen = chosen_tau = ratio_dose = ratio_tau = None
    chosen_units = ""
    if lower <= auc_ratio <= upper:
        reasons.append(
            f"Predicted AUC ratio {auc_ratio:.3g} lies within the no-effect boundary {lower:g}-{upper:g} "
            f"({boundary_origin}): no dose change is suggested."
        )
        action = "no change"
    else:
        increase = auc_ratio < lower
        action = "increase dose" if increase else "reduce dose"
        reasons.append(
            f"Predicted AUC ratio {auc_ratio:.3g} lies {'below' if increase else 'above'} the no-effect boundary "
            f"{lower:g}-{upper:g} ({boundary_origin})."
        )
        reasons.append(
            f"With linear kinetics the dose restoring the usual exposure is {usual_dose:g} {dose_unit} / {auc_ratio:.3g} "
            f"= {exact:.3g} {dose_unit}."
        )
        if strengths:
            options = _candidates(strengths)
            inside = [(abs(math.log(auc_ratio * d / usual_dose)), d, u) for d, u in options if lower <= auc_ratio * d / usual_dose <= upper]
            fitting = [(d, u) for d, u in options if d <= exact * (1 + 1e-9)]
            if inside:
                _, chosen, chosen_units = min(inside)
                ratio_dose = auc_ratio * chosen / usual_dose
                reasons.append(
                    f"Available dose bringing exposure back inside the boundary, closest to the usual exposure: "
                    f"{chosen:g} {dose_unit}{_made_of(chosen_units, dose_unit)}, predicted exposure ratio {ratio_dose:.3g} "
                    "against the usual regimen alone."
                )
            elif fitting:
                chosen, chosen_units = fitting[-1]
                ratio_dose = auc_ratio * chosen / usual_dose
                reasons.append(
                    f"No available dose lands inside the boundary; nearest not above the exact dose: {chosen:g} {dose_unit}"
                    f"{_made_of(chosen_units, dose_unit)}, predicted exposure ratio {ratio_dose:.3g} against the usual regimen alone."
                )
                if ratio_dose < lower:
                    reasons.append(
                        f"That rounded dose falls below the lower boundary {lower:g}: exposure, and efficacy, may be too low; "
                        "consider the interval alternative or monitoring."
                    )
                if increase and chosen <= usual_dose:
                    chosen = None
                    ratio_dose = None
                    reasons.append("No available dose lies between the usual dose and the exact dose.")
            else:
                reasons.append(f"The smallest available dose ({min(strengths):g} {dose_unit}) exceeds {exact:.3g} {dose_unit}.")
        else:
            reasons.append("No strengths were given: the exact figure is shown unrounded.")
        tau_options = (
            [t for t in PRACTICAL_INTERVALS_H if t >= exact_tau * (1 - 1e-9)]
            if not increase
            else [t for t in PRACTICAL_INTERVALS_H if t <= exact_tau * (1 + 1e-9)]
        )
        if tau_options and not math.isclose(interval_h, exact_tau):
            chosen_tau = tau_options[0] if not increase else tau_options[-1]
            ratio_tau = auc_ratio * interval_h / chosen_tau
            if math.isclose(chosen_tau, interval_h):
                chosen_tau = ratio_tau = None
        reasons.append(
            f"Interval alternative: keep the dose and dose every {interval_h:g} h x {auc_ratio:.3g} = {exact_tau:.3g} h"
            + (
                f"; nearest practical interval {chosen_tau:g} h gives an exposure ratio of {ratio_tau:.3g} "
                "(same average concentration, larger peak-to-trough swing)."
                if chosen_tau is not None and ratio_tau is not None
                else "; no practical interval (4 h to 1 week) fits."
            )
            + " Only suitable if the victim's half-life supports the longer interval."
        )
        if chosen is None and chosen_tau is None and strengths:
            action = "avoid or monitor"
            reasons.append("Neither a dose nor an interval change is feasible: avoid the combination or monitor closely.")
        if increase:
            cautions.insert(0, INCREASE_CAUTION)
    if mechanism_parts:
        shown = ", ".join(f"{name} alone {ratio:.3g}" for name, ratio in mechanism_parts)
        reasons.append(f"Mixed effect: the net AUC ratio {auc_ratio:.3g} combines opposite mechanisms ({shown}).")
        outside = [(n, r) for n, r in mechanism_parts if not lower <= r <= upper]
        if outside:
            reasons.append(
                f"Parts outside the boundary ({', '.join(f'{n} alone {r:.3g}' for n, r in outside)}): if the mechanisms develop "
                "at different speeds, exposure can move towards a part for a time (reversible inhibition ends at once when the "
                "perpetrator stops, enzyme changes last days); the time course shows whether it does."
            )
    if narrow_therapeutic_index:
        if action != "no change":
            action = "avoid or monitor"
        reasons.append(
            "The victim is marked narrow therapeutic index: use therapeutic drug monitoring or avoid the combination; "
            "a computed dose is not a substitute for expert review."
        )
    return DoseSuggestion(
        action=action,
        auc_ratio=auc_ratio,
        boundary=(lower, upper),
        boundary_origin=boundary_origin,
        usual_dose=usual_dose,
        dose_unit=dose_unit,
        usual_interval_h=interval_h,
        exact_dose=exact,
        chosen_dose=chosen,
        chosen_units=chosen_units,
        ratio_with_chosen=ratio_dose,
        exact_interval_h=exact_tau,
        chosen_interval_h=chosen_tau,
        ratio_with_interval=ratio_tau,
        reasons=tuple(reasons),
        cautions=tuple(cautions),
    )


def fm_from_observed_ratio(observed_ratio: float, *, remaining_activity: float = 0.0, gut_ratio: float = 1.0) -> float:
    """Back-calculate fm from an AUC ratio observed with a strong inhibitor.

    From AUCR_h = 1/(fm x a + 1 - fm): fm = (1 - 1/AUCR_h) / (1 - a), with
    AUCR_h = observed / AUCR_g.  ``remaining_activity`` a = 0 assumes complete
    inhibition (which gives the smallest fm compatible with the observation).

    Raises
    ------
    InputError
        If the ratio is below 1, a is outside [0, 1), or fm would exceed 1.
    """
    if not math.isfinite(observed_ratio) or observed_ratio < 1.0:
        raise InputError("observed_ratio", observed_ratio, "is not an AUC ratio of at least 1 (an inhibition study)")
    if not 0.0 <= remaining_activity < 1.0:
        raise InputError("remaining_activity", remaining_activity, "is outside [0, 1)")
    if not math.isfinite(gut_ratio) or gut_ratio < 1.0 or gut_ratio > observed_ratio:
        raise InputError("gut_ratio", gut_ratio, f"is not between 1 and the observed ratio {observed_ratio:g}")
    hepatic = observed_ratio / gut_ratio
    fm = (1.0 - 1.0 / hepatic) / (1.0 - remaining_activity)
    if fm > 1.0 + 1e-12:
        raise InputError(
            "observed_ratio",
            observed_ratio,
            f"implies fm = {fm:.3g} > 1 at remaining activity {remaining_activity:g}; the inputs are inconsistent",
        )
    return min(fm, 1.0)


@dataclass(frozen=True, slots=True, kw_only=True)
class DoseLimit:
    """The highest perpetrator dose that keeps the victim inside its boundary."""

    scale: float | None  # multiple of the scenario's dose; None = no limit
    dose: float | None
    dose_unit: str
    boundary_upper: float
    reason: str


def highest_perpetrator_scale(ratio_at: Callable[[float], float], upper: float) -> float | None:
    """Scale s at which ``ratio_at(s)`` (increasing in s) reaches ``upper``; None if never.

    Assumes the perpetrator's concentrations scale linearly with its dose.  The
    bracket is found by quadrupling, then narrowed by the Illinois variant of
    regula falsi (pure Python: it keeps scipy's import, about 0.4 s, off the
    command's cold start; the root is bracketed at every step, so it cannot
    diverge).  Relative tolerance 1e-12 on s.
    """
    if ratio_at(0.0) >= upper:
        return 0.0
    lo, hi = 0.0, 1.0
    for _ in range(80):
        if ratio_at(hi) >= upper:
            break
        lo, hi = hi, hi * 4.0
    else:
        return None
    f_lo, f_hi = ratio_at(lo) - upper, ratio_at(hi) - upper
    side = 0
    for _ in range(200):
        mid = (lo * f_hi - hi * f_lo) / (f_hi - f_lo)
        f_mid = ratio_at(mid) - upper
        if f_mid == 0.0 or hi - lo <= 1e-12 * hi:
            return mid
        if (f_mid > 0) == (f_hi > 0):
            hi, f_hi = mid, f_mid
            if side == -1:
                f_lo /= 2.0
            side = -1
        else:
            lo, f_lo = mid, f_mid
            if side == 1:
                f_hi /= 2.0
            side = 1
    return (lo + hi) / 2.0


def _days(hours: float) -> str:
    d = hours / 24.0
    return f"{d:.1f}" if d < 10 else f"{d:.0f}"


def timing_advice(
    *,
    action: str,
    steady_ratio: float,
    static_ratio: float,
    onset_h: float | None,
    offset_h: float | None,
    peak_ratio: float,
    peak_h: float,
    boundary: tuple[float, float],
    effect_fraction: float,
    follow_up_h: float,
    mechanisms: tuple[str, ...],
    usual_dose: float | None = None,
    dose_unit: str = "",
    after_stop_ratio: float | None = None,
    after_stop_h: float | None = None,
    half_offset_h: float | None = None,
) -> tuple[str, ...]:
    """When to change the victim's dose and when to go back, from a simulated time course.

    Parameters
    ----------
    action
        The static suggestion's action (``DoseSuggestion.action``).
    steady_ratio, static_ratio
        Dynamic steady-state and static AUC ratios.
    onset_h, offset_h
        Time (h) from starting the perpetrator to reach and stay within
        (1 - f) of the steady effect, and from stopping it to fall within
        (1 - f) of no effect; None when not reached.
    peak_ratio, peak_h
        The largest exposure change while dosing (log scale) and when.
    boundary
        The victim's no-effect boundary (lower, upper).
    follow_up_h
        How long after stopping the course was followed.
    mechanisms
        Mechanisms present (``Prediction.mechanisms``).
    usual_dose, dose_unit
        The victim's usual dose, to show the dose the dynamic ratio implies
        when it differs from the static one by more than 25 %.
    half_offset_h
        Time (h) after stopping for half the effect (log scale) to go.
    after_stop_ratio, after_stop_h
        The largest exposure change after stopping, and when (h after the
        stop): a rebound across 1 (for example reversible inhibition gone at
        once while induced enzyme lingers) is called out.

    Timing is read from a minimal model (one compartment, kdeg values often
    from memory); it guides monitoring, not a schedule.
    """
    lower, upper = boundary
    pct = f"{effect_fraction:.0%}"
    out: list[str] = [
        f"Time course (dynamic check): steady-state AUC ratio {steady_ratio:.3g} against the static {static_ratio:.3g}"
        + (" (the static model uses peak concentrations, so it is usually the larger)." if steady_ratio < static_ratio else ".")
    ]
    if usual_dose is not None and abs(math.log(steady_ratio / static_ratio)) > math.log(1.25):
        out.append(
            f"The two models disagree: with the dynamic ratio the dose restoring the usual exposure would be "
            f"{usual_dose / steady_ratio:.3g} {dose_unit} instead of {usual_dose / static_ratio:.3g} {dose_unit}. The static "
            "figure is the conservative screen; a dose chosen from it may undershoot the usual exposure, so confirm with "
            "monitoring or clinical data."
        )
    inside = lower <= steady_ratio <= upper and lower <= peak_ratio <= upper
    if action == "no change" and inside:
        out.append("The simulated exposure stays inside the no-effect boundary throughout: no dose timing applies.")
        return tuple(out)
    increase = steady_ratio < 1.0
    if onset_h is not None:
        if onset_h <= 24.0:
            out.append(
                f"Start: {pct} of the change is reached within {_days(onset_h)} days of starting the perpetrator; "
                "change the victim's dose when the perpetrator is started."
            )
        elif increase:
            out.append(
                f"Start: induction builds over about {_days(onset_h)} days ({pct} of its steady effect); raise the victim's "
                "dose stepwise over that time, guided by monitoring, rather than all at once."
            )
        else:
            out.append(
                f"Start: the rise in exposure builds over about {_days(onset_h)} days ({pct} of its steady effect); a reduced "
                "dose from the first day of co-administration is the cautious choice, with review over that time."
            )
    ln_ss = math.log(steady_ratio) if steady_ratio > 0 else 0.0
    if abs(math.log(peak_ratio) - ln_ss) > (1.0 - effect_fraction) * abs(ln_ss) + 1e-9 and not lower <= peak_ratio <= upper:
        out.append(
            f"The exposure ratio passes through {peak_ratio:.3g} around day {_days(peak_h)} before settling at "
            f"{steady_ratio:.3g} (the mechanisms act at different speeds): one dose change does not fit the whole course; "
            "monitor closely in the first weeks."
        )
    if (
        after_stop_ratio is not None
        and after_stop_h is not None
        and not lower <= after_stop_ratio <= upper
        and ((after_stop_ratio - 1.0) * (steady_ratio - 1.0) < 0 or abs(math.log(after_stop_ratio)) > abs(ln_ss) * 1.1)
    ):
        out.append(
            f"After the perpetrator is stopped, exposure swings to {after_stop_ratio:.3g} times the usual about day "
            f"{_days(after_stop_h)} of the washout (the mechanisms fade at different speeds): "
            + (
                "exposure falls below the usual level, so efficacy may be lost if the reduced dose is kept; "
                if after_stop_ratio < 1.0
                else "exposure rises above the usual level; "
            )
            + "adjust the dose and monitor through the washout."
        )
    if offset_h is not None:
        why = []
        if "time-dependent" in mechanisms:
            why.append("inactivated enzyme must be resynthesised (set by kdeg)")
        if "induction" in mechanisms:
            why.append("induced enzyme returns to baseline (set by kdeg)")
        if "reversible" in mechanisms or not why:
            why.append("reversible inhibition ends as the perpetrator is eliminated")
        reason = "; ".join(why)
        half = f"half of it within {_days(half_offset_h)} days and " if half_offset_h is not None and half_offset_h < offset_h else ""
        if offset_h <= 24.0:
            out.append(
                f"Stop: the effect is gone within {_days(offset_h)} days of stopping ({reason}); return to the usual dose "
                "when the perpetrator is stopped."
            )
        elif increase:
            out.append(
                f"Stop: after the perpetrator is stopped the effect fades, {half}{pct} of it within {_days(offset_h)} days "
                f"({reason}); bring the victim's dose back to the usual dose progressively over that time - keeping the "
                "higher dose risks toxicity as induction fades."
            )
        else:
            out.append(
                f"Stop: after the perpetrator is stopped the effect fades, {half}{pct} of it within {_days(offset_h)} days "
                f"({reason}); step back up to the usual dose over that time, fully by about day {_days(offset_h)}: "
                "returning at once risks overexposure while the effect lasts, keeping the reduced dose too long risks "
                "underexposure."
            )
    else:
        out.append(
            f"Stop: the effect had not faded within the {_days(follow_up_h)} days simulated after stopping; return to "
            "the usual dose only under monitoring."
        )
    out.append(
        "Timing comes from a minimal one-compartment model and enzyme turnover rates that are often from memory: "
        "a guide for monitoring, not a schedule."
    )
    return tuple(out)
