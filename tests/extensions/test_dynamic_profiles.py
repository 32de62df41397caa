"""The time course keeps a scalar perpetrator profile (inside the ODE right-hand side, for speed)
and a vectorised one (for output grids); they must give the same concentrations.

Inputs are arbitrary test values, not check values: the check is the agreement of the two forms.
"""

from __future__ import annotations

import numpy as np
import pytest

from interact.dynamic import _Perp


@pytest.mark.parametrize("oral", [True, False])
def test_scalar_and_vector_profiles_agree(oral: bool) -> None:
    perp = _Perp(
        mode="regimen", oral=oral, dose=300.0, tau=24.0, n_doses=10, stop=240.0, ka=1.5, ke=0.1, vf=80.0,
        fu=0.05, portal=0.4, enterocyte=0.2, cmax=4.0, metabolites=(), const_inlet=(0.2,), const_ent=(1.0,),
    )  # fmt: skip
    grid = np.linspace(0.0, 239.0, 377)
    _, inlet_v, ent_v = perp.plasma_v(grid)
    for k, t in enumerate(grid):
        inlet, ent = perp.sites(float(t), perp.doses_by(float(t)), True)
        assert inlet[0] == pytest.approx(inlet_v[k], rel=1e-12, abs=1e-15)
        assert ent[0] == pytest.approx(ent_v[k], rel=1e-12, abs=1e-15)
