"""Dose advice for the object drug (victim), fm back-calculation, perpetrator-dose ceiling.

PK principles (common practice; standard linear pharmacokinetics):

- with linear kinetics the average exposure of a regimen scales with dose /
  interval, so a dose d every tau gives the exposure ratio AUCR x (d / usual
  dose) x (usual tau / tau) against the usual regimen without the precipitant;
- act only when the AUC ratio lies outside the object drug's no-effect
  boundary (ICH M12 5.3.1; default 0.8-1.25);
- a regimen is offered only when its exposure ratio, and for a changed
  interval its steady-state peak and trough when the half-life is known, lie
  inside the boundaries; among those, the one closest to the usual exposure.

One implementation serves every caller: :func:`choose_regimens` works on
arrays of AUC ratios (one scenario, a batch of pairs, a set of samples);
:func:`suggest_dose` adds the reasons for one scenario.  Every suggestion
carries :data:`interact.cautions.DOSE_CAUTIONS`.
"""

from __future__ import annotations

import dataclasses
import functools
import itertools
import math
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Final, ParamSpec

import numpy as np
from numpy.typing import ArrayLike, NDArray

from . import units
from .cautions import DOSE_CAUTIONS, INCREASE_CAUTION
from .errors import InputError
from .steps import StepTable

if TYPE_CHECKING:
    from .scenario import Victim

__all__ = [
    "ACTIONS",
    "DEFAULT_INTERVALS_H",
    "MAX_UNITS",
    "DoseLimit",
    "DoseSuggestion",
    "Regimen",
    "RegimenChoice",
    "RegimenOutcome",
    "RegimenPlan",
    "choose_regimens",
    "feasible_fraction",
    "fm_from_observed_ratio",
    "highest_perpetrator_scale",
    "plan_for_victim",
    "plan_regimens",
    "regimen_feasibility",
    "regimen_label",
    "suggest_dose",
    "timing_advice",
]

#: the suggested actions, the same words in every output; codes index this tuple
ACTIONS: Final = ("no change", "reduce dose", "increase dose", "change interval", "avoid or monitor")
NO_CHANGE: Final = 0
REDUCE: Final = 1
INCREASE: Final = 2
INTERVAL: Final = 3
AVOID: Final = 4

#: dosing intervals (h) tried when the interval is changed: common practice (overridable per victim)
DEFAULT_INTERVALS_H: Final = (6.0, 8.0, 12.0, 24.0, 48.0, 72.0)
#: at most this many units (tablets, capsules) in one administration: common practice (overridable per victim)
MAX_UNITS: Final = 4
#: distinct unit sizes (strengths, and halves of scored ones) the search enumerates at most
MAX_UNIT_SIZES: Final = 24
#: the search looks at up to this many units per administration whatever the victim says
MAX_UNITS_LIMIT: Final = 8
#: at most this many unit combinations are enumerated (about 0.1 s); more is refused with a named error
MAX_COMBINATIONS: Final = 100_000

_LN2: Final = math.log(2.0)
_CELLS: Final = 1 << 21  # rows x candidates evaluated at once (bounds memory to some tens of MB)


# --------------------------------------------------------------------------- candidates


def regimen_label(regimen: Regimen, unit: str) -> str:
    """'12.5 mg every 24 h (10 + 2.5 mg)'; the exact dose of a plan without strengths is named as such until it is sized."""
    if math.isnan(regimen.dose):
        return f"the exact dose restoring the usual exposure, every {regimen.interval_h:g} h"
    made = f" ({regimen.makeup} {unit})" if regimen.units > 1 else ""
    return f"{regimen.dose:.4g} {unit} every {regimen.interval_h:g} h{made}"


@dataclass(frozen=True, slots=True, kw_only=True)
class Regimen:
    """One regimen the object drug could be given: a dose every interval.

    ``kind`` is ``"dose"`` (the usual interval, another dose), ``"exact dose"``
    (no strengths given: the unrounded dose that restores the usual exposure,
    its size set by each AUC ratio) or ``"interval"`` (the usual dose, another
    interval).  ``makeup`` names the units of a dose (``"10 + 2.5"``; ``"2 x 5"``).
    """

    kind: str
    dose: float
    interval_h: float
    makeup: str
    units: int


def _unit_sizes(strengths: tuple[float, ...], scored: tuple[float, ...]) -> list[float]:
    sizes = set(strengths) | {s / 2.0 for s in scored}
    return sorted(sizes)


def _makeup(parts: tuple[float, ...]) -> str:
    """'10 + 2.5', '2 x 5', '5' (largest first; repeated units counted)."""
    counts: dict[float, int] = {}
    for p in sorted(parts, reverse=True):
        counts[p] = counts.get(p, 0) + 1
    return " + ".join(f"{n} x {p:g}" if n > 1 else f"{p:g}" for p, n in counts.items())


def _dose_candidates(sizes: list[float], max_units: int) -> list[tuple[float, tuple[float, ...]]]:
    """Every dose made of 1..max_units units (mixed sizes), each with its fewest-unit make-up.

    Sums are rounded to 10 significant digits so that 2.5 + 2.5 and 5 meet.
    """
    best: dict[float, tuple[float, ...]] = {}
    for k in range(1, max_units + 1):
        for combo in itertools.combinations_with_replacement(sizes, k):
            total = float(f"{math.fsum(combo):.10g}")
            kept = best.get(total)
            if kept is None or (len(combo), len(set(combo))) < (len(kept), len(set(kept))):
                best[total] = combo
    return sorted(best.items())


