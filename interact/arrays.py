"""Class bands on arrays of AUC ratios.

Batch screening and sampling evaluate the mechanistic model for many pairs
or many samples at once; these helpers turn the resulting arrays of AUC
ratios into the same class band that :meth:`interact.tables.Classes.classify`
gives for one scenario (tests keep the two equal).  Suggested actions on
arrays come from :func:`interact.dosing.choose_regimens`, the one rule for
every caller.
"""

from __future__ import annotations

import functools

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .steps import StepTable
from .tables import Classes

__all__ = ["band_codes", "band_labels"]


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
    if r.size < _STEP_TABLE_ROWS:
        return _band_codes(r, classes)
    steps = _band_steps(classes)
    (codes,), _, rest = steps.look_up(r)
    if rest.size:  # at a bound (or not a finite positive ratio): the comparisons themselves
        codes[rest] = _band_codes(r.ravel()[rest], classes)
    return codes.reshape(r.shape)


#: ratios from which band_codes looks codes up in a table (interact.steps) rather than comparing with every bound
_STEP_TABLE_ROWS = 4096


def _band_codes(r: NDArray[np.float64], classes: Classes) -> NDArray[np.int8]:
    inh = sorted(classes.inhibition, key=lambda b: -b.bound)
    ind = sorted(classes.induction, key=lambda b: b.bound)
    conditions = [r >= b.bound for b in inh] + [r <= b.bound for b in ind]
    choices = list(range(1, len(conditions) + 1))
    return np.select(conditions, choices, default=0).astype(np.int8)


@functools.lru_cache(maxsize=8)
def _band_steps(classes: Classes) -> StepTable:
    """:func:`_band_codes` as a step table: constant between the bounds."""
    bounds = np.array([b.bound for b in (*classes.inhibition, *classes.induction)], dtype=float)
    return StepTable.build(bounds, lambda r: (_band_codes(r, classes),))
