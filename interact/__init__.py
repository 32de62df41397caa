"""interact: static drug-drug interaction risk for reversible enzyme inhibitors.

The public API: load a scenario, assess it, read the result.

>>> from interact import assess, load_scenario, demo_path
>>> result = assess(load_scenario(demo_path()))
>>> round(result.prediction.total, 2) > 1
True

Predictions are screening estimates, not clinical advice.
"""

__version__ = "0.1.0"

from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # the names for type checkers; at run time they load on first use
    from .assessment import Assessment, assess
    from .errors import (
        AssumptionWarning,
        FitError,
        FitWarning,
        FromMemoryWarning,
        InputError,
        InteractError,
        InteractWarning,
        ModelLimitWarning,
        ScenarioError,
        UnitError,
    )
    from .scenario import (
        Inhibition,
        Metabolite,
        Pathway,
        Perpetrator,
        Physiology,
        Scenario,
        Victim,
        demo_path,
        dumps_scenario,
        load_scenario,
        loads_scenario,
        save_scenario,
    )
    from .tables import load_rules, rule_set_names

# Each public name and the module that defines it.  Loading on first use keeps
# `import interact.tui` and `interact --version` from paying for pint and the
# engine before they need them; `from interact import assess` works as before.
_WHERE = {
    "Assessment": "assessment",
    "assess": "assessment",
    "AssumptionWarning": "errors",
    "FitError": "errors",
    "FitWarning": "errors",
    "FromMemoryWarning": "errors",
    "InteractWarning": "errors",
    "ModelLimitWarning": "errors",
    "InputError": "errors",
    "InteractError": "errors",
    "ScenarioError": "errors",
    "UnitError": "errors",
    "Inhibition": "scenario",
    "Metabolite": "scenario",
    "Pathway": "scenario",
    "Perpetrator": "scenario",
    "Physiology": "scenario",
    "Scenario": "scenario",
    "Victim": "scenario",
    "demo_path": "scenario",
    "dumps_scenario": "scenario",
    "load_scenario": "scenario",
    "loads_scenario": "scenario",
    "save_scenario": "scenario",
    "load_rules": "tables",
    "rule_set_names": "tables",
}


def __getattr__(name: str) -> Any:
    module = _WHERE.get(name)
    if module is None:
        raise AttributeError(f"module 'interact' has no attribute {name!r}")
    import importlib

    value = getattr(importlib.import_module(f".{module}", __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))


__all__ = [
    "Assessment",
    "AssumptionWarning",
    "FitError",
    "FitWarning",
    "FromMemoryWarning",
    "Inhibition",
    "InputError",
    "InteractError",
    "InteractWarning",
    "Metabolite",
    "ModelLimitWarning",
    "Pathway",
    "Perpetrator",
    "Physiology",
    "Scenario",
    "ScenarioError",
    "UnitError",
    "Victim",
    "__version__",
    "assess",
    "demo_path",
    "dumps_scenario",
    "load_rules",
    "load_scenario",
    "loads_scenario",
    "rule_set_names",
    "save_scenario",
]