@dataclass(frozen=True, slots=True, kw_only=True)
class RegimenPlan:
    """The object drug's usual regimen, the regimens it could be given instead, and the limits they must keep.

    Candidates are ordered for tie-breaking: dose changes before interval
    changes (the interval a patient knows is kept), fewer units first, then
    intervals nearest the usual one.  Build with :func:`plan_regimens` or
    :func:`plan_for_victim`.
    """

    usual_dose: float
    dose_unit: str
    usual_interval_h: float
    candidates: tuple[Regimen, ...]
    half_life_h: float | None
    boundary: tuple[float, float]
    peak_boundary: tuple[float, float]
    trough_boundary: tuple[float, float]
    boundary_origin: str
    narrow_therapeutic_index: bool
    max_units: int
    intervals_h: tuple[float, ...]

    # derived arrays, one entry per candidate (built by plan_regimens)
    factors: NDArray[np.float64] = field(repr=False, compare=False)  # exposure ratio per unit AUCR; NaN for the exact dose
    log_factors: NDArray[np.float64] = field(repr=False, compare=False)
    exact: NDArray[np.bool_] = field(repr=False, compare=False)
    interval: NDArray[np.bool_] = field(repr=False, compare=False)
    taus_h: NDArray[np.float64] = field(repr=False, compare=False)  # the interval candidates' intervals
    codes: NDArray[np.int8] = field(repr=False, compare=False)  # action of each candidate, then AVOID (index -1)
    # whether any candidate is the exact dose / an interval (exact.any(), interval.any(): asked on every row chunk)
    has_exact: bool = field(repr=False, compare=False)
    has_interval: bool = field(repr=False, compare=False)


def _check_boundary(name: str, b: tuple[float, float]) -> tuple[float, float]:
    lo, hi = float(b[0]), float(b[1])
    if not (math.isfinite(lo) and math.isfinite(hi) and 0.0 < lo <= 1.0 <= hi):
        raise InputError(name, list(b), "is not a [lower, upper] pair with 0 < lower <= 1 <= upper")
    return lo, hi


_P = ParamSpec("_P")


def _remembered(function: Callable[_P, RegimenPlan]) -> Callable[_P, RegimenPlan]:
    """``function`` remembered by its (keyword) arguments, typed (10 and 10.0 are kept apart), when they are hashable.

    For :func:`plan_regimens`: the enumeration of strength sums was about 90 of the 490 us of an assessment
    of the demo, and the terminal app re-assesses the same object drug on every keystroke.  A plan is
    immutable (its arrays are read-only), so sharing one is safe.
    """
    cached = functools.lru_cache(maxsize=256, typed=True)(function)

    @functools.wraps(function)
    def call(*args: _P.args, **kwargs: _P.kwargs) -> RegimenPlan:
        try:
            hash((args, tuple(kwargs.values())))
        except TypeError:  # a list or an array given: built, not remembered
            return function(*args, **kwargs)
        return cached(*args, **kwargs)  # type: ignore[arg-type]  # hashable: checked above

    return call


def _check_plan(
    usual_dose: float,
    dose_unit: str,
    interval_h: float,
    strengths: tuple[float, ...],
    scored: tuple[float, ...],
    max_units: int,
    intervals_h: tuple[float, ...],
    half_life_h: float | None,
    boundary: tuple[float, float],
    peak_boundary: tuple[float, float] | None,
    trough_boundary: tuple[float, float] | None,
) -> tuple[tuple[float, float], tuple[float, float], tuple[float, float]]:
    """The usual regimen, strengths, intervals and half-life checked; the three boundaries (peak and trough default to AUC's)."""
    for name, value in (("victim.dose", usual_dose), ("victim.interval", interval_h)):
        if not (math.isfinite(value) and value > 0.0):
            raise InputError(name, value, "is not a positive finite number")
    bad = [s for s in (*strengths, *scored) if not (math.isfinite(s) and s > 0.0)]
    if bad:
        raise InputError("victim.strengths", bad[0], "is not a positive strength")
    missing = [s for s in scored if s not in strengths]
    if missing:
        raise InputError("victim.scored_strengths", f"{missing[0]:g} {dose_unit}", "is not one of the strengths")
    if not 1 <= max_units <= MAX_UNITS_LIMIT:
        raise InputError("victim.max_units", max_units, f"is not a whole number from 1 to {MAX_UNITS_LIMIT}")
    bad_tau = [t for t in intervals_h if not (math.isfinite(t) and t > 0.0)]
    if bad_tau:
        raise InputError("victim.intervals", bad_tau[0], "is not a positive interval")
    if half_life_h is not None and not (math.isfinite(half_life_h) and half_life_h > 0.0):
        raise InputError("victim.half_life", half_life_h, "is not a positive finite time")
    b = _check_boundary("victim.no_effect_boundary", boundary)
    pb = _check_boundary("victim.peak_boundary", peak_boundary) if peak_boundary is not None else b
    tb = _check_boundary("victim.trough_boundary", trough_boundary) if trough_boundary is not None else b
    return b, pb, tb


def _checked_sizes(strengths: tuple[float, ...], scored: tuple[float, ...], max_units: int) -> list[float]:
    """The unit sizes the search combines, checked against the search's limits."""
    sizes = _unit_sizes(tuple(strengths), tuple(scored))
    if len(sizes) > MAX_UNIT_SIZES:
        raise InputError(
            "victim.strengths",
            f"{len(sizes)} unit sizes",
            f"are more than the {MAX_UNIT_SIZES} the regimen search takes; list the forms in use",
        )
    combos = sum(math.comb(len(sizes) + k - 1, k) for k in range(1, max_units + 1))
    if combos > MAX_COMBINATIONS:
        raise InputError(
            "victim.max_units",
            max_units,
            f"with {len(sizes)} unit sizes gives {combos:,} combinations, more than the {MAX_COMBINATIONS:,} the regimen search "
            "enumerates; lower max_units or list fewer strengths",
        )
    return sizes


