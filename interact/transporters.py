"""Object drugs cleared by transporters: the extended clearance concept and its regime.

The organ ratios of transporter routes are pathways of the one interaction model (:mod:`interact.model`,
the net-effect form ``1 / (sum f x activity + 1 - sum f)`` per organ), with

- intestinal efflux (P-gp, BCRP): f = the fraction of the oral dose the transporter returns to the
  lumen, activity at the enterocyte concentration I,ent; it shares the gut term with gut-wall CYP3A
  (f = 1 - Fg), the two being parallel losses of the same dose;
- hepatic uptake (OATP1B1, OATP1B3, OCT1): f = the fraction of systemic clearance that depends on
  uptake by the transporter, activity at Iin,max,u;
- renal secretion (OAT1, OAT3, OCT2, MATE1, MATE2-K): f = renal fraction x the fraction of renal
  clearance the transporter secretes, activity at Imax,u.

Per pathway this is AUCR = 1 / (fe / (1 + [I]/Ki) + 1 - fe), the form of [@elsby2016] (Tables 3 and 4:
intestinal BCRP with [I] = Igut,max = Fa ka Dose / Qent and hepatic OATP1B1 with [I] = Iinlet,max,u, the
organ ratios multiplied); ``tests/test_transporters.py`` reproduces their printed ratios.

When the hepatic clearances are known, uptake and metabolism act through the extended clearance
concept instead of as independent fractions ([@shitara2006], from memory; [@camenisch2012]):

    CLint,all = PS_inf x (CLmet + CLbile) / (PS_eff + CLmet + CLbile)

(all unbound intrinsic clearances: sinusoidal uptake, sinusoidal efflux, metabolism, biliary
excretion).  Its limits: with PS_eff >> CLmet + CLbile it is PS_inf / PS_eff x (CLmet + CLbile)
(metabolism and biliary excretion limit the rate, scaled by the hepatocyte partition PS_inf/PS_eff);
with CLmet + CLbile >> PS_eff it is PS_inf (uptake limits the rate).  The limiting cases are printed
in [@pharmaceutics2020interplay] (section 2.6, seen); the full equation is written from memory and
checked here against those limits.

The regime label compares beta = (CLmet + CLbile) / PS_eff with 10 and 0.1: at beta >= 10 CLint,all is
within 10 % of PS_inf (uptake-limited), at beta <= 0.1 within 10 % of the partition-scaled form
(metabolism-limited, counting biliary excretion), mixed between.  The factor of 10 is this project's
choice (a 10 % error of the limiting form); [@patileavrana2018] (abstract) reports that most drugs have
beta < 4 and that inhibition can move a drug out of the uptake-limited
regime, so the regime is reported with and without the precipitant.
"""

from __future__ import annotations

from typing import Final

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "METABOLISM_LIMITED",
    "MIXED",
    "REGIME_BOUND",
    "UPTAKE_LIMITED",
    "clearance_regime",
    "extended_clearance",
    "extended_clearance_activity",
]

#: beta = (CLmet + CLbile) / PS_eff at or beyond which one step is taken to limit the rate (this project's choice)
REGIME_BOUND: Final = 10.0
UPTAKE_LIMITED: Final = "uptake-limited"
METABOLISM_LIMITED: Final = "metabolism-limited"
MIXED: Final = "mixed"


def extended_clearance(ps_inf: ArrayLike, ps_eff: ArrayLike, cl_met: ArrayLike, cl_bile: ArrayLike = 0.0) -> NDArray[np.float64]:
    """Overall hepatic intrinsic clearance CLint,all = PS_inf (CLmet + CLbile) / (PS_eff + CLmet + CLbile).

    Parameters
    ----------
    ps_inf, ps_eff, cl_met, cl_bile
        Unbound intrinsic clearances of sinusoidal uptake, sinusoidal efflux, metabolism and biliary
        excretion, in one unit (any flow unit, or ratios to one reference); arrays broadcast.

    Returns
    -------
    CLint,all in the same unit.  Written as PS_inf / (1 + PS_eff / (CLmet + CLbile)) so that it stays
    finite when PS_eff is zero (it is then PS_inf).
    """
    elim = np.add(cl_met, cl_bile, dtype=float)
    with np.errstate(divide="ignore"):
        return np.asarray(ps_inf, dtype=float) / (1.0 + np.divide(ps_eff, elim))


def extended_clearance_activity(
    ps_inf: ArrayLike,
    ps_eff: ArrayLike,
    cl_met: ArrayLike,
    cl_bile: ArrayLike,
    uptake_left: ArrayLike,
    metabolism_left: ArrayLike,
    bile_left: ArrayLike = 1.0,
) -> NDArray[np.float64]:
    """CLint,all with the precipitant over CLint,all without it: the hepatic activity the liver ratio uses.

    ``uptake_left``, ``metabolism_left`` and ``bile_left`` are the remaining fractions of PS_inf, CLmet and
    CLbile (:func:`interact.model.remaining`); PS_eff is left unchanged.
    """
    before = extended_clearance(ps_inf, ps_eff, cl_met, cl_bile)
    after = extended_clearance(
        np.multiply(ps_inf, uptake_left), ps_eff, np.multiply(cl_met, metabolism_left), np.multiply(cl_bile, bile_left)
    )
    return np.asarray(after / before, dtype=float)


def clearance_regime(ps_eff: ArrayLike, cl_met: ArrayLike, cl_bile: ArrayLike = 0.0) -> NDArray[np.str_]:
    """``uptake-limited``, ``metabolism-limited`` or ``mixed`` from beta = (CLmet + CLbile) / PS_eff (see module notes)."""
    elim = np.add(cl_met, cl_bile, dtype=float)
    eff = np.asarray(ps_eff, dtype=float)
    uptake = elim >= REGIME_BOUND * eff  # PS_eff = 0 is uptake-limited whatever the elimination
    metabolism = ~uptake & (REGIME_BOUND * elim <= eff)
    return np.where(uptake, UPTAKE_LIMITED, np.where(metabolism, METABOLISM_LIMITED, MIXED))
