"""interact: static drug-drug interaction risk for precipitants that inhibit or induce enzymes and transporters.

The public API: load a scenario, assess it, read the result.

>>> from interact import assess, load_scenario, demo_path
>>> result = assess(load_scenario(demo_path()))
>>> round(result.prediction.total, 2) > 1
True

Predictions are screening estimates, not clinical advice.
"""

__version__ = "0.1.0"

import lazy_loader

# Each public name loads from its module on first use, so that `import interact.tui` and `interact --version` do not
# pay for pint and the engine before they need them; `from interact import assess` works as usual.  The names are
# written once, in __init__.pyi (which type checkers read); lazy_loader builds the loader and __all__ from it.
__getattr__, __dir__, __all__ = lazy_loader.attach_stub(__name__, __file__)
__all__ = sorted([*__all__, "__version__"])