@_remembered
def plan_regimens(
    *,
    usual_dose: float,
    dose_unit: str,
    interval_h: float,
    strengths: tuple[float, ...] = (),
    scored: tuple[float, ...] = (),
    max_units: int = MAX_UNITS,
    intervals_h: tuple[float, ...] = DEFAULT_INTERVALS_H,
    half_life_h: float | None = None,
    boundary: tuple[float, float] = (0.8, 1.25),
    peak_boundary: tuple[float, float] | None = None,
    trough_boundary: tuple[float, float] | None = None,
    boundary_origin: str = "",
    narrow_therapeutic_index: bool = False,
) -> RegimenPlan:
    """Enumerate the regimens the object drug could be given.

    Parameters
    ----------
    usual_dose, dose_unit
        The usual dose per administration and its unit; ``strengths`` and
        ``scored`` are in the same unit.
    interval_h
        The usual dosing interval (h).
    strengths
        Available unit strengths.  A dose is a sum of 1 to ``max_units`` units,
        strengths mixed (10 + 2.5); a strength listed in ``scored`` may also be
        halved.  Without strengths the dose candidate is the exact dose.
    intervals_h
        Intervals (h) tried with the usual dose (common practice: 6 to 72 h).
    half_life_h
        The object drug's elimination half-life (h) without the precipitant;
        when given, interval candidates are judged on their steady-state peak
        and trough too (see :func:`regimen_feasibility`).
    boundary, peak_boundary, trough_boundary
        No-effect boundaries for the exposure (AUC) ratio, the peak ratio and
        the trough ratio; peak and trough default to ``boundary``.

    Raises
    ------
    InputError
        Naming the field, for a non-positive dose or interval, a bad boundary,
        or more unit sizes than the search takes.

    Plans are remembered by their arguments (see ``_remembered``).
    """
    b, pb, tb = _check_plan(
        usual_dose, dose_unit, interval_h, strengths, scored, max_units, intervals_h, half_life_h, boundary, peak_boundary, trough_boundary
    )
    sizes = _checked_sizes(strengths, scored, max_units)
    doses: list[Regimen] = []
    if sizes:
        for dose, parts in _dose_candidates(sizes, max_units):
            if math.isclose(dose, usual_dose, rel_tol=1e-9):
                continue  # the usual regimen itself
            doses.append(Regimen(kind="dose", dose=dose, interval_h=interval_h, makeup=_makeup(parts), units=len(parts)))
        doses.sort(key=lambda r: (r.units, r.dose))
    else:
        doses.append(Regimen(kind="exact dose", dose=math.nan, interval_h=interval_h, makeup="", units=0))
    taus = sorted(
        {float(t) for t in intervals_h if not math.isclose(t, interval_h, rel_tol=1e-9)}, key=lambda t: (abs(math.log(t / interval_h)), t)
    )
    regimens = (*doses, *(Regimen(kind="interval", dose=usual_dose, interval_h=t, makeup="", units=0) for t in taus))
    factors = np.array(
        [
            math.nan if c.kind == "exact dose" else (c.dose / usual_dose if c.kind == "dose" else interval_h / c.interval_h)
            for c in regimens
        ],
        dtype=float,
    )
    codes = [INTERVAL if c.kind == "interval" else (INCREASE if c.kind == "dose" and c.dose > usual_dose else REDUCE) for c in regimens]
    arrays = {
        "factors": factors,
        "log_factors": np.log(factors),
        "exact": np.array([c.kind == "exact dose" for c in regimens], dtype=bool),
        "interval": np.array([c.kind == "interval" for c in regimens], dtype=bool),
        "taus_h": np.array(taus, dtype=float),
        "codes": np.array([*codes, AVOID], dtype=np.int8),
    }
    for a in arrays.values():
        a.setflags(write=False)  # plans are shared (remembered by their arguments)
    return RegimenPlan(
        usual_dose=usual_dose,
        dose_unit=dose_unit,
        usual_interval_h=interval_h,
        candidates=regimens,
        half_life_h=half_life_h,
        boundary=b,
        peak_boundary=pb,
        trough_boundary=tb,
        boundary_origin=boundary_origin,
        narrow_therapeutic_index=narrow_therapeutic_index,
        max_units=max_units,
        intervals_h=tuple(sorted(float(t) for t in intervals_h)),
        has_exact=bool(arrays["exact"].any()),
        has_interval=bool(arrays["interval"].any()),
        **arrays,
    )


def plan_for_victim(victim: Victim, default_boundary: tuple[float, float], default_origin: str) -> RegimenPlan:
    """:func:`plan_regimens` for a scenario's object drug (its strengths, intervals, half-life and boundaries)."""
    unit = units.unit_text(victim.dose)
    if victim.no_effect_lower is not None and victim.no_effect_upper is not None:
        boundary, origin = (victim.no_effect_lower, victim.no_effect_upper), "given for this victim"
    else:
        boundary, origin = default_boundary, default_origin
    return plan_regimens(
        usual_dose=float(victim.dose.magnitude),
        dose_unit=unit,
        interval_h=units.magnitude(victim.interval, "h"),
        strengths=tuple(units.magnitude(s, unit) for s in victim.strengths),
        scored=tuple(units.magnitude(s, unit) for s in victim.scored_strengths),
        max_units=victim.max_units if victim.max_units is not None else MAX_UNITS,
        intervals_h=tuple(units.magnitude(t, "h") for t in victim.intervals) or DEFAULT_INTERVALS_H,
        half_life_h=units.magnitude(victim.half_life, "h") if victim.half_life is not None else None,
        boundary=boundary,
        peak_boundary=victim.peak_boundary,
        trough_boundary=victim.trough_boundary,
        boundary_origin=origin,
        narrow_therapeutic_index=victim.narrow_therapeutic_index,
    )


# --------------------------------------------------------------------------- feasibility (arrays)


@dataclass(frozen=True, slots=True, kw_only=True)
class CandidateRatios:
    """Each candidate's predicted ratios against the usual regimen alone, for rows of AUC ratios (rows x candidates)."""

    exposure: NDArray[np.float64]
    peak: NDArray[np.float64]  # NaN where not judged (dose candidates, or no half-life)
    trough: NDArray[np.float64]
    feasible: NDArray[np.bool_]


def _inside(x: NDArray[np.float64], b: tuple[float, float]) -> NDArray[np.bool_]:
    return (x >= b[0]) & (x <= b[1])


def regimen_feasibility(plan: RegimenPlan, total: ArrayLike, gut: ArrayLike | None = None) -> CandidateRatios:
    """Exposure, peak and trough ratios of every candidate, and whether it is feasible.

    Exposure ratio (average concentration with the precipitant and the
    candidate, over the usual regimen alone; linear kinetics, common
    practice): AUCR x dose / usual dose for a dose, AUCR x usual interval /
    interval for an interval, exactly 1 for the exact dose.

    Peak and trough ratios of interval candidates, when the half-life is
    known: steady state of a one-compartment model with first-order
    elimination and input fast against the interval (standard accumulation,
    common practice): C_max = F D / V / (1 - exp(-k tau)), C_min = C_max
    exp(-k tau).  The precipitant multiplies F by the gut ratio and divides
    clearance (so k) by AUCR / gut ratio; V is unchanged.

    A candidate is feasible when its exposure ratio, and for a judged interval
    its peak and trough ratios, lie inside their boundaries (inclusive, no
    tolerance).
    """
    with _quiet():
        return _candidate_ratios(plan, total, gut)


