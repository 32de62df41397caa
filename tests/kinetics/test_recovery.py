"""Mechanism recovery and Ki-interval coverage on simulated designs (issue 14, item 2).

See tests/kinetics/recovery.py for the design.  Check values are statistical: a 95 % confidence interval covers
the true value in 95 % of repetitions by definition; with 800 data sets the pooled coverage has a binomial
standard error of 0.8 %, so the goal 93-97 % is held pooled, and each cell (50 data sets, standard error 3 %) is
held to at least 84 % (more than 3.5 standard errors below 95 %).  Print the table with
``python tests/kinetics/recovery.py 50``.
"""

from __future__ import annotations

import pytest

from .recovery import simulate, table


@pytest.mark.slow
def test_mechanism_recovery_and_ki_coverage() -> None:
    cells = simulate(50)
    print(table(cells))
    n = sum(c.n for c in cells)
    coverage = sum(c.covered for c in cells) / n
    assert 0.93 <= coverage <= 0.97, table(cells)
    for c in cells:
        assert c.covered / c.n >= 0.84, table(cells)
        assert c.error_model_right / c.n >= 0.8, table(cells)
        if (c.mechanism, c.noise, c.level) == ("mixed", "constant", 0.10):
            # Kiu = 20 uM equals the highest inhibitor level: at 10 % constant noise the uncompetitive part is
            # rarely significant, and the verdict then (rightly) reports the simpler competitive model
            assert c.correct / c.n >= 0.25, table(cells)
        else:
            assert c.correct / c.n >= 0.8, table(cells)
    assert sum(c.correct for c in cells) / n >= 0.88, table(cells)
