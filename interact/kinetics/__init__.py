"""In vitro kinetics: from incubation data to an unbound inhibition constant.

- :mod:`.ratelaws`        rate laws of reversible inhibition with analytic Jacobians
- :mod:`.engine`          least squares with SEs, Wald and profile intervals, AIC/AICc/BIC
- :mod:`.data`            incubation grids and IC50 curves, and their CSV readers
- :mod:`.fitting`         global fit of every mechanism, F tests, AICc weights, verdict
- :mod:`.ic50`            4PL/3PL IC50 curves and Cheng-Prusoff Ki
- :mod:`.binding`         fu,inc predicted (Austin 2002, Hallifax & Houston 2006, Kilford 2008) or rescaled
- :mod:`.diagnostics`     double-reciprocal, Dixon and residual plot data (arrays, no drawing)
- :mod:`.scenario_update` carry a fitted Ki into a scenario file's text
- :mod:`.conversion`      Cheng-Prusoff and the unbound correction used by the engine

>>> from interact.kinetics import fit_inhibition, incubation_data
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # the names for type checkers; at run time they load lazily
    from .binding import (
        BINDING_METHODS,
        BindingPrediction,
        UnboundConstant,
        predict_fu_inc,
        rescale_fu_inc,
        unbound_constant,
        unbound_ki,
    )
    from .conversion import CHENG_PRUSOFF_SOURCE, ki_from_ic50, unbound
    from .data import (
        IC50Data,
        IncubationData,
        columns_of,
        incubation_data,
        parse_ic50_csv,
        parse_incubation_csv,
        read_ic50_csv,
        read_incubation_csv,
    )
    from .diagnostics import PlotData, Series, diagnostic_plots, dixon_data, double_reciprocal_data, residual_data
    from .engine import WEIGHTS, CurveModel, Estimate, FitResult, fit_curve
    from .fitting import (
        MODELS,
        FTest,
        ModelComparison,
        RankedModel,
        Verdict,
        fit_inhibition,
        fit_substrate_inhibition,
        guess_inhibition,
        guess_michaelis_menten,
        inhibition_model,
    )
    from .ic50 import IC50Fit, KiFromIC50, fit_ic50, guess_ic50, ic50_model, ki_from_ic50_fit
    from .scenario_update import update_inhibition_text

# Submodules load on first use, so that `interact assess` does not pay for the fitting code.
_WHERE = {
    "BINDING_METHODS": "binding",
    "BindingPrediction": "binding",
    "CHENG_PRUSOFF_SOURCE": "conversion",
    "CurveModel": "engine",
    "Estimate": "engine",
    "FTest": "fitting",
    "FitResult": "engine",
    "IC50Data": "data",
    "IC50Fit": "ic50",
    "IncubationData": "data",
    "KiFromIC50": "ic50",
    "MODELS": "fitting",
    "ModelComparison": "fitting",
    "PlotData": "diagnostics",
    "RankedModel": "fitting",
    "Series": "diagnostics",
    "UnboundConstant": "binding",
    "Verdict": "fitting",
    "WEIGHTS": "engine",
    "columns_of": "data",
    "diagnostic_plots": "diagnostics",
    "dixon_data": "diagnostics",
    "double_reciprocal_data": "diagnostics",
    "fit_curve": "engine",
    "fit_ic50": "ic50",
    "fit_inhibition": "fitting",
    "fit_substrate_inhibition": "fitting",
    "guess_ic50": "ic50",
    "guess_inhibition": "fitting",
    "guess_michaelis_menten": "fitting",
    "ic50_model": "ic50",
    "incubation_data": "data",
    "inhibition_model": "fitting",
    "ki_from_ic50": "conversion",
    "ki_from_ic50_fit": "ic50",
    "parse_ic50_csv": "data",
    "parse_incubation_csv": "data",
    "predict_fu_inc": "binding",
    "read_ic50_csv": "data",
    "read_incubation_csv": "data",
    "rescale_fu_inc": "binding",
    "residual_data": "diagnostics",
    "unbound": "conversion",
    "unbound_constant": "binding",
    "unbound_ki": "binding",
    "update_inhibition_text": "scenario_update",
}

__all__ = [  # noqa: RUF022 (plain sorted order, as the tests check)
    "BINDING_METHODS",
    "BindingPrediction",
    "CHENG_PRUSOFF_SOURCE",
    "CurveModel",
    "Estimate",
    "FTest",
    "FitResult",
    "IC50Data",
    "IC50Fit",
    "IncubationData",
    "KiFromIC50",
    "MODELS",
    "ModelComparison",
    "PlotData",
    "RankedModel",
    "Series",
    "UnboundConstant",
    "Verdict",
    "WEIGHTS",
    "columns_of",
    "diagnostic_plots",
    "dixon_data",
    "double_reciprocal_data",
    "fit_curve",
    "fit_ic50",
    "fit_inhibition",
    "fit_substrate_inhibition",
    "guess_ic50",
    "guess_inhibition",
    "guess_michaelis_menten",
    "ic50_model",
    "incubation_data",
    "inhibition_model",
    "ki_from_ic50",
    "ki_from_ic50_fit",
    "parse_ic50_csv",
    "parse_incubation_csv",
    "predict_fu_inc",
    "read_ic50_csv",
    "read_incubation_csv",
    "rescale_fu_inc",
    "residual_data",
    "unbound",
    "unbound_constant",
    "unbound_ki",
    "update_inhibition_text",
]


def __getattr__(name: str) -> Any:
    module = _WHERE.get(name)
    if module is None:
        raise AttributeError(f"module 'interact.kinetics' has no attribute {name!r}")
    value = getattr(importlib.import_module(f".{module}", __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
