"""Binding for every constant (issue 14, item 4): fu_inc corrects Ki, KI and EC50 unless a constant has its own.

Ki,u = Ki x fu,inc, likewise KI,u and EC50,u (reference-notes section 4, "Binding correction"; from memory there,
common practice).  The scenario is the built-in invented example tdi_inducer.toml (says so); values are inputs.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from interact import assess, loads_scenario
from interact.errors import ScenarioError
from interact.uncertainty import ScenarioModel

EXAMPLE = (Path(__file__).resolve().parents[1] / "interact" / "examples" / "tdi_inducer.toml").read_text(encoding="utf-8")
SHARED = EXAMPLE.replace("fu_inc_ki_inact = 1.0", "#").replace("fu_inc_ec50 = 1.0", "#")


def _const(text: str):  # type: ignore[no-untyped-def]
    result = assess(loads_scenario(text))
    return result, next(c for c in result.constants if c.target == "CYP3A" and c.species_index == 0)


def test_fu_inc_corrects_every_constant_unless_one_has_its_own() -> None:
    result, c = _const(SHARED)
    assert c.fu_inc == 0.8
    assert c.ki_inact_u_um == pytest.approx(1.8 * 0.8, rel=1e-12) and c.ec50_u_um == pytest.approx(1.2 * 0.8, rel=1e-12)
    assert c.ki_inact_fu_origin.startswith("fu_inc (given") and c.ec50_fu_origin.startswith("fu_inc (given")
    assert any("corrects Ki and KI and EC50 alike" in w for w in result.warnings)
    own = SHARED.replace('ec50 = "1.2 uM"', 'ec50 = "1.2 uM"\nfu_inc_ec50 = 0.25', 1)
    result, c = _const(own)
    assert c.ec50_u_um == pytest.approx(1.2 * 0.25, rel=1e-12) and c.ec50_fu_origin == "fu_inc_ec50 (given)"
    assert c.ki_inact_u_um == pytest.approx(1.8 * 0.8, rel=1e-12)
    assert any("corrects Ki and KI alike" in w for w in result.warnings)
    _, c = _const(EXAMPLE)  # the example marks both as already unbound
    assert (c.ki_inact_u_um, c.ec50_u_um) == (1.8, 1.2)


def test_the_uncertainty_model_applies_the_same_binding() -> None:
    result, _ = _const(SHARED)
    model = ScenarioModel(result)
    assert model.evaluate().total == result.prediction.total  # bit for bit at the point values
    # varying the shared fu_inc moves KI and EC50 with Ki: at fu_inc = 1 the ratio is that of unbound-as-given inputs
    moved = model.evaluate({"perpetrator.inhibits[0].fu_inc": np.array([1.0])}).total
    by_hand = assess(loads_scenario(SHARED.replace("fu_inc = 0.8", "fu_inc = 1.0", 1))).prediction.total
    assert float(moved[0]) == pytest.approx(by_hand, rel=1e-12)


def test_reports_show_each_constants_binding_and_source() -> None:
    from interact.report.assessment import format_assessment

    result, _ = _const(SHARED.replace('ec50 = "1.2 uM"', 'ec50 = "1.2 uM"\nfu_inc_ec50 = 0.25', 1))
    text = format_assessment(result, "markdown")
    assert "0.8 (fu_inc (given, shared with Ki))" in text and "0.25 (fu_inc_ec50 (given))" in text
    assert "KI,u 1.44 uM" in text and "EC50,u 0.300 uM" in text


def test_own_binding_without_its_constant_is_refused() -> None:
    with pytest.raises(ScenarioError, match=r"perpetrator\.inhibits\[0\]\.fu_inc_ec50"):
        loads_scenario(EXAMPLE.replace("emax = 5.0", "#").replace('ec50 = "1.2 uM"', "#", 1).replace("calibration = 1.0", "#"))