def _quiet() -> np.errstate:
    """The floating-point states the candidate arithmetic ignores (a row that is not a finite positive ratio gives NaN
    or inf, never a warning): entered once by each caller of the unguarded helpers below (about 1.6 us each time)."""
    return np.errstate(invalid="ignore", over="ignore", divide="ignore")


def _candidate_ratios(plan: RegimenPlan, total: ArrayLike, gut: ArrayLike | None) -> CandidateRatios:
    """:func:`regimen_feasibility` without its ``np.errstate`` (the caller enters it)."""
    r = np.atleast_1d(np.asarray(total, dtype=float))
    # the gut ratio counts only for judged intervals (a half-life given): not shaped otherwise (a few us of one row)
    g = None if gut is None or plan.half_life_h is None else np.broadcast_to(np.atleast_1d(np.asarray(gut, dtype=float)), r.shape)
    exposure, feasible, judged = _exposure_and_feasibility(plan, r, g)
    peak = np.empty(exposure.shape)  # empty then fill: the same NaN arrays as np.full, in half its time on one row
    peak.fill(np.nan)
    trough = np.empty(exposure.shape)
    trough.fill(np.nan)
    if judged is not None:
        peak[:, plan.interval], trough[:, plan.interval] = judged
    return CandidateRatios(exposure=exposure, peak=peak, trough=trough, feasible=feasible)


def _exposure_and_feasibility(
    plan: RegimenPlan, total: NDArray[np.float64], gut: NDArray[np.float64] | None
) -> tuple[NDArray[np.float64], NDArray[np.bool_], tuple[NDArray[np.float64], NDArray[np.float64]] | None]:
    """(exposure ratios, feasibility, (peak, trough) of the interval columns or None): rows x candidates (called
    under ``_quiet()``)."""
    r = total[:, None]
    exposure = r * plan.factors[None, :]
    if plan.has_exact:
        exposure[:, plan.exact] = np.where(np.isfinite(r) & (r > 0.0), 1.0, np.nan)
    feasible = _inside(exposure, plan.boundary)
    if plan.half_life_h is None or not plan.has_interval:
        return exposure, feasible, None
    g = np.ones_like(r) if gut is None else gut[:, None]
    k = _LN2 / plan.half_life_h
    tau0 = plan.usual_interval_h
    taus = plan.taus_h[None, :]
    k_new = k * g / r  # clearance divided by the hepatic (non-gut) part AUCR / Rg
    base = -math.expm1(-k * tau0)
    den = -np.expm1(-k_new * taus)
    pk = g * base / den
    tr = np.exp(np.log(g) + k * tau0 - k_new * taus + math.log(base) - np.log(den))
    feasible[:, plan.interval] &= _inside(pk, plan.peak_boundary) & _inside(tr, plan.trough_boundary)
    return exposure, feasible, (pk, tr)


@dataclass(frozen=True, slots=True, kw_only=True)
class RegimenChoice:
    """Per row: the action code (into :data:`ACTIONS`) and the chosen candidate (-1 = none; worked out when asked for)."""

    action: NDArray[np.int8]
    chosen_rows: Callable[[], NDArray[np.intp]] = field(repr=False, compare=False)

    @property
    def chosen(self) -> NDArray[np.intp]:
        """The chosen candidate of each row (an index into the plan's candidates), -1 for none."""
        return self.chosen_rows()


def _scores(plan: RegimenPlan, total: NDArray[np.float64], feasible: NDArray[np.bool_]) -> NDArray[np.float64]:
    """Distance from the usual exposure on the log scale, |log(AUCR x factor)| (0 for the exact dose); inf where infeasible.

    The one ranking of candidates: the choice is the smallest, ties to the earlier candidate (called under
    ``_quiet()``).
    """
    score = np.abs(np.log(total)[:, None] + plan.log_factors[None, :])
    if plan.has_exact:
        score[:, plan.exact] = 0.0
    score[~feasible] = np.inf
    return score


def _decide(plan: RegimenPlan, total: NDArray[np.float64], score: NDArray[np.float64]) -> tuple[NDArray[np.int8], NDArray[np.intp]]:
    """Action codes and chosen candidates (-1 = none) from the scores (rows x candidates)."""
    n = total.shape[0]
    inside = _inside(total, plan.boundary)
    if not plan.candidates:
        chosen = np.full(n, -1, dtype=np.intp)
    else:
        chosen = np.argmin(score, axis=1)  # intp, a new array; argmin takes the first of equal scores
        chosen[~np.isfinite(score[np.arange(n), chosen])] = -1
    action = plan.codes[chosen]  # chosen = -1 picks AVOID
    if plan.has_exact:
        action = np.where(plan.exact[np.maximum(chosen, 0)] & (chosen >= 0) & (total < 1.0), np.int8(INCREASE), action)
    action = np.where(inside, np.int8(NO_CHANGE), action).astype(np.int8, copy=False)
    chosen[inside] = -1
    return action, chosen


def _choose_chunk(
    plan: RegimenPlan, total: NDArray[np.float64], gut: NDArray[np.float64] | None
) -> tuple[NDArray[np.int8], NDArray[np.intp]]:
    with _quiet():
        _, feasible, _ = _exposure_and_feasibility(plan, total, gut)
        score = _scores(plan, total, feasible)
    return _decide(plan, total, score)


