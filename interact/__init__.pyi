# ruff: noqa: I001  (one `X as X` line per module reads as the list it is; the alias marks a re-export)
# The public API, written once: type checkers read these imports, and interact/__init__.py loads each name from
# its module on first use (lazy_loader.attach_stub reads this file), so `import interact` stays light.
from .assessment import Assessment as Assessment, assess as assess
from .errors import (
    AssumptionWarning as AssumptionWarning,
    FitError as FitError,
    FitWarning as FitWarning,
    FromMemoryWarning as FromMemoryWarning,
    InputError as InputError,
    InteractError as InteractError,
    InteractWarning as InteractWarning,
    ModelLimitWarning as ModelLimitWarning,
    ScenarioError as ScenarioError,
    UnitError as UnitError,
)
from .scenario import (
    Inhibition as Inhibition,
    Metabolite as Metabolite,
    Pathway as Pathway,
    Perpetrator as Perpetrator,
    Physiology as Physiology,
    Scenario as Scenario,
    Victim as Victim,
    demo_path as demo_path,
    dumps_scenario as dumps_scenario,
    load_scenario as load_scenario,
    loads_scenario as loads_scenario,
    save_scenario as save_scenario,
)
from .tables import load_rules as load_rules, rule_set_names as rule_set_names

__version__: str
__all__: list[str]
