"""Nonspecific binding in the incubation (fu,inc): predicted, rescaled, applied.

Predictions use the published relations whose coefficients live in
``reference_tables/binding.toml`` (each with its source and status there):

- Austin et al. 2002, rat liver microsomes: fu,inc = 1 / (1 + C 10^(0.56 logP/D - 1.41));
- Hallifax & Houston 2006, microsomes: fu,mic = 1 / (1 + C 10^(0.072 (logP/D)^2 + 0.067 logP/D - 1.126));
- Kilford et al. 2008, hepatocytes: fu,hep = 1 / (1 + 125 VR 10^(same quadratic)), VR = 0.005 at 10^6 cells/mL,
  scaling with cell density.

C is the microsomal protein concentration in mg/mL; use logP for bases and
logD7.4 for acids and neutrals (Austin et al. 2002, abstract).  Rescaling between protein
concentrations assumes linear (non-saturable) binding (algebra):
fu2 = 1 / (1 + (C2/C1) (1 - fu1)/fu1).  Ki,u = Ki x fu,inc.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final

from ..errors import InputError
from ..tables import BindingEquation, load_binding
from .conversion import unbound

__all__ = [
    "BINDING_METHODS",
    "BindingPrediction",
    "UnboundConstant",
    "predict_fu_inc",
    "rescale_fu_inc",
    "unbound_constant",
    "unbound_ki",
]

#: method ids in binding.toml; the microsomal default is the later relation
BINDING_METHODS: Final = ("austin-2002", "hallifax-2006", "kilford-2008")
DEFAULT_MICROSOMAL: Final = "hallifax-2006"


@dataclass(frozen=True, slots=True, kw_only=True)
class BindingPrediction:
    """A predicted fu,inc with the equation, inputs, source and any domain warnings."""

    fu_inc: float
    method: str
    title: str
    system: str
    lipophilicity: float
    protein_mg_per_ml: float | None
    cells_million_per_ml: float | None
    equation: str
    source: str
    status: str
    warnings: tuple[str, ...] = ()

    @property
    def from_memory(self) -> bool:
        return self.status == "from memory"


def _equation(method: str) -> BindingEquation:
    for eq in load_binding():
        if eq.id == method:
            return eq
    raise InputError("binding method", method, f"is not one of {', '.join(e.id for e in load_binding())}")


def _finite(value: float, field: str) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(field, value, "is not a finite number")
    return float(value)


def predict_fu_inc(
    lipophilicity: float,
    *,
    method: str = DEFAULT_MICROSOMAL,
    protein_mg_per_ml: float | None = None,
    cells_million_per_ml: float | None = None,
) -> BindingPrediction:
    """Predict fu,inc from logP (bases) or logD7.4 (acids, neutrals).

    Parameters
    ----------
    lipophilicity
        logP or logD7.4 (dimensionless).
    method
        ``austin-2002`` or ``hallifax-2006`` (microsomes, need ``protein_mg_per_ml``),
        ``kilford-2008`` (hepatocytes, needs ``cells_million_per_ml``, 10^6 cells/mL).

    Returns
    -------
    BindingPrediction
        fu,inc in (0, 1], with warnings when an input lies outside the stated domain.

    Raises
    ------
    InputError
        Unknown method, missing or non-positive protein / cell concentration, non-finite logP.
    """
    eq = _equation(method)
    x = _finite(lipophilicity, "lipophilicity (logP/logD)")
    warnings: list[str] = []
    lo, hi = eq.span("lipophilicity_range")
    if not lo <= x <= hi:
        warnings.append(
            f"logP/D {x:g} is outside the {eq.title} domain ({lo:g} to {hi:g}, {eq.item('lipophilicity_range').status}); "
            "the prediction is an extrapolation"
        )
    if eq.system == "microsomes":
        if protein_mg_per_ml is None:
            raise InputError("protein", None, f"is needed for {eq.title}: the microsomal protein concentration in mg/mL")
        c = _finite(protein_mg_per_ml, "protein (mg/mL)")
        if c <= 0:
            raise InputError("protein (mg/mL)", c, "must be above zero")
        plo, phi = eq.span("protein_range_mg_per_ml")
        if not plo <= c <= phi:
            warnings.append(f"protein {c:g} mg/mL is outside {plo:g}-{phi:g} mg/mL ({eq.item('protein_range_mg_per_ml').status})")
        if method == "austin-2002":
            warnings.append(
                f"{eq.title}: derived in rat liver microsomes ([@austin2002], abstract); for human microsomes it is an "
                "extrapolation, and its coefficients are from memory"
            )
            exponent = eq.number("a") * x + eq.number("b")
        else:
            exponent = eq.number("a2") * x**2 + eq.number("a1") * x + eq.number("b")
        fu = 1.0 / (1.0 + c * 10.0**exponent)
        cells = None
    else:
        if cells_million_per_ml is None:
            raise InputError("cells", None, f"is needed for {eq.title}: the hepatocyte density in 10^6 cells/mL")
        n = _finite(cells_million_per_ml, "cells (10^6/mL)")
        if n <= 0:
            raise InputError("cells (10^6/mL)", n, "must be above zero")
        clo, chi = eq.span("cell_range_million_per_ml")
        if not clo <= n <= chi:
            warnings.append(f"cell density {n:g} x 10^6/mL is outside {clo:g}-{chi:g} ({eq.item('cell_range_million_per_ml').status})")
        accurate = eq.number("accurate_below_lipophilicity")
        if x > accurate:
            warnings.append(f"logP/D {x:g} is above {accurate:g}, where {eq.title} is less accurate ([@kilford2008], abstract)")
        vr = eq.number("volume_ratio_per_million_cells") * n
        exponent = eq.number("a2") * x**2 + eq.number("a1") * x + eq.number("b")
        fu = 1.0 / (1.0 + eq.number("scale") * vr * 10.0**exponent)
        c = None
        cells = n
    return BindingPrediction(
        fu_inc=fu,
        method=method,
        title=eq.title,
        system=eq.system,
        lipophilicity=x,
        protein_mg_per_ml=c,
        cells_million_per_ml=cells,
        equation=eq.equation,
        source=eq.source,
        status=eq.status,
        warnings=tuple(warnings),
    )


def rescale_fu_inc(fu_inc: float, from_protein: float, to_protein: float) -> float:
    """fu,inc at another protein (or cell) concentration, for linear binding (same units for both).

    fu2 = 1 / (1 + (C2/C1) (1 - fu1)/fu1)  (algebra from fu = 1/(1 + K C)).
    """
    fu = _finite(fu_inc, "fu_inc")
    if not 0 < fu <= 1:
        raise InputError("fu_inc", fu, "is not in (0, 1]")
    c1, c2 = _finite(from_protein, "from protein"), _finite(to_protein, "to protein")
    if c1 <= 0 or c2 <= 0:
        raise InputError("protein", (c1, c2), "must both be above zero")
    return 1.0 / (1.0 + (c2 / c1) * (1.0 - fu) / fu)


def unbound_ki(ki_um: float, fu_inc: float) -> float:
    """Ki,u = Ki x fu,inc (uM)."""
    fu = _finite(fu_inc, "fu_inc")
    if not 0 < fu <= 1:
        raise InputError("fu_inc", fu, "is not in (0, 1]")
    return float(unbound(_finite(ki_um, "ki"), fu))


@dataclass(frozen=True, slots=True, kw_only=True)
class UnboundConstant:
    """An inhibition constant and its unbound value Ki,u = Ki x fu,inc, with the interval scaled alike.

    ``low_um``/``high_um`` are the profile-likelihood limits when available,
    else the Wald limits; ``inf`` means not bounded above.  The uncertainty of
    fu,inc itself is not propagated.
    """

    name: str
    ki_um: float
    low_um: float | None
    high_um: float | None
    interval: str
    fu_inc: float
    fu_origin: str
    ki_u_um: float
    low_u_um: float | None
    high_u_um: float | None


def unbound_constant(
    name: str, ki_um: float, low_um: float | None, high_um: float | None, fu_inc: float, *, interval: str, fu_origin: str
) -> UnboundConstant:
    """Scale a constant and its interval by fu,inc (see :class:`UnboundConstant`)."""
    fu = _finite(fu_inc, "fu_inc")
    if not 0 < fu <= 1:
        raise InputError("fu_inc", fu, "is not in (0, 1]")

    def scale(x: float | None) -> float | None:
        return None if x is None else x * fu

    return UnboundConstant(
        name=name,
        ki_um=ki_um,
        low_um=low_um,
        high_um=high_um,
        interval=interval,
        fu_inc=fu,
        fu_origin=fu_origin,
        ki_u_um=ki_um * fu,
        low_u_um=scale(low_um),
        high_u_um=scale(high_um),
    )
