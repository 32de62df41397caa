"""Class bands and dose-suggestion actions on arrays of AUC ratios.

Batch screening and sampling evaluate the mechanistic model for many pairs
or many samples at once; these helpers turn the resulting arrays of AUC
ratios into the same class band and the same suggested action that
:func:`interact.assessment.assess` gives for one scenario.  The rules are
those of :meth:`interact.tables.Classes.classify` and
:func:`interact.dosing.suggest_dose`, written on arrays; tests keep the two
equal pair by pair.
"""

from __future__ import annotations

from typing import Final

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .dosing import PRACTICAL_INTERVALS_H, _candidates
from .tables import Classes

__all__ = [
    "ACTIONS",
    "band_codes",
    "band_labels",
    "dose_action_breakpoints",
    "dose_action_codes",
    "dose_action_codes_by_victim",
    "dose_candidates",
]

#: suggested actions, indexed by the codes of :func:`dose_action_codes`
ACTIONS: Final = ("no change", "reduce dose", "increase dose", "avoid or monitor")

_TOL: Final = 1e-9  # the tolerances of suggest_dose and math.isclose


def band_labels(classes: Classes) -> tuple[str, ...]:
    """Labels indexed by :func:`band_codes`: 0 is "no class", then inhibition bands (strongest first), then induction."""
    inh = sorted(classes.inhibition, key=lambda b: -b.bound)
    ind = sorted(classes.induction, key=lambda b: b.bound)
    return ("no class", *(f"{b.name} inhibition" for b in inh), *(f"{b.name} induction" for b in ind))


def band_codes(auc_ratio: ArrayLike, classes: Classes) -> NDArray[np.int8]:
    """The class band of each AUC ratio as a code into :func:`band_labels` (0 = between the bands).

    Same order of tests as :meth:`Classes.classify`: inhibition bands from the
    strongest down (lower bound inclusive), then induction bands from the
    strongest up (upper bound inclusive).
    """
    r = np.asarray(auc_ratio, dtype=float)
    inh = sorted(classes.inhibition, key=lambda b: -b.bound)
    ind = sorted(classes.induction, key=lambda b: b.bound)
    conditions = [r >= b.bound for b in inh] + [r <= b.bound for b in ind]
    choices = list(range(1, len(conditions) + 1))
    return np.select(conditions, choices, default=0).astype(np.int8)


def dose_candidates(strength_sets: list[tuple[float, ...]]) -> NDArray[np.float64]:
    """Available doses per victim (1 to 4 units of one strength), padded with NaN to one width."""
    rows = [[d for d, _ in _candidates(s)] if s else [] for s in strength_sets]
    width = max((len(r) for r in rows), default=0)
    out = np.full((len(rows), max(width, 1)), np.nan)
    for i, r in enumerate(rows):
        out[i, : len(r)] = r
    return out


def _isclose(a: NDArray[np.float64], b: ArrayLike) -> NDArray[np.bool_]:
    """math.isclose with its default rel_tol = 1e-9, on arrays."""
    bb = np.asarray(b, dtype=float)
    return np.abs(a - bb) <= _TOL * np.maximum(np.abs(a), np.abs(bb))