def choose_regimens(plan: RegimenPlan, total: ArrayLike, gut: ArrayLike | None = None) -> RegimenChoice:
    """The suggested action and regimen for each AUC ratio in ``total`` (with its gut ratio ``gut``).

    The rule, the same for one scenario, a batch of pairs and a set of samples:

    - the AUC ratio inside the no-effect boundary: no change;
    - otherwise the feasible candidate (see :func:`regimen_feasibility`)
      closest to the usual exposure on the log scale, ties to the earlier
      candidate (dose changes first, fewer units first); its kind gives the
      action (reduce dose, increase dose, change interval);
    - no feasible candidate: avoid or monitor.

    Evaluated in chunks of rows, so memory stays bounded for any length.  For many rows of a plan whose candidates
    are judged on exposure alone, the rule is first evaluated once per stretch of AUC ratios over which it cannot
    change (:func:`_rule_steps`), and each row looks its answer up; rows near a point where the answer may change
    are evaluated directly.  Both give the same answer (``tests/test_regimens.py`` holds them equal).
    """
    r = np.atleast_1d(np.asarray(total, dtype=float)).ravel()
    g = None if gut is None else np.broadcast_to(np.asarray(gut, dtype=float), np.shape(total)).ravel()
    shape = np.shape(total)
    steps = _rule_steps(plan) if r.size >= _STEP_TABLE_ROWS else None
    if steps is None:
        action, chosen = _choose_rows(plan, r, g)
        return RegimenChoice(action=action.reshape(shape), chosen_rows=lambda: chosen.reshape(shape))
    (action,), stretch, rest = steps.look_up(r, stretch=True)
    assert stretch is not None
    direct = _choose_rows(plan, r[rest], None if g is None else g[rest])  # near a change point, or not a finite positive ratio
    action[rest] = direct[0]

    def chosen_rows() -> NDArray[np.intp]:
        assert steps is not None
        chosen: NDArray[np.intp] = steps.values[1][stretch]
        chosen[rest] = direct[1]
        return chosen.reshape(shape)

    return RegimenChoice(action=action.reshape(shape), chosen_rows=chosen_rows)


def _choose_rows(plan: RegimenPlan, r: NDArray[np.float64], g: NDArray[np.float64] | None) -> tuple[NDArray[np.int8], NDArray[np.intp]]:
    """The rule evaluated directly, every candidate of every row, in chunks of rows."""
    action = np.empty(r.size, dtype=np.int8)
    chosen = np.empty(r.size, dtype=np.intp)
    step = _rows_per_chunk(plan)
    for a in range(0, r.size, step):
        b = min(r.size, a + step)
        action[a:b], chosen[a:b] = _choose_chunk(plan, r[a:b], None if g is None else g[a:b])
    return action, chosen


#: rows from which choose_regimens builds (or reuses) a plan's step table rather than scanning every candidate per row
_STEP_TABLE_ROWS: Final = 4096


@functools.lru_cache(maxsize=128)
def _rule_steps(plan: RegimenPlan) -> StepTable | None:
    """The rule of :func:`choose_regimens` as a step function of the AUC ratio (:class:`interact.steps.StepTable`), or
    None where it is not one.

    When no candidate is judged on peak and trough (no half-life, or no interval candidates), a row's answer depends
    on its AUC ratio r alone, through the candidates' exposures r x f (f: exposure factor) against the boundary
    [lo, hi] and their scores |log r + log f|.  Sorted by f, the feasible candidates are one run (r x f rises with f)
    and the scores fall then rise, lowest next to where log r + log f changes sign; so, in exact arithmetic, the
    chosen candidate can change only where the run's ends move (r = lo / f, r = hi / f), where two neighbouring
    scores swap (r = 1 / sqrt(f_k x f_k+1)), and where r crosses the boundary itself (lo, hi; and 1, where an exact
    dose turns from reduce to increase).  Between those points the answer is constant: it is taken from the rule
    itself (:func:`_choose_rows`), evaluated at one ratio in each stretch.  Plans are compared by value, so victims
    with the same regimens share one table.
    """
    if plan.half_life_h is not None and plan.has_interval:
        return None  # peak and trough depend on the gut ratio too: evaluated directly
    lo, hi = plan.boundary
    f = np.unique(plan.factors[~plan.exact])
    points = np.concatenate([[lo, hi, 1.0], lo / f, hi / f, 1.0 / np.sqrt(f[:-1] * f[1:])])
    return StepTable.build(points, lambda r: _choose_rows(plan, r, None))


