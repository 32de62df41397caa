"""interact: static drug-drug interaction risk for reversible enzyme inhibitors.

The public API: load a scenario, assess it, read the result.

>>> from interact import assess, load_scenario, demo_path
>>> result = assess(load_scenario(demo_path()))
>>> round(result.prediction.total, 2) > 1
True

Predictions are screening estimates, not clinical advice.
"""

__version__ = "0.1.0"

from .assessment import Assessment, assess
from .errors import FitError, InputError, InteractError, ScenarioError, UnitError
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

__all__ = [
    "Assessment",
    "FitError",
    "Inhibition",
    "InputError",
    "InteractError",
    "Metabolite",
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
