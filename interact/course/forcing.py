"""The perpetrator in time: its plasma curve and its unbound concentrations at the liver inlet and in the enterocyte.

Standard one-compartment pharmacokinetics with superposition of doses (common practice).  The site
concentrations are those of :mod:`interact.exposure` with the dose replaced by the amount still in the gut at
time t (:func:`~interact.exposure.unbound_inlet_um`, :func:`~interact.exposure.enterocyte_um`,
:func:`~interact.exposure.unbound_cmax_um` on the time grid).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..exposure import enterocyte_um, unbound_cmax_um, unbound_inlet_um

Array = NDArray[np.float64]
#: t -> (liver-inlet, enterocyte) unbound concentrations per species (uM)
Forcing = Callable[[float], tuple[list[float], list[float]]]


def _geometric_v(t: Array, tau: float, m: Array, k: float) -> Array:
    """sum_{i=0}^{m-1} exp(-k (t - i tau)) for the m doses given by t (0 before the first)."""
    last = (m - 1) * tau
    q = math.exp(-k * tau)
    out = np.exp(-k * (t - last)) * (1.0 - q**m) / (1.0 - q)
    return np.where(m > 0, out, 0.0)


def ss_shape(ka: float, ke: float, tau: float) -> tuple[float, float]:
    """Peak of the steady-state one-compartment oral curve per unit D/V, and its time (h)."""
    a = ka * (1.0 - math.exp(-ke * tau))
    b = ke * (1.0 - math.exp(-ka * tau))
    tmax = math.log(a / b) / (ka - ke)
    tmax = min(max(tmax, 0.0), tau)
    shape = ka / (ka - ke) * (math.exp(-ke * tmax) / (1.0 - math.exp(-ke * tau)) - math.exp(-ka * tmax) / (1.0 - math.exp(-ka * tau)))
    return shape, tmax


@dataclass(frozen=True, slots=True, kw_only=True)
class PerpetratorCourse:
    """The perpetrator's doses and the constants that turn them into site concentrations (rates in 1/h)."""

    mode: str
    oral: bool
    dose: float  # umol
    tau: float  # h
    n_doses: int
    stop: float  # h
    ka: float
    ke: float
    vf: float  # L (V/F, or V for intravenous)
    fu: float
    fa_fg: float
    fa: float
    fu_gut: float
    qh: float  # L/h
    rb: float
    qent: float  # L/h
    cmax: float  # uM
    # metabolites: (unbound fraction, Cmax_metabolite / Cmax_parent)
    metabolites: tuple[tuple[float, float], ...]
    const_inlet: tuple[float, ...]  # per species, the static values (mode "constant")
    const_ent: tuple[float, ...]
    profile_t: Array | None = None
    profile_c: Array | None = None

    def plasma(self, t: Array) -> tuple[Array, Array]:
        """Parent total plasma concentration (uM) and amount in the gut (umol) on a time grid (h)."""
        m = np.where(t < -1e-9, 0, np.minimum(np.floor(t / self.tau + 1e-9) + 1, self.n_doses)).astype(float)
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
        return np.where(t < 0, 0.0, c), g

    def concentrations(self, t: Array) -> tuple[Array, Array, Array]:
        """Unbound liver-inlet and enterocyte concentrations, shape (species, time), and the parent's plasma curve (uM)."""
        if self.mode == "constant":
            on = (t >= -1e-9) & (t < self.stop - 1e-9)
            held = np.where(on, np.asarray(self.const_inlet)[:, None], 0.0), np.where(on, np.asarray(self.const_ent)[:, None], 0.0)
            return held[0], held[1], np.where(on, self.cmax, 0.0)
        c, g = self.plasma(t)
        inlet = [unbound_inlet_um(c, self.fu, g, self.fa_fg, self.ka, self.qh, self.rb)]
        ent = [enterocyte_um(g, self.fa, self.ka, self.qent, self.fu_gut) if self.oral else unbound_cmax_um(c, self.fu)]
        for fu_m, scale in self.metabolites:  # a metabolite follows the parent, unbound alike at every site
            inlet.append(unbound_cmax_um(scale * c, fu_m))
            ent.append(inlet[-1])
        return np.array(inlet), np.array(ent), c

    def forcing(self) -> Forcing:
        """The same concentrations as :meth:`concentrations` at one time, in plain floats, for the ODE's right-hand side.

        The solver asks for one time at a time (about 17,000 times for 30 days of the example): the whole right-hand
        side in plain floats takes about 8 us a call, while :meth:`concentrations` and the sites' terms on one-element
        numpy arrays take over 100 us (measured on the 2-core machine under load, tdi_inducer.toml), which would make
        the time course seconds long.  ``tests/extensions/test_dynamic_profiles.py`` keeps the two equal.
        """
        n_species = 1 + len(self.metabolites)
        zero = [0.0] * n_species
        if self.mode == "constant":
            inlet0, ent0, stop = list(self.const_inlet), list(self.const_ent), self.stop - 1e-9

            def constant(t: float) -> tuple[list[float], list[float]]:
                return (inlet0, ent0) if -1e-9 <= t < stop else (zero, zero)

            return constant
        exp = math.exp
        ka, ke, tau, n = self.ka, self.ke, self.tau, self.n_doses
        inv_tau = 1.0 / tau
        qa, qe = exp(-ka * tau), exp(-ke * tau)
        geo_a = [(1.0 - qa**m) / (1.0 - qa) if qa < 1.0 else float(m) for m in range(n + 1)]
        geo_e = [(1.0 - qe**m) / (1.0 - qe) if qe < 1.0 else float(m) for m in range(n + 1)]  # ke = 0 with a profile
        fu, oral = self.fu, self.oral
        coef = self.dose / self.vf * (ka / (ka - ke) if oral else 1.0) if self.mode == "regimen" else 0.0  # vf is fitted only then
        portal = self.fa_fg * ka * self.dose / (self.qh * self.rb)
        ent = self.fu_gut * self.fa * ka * self.dose / self.qent
        mets = [fu_m * scale for fu_m, scale in self.metabolites]
        prof = (self.profile_t, self.profile_c) if self.mode == "profile" else None

        def course(t: float) -> tuple[list[float], list[float]]:
            if t < -1e-9:
                return zero, zero
            m = int(t * inv_tau + 1e-9) + 1
            if m > n:
                m = n
            dt = t - (m - 1) * tau
            s_a = exp(-ka * dt) * geo_a[m] if oral else 0.0
            if prof is not None:
                c = float(np.interp(t, prof[0], prof[1]))  # type: ignore[arg-type]
            elif oral:
                c = coef * (exp(-ke * dt) * geo_e[m] - s_a)
            else:
                c = coef * exp(-ke * dt) * geo_e[m]
            inlet = [fu * (c + portal * s_a)]
            gut = [ent * s_a if oral else fu * c]
            for k in mets:
                inlet.append(k * c)
                gut.append(k * c)
            return inlet, gut

        return course