def _rows_per_chunk(plan: RegimenPlan) -> int:
    return max(1, _CELLS // max(1, len(plan.candidates)))


def feasible_fraction(plan: RegimenPlan, total: ArrayLike, gut: ArrayLike | None = None) -> tuple[float, NDArray[np.float64]]:
    """Over rows of (AUC ratio, gut ratio), e.g. samples: the fraction inside the boundary with the usual regimen, and per candidate.

    The probability, under the sampled inputs, that the object drug's
    exposure stays inside its boundaries with each regimen (the same
    feasibility test as :func:`choose_regimens`).  For many rows of a plan judged on exposure alone, the rows are
    counted per stretch of AUC ratios over which no candidate's feasibility can change (:func:`_feasibility_steps`),
    and each stretch's counts go to the candidates feasible there; rows near a change point are tested directly.
    """
    r = np.atleast_1d(np.asarray(total, dtype=float)).ravel()
    g = None if gut is None else np.broadcast_to(np.asarray(gut, dtype=float), np.shape(total)).ravel()
    usual = int(np.count_nonzero(_inside(r, plan.boundary)))
    n = max(1, r.size)
    steps = _feasibility_steps(plan) if r.size >= _STEP_TABLE_ROWS else None
    if steps is None:
        return usual / n, _feasible_counts(plan, r, g) / n
    _, stretch, rest = steps.look_up(r, (), stretch=True)
    assert stretch is not None
    per_stretch = np.bincount(stretch, minlength=steps.values[0].shape[0])
    per_stretch[0] -= rest.size  # the rows tested directly were counted in stretch 0
    counts = (per_stretch @ steps.values[0].astype(np.int64)) + _feasible_counts(plan, r[rest], None if g is None else g[rest])
    return usual / n, counts / n


def _feasible_counts(plan: RegimenPlan, r: NDArray[np.float64], g: NDArray[np.float64] | None) -> NDArray[np.float64]:
    """How many rows each candidate is feasible for, tested directly in chunks of rows."""
    counts = np.zeros(len(plan.candidates))
    step = _rows_per_chunk(plan)
    for a in range(0, r.size, step):
        b = min(r.size, a + step)
        counts += regimen_feasibility(plan, r[a:b], None if g is None else g[a:b]).feasible.sum(axis=0)
    return counts


@functools.lru_cache(maxsize=128)
def _feasibility_steps(plan: RegimenPlan) -> StepTable | None:
    """Each candidate's feasibility (:func:`regimen_feasibility`) as a step function of the AUC ratio r (values: stretches
    x candidates), or None where it is not one (intervals judged on peak and trough depend on the gut ratio too).

    Judged on exposure alone, a candidate is feasible while lo <= r x f <= hi: its feasibility changes only at
    r = lo / f and r = hi / f (the exact dose: at none, for a finite positive r).
    """
    if plan.half_life_h is not None and plan.has_interval:
        return None
    lo, hi = plan.boundary
    f = np.unique(plan.factors[~plan.exact])
    return StepTable.build(np.concatenate([lo / f, hi / f]), lambda r: (regimen_feasibility(plan, r).feasible,))


# --------------------------------------------------------------------------- one scenario, with reasons


@dataclass(frozen=True, slots=True, kw_only=True)
class RegimenOutcome:
    """A candidate regimen with its predicted ratios for one scenario."""

    index: int  # position in RegimenPlan.candidates
    regimen: Regimen
    exposure_ratio: float
    peak_ratio: float | None
    trough_ratio: float | None
    feasible: bool
    checked: bool  # interval judged on peak and trough (half-life known); always True for doses

    def describe(self, unit: str) -> str:
        """'12.5 mg every 24 h (10 + 2.5 mg)' (no ratios)."""
        return regimen_label(self.regimen, unit)


@dataclass(frozen=True, slots=True, kw_only=True)
class DoseSuggestion:
    """What the model suggests for the object drug's regimen, and why."""

    action: str  # one of ACTIONS
    monitoring: bool  # narrow therapeutic index and a ratio other than 1: only under monitoring
    plan: RegimenPlan  # the regimens searched, the usual regimen and the boundaries
    auc_ratio: float
    gut_ratio: float
    exact_dose: float
    exact_interval_h: float
    chosen: RegimenOutcome | None
    options: tuple[RegimenOutcome, ...]  # every feasible candidate, best first
    nearest: tuple[RegimenOutcome, ...]  # when none is feasible: the nearest dose and the nearest interval
    reasons: tuple[str, ...]
    cautions: tuple[str, ...]

    @property
    def boundary(self) -> tuple[float, float]:
        return self.plan.boundary

    @property
    def boundary_origin(self) -> str:
        return self.plan.boundary_origin

    @property
    def peak_boundary(self) -> tuple[float, float]:
        return self.plan.peak_boundary

    @property
    def trough_boundary(self) -> tuple[float, float]:
        return self.plan.trough_boundary

    @property
    def usual_dose(self) -> float:
        return self.plan.usual_dose

    @property
    def dose_unit(self) -> str:
        return self.plan.dose_unit

    @property
    def usual_interval_h(self) -> float:
        return self.plan.usual_interval_h

    @property
    def half_life_h(self) -> float | None:
        return self.plan.half_life_h

    @property
    def headline(self) -> str:
        """The action, with the monitoring qualifier of a narrow-therapeutic-index object drug."""
        return f"{self.action}, only with therapeutic drug monitoring (narrow therapeutic index)" if self.monitoring else self.action

    @property
    def chosen_dose(self) -> float | None:
        """The suggested dose when the suggestion is a dose change (None otherwise)."""
        c = self.chosen
        return c.regimen.dose if c is not None and c.regimen.kind != "interval" else None

    @property
    def chosen_interval_h(self) -> float | None:
        """The suggested interval when the suggestion is an interval change (None otherwise)."""
        c = self.chosen
        return c.regimen.interval_h if c is not None and c.regimen.kind == "interval" else None


def _outcomes(plan: RegimenPlan, auc_ratio: float, c: CandidateRatios, only: list[int] | None = None) -> list[RegimenOutcome]:
    """The candidates (those at the positions ``only``, else all) with their ratios for the first row of ``c``."""
    out = []
    # the first row as Python numbers at once (the same values as float() of each element, without a numpy scalar each)
    exposure, peak, trough, feasible = (c.exposure[0].tolist(), c.peak[0].tolist(), c.trough[0].tolist(), c.feasible[0].tolist())
    for k in range(len(plan.candidates)) if only is None else only:
        reg = plan.candidates[k]
        if reg.kind == "exact dose":
            reg = dataclasses.replace(reg, dose=plan.usual_dose / auc_ratio)
        judged = reg.kind == "interval" and plan.half_life_h is not None
        out.append(
            RegimenOutcome(
                index=k,
                regimen=reg,
                exposure_ratio=exposure[k],
                peak_ratio=peak[k] if judged else None,
                trough_ratio=trough[k] if judged else None,
                feasible=feasible[k],
                checked=reg.kind != "interval" or judged,
            )
        )
    return out


def _outside_by(x: float, b: tuple[float, float]) -> float:
    """How far (log scale) x lies outside [lower, upper]; 0 inside."""
    if not (math.isfinite(x) and x > 0.0):
        return math.inf
    return max(0.0, math.log(b[0] / x), math.log(x / b[1]))


def _miss(o: RegimenOutcome, plan: RegimenPlan) -> float:
    return max(
        _outside_by(o.exposure_ratio, plan.boundary),
        0.0 if o.peak_ratio is None else _outside_by(o.peak_ratio, plan.peak_boundary),
        0.0 if o.trough_ratio is None else _outside_by(o.trough_ratio, plan.trough_boundary),
    )


def _ratios_text(o: RegimenOutcome) -> str:
    text = f"exposure ratio {o.exposure_ratio:.3g}"
    if o.regimen.kind == "interval":
        if o.peak_ratio is not None and o.trough_ratio is not None:
            text += f", steady-state peak ratio {o.peak_ratio:.3g}, trough ratio {o.trough_ratio:.3g}"
        else:
            text += ", peak and trough unchecked (no half-life given)"
    return text


def _why_outside(o: RegimenOutcome, plan: RegimenPlan) -> str:
    parts = []
    for label, x, b in (
        ("exposure", o.exposure_ratio, plan.boundary),
        ("peak", o.peak_ratio, plan.peak_boundary),
        ("trough", o.trough_ratio, plan.trough_boundary),
    ):
        if x is None or b[0] <= x <= b[1]:
            continue
        if x > b[1]:
            parts.append(f"{label} {x:.3g}, {100 * (x / b[1] - 1):.0f} % above {b[1]:g}")
        else:
            parts.append(f"{label} {x:.3g}, {100 * (1 - x / b[0]):.0f} % below {b[0]:g}")
    return "; ".join(parts)


def _regimen_reasons(
    plan: RegimenPlan, outcomes: list[RegimenOutcome], score: NDArray[np.float64], chosen: RegimenOutcome | None, reasons: list[str]
) -> tuple[tuple[RegimenOutcome, ...], tuple[RegimenOutcome, ...]]:
    """The reasons for the chosen regimen (or for avoiding the combination), added to ``reasons``; the options inside
    the boundary, best first, and the nearest ones outside when none is inside."""
    unit = plan.dose_unit
    nearest: tuple[RegimenOutcome, ...] = ()
    ranked = sorted((o for o in outcomes if o.feasible), key=lambda o: (score[0, o.index], o.index))
    if chosen is not None:
        what = "the exact dose (no strengths given: round to an available form)" if chosen.regimen.kind == "exact dose" else ""
        reasons.append(
            f"Suggested regimen: {chosen.describe(unit)}{' - ' + what if what else ''}; {_ratios_text(chosen)}, "
            "against the usual regimen alone; the closest to the usual exposure of the regimens inside the boundary."
        )
        if chosen.regimen.kind == "interval":
            longer = chosen.regimen.interval_h > plan.usual_interval_h
            reasons.append(
                f"{'A longer' if longer else 'A shorter'} interval keeps the average concentration but "
                f"{'widens' if longer else 'narrows'} the swing between peak and trough"
                + (
                    f"; with the half-life {plan.half_life_h:.3g} h the peak and trough stay inside "
                    f"{plan.peak_boundary[0]:g}-{plan.peak_boundary[1]:g} and {plan.trough_boundary[0]:g}-{plan.trough_boundary[1]:g} "
                    "(one-compartment accumulation, stated as such)."
                    if plan.half_life_h is not None
                    else ": unchecked, because no half-life was given; give victim.half_life to judge peak and trough."
                )
            )
        if len(ranked) > 1:
            reasons.append(f"{len(ranked) - 1} other regimen(s) also keep exposure inside the boundary (table below).")
    else:
        dose_side = [o for o in outcomes if o.regimen.kind != "interval"]
        tau_side = [o for o in outcomes if o.regimen.kind == "interval"]
        near = [min(side, key=lambda o: (_miss(o, plan), o.index)) for side in (dose_side, tau_side) if side]
        nearest = tuple(near)
        reasons.append(
            f"No regimen within reach keeps exposure inside the boundary (doses of up to {plan.max_units} units of "
            f"the strengths given; intervals {', '.join(f'{t:g}' for t in plan.intervals_h)} h): avoid the combination, "
            "or monitor closely if it cannot be avoided."
        )
        if near:
            reasons.append(
                "Nearest options, all outside: " + "; ".join(f"{o.describe(unit)} ({_why_outside(o, plan)})" for o in near) + "."
            )
    return tuple(ranked), nearest


def _mixed_reasons(auc_ratio: float, mechanism_parts: tuple[tuple[str, float], ...], boundary: tuple[float, float]) -> list[str]:
    """For opposite mechanisms: the net ratio and each part, and a warning when a part alone is outside the boundary."""
    lower, upper = boundary
    reasons = []
    shown = ", ".join(f"{name} alone {ratio:.3g}" for name, ratio in mechanism_parts)
    reasons.append(f"Mixed effect: the net AUC ratio {auc_ratio:.3g} combines opposite mechanisms ({shown}).")
    outside = [(n, r) for n, r in mechanism_parts if not lower <= r <= upper]
    if outside:
        reasons.append(
            f"Parts outside the boundary ({', '.join(f'{n} alone {r:.3g}' for n, r in outside)}): if the mechanisms develop "
            "at different speeds, exposure can move towards a part for a time (reversible inhibition ends at once when the "
            "perpetrator stops, enzyme changes last days); the time course shows whether it does."
        )
    return reasons


def suggest_dose(
    plan: RegimenPlan,
    *,
    auc_ratio: float,
    gut_ratio: float = 1.0,
    mechanism_parts: tuple[tuple[str, float], ...] = (),
) -> DoseSuggestion:
    """The regimen suggestion for one scenario, with its reasons and cautions.

    The decision is :func:`choose_regimens` for one row (the rule every batch
    and sample follows); this adds the text and lists every feasible option.

    Parameters
    ----------
    plan
        The object drug's regimens and boundaries (:func:`plan_for_victim`).
    auc_ratio, gut_ratio
        Predicted AUC ratio (with / without the precipitant) and its gut part.
    mechanism_parts
        For mixed effects (inhibition and induction), (mechanism, AUC ratio
        with that mechanism alone) pairs: the suggestion then states the net and
        each part, and warns when a part alone lies outside the boundary.
    """
    if not (math.isfinite(auc_ratio) and auc_ratio > 0.0):
        raise InputError("auc_ratio", auc_ratio, "is not a positive finite AUC ratio")
    lower, upper = plan.boundary
    unit = plan.dose_unit
    # the rule of choose_regimens for one row, with the ratios and scores kept for the text and the table
    r = np.array([auc_ratio])
    with _quiet():  # entered once for both
        ratios = _candidate_ratios(plan, r, [gut_ratio])
        score = _scores(plan, r, ratios.feasible)
    codes, picks = _decide(plan, r, score)
    code, k = int(codes[0]), int(picks[0])
    # the records the text needs: none inside the boundary, the feasible ones when one is chosen, all for the nearest
    feasible = [] if code == NO_CHANGE else ratios.feasible[0].nonzero()[0].tolist() if k >= 0 else None
    outcomes = _outcomes(plan, auc_ratio, ratios, feasible)
    exact = plan.usual_dose / auc_ratio
    exact_tau = plan.usual_interval_h * auc_ratio
    reasons: list[str] = []
    cautions = list(DOSE_CAUTIONS)
    chosen: RegimenOutcome | None = next(o for o in outcomes if o.index == k) if k >= 0 else None
    options: tuple[RegimenOutcome, ...] = ()
    nearest: tuple[RegimenOutcome, ...] = ()
    if code == NO_CHANGE:
        reasons.append(
            f"Predicted AUC ratio {auc_ratio:.3g} lies within the no-effect boundary {lower:g}-{upper:g} "
            f"({plan.boundary_origin}): no dose change is suggested."
        )
    else:
        increase = auc_ratio < lower
        reasons.append(
            f"Predicted AUC ratio {auc_ratio:.3g} lies {'below' if increase else 'above'} the no-effect boundary "
            f"{lower:g}-{upper:g} ({plan.boundary_origin})."
        )
        reasons.append(
            f"With linear kinetics the usual exposure returns with {plan.usual_dose:g} {unit} / {auc_ratio:.3g} = {exact:.3g} {unit} "
            f"every {plan.usual_interval_h:g} h, or {plan.usual_dose:g} {unit} every {plan.usual_interval_h:g} h x {auc_ratio:.3g} "
            f"= {exact_tau:.3g} h."
        )
        options, nearest = _regimen_reasons(plan, outcomes, score, chosen, reasons)
        if increase:
            cautions.insert(0, INCREASE_CAUTION)
    if mechanism_parts:
        reasons.extend(_mixed_reasons(auc_ratio, mechanism_parts, plan.boundary))
    monitoring = plan.narrow_therapeutic_index and auc_ratio != 1.0
    if plan.narrow_therapeutic_index:
        reasons.append(
            "The victim is marked narrow therapeutic index: any regimen here is a starting point for therapeutic drug "
            "monitoring, not a substitute for it or for expert review; avoiding the combination may be safer."
        )
    return DoseSuggestion(
        action=ACTIONS[code],
        monitoring=monitoring,
        plan=plan,
        auc_ratio=auc_ratio,
        gut_ratio=gut_ratio,
        exact_dose=exact,
        exact_interval_h=exact_tau,
        chosen=chosen,
        options=options,
        nearest=nearest,
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


def _start_advice(onset_h: float, increase: bool, pct: str) -> str:
    """When to change the victim's dose on starting the perpetrator, from the onset time (h)."""
    if onset_h <= 24.0:
        return (
            f"Start: {pct} of the change is reached within {_days(onset_h)} days of starting the perpetrator; "
            "change the victim's dose when the perpetrator is started."
        )
    elif increase:
        return (
            f"Start: induction builds over about {_days(onset_h)} days ({pct} of its steady effect); raise the victim's "
            "dose stepwise over that time, guided by monitoring, rather than all at once."
        )
    else:
        return (
            f"Start: the rise in exposure builds over about {_days(onset_h)} days ({pct} of its steady effect); a reduced "
            "dose from the first day of co-administration is the cautious choice, with review over that time."
        )


def _stop_advice(
    offset_h: float | None, half_offset_h: float | None, follow_up_h: float, increase: bool, pct: str, mechanisms: tuple[str, ...]
) -> str:
    """When to go back to the usual dose on stopping the perpetrator, from the offset time (h) and its causes."""
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
            return (
                f"Stop: the effect is gone within {_days(offset_h)} days of stopping ({reason}); return to the usual dose "
                "when the perpetrator is stopped."
            )
        elif increase:
            return (
                f"Stop: after the perpetrator is stopped the effect fades, {half}{pct} of it within {_days(offset_h)} days "
                f"({reason}); bring the victim's dose back to the usual dose progressively over that time - keeping the "
                "higher dose risks toxicity as induction fades."
            )
        else:
            return (
                f"Stop: after the perpetrator is stopped the effect fades, {half}{pct} of it within {_days(offset_h)} days "
                f"({reason}); step back up to the usual dose over that time, fully by about day {_days(offset_h)}: "
                "returning at once risks overexposure while the effect lasts, keeping the reduced dose too long risks "
                "underexposure."
            )
    else:
        return (
            f"Stop: the effect had not faded within the {_days(follow_up_h)} days simulated after stopping; return to "
            "the usual dose only under monitoring."
        )


def _rebound_advice(after_stop_ratio: float, after_stop_h: float, steady_ratio: float, boundary: tuple[float, float]) -> list[str]:
    """A swing after stopping that leaves the boundary on the other side of 1, or beyond the steady effect."""
    lower, upper = boundary
    ln_ss = math.log(steady_ratio) if steady_ratio > 0 else 0.0
    out = []
    if not lower <= after_stop_ratio <= upper and (
        (after_stop_ratio - 1.0) * (steady_ratio - 1.0) < 0 or abs(math.log(after_stop_ratio)) > abs(ln_ss) * 1.1
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
    return out


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
        out.append(_start_advice(onset_h, increase, pct))
    ln_ss = math.log(steady_ratio) if steady_ratio > 0 else 0.0
    if abs(math.log(peak_ratio) - ln_ss) > (1.0 - effect_fraction) * abs(ln_ss) + 1e-9 and not lower <= peak_ratio <= upper:
        out.append(
            f"The exposure ratio passes through {peak_ratio:.3g} around day {_days(peak_h)} before settling at "
            f"{steady_ratio:.3g} (the mechanisms act at different speeds): one dose change does not fit the whole course; "
            "monitor closely in the first weeks."
        )
    if after_stop_ratio is not None and after_stop_h is not None:
        out.extend(_rebound_advice(after_stop_ratio, after_stop_h, steady_ratio, boundary))
    out.append(_stop_advice(offset_h, half_offset_h, follow_up_h, increase, pct, mechanisms))
    out.append(
        "Timing comes from a minimal one-compartment model and enzyme turnover rates that are often from memory: "
        "a guide for monitoring, not a schedule."
    )
    return tuple(out)
