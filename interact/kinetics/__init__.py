"""In vitro kinetics: from incubation data to an unbound inhibition constant.

- :mod:`.ratelaws`   rate laws of reversible inhibition with analytic Jacobians
- :mod:`.engine`     least squares with SEs, Wald and profile intervals, AIC/AICc/BIC
- :mod:`.data`       incubation grids and their CSV reader
- :mod:`.fitting`    global fit of every mechanism, F tests, AICc weights, verdict
- :mod:`.conversion` Cheng-Prusoff and the unbound correction used by the engine
"""

from .conversion import CHENG_PRUSOFF_SOURCE, ki_from_ic50, unbound
from .data import IncubationData, incubation_data, parse_incubation_csv, read_incubation_csv
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

__all__ = [
    "CHENG_PRUSOFF_SOURCE",
    "CurveModel",
    "Estimate",
    "FTest",
    "FitResult",
    "IncubationData",
    "MODELS",
    "ModelComparison",
    "RankedModel",
    "Verdict",
    "WEIGHTS",
    "fit_curve",
    "fit_inhibition",
    "fit_substrate_inhibition",
    "guess_inhibition",
    "guess_michaelis_menten",
    "incubation_data",
    "inhibition_model",
    "ki_from_ic50",
    "parse_incubation_csv",
    "read_incubation_csv",
    "unbound",
]