def dose_action_codes(
    auc_ratio: ArrayLike,
    *,
    usual_dose: ArrayLike,
    interval_h: ArrayLike,
    candidates: ArrayLike,
    lower: ArrayLike,
    upper: ArrayLike,
    narrow_therapeutic_index: ArrayLike,
) -> NDArray[np.int8]:
    """The action :func:`~interact.dosing.suggest_dose` would suggest, as codes into :data:`ACTIONS`.

    Parameters
    ----------
    auc_ratio
        Predicted AUC ratios, any shape ``S``.
    usual_dose, interval_h, lower, upper, narrow_therapeutic_index
        The victim's usual dose, dosing interval (h), no-effect boundary and
        narrow-therapeutic-index flag, broadcastable to ``S``.
    candidates
        Available doses (same unit as ``usual_dose``) along a last axis,
        NaN-padded (see :func:`dose_candidates`); shape ``S + (k,)`` or
        broadcastable to it.  All NaN means no strengths were given.
    """
    r = np.asarray(auc_ratio, dtype=float)
    usual = np.asarray(usual_dose, dtype=float)
    tau = np.asarray(interval_h, dtype=float)
    lo = np.asarray(lower, dtype=float)
    hi = np.asarray(upper, dtype=float)
    cand = np.asarray(candidates, dtype=float)
    inside_boundary = (lo <= r) & (r <= hi)
    increase = r < lo
    has_strengths = np.any(~np.isnan(cand), axis=-1)

    # a dose among the candidates: as in suggest_dose, ratio = auc_ratio * dose / usual
    rx = r[..., None]
    ratio_d = rx * cand / usual[..., None]
    inside = np.any((lo[..., None] <= ratio_d) & (ratio_d <= hi[..., None]), axis=-1)
    exact = usual / r
    fits = cand <= (exact * (1 + _TOL))[..., None]
    fitting = np.any(fits, axis=-1)
    largest_fit = np.max(np.where(fits, cand, -np.inf), axis=-1)
    dose_found = inside | (fitting & ~(increase & (largest_fit <= usual)))
    dose_found &= has_strengths

    # an interval among the practical ones
    exact_tau = tau * r
    t = np.asarray(PRACTICAL_INTERVALS_H, dtype=float)
    longer = t >= (exact_tau * (1 - _TOL))[..., None]
    shorter = t <= (exact_tau * (1 + _TOL))[..., None]
    opts = np.where(increase[..., None], shorter, longer)
    any_opt = np.any(opts, axis=-1)
    first_longer = np.min(np.where(longer, t, np.inf), axis=-1)
    last_shorter = np.max(np.where(shorter, t, -np.inf), axis=-1)
    chosen_tau = np.where(increase, last_shorter, first_longer)
    tau_found = any_opt & ~_isclose(tau, exact_tau) & ~_isclose(np.where(any_opt, chosen_tau, 0.0), tau)

    action = np.where(increase, 2, 1).astype(np.int8)
    action = np.where(~dose_found & ~tau_found & has_strengths, np.int8(3), action)
    action = np.where(inside_boundary, np.int8(0), action)
    nti = np.asarray(narrow_therapeutic_index, dtype=bool)
    action = np.where(nti & (action != 0), np.int8(3), action)
    return np.broadcast_to(action, np.broadcast(r, usual, tau, lo, hi, nti).shape).astype(np.int8)


def dose_action_breakpoints(
    *, usual_dose: float, interval_h: float, candidates: NDArray[np.float64], lower: float, upper: float
) -> NDArray[np.float64]:
    """The AUC ratios at which any test inside :func:`dose_action_codes` can change its outcome, sorted.

    Between two neighbouring breakpoints every comparison in the dose rule
    (the boundary, each candidate dose's exposure ratio, whether a dose fits
    below the exact dose, each practical interval, the interval closeness
    tests) keeps its value, because each is monotone in the AUC ratio and
    flips once, within a few ulps of one of these values.
    """
    d = candidates[~np.isnan(candidates)]
    t = np.asarray(PRACTICAL_INTERVALS_H, dtype=float)
    points = [
        np.array([lower, upper, 1.0 - _TOL, 1.0 / (1.0 - _TOL), 1.0 + _TOL]),
        lower * usual_dose / d,
        upper * usual_dose / d,
        usual_dose * (1 + _TOL) / d,
        t / (interval_h * (1 - _TOL)),
        t / (interval_h * (1 + _TOL)),
    ]
    b = np.unique(np.concatenate(points))
    return b[np.isfinite(b) & (b > 0)]


#: AUC ratios closer than this (relative) to a breakpoint are decided by the full rule
_NEAR: Final = 1e-9


