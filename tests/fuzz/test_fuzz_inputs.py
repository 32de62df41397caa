"""The standing fuzz suite: every input path ends in a result or an InteractError naming a field, within budget.

Strategies generate scenario files, rule sets, CSV tables (incubation, pre-incubation, induction, batch),
uncertainty specs and output paths, mixing plausible values with hostile ones (NaN, infinities, 1e308,
subnormals, huge integers, control and escape characters, byte-order marks, deep nesting, wrong types).
Every value here is a generated input, never a check value. Each case must:

- end in a result (finite numbers) or an ``InteractError`` whose field (or message) names what is wrong;
- stay within a time budget (and, for the batch and uncertainty paths, a memory budget measured with tracemalloc;
  the fits read at most a few thousand rows, and tracemalloc would slow their Python loops several-fold);
- never write anywhere but the intended output path.

The case counts are printed at the end of the run ("fuzz cases generated: ...").
"""

from __future__ import annotations

import io
import math
import os
import stat
import tempfile
import time
import tomllib
import tracemalloc
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest
import tomlkit
from fuzzcount import CASES, RESULTS
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import interact
from interact import assess
from interact.cli import main
from interact.errors import InteractError, ScenarioError
from interact.report.assessment import format_assessment
from interact.scenario import loads_scenario

# Fuzzed inputs trigger model and fit warnings (defaults assumed, values from memory ...) as a side effect; each case
# must end in a result or an InteractError. Their emission is checked in tests/api/test_warnings.py.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

EXAMPLES = Path(interact.__file__).parent / "examples"
BASE_TEXT = (EXAMPLES / "tdi_inducer.toml").read_text(encoding="utf-8")
RULES_TEXT = (Path(interact.__file__).resolve().parents[1] / "reference_tables" / "rules" / "ich-m12-2024.toml").read_text(encoding="utf-8")
#: seconds one case may take: a hang or runaway work, not a slow machine, must trip it (the slowest accepted cases
#: take about a second on the shared 2-core machine; imports are warmed before timing)
TIME_BUDGET_S = 30.0
#: bytes one table case may allocate at its peak
MEMORY_BUDGET = 256 * 2**20


#: FUZZ_SCALE=10 runs ten times the examples (by hand, to search harder); CI runs the fixed counts
SCALE = int(os.environ.get("FUZZ_SCALE", "1"))


def budget(examples: int) -> settings:
    """A fixed number of examples per input path (derandomized under CI=true by tests/conftest.py's profile)."""
    return settings(max_examples=examples * SCALE, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])


def _named(exc: InteractError) -> None:
    """The error names what is wrong: a field (key path, column, option) and a message."""
    if isinstance(exc, ScenarioError):
        assert exc.problems and all(p.field and p.message for p in exc.problems)
    field = getattr(exc, "field", None)
    assert (field or str(exc)) and str(exc).strip()


def _within_budget(name: str, run: Callable[[], object], *, memory: bool = False) -> object:
    """Run one case: a result or a named InteractError, within the time (and memory) budget."""
    CASES[name] += 1
    if memory:
        tracemalloc.start()
    start = time.perf_counter()
    try:
        out = run()
        RESULTS[name] += 1
        return out
    except InteractError as exc:
        _named(exc)
        return None
    finally:
        elapsed = time.perf_counter() - start
        if memory:
            _, peak = tracemalloc.get_traced_memory()
            tracemalloc.stop()
            assert peak < MEMORY_BUDGET, f"{name}: {peak / 2**20:.0f} MiB"
        assert elapsed < TIME_BUDGET_S, f"{name}: {elapsed:.1f} s"


# --------------------------------------------------------------------------- values

