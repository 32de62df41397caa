"""Model warnings reach Python's warnings machinery (InteractWarning and its topics); the shells keep printing them.

Scenarios are invented test inputs (tests/conftest.py base_dict); the checks are invariants: every warning text on
an Assessment is emitted once, under a topic, pointing at the caller; none is emitted with ``warn=False``.
"""

from __future__ import annotations

import warnings

import pytest
from conftest import base_dict
from hypothesis import given, settings
from hypothesis import strategies as st

import interact
from interact import assess
from interact.cli import main
from interact.errors import AssumptionWarning, FromMemoryWarning, InteractWarning, ModelLimitWarning
from interact.scenario import scenario_from_dict


def _warned(data: dict) -> tuple[interact.Assessment, list[warnings.WarningMessage]]:  # type: ignore[type-arg]
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        a = assess(scenario_from_dict(data))
    return a, list(caught)


@settings(max_examples=40, deadline=None)
@given(
    fg=st.one_of(st.none(), st.floats(0.1, 1.0)),
    fu_inc=st.one_of(st.none(), st.floats(0.05, 1.0)),
    mechanism=st.sampled_from(["competitive", "uncompetitive", "noncompetitive"]),
    cmax=st.floats(0.01, 30.0),
    extra_pathway=st.booleans(),
)
def test_every_warning_on_the_result_is_emitted_once_under_a_topic(
    fg: float | None, fu_inc: float | None, mechanism: str, cmax: float, extra_pathway: bool
) -> None:
    d = base_dict()
    inh = d["perpetrator"]["inhibits"][0]
    inh["mechanism"] = mechanism
    d["perpetrator"]["cmax"] = f"{cmax!r} uM"
    if fu_inc is None:
        del inh["fu_inc"]
    else:
        inh["fu_inc"] = fu_inc
    if fg is None:
        del d["victim"]["fg"]
    else:
        d["victim"]["fg"] = fg
    if extra_pathway:
        d["victim"]["pathways"] = [{"enzyme": "CYP3A", "fm": 0.6}, {"enzyme": "CYP2D6", "fm": 0.3}]
    a, caught = _warned(d)
    assert [str(w.message) for w in caught] == list(a.warnings)
    for w in caught:
        assert issubclass(w.category, InteractWarning) and w.category is not InteractWarning
        assert w.filename == __file__  # stacklevel points at the caller of assess()
    if fg is None:
        assert any(w.category is AssumptionWarning and "victim.fg" in str(w.message) for w in caught)
    if mechanism == "uncompetitive":
        assert any(w.category is ModelLimitWarning for w in caught)
    with warnings.catch_warnings(record=True) as quiet:
        warnings.simplefilter("always")
        again = assess(scenario_from_dict(d), warn=False)
    assert quiet == [] and again.warnings == a.warnings


def test_kdeg_from_memory_is_a_from_memory_warning_and_filterable() -> None:
    d = base_dict()
    d["perpetrator"]["inhibits"] = [{"target": "CYP3A", "kinact": "0.05 1/min", "ki_inact": "2 uM"}]
    a, caught = _warned(d)
    memory = [w for w in caught if w.category is FromMemoryWarning]
    if not any("from memory" in w for w in a.warnings):
        pytest.fail("expected the CYP3A kdeg default to be marked from memory in the targets table")
    assert memory and all("from memory" in str(w.message) for w in memory)
    with warnings.catch_warnings(record=True) as caught2:
        warnings.simplefilter("always")
        warnings.simplefilter("ignore", FromMemoryWarning)
        assess(scenario_from_dict(d))
    assert not any(w.category is FromMemoryWarning for w in caught2)


def test_public_names_and_hierarchy() -> None:
    for name in ("InteractWarning", "AssumptionWarning", "FromMemoryWarning", "ModelLimitWarning", "FitWarning"):
        cls = getattr(interact, name)
        assert issubclass(cls, UserWarning) and issubclass(cls, interact.InteractWarning)


def test_cli_prints_the_warnings_and_emits_none(tmp_path, capsys) -> None:  # type: ignore[no-untyped-def]
    d = base_dict()
    del d["victim"]["fg"]
    from interact.scenario import dumps_scenario

    path = tmp_path / "s.toml"
    path.write_text(dumps_scenario(scenario_from_dict(d)), encoding="utf-8")
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        assert main(["assess", str(path)]) == 0
    assert not [w for w in caught if issubclass(w.category, InteractWarning)]
    assert "victim.fg not given" in capsys.readouterr().out


def test_fit_design_warnings_are_fit_warnings_and_the_comparison_has_a_short_repr() -> None:
    import numpy as np

    from interact.errors import FitWarning
    from interact.kinetics.data import incubation_data
    from interact.kinetics.fitting import fit_inhibition
    from interact.kinetics.ratelaws import competitive

    # two inhibitor levels and no control rows: a design the fit flags (simulated competitive data, test input only)
    s, i = np.meshgrid([2.0, 5.0, 10.0, 20.0, 50.0], [2.0, 8.0])
    s, i = s.ravel(), i.ravel()
    v = competitive(s, i, 100.0, 10.0, 5.0) + np.random.default_rng(0).normal(0, 1.5, s.size)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        comp = fit_inhibition(incubation_data(s, i, v))
    fit_warned = [str(w.message) for w in caught if w.category is FitWarning]
    assert fit_warned == list(comp.warnings) and any("No control rows" in w for w in fit_warned)
    with warnings.catch_warnings(record=True) as quiet:
        warnings.simplefilter("always")
        fit_inhibition(incubation_data(s, i, v), warn=False)
    assert not [w for w in quiet if w.category is FitWarning]
    text = repr(comp)
    assert len(text) < 300 and comp.verdict.model in text
    page = comp._repr_html_()
    assert "AICc" in page and "Caution" in page and all(r.model in page for r in comp.ranking)


def test_time_course_warnings_are_emitted_under_their_topics() -> None:
    from pathlib import Path

    from interact.dynamic import simulate

    example = Path(interact.__file__).parent / "examples" / "tdi_inducer.toml"
    a = assess(interact.load_scenario(example), warn=False)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        course = simulate(a, days=10)
    assert [str(w.message) for w in caught] == list(course.warnings) and course.warnings
    assert all(issubclass(w.category, InteractWarning) for w in caught)
    assert any(w.category is FromMemoryWarning for w in caught)  # the kdeg values of the targets table are from memory
    with warnings.catch_warnings(record=True) as quiet:
        warnings.simplefilter("always")
        simulate(a, days=10, warn=False)
    assert quiet == []


def test_ic50_fit_warnings_are_fit_warnings() -> None:
    import numpy as np

    from interact.errors import FitWarning
    from interact.kinetics.ic50 import fit_ic50

    x = np.array([0.1, 0.3, 1.0, 3.0, 10.0])
    flat = np.array([100.0, 99.0, 98.0, 97.0, 96.0])  # barely declining: a test input the fit refuses to call a curve
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = fit_ic50(x, flat)
    assert result.warnings and [str(w.message) for w in caught if w.category is FitWarning] == list(result.warnings)
    assert all(w.filename == __file__ for w in caught)
    with warnings.catch_warnings(record=True) as quiet:
        warnings.simplefilter("always")
        fit_ic50(x, flat, warn=False)
    assert quiet == []