def dose_action_codes_by_victim(
    auc_ratio: NDArray[np.float64],
    *,
    usual_dose: NDArray[np.float64],
    interval_h: NDArray[np.float64],
    candidates: NDArray[np.float64],
    lower: NDArray[np.float64],
    upper: NDArray[np.float64],
    narrow_therapeutic_index: NDArray[np.bool_],
) -> NDArray[np.int8]:
    """:func:`dose_action_codes` for a (pairs, victims) array of AUC ratios, faster for many pairs per victim.

    For each victim the action is a step function of the AUC ratio: it is
    evaluated once per step (at a point between two breakpoints, see
    :func:`dose_action_breakpoints`) and looked up for every pair by a binary
    search over that victim's few breakpoints.  Ratios within a relative
    1e-9 of a breakpoint are decided by :func:`dose_action_codes` itself, so
    the result is the same, case by case (a test checks this at and around
    every breakpoint).
    """
    r = np.asarray(auc_ratio, dtype=float)
    n_v = r.shape[1]
    usual = np.asarray(usual_dose, dtype=float)[:, None]
    tau = np.asarray(interval_h, dtype=float)[:, None]
    lo = np.asarray(lower, dtype=float)[:, None]
    hi = np.asarray(upper, dtype=float)[:, None]
    d = np.asarray(candidates, dtype=float)
    t = np.asarray(PRACTICAL_INTERVALS_H, dtype=float)[None, :]
    fixed = np.broadcast_to(np.array([1.0 - _TOL, 1.0 / (1.0 - _TOL), 1.0 + _TOL]), (n_v, 3))
    b = np.concatenate(
        [lo, hi, fixed, lo * usual / d, hi * usual / d, usual * (1 + _TOL) / d, t / (tau * (1 - _TOL)), t / (tau * (1 + _TOL))],
        axis=1,
    )
    b = np.where(np.isfinite(b) & (b > 0), b, np.inf)
    b.sort(axis=1)
    below = np.concatenate([b[:, :1] / 2.0, b], axis=1)[:, :-1]  # neighbour below each step's upper breakpoint
    reps = np.where(np.isinf(b), below * 2.0, np.sqrt(below * b))
    reps[:, 0] = b[:, 0] / 2.0
    reps = np.concatenate([reps, b[:, -1:] * 2.0], axis=1)  # the step above the last breakpoint
    reps = np.where(np.isfinite(reps), reps, 1.0)  # steps past the last finite breakpoint: never looked up
    args = {
        "usual_dose": usual,
        "interval_h": tau,
        "lower": lo,
        "upper": hi,
        "narrow_therapeutic_index": np.asarray(narrow_therapeutic_index)[:, None],
    }
    step = dose_action_codes(reps, candidates=d[:, None, :], **args)  # (victims, width + 1)
    # per victim (a loop over victims, not pairs): find each ratio's step among the victim's few breakpoints;
    # a ratio with a breakpoint within a relative 1e-9 of it is decided by the full rule instead
    rt = np.ascontiguousarray(r.T)
    codes_t = np.empty(rt.shape, dtype=np.int8)
    nti = np.asarray(narrow_therapeutic_index, dtype=bool)
    for j in range(n_v):
        rj = rt[j]
        first = np.searchsorted(b[j], rj * (1.0 - _NEAR), side="left")
        last = np.searchsorted(b[j], rj * (1.0 + _NEAR), side="right")
        codes_t[j] = step[j][first]
        near = (first != last) | ~np.isfinite(rj)
        if near.any():
            codes_t[j][near] = dose_action_codes(
                rj[near],
                usual_dose=usual[j, 0],
                interval_h=tau[j, 0],
                candidates=d[j],
                lower=lo[j, 0],
                upper=hi[j, 0],
                narrow_therapeutic_index=nti[j],
            )
    codes = codes_t.T
    return codes.astype(np.int8)