NUMBERS = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from([0.0, -0.0, 5e-324, 1e-300, 1e-30, 1e30, 1e300, 1.7976931348623157e308, -1.0, 1.0, 0.5]),
    st.integers(-(10**40), 10**40),
)
UNITS = st.sampled_from(
    ["uM", "nM", "mg", "ug/mL", "ng/mL", "1/h", "1/min", "h", "min", "s", "wk", "L/h", "g/mol", "", "%", "kg", "parsec"]
)
QUANTITY_TEXT = st.builds(lambda n, u: f"{n!r} {u}".strip(), NUMBERS, UNITS)
NASTY_TEXT = st.one_of(
    st.text(max_size=40),
    st.sampled_from(
        [
            "\ufeff",
            "\x1b[8m",
            "\x1b]0;t\x07",
            "<script>x</script>",
            "[a](javascript:b)",
            "\u202eevil",
            "x" * 3000,
            "1 uM**99",
            "()",
            "1e999 uM",
            "nan uM",
            "-5 mg",
        ]
    ),
)
HOSTILE = st.one_of(
    NUMBERS,
    QUANTITY_TEXT,
    NASTY_TEXT,
    st.booleans(),
    st.lists(NUMBERS, max_size=3),
    st.dictionaries(st.text(max_size=5), NUMBERS, max_size=2),
    st.just([[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[1]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]),
)


def _log_uniform(low: float, high: float) -> st.SearchStrategy[float]:
    return st.floats(math.log10(low), math.log10(high)).map(lambda e: float(f"{10.0**e:.4g}"))


#: plausible replacements (half of the edits): a value of the right kind and size, so that many cases reach a result
PLAUSIBLE: dict[str, st.SearchStrategy[Any]] = {
    "dose": _log_uniform(0.1, 2000).map(lambda x: f"{x} mg"),
    "cmax": _log_uniform(0.001, 50).map(lambda x: f"{x} uM"),
    "fu_plasma": _log_uniform(0.001, 1),
    "interval": st.sampled_from(["6 h", "8 h", "12 h", "24 h", "48 h", "1 wk"]),
    "half_life": _log_uniform(0.5, 500).map(lambda x: f"{x} h"),
    "ka": _log_uniform(0.05, 20).map(lambda x: f"{x} 1/h"),
    "blood_plasma_ratio": st.floats(0.5, 3),
    "ki": _log_uniform(1e-4, 1e3).map(lambda x: f"{x} uM"),
    "kinact": _log_uniform(1e-4, 1).map(lambda x: f"{x} 1/min"),
    "ki_inact": _log_uniform(1e-3, 1e3).map(lambda x: f"{x} uM"),
    "emax": _log_uniform(0.1, 50),
    "ec50": _log_uniform(1e-3, 1e3).map(lambda x: f"{x} uM"),
    "fu_inc": _log_uniform(0.01, 1),
    "fg": st.floats(0.05, 1),
    "fm": st.floats(0, 1),
    "hepatic_extraction": st.floats(0.01, 0.95),
    "strengths": st.lists(_log_uniform(0.01, 1000).map(lambda x: f"{x} mg"), min_size=1, max_size=5),
    "name": st.text(min_size=1, max_size=30),
}

SCENARIO_PATHS = [
    ("title",),
    ("rules",),
    ("perpetrator", "dose"),
    ("perpetrator", "cmax"),
    ("perpetrator", "fu_plasma"),
    ("perpetrator", "interval"),
    ("perpetrator", "half_life"),
    ("perpetrator", "ka"),
    ("perpetrator", "blood_plasma_ratio"),
    ("perpetrator", "name"),
    ("perpetrator", "inhibits", 0, "ki"),
    ("perpetrator", "inhibits", 0, "kinact"),
    ("perpetrator", "inhibits", 0, "ki_inact"),
    ("perpetrator", "inhibits", 0, "emax"),
    ("perpetrator", "inhibits", 0, "ec50"),
    ("perpetrator", "inhibits", 0, "fu_inc"),
    ("victim", "dose"),
    ("victim", "interval"),
    ("victim", "half_life"),
    ("victim", "ka"),
    ("victim", "fg"),
    ("victim", "strengths"),
    ("victim", "name"),
    ("victim", "pathways", 0, "fm"),
    ("victim", "hepatic_extraction"),
    ("turnover",),
]


def _set(data: dict[str, Any], path: tuple[Any, ...], value: object) -> None:
    node: Any = data
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = value


@st.composite
def scenario_texts(draw: st.DrawFn) -> str:
    """A scenario file: the invented example with values replaced, then text-level damage (BOM, cut, duplicated line)."""
    data: dict[str, Any] = tomllib.loads(BASE_TEXT)
    for path in draw(st.lists(st.sampled_from(SCENARIO_PATHS), min_size=0, max_size=3)):
        plausible = PLAUSIBLE.get(str(path[-1]))
        value = draw(plausible) if plausible is not None and draw(st.sampled_from([True, True, False])) else draw(HOSTILE)
        if path == ("turnover",):
            value = [{"enzyme": "CYP3A", "kdeg_liver": draw(st.one_of(QUANTITY_TEXT, _log_uniform(0.005, 0.1).map(lambda x: f"{x} 1/h")))}]
            if draw(st.booleans()):
                value.append({"enzyme": draw(st.sampled_from(["CYP3A", "CYP2D6", "cyp3a4"]))})
        try:
            _set(data, path, value)
        except (KeyError, IndexError, TypeError):
            pass
    try:
        text = tomlkit.dumps(data)
    except Exception:  # a value TOML cannot hold (e.g. a None): keep the example text
        text = BASE_TEXT
    damage = draw(st.sampled_from(["none"] * 6 + ["bom", "cut", "dup", "nest", "bigint"]))
    if damage == "bom":
        text = "\ufeff" + text
    elif damage == "cut":
        text = text[: draw(st.integers(0, len(text)))]
    elif damage == "dup":
        lines = text.splitlines()
        k = draw(st.integers(0, max(len(lines) - 1, 0)))
        text = "\n".join([*lines[: k + 1], *lines[k:]])
    elif damage == "nest":
        depth = draw(st.sampled_from([40, 3000]))
        text = text.replace("emax = ", "emax_deep = " + "[" * depth + "1" + "]" * depth + "\nemax = ", 1)
    elif damage == "bigint":
        text = text.replace("fu_plasma = 0.05", "fu_plasma = " + "9" * draw(st.sampled_from([400, 4400])), 1)
    return text


# --------------------------------------------------------------------------- scenario files


def _scenario_case(text: str) -> None:
    scenario = loads_scenario(text, source="fuzz.toml")
    result = assess(scenario)
    for x in (result.prediction.gut, result.prediction.liver, result.prediction.total):
        assert math.isfinite(x) and x > 0
    from interact.dynamic import simulate

    course = None
    try:
        course = simulate(result, days=10)
    except InteractError as exc:
        _named(exc)
    for fmt in ("text", "markdown", "json"):
        out = format_assessment(result, fmt, time_course=course)
        assert "\x1b" not in out
        if fmt == "json":
            import json

            json.loads(out)


@budget(200)
@given(text=scenario_texts())
def test_scenario_files(text: str) -> None:
    _within_budget("scenario files", lambda: _scenario_case(text))


# --------------------------------------------------------------------------- rule sets


RULE_EDITS = [
    ("cutoff = { value = 1.02,", "cutoff = { value = {v},"),
    ("[fu_plasma_floor]\nvalue = 0.01", "[fu_plasma_floor]\nvalue = {v}"),
    ("[aucr_inhibition_cutoff]\nvalue = 1.25", "[aucr_inhibition_cutoff]\nvalue = {v}"),
    ("[aucr_induction_cutoff]\nvalue = 0.8", "[aucr_induction_cutoff]\nvalue = {v}"),
    ("multiplier = { value = 5.0,", "multiplier = { value = {v},"),
    ("[fu_plasma_floor_measured_exempt]\nvalue = true", "[fu_plasma_floor_measured_exempt]\nvalue = {v}"),
    ('table_version = "2026.12"', 'table_version = "2026.12"\n[physiology.fu_gut]\nvalue = {v}\nsource = "s"\nstatus = "from memory"'),
    (
        'table_version = "2026.12"',
        'table_version = "2026.12"\n[physiology.hepatic_blood_flow]\nvalue = {v}\nsource = "s"\nstatus = "from memory"',
    ),
    ('mechanism = "reversible"', "mechanism = {v}"),
]
TOML_VALUES = st.one_of(
    st.sampled_from(["1.1", "1.02", "0.05", "0.9", "0.5", "1.5", "2.0", "false", '"97 L/h"', '"1.5 L/min"', '"reversible"']),
    st.sampled_from(
        ["nan", "inf", "-inf", "-1", "0", "2", "1e308", "5e-324", "[1, 2]", "true", '"0.5"', "{a = 1}", '"97 L/h"', '"-3 L/h"']
    ),
    st.floats(allow_nan=False, allow_infinity=False).map(repr),
)


@st.composite
def rule_texts(draw: st.DrawFn) -> str:
    text = RULES_TEXT
    for old, new in draw(st.lists(st.sampled_from(RULE_EDITS), min_size=1, max_size=3, unique=True)):
        text = text.replace(old, new.replace("{v}", draw(TOML_VALUES)), 1)
    return text


@budget(100)
@given(text=rule_texts())
def test_rule_sets(text: str) -> None:
    from interact.tables import load_rules

    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "rules.toml"
        path.write_text(text, encoding="utf-8")

        def case() -> None:
            rules = load_rules(path)
            for value in (rules.fu_plasma_floor.value, rules.aucr_inhibition_cutoff.value, rules.aucr_induction_cutoff.value):
                assert math.isfinite(value) and value > 0
            result = assess(loads_scenario(BASE_TEXT), rules=rules)
            import json

            json.loads(format_assessment(result, "json"))

        _within_budget("rule sets", case)


# --------------------------------------------------------------------------- CSV tables

CELLS = st.one_of(
    NUMBERS.map(repr),
    st.sampled_from(["", "nan", "inf", "-1", "1e309", "0", "x", '"', "\ufeff1", "1,5", "1e-320", "1" * 400]),
    st.text(max_size=8),
)


def _csv(header: str, rows: list[list[str]], bom: bool) -> str:
    return ("\ufeff" if bom else "") + header + "\n" + "\n".join(",".join(r) for r in rows) + "\n"


def _plausible(draw: st.DrawFn, n: int, low: float, high: float) -> list[str]:
    return [repr(draw(st.floats(low, high))) for _ in range(n)]


@st.composite
def csv_tables(draw: st.DrawFn, header: str, model: Callable[[st.DrawFn], list[float]]) -> str:
    """Rows drawn from a plausible model (so the fits run and reach results), then some hostile cells and shapes."""
    if model is _preincubation_row:  # a pre-incubation design: every time at every concentration, some rows dropped
        grid = [(i, t) for i in (0.0, 1.0, 3.0, 10.0, 30.0) for t in (0.0, 5.0, 10.0, 20.0, 30.0)]
        kept = [g for g in grid if draw(st.integers(0, 9)) > 0]
        rows = [[repr(x) for x in (i, t, 100.0 * math.exp(-0.1 * i / (3.0 + i) * t) * _noise(draw))] for i, t in kept]
    else:
        rows = [[repr(x) for x in model(draw)] for _ in range(draw(st.integers(0, 24)))]
    columns = header.count(",") + 1
    for _ in range(draw(st.sampled_from([0, 0, 0, 1, 2, 3]))):
        if rows:
            r, c = draw(st.integers(0, len(rows) - 1)), draw(st.integers(0, columns - 1))
            rows[r][c] = draw(CELLS)
    if rows and draw(st.sampled_from([False, False, False, True])):
        rows[0] = rows[0][: draw(st.integers(0, columns))]  # a short row
    return _csv(header, rows, draw(st.booleans()))


def _noise(draw: st.DrawFn) -> float:
    return 1.0 + draw(st.floats(-0.1, 0.1))


def _incubation_row(draw: st.DrawFn) -> list[float]:
    """Competitive inhibition, v = Vmax S / (Km (1 + I/Ki) + S): invented constants (Vmax 100, Km 10 uM, Ki 2 uM)."""
    s = draw(st.sampled_from([0.0, 1.0, 2.5, 5.0, 10.0, 25.0, 50.0, 100.0]))
    i = draw(st.sampled_from([0.0, 0.5, 1.0, 2.0, 5.0, 10.0]))
    return [s, i, 100.0 * s / (10.0 * (1 + i / 2.0) + s) * _noise(draw)]


def _preincubation_row(draw: st.DrawFn) -> list[float]:
    """Activity left, 100 exp(-kobs t), kobs = 0.1 I / (3 + I) per min: invented constants."""
    i = draw(st.sampled_from([0.0, 1.0, 3.0, 10.0, 30.0]))
    t = draw(st.sampled_from([0.0, 5.0, 10.0, 20.0, 30.0]))
    return [i, t, 100.0 * math.exp(-0.1 * i / (3.0 + i) * t) * _noise(draw)]


def _induction_row(draw: st.DrawFn) -> list[float]:
    """Fold change 1 + 6 C / (2 + C): invented constants."""
    c = draw(st.sampled_from([0.0, 0.1, 0.3, 1.0, 3.0, 10.0, 30.0]))
    return [c, (1.0 + 6.0 * c / (2.0 + c)) * _noise(draw)]


@budget(60)
@given(text=csv_tables("substrate (uM),inhibitor (uM),velocity", _incubation_row))
def test_incubation_csv(text: str) -> None:
    from interact.kinetics.data import parse_incubation_csv
    from interact.kinetics.fitting import fit_inhibition

    def case() -> None:
        data = parse_incubation_csv(text, source="fuzz.csv")
        # numpy warnings are errors here (pytest filterwarnings): a trial Km of 0 on rows at substrate 0 once divided
        # 0 by 0 in the rate law, e.g. rows (0, 0, 0), (0, 0, 0), (1, 0, 9.09), (2.5, 0.5, 16.7)
        comp = fit_inhibition(data, models=("none", "competitive", "mixed"), profile=False)
        assert comp.fits
        for fit in comp.fits:
            if fit.success:  # a converged fit reports finite constants (an unbounded Ki is +inf, by design)
                assert all(math.isfinite(e.value) or e.value == math.inf for e in fit.estimates), fit.estimates

    _within_budget("incubation CSV", case)


@budget(60)
@given(text=csv_tables("inhibitor (uM),time (min),activity", _preincubation_row))
def test_preincubation_csv(text: str) -> None:
    from interact.kinetics.carry import parse_preincubation_csv
    from interact.kinetics.inactivation import fit_inactivation_raw

    def case() -> None:
        c = parse_preincubation_csv(text, source="fuzz.csv").columns
        fit_inactivation_raw(c["inhibitor"], c["time"], c["activity"])

    _within_budget("pre-incubation CSV", case)


@budget(60)
@given(text=csv_tables("concentration (uM),fold_change", _induction_row))
def test_induction_csv(text: str) -> None:
    from interact.kinetics.carry import parse_fold_change_csv
    from interact.kinetics.induction import fit_induction

    def case() -> None:
        c = parse_fold_change_csv(text, source="fuzz.csv").columns
        fit_induction(c["concentration"], c["fold_change"])

    _within_budget("induction CSV", case)


P_HEADER = "name,dose (mg),molar mass (g/mol),cmax (ng/mL),fu_p,route,ki CYP3A (uM),ki CYP2D6 (uM)"
V_HEADER = "name,dose (mg),interval (h),fg,strengths (mg),fm CYP3A,fm CYP2D6"


@st.composite
def batch_tables(draw: st.DrawFn) -> tuple[str, str, str]:
    perps = [
        [
            draw(st.one_of(st.sampled_from(["P", "Q", "R"]), NASTY_TEXT)).replace(",", ";").replace("\n", " ").replace('"', "") or "P",
            *_plausible(draw, 3, 0.001, 1000.0),
            repr(draw(st.floats(0.001, 1.0))),
            "oral",
            *_plausible(draw, 2, 1e-6, 100.0),
        ]
        for _ in range(draw(st.integers(1, 4)))
    ]
    victims = [
        [
            "V",
            *_plausible(draw, 2, 0.01, 100.0),
            repr(draw(st.floats(0.05, 1.0))),
            "1;5",
            repr(draw(st.floats(0, 0.6))),
            repr(draw(st.floats(0, 0.4))),
        ]
        for _ in range(draw(st.integers(1, 4)))
    ]
    for table in (perps, victims):
        for _ in range(draw(st.sampled_from([0, 0, 0, 1, 2]))):
            r = draw(st.integers(0, len(table) - 1))
            c = draw(st.integers(1, len(table[r]) - 1))
            table[r][c] = draw(CELLS).replace(",", ".").replace("\n", "")
    return _csv(P_HEADER, perps, draw(st.booleans())), _csv(V_HEADER, victims, draw(st.booleans())), draw(st.sampled_from(["fail", "skip"]))


@budget(100)
@given(tables=batch_tables())
def test_batch_tables(tables: tuple[str, str, str]) -> None:
    from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims
    from interact.report.batch import write_results

    p_text, v_text, on_error = tables

    def case() -> None:
        perps = loads_perpetrators(p_text, "ich-m12-2024", source="p.csv", on_error=on_error)
        victims = loads_victims(v_text, source="v.csv", on_error=on_error)
        result = evaluate_pairs(perps, victims, "ich-m12-2024")
        for fmt in ("csv", "json", "markdown"):
            handle = io.StringIO()
            rows = write_results(result, handle, fmt)
            assert rows == result.pairs
            if fmt == "csv":  # never a blank ratio
                import csv

                for row in csv.DictReader(io.StringIO(handle.getvalue())):
                    assert row["AUCR"] and row["AUCR gut"] and row["AUCR liver"]
        assert all(math.isfinite(x) for x in result.total.ravel())

    _within_budget("batch tables", case, memory=True)


# --------------------------------------------------------------------------- uncertainty specs

VARY_PATHS = [
    "perpetrator.cmax",
    "perpetrator.fu_plasma",
    "perpetrator.inhibits[0].ki",
    "perpetrator.inhibits[0].kinact",
    "victim.fg",
    "victim.pathways[0].fm",
    "victim.nothing",
    "",
]
PLAUSIBLE_SPECS = st.sampled_from(["cv:30%", "cv:0.5", "uniform:0.3,0.6", "ci:0.5 uM,2 uM", "ci:0.5,2", "uniform:0.5,0.95", "fixed"])
SPECS = st.one_of(
    PLAUSIBLE_SPECS,
    PLAUSIBLE_SPECS,
    PLAUSIBLE_SPECS,
    PLAUSIBLE_SPECS,
    st.builds(lambda v: f"cv:{v}%", NUMBERS),
    st.builds(lambda a, b: f"ci:{a!r},{b!r}", NUMBERS, NUMBERS),
    st.builds(lambda a, b, u: f"ci:{a!r} {u},{b!r} {u}", NUMBERS, NUMBERS, UNITS),
    st.builds(lambda a, b: f"uniform:{a!r},{b!r}", NUMBERS, NUMBERS),
    st.sampled_from(["fixed", "cv:", "ci:1", "uniform:0.2,0.1", "normal:1,2", "cv:30%%", ""]),
)


@st.composite
def spec_texts(draw: st.DrawFn) -> str:
    vary = {draw(st.sampled_from(VARY_PATHS)): draw(SPECS) for _ in range(draw(st.integers(1, 3)))}
    doc = tomlkit.document()
    doc["vary"] = vary
    sampling: dict[str, Any] = {}
    if draw(st.booleans()):
        sampling["samples"] = draw(
            st.one_of(st.integers(1, 3000), st.integers(1, 3000), st.integers(-5, 0), st.sampled_from([0, 10**12, 1.5, "100"]))
        )
    if draw(st.booleans()):
        sampling["seed"] = draw(st.one_of(st.integers(0, 2**32), st.integers(0, 2**32), st.integers(-5, 2**70), st.just("x")))
    if draw(st.booleans()):
        sampling["method"] = draw(st.sampled_from(["mc", "lhs", "mc", "lhs", "sobol", 3]))
    if sampling:
        doc["sampling"] = sampling
    return ("\ufeff" if draw(st.booleans()) else "") + tomlkit.dumps(doc)


BASE_RESULT = None


@budget(100)
@given(text=spec_texts())
def test_uncertainty_specs(text: str) -> None:
    from interact.uncertainty import loads_spec, run_uncertainty, sensitivity

    global BASE_RESULT
    if BASE_RESULT is None:  # once: the assessment, and the imports of the sampling code (not part of a case's time)
        BASE_RESULT = assess(loads_scenario(BASE_TEXT))
        run_uncertainty(BASE_RESULT, (("victim.fg", "uniform:0.3,0.6"),), samples=10)
    result = BASE_RESULT

    def case() -> None:
        spec = loads_spec(text, source="spec.toml")
        samples = spec.samples if spec.samples is not None else 500
        samples = min(samples, 2000)  # the CLI's own limit is 5,000,000; the fuzz keeps each case short
        spread = run_uncertainty(result, spec.vary, samples=samples, seed=spec.seed or 0, method=spec.method or "lhs")
        sens = sensitivity(result, spec.vary)
        from interact.report.uncertainty import format_uncertainty

        for fmt in ("text", "json"):
            out = format_uncertainty(spread, sens, fmt)
            assert "not a number" not in out
            if fmt == "json":
                import json

                json.loads(out)

    _within_budget("uncertainty specs", case, memory=True)


# --------------------------------------------------------------------------- output paths

TARGET_KINDS = [
    "new",
    "existing",
    "read-only",
    "symlink",
    "dangling-symlink",
    "folder",
    "fifo",
    "input",
    "input-link",
    "missing-folder",
    "device",
]


def _snapshot(folder: Path) -> dict[str, tuple[str, bytes | str]]:
    out: dict[str, tuple[str, bytes | str]] = {}
    for path in sorted(folder.rglob("*")):
        info = os.lstat(path)
        if stat.S_ISLNK(info.st_mode):
            out[str(path)] = ("link", os.readlink(path))
        elif stat.S_ISREG(info.st_mode):
            out[str(path)] = (oct(stat.S_IMODE(info.st_mode)), path.read_bytes())
        else:
            out[str(path)] = (oct(stat.S_IFMT(info.st_mode)), "")
    return out


@budget(60)
@given(
    kind=st.sampled_from(TARGET_KINDS),
    command=st.sampled_from(["assess", "report", "uncertainty", "timecourse-plot"]),
    force=st.booleans(),
)
def test_output_paths(kind: str, command: str, force: bool) -> None:
    CASES["output paths"] += 1
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        scen = folder / "s.toml"
        scen.write_text(BASE_TEXT, encoding="utf-8")
        other = folder / "other.txt"
        other.write_text("keep\n", encoding="utf-8")
        target = folder / "out.txt"
        intended: set[str] = {str(target)}
        if kind == "existing":
            target.write_text("old\n", encoding="utf-8")
        elif kind == "read-only":
            target.write_text("old\n", encoding="utf-8")
            target.chmod(0o444)
        elif kind == "symlink":
            (folder / "real.txt").write_text("old\n", encoding="utf-8")
            target.symlink_to(folder / "real.txt")
            intended = {str(folder / "real.txt")}
        elif kind == "dangling-symlink":
            target.symlink_to(folder / "made.txt")
            intended = {str(folder / "made.txt")}
        elif kind == "folder":
            target.mkdir()
        elif kind == "fifo":
            os.mkfifo(target)
        elif kind == "input":
            target = scen
        elif kind == "input-link":
            target.symlink_to(scen)
        elif kind == "missing-folder":
            target = folder / "no" / "out.txt"
        elif kind == "device":
            target = Path("/dev/null")
        before = _snapshot(folder)
        argv = {
            "assess": ["assess", str(scen), "--time-course", "off", "-o", str(target)],
            "report": ["report", str(scen), "--format", "markdown", "-o", str(target)],
            "uncertainty": ["uncertainty", str(scen), "--vary", "victim.fg=uniform:0.3,0.6", "--samples", "100", "-o", str(target)],
            "timecourse-plot": ["timecourse", str(scen), "--days", "5", "--plot", str(target), "-o", str(folder / "course.txt")],
        }[command]
        if command == "timecourse-plot":
            intended |= {str(folder / "course.txt")}
        if force:
            argv.append("--force")
        start = time.perf_counter()
        rc = main(argv)
        RESULTS["output paths"] += rc == 0
        assert time.perf_counter() - start < TIME_BUDGET_S
        after = _snapshot(folder)
        changed = {p for p in set(before) | set(after) if before.get(p) != after.get(p)}
        assert changed <= intended, (kind, command, changed - intended)
        should_refuse = kind in ("folder", "fifo", "input", "input-link", "missing-folder", "device") or (kind == "read-only" and not force)
        if should_refuse:
            assert rc == 2 and not changed, (kind, command, rc)
        else:
            assert rc == 0, (kind, command)
            written = Path(os.path.realpath(target))
            assert written.is_file() and written.stat().st_size > 0
        if kind == "read-only":
            assert stat.S_IMODE(os.stat(target).st_mode) == 0o444
        if kind in ("symlink", "dangling-symlink", "input-link"):
            assert target.is_symlink()


@pytest.fixture(autouse=True)
def _no_stray_temporary_files() -> Any:
    """The writer leaves no temporary file behind in the working folder."""
    before = set(os.listdir("."))
    yield
    assert not [p for p in set(os.listdir(".")) - before if p.endswith(".tmp")]
