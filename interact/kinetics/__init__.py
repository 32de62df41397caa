"""In vitro kinetics: from incubation data to an unbound inhibition constant.

- :mod:`.ratelaws`        rate laws of reversible inhibition with analytic Jacobians
- :mod:`.engine`          least squares with SEs, Wald and profile intervals, AIC/AICc/BIC
- :mod:`.data`            incubation grids and IC50 curves, and their CSV readers
- :mod:`.fitting`         global fit of every mechanism, F tests, AICc weights, verdict
- :mod:`.ic50`            4PL/3PL IC50 curves and Cheng-Prusoff Ki
- :mod:`.binding`         fu,inc predicted (Austin 2002, Hallifax & Houston 2006, Kilford 2008) or rescaled
- :mod:`.diagnostics`     double-reciprocal, Dixon and residual plot data (arrays, no drawing)
- :mod:`.scenario_update` carry fitted constants (Ki, kinact and KI, Emax and EC50) into a scenario file's text
- :mod:`.conversion`      Cheng-Prusoff and the unbound correction used by the engine

>>> from interact.kinetics import fit_inhibition, incubation_data
"""

import lazy_loader

# Submodules load on first use, so that `interact assess` does not pay for the fitting code.  The public names are
# written once, in __init__.pyi (which type checkers read); lazy_loader builds the loader and __all__ from it.
__getattr__, __dir__, __all__ = lazy_loader.attach_stub(__name__, __file__)
