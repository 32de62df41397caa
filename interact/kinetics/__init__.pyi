# ruff: noqa: I001  (one `X as X` line per module reads as the list it is; the alias marks a re-export)
# The public API of interact.kinetics, written once: type checkers read these imports, and __init__.py loads each
# name from its module on first use (lazy_loader.attach_stub reads this file), so `interact assess` does not pay
# for the fitting code.
from .binding import (
    BINDING_METHODS as BINDING_METHODS,
    BindingPrediction as BindingPrediction,
    UnboundConstant as UnboundConstant,
    predict_fu_inc as predict_fu_inc,
    rescale_fu_inc as rescale_fu_inc,
    unbound_constant as unbound_constant,
    unbound_ki as unbound_ki,
)
from .conversion import (
    CHENG_PRUSOFF_SOURCE as CHENG_PRUSOFF_SOURCE,
    ki_from_ic50 as ki_from_ic50,
    unbound as unbound,
)
from .data import (
    IC50Data as IC50Data,
    IncubationData as IncubationData,
    columns_of as columns_of,
    incubation_data as incubation_data,
    parse_ic50_csv as parse_ic50_csv,
    parse_incubation_csv as parse_incubation_csv,
    read_ic50_csv as read_ic50_csv,
    read_incubation_csv as read_incubation_csv,
)
from .diagnostics import (
    PlotData as PlotData,
    Series as Series,
    diagnostic_plots as diagnostic_plots,
    dixon_data as dixon_data,
    double_reciprocal_data as double_reciprocal_data,
    residual_data as residual_data,
)
from .engine import (
    WEIGHTS as WEIGHTS,
    CurveModel as CurveModel,
    Estimate as Estimate,
    FitResult as FitResult,
    fit_curve as fit_curve,
)
from .fitting import (
    MODELS as MODELS,
    FTest as FTest,
    ModelComparison as ModelComparison,
    RankedModel as RankedModel,
    Verdict as Verdict,
    fit_inhibition as fit_inhibition,
    fit_substrate_inhibition as fit_substrate_inhibition,
    guess_inhibition as guess_inhibition,
    guess_michaelis_menten as guess_michaelis_menten,
    inhibition_model as inhibition_model,
)
from .ic50 import (
    IC50Fit as IC50Fit,
    KiFromIC50 as KiFromIC50,
    fit_ic50 as fit_ic50,
    guess_ic50 as guess_ic50,
    ic50_model as ic50_model,
    ki_from_ic50_fit as ki_from_ic50_fit,
)
from .scenario_update import update_inhibition_text as update_inhibition_text

__all__: list[str]
