"""Units: parsing, dimensions, mass <-> molar conversion, error messages."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from interact import units
from interact.errors import UnitError


@pytest.mark.parametrize(
    ("text", "kind", "unit", "value"),
    [
        ("812 ng/mL", "concentration", "ng/mL", 812.0),
        ("1.8 uM", "concentration", "uM", 1.8),
        ("1.8 µM", "concentration", "uM", 1.8),
        ("200 mg", "dose", "mg", 200.0),
        ("0.1 1/min", "rate", "1/min", 0.1),
        ("0.03 h-1", "rate", "1/h", 0.03),
        ("0.03 h^-1", "rate", "1/h", 0.03),
        ("97 L/h", "flow", "L/min", 97.0 / 60.0),
        ("250 mL", "volume", "L", 0.25),
        ("24 h", "time", "min", 1440.0),
    ],
)
def test_parse_and_convert(text: str, kind: str, unit: str, value: float) -> None:
    q = units.parse(text, kind, field="f")
    assert units.magnitude(q, unit) == pytest.approx(value, rel=1e-12)


def test_mass_to_molar_through_molar_mass() -> None:
    # 812 ng/mL of a 452.5 g/mol compound: 812e-9 g/mL / 452.5 g/mol = 1.7945e-6 mol/L (arithmetic)
    mw = units.parse("452.5 g/mol", "molar_mass", field="mw")
    c = units.parse("812 ng/mL", "concentration", field="c")
    assert units.concentration_um(c, mw, field="c") == pytest.approx(812 / 452.5, rel=1e-12)
    dose = units.parse("200 mg", "dose", field="d")
    assert units.amount_umol(dose, mw, field="d") == pytest.approx(200e3 / 452.5, rel=1e-12)


def test_mass_concentration_without_molar_mass_names_field() -> None:
    c = units.parse("812 ng/mL", "concentration", field="perpetrator.cmax")
    with pytest.raises(UnitError, match=r"^perpetrator\.cmax: .*molar_mass"):
        units.concentration_um(c, None, field="perpetrator.cmax")


@pytest.mark.parametrize(
    ("text", "pattern"),
    [
        ("1.8 kg", r'^perpetrator\.cmax: "1\.8 kg" is a mass; expected a concentration such as "1\.8 uM" or "812 ng/mL"$'),
        ("1.8 furlongs", r'unknown unit "furlongs"'),
        ("abc", r"does not start with a number"),
        ("-1 uM", r"is negative"),
        ("0 uM", r"is zero"),
        ("1e999 uM", r"not a finite number"),
        ("5", r"has no unit"),
        ("1 uM; rm -rf", r"unreadable unit"),
        ("9" * 200 + " uM", r"too long"),
    ],
)
def test_errors_name_field_value_and_expectation(text: str, pattern: str) -> None:
    with pytest.raises(UnitError, match=pattern) as info:
        units.parse(text, "concentration", field="perpetrator.cmax")
    assert info.value.field == "perpetrator.cmax"
    assert "\n" not in str(info.value)


def test_non_text_is_rejected() -> None:
    with pytest.raises(UnitError, match="not text with a unit"):
        units.parse(1.5, "concentration", field="x")


@pytest.mark.parametrize(("text", "value"), [(0.02, 0.02), ("0.02", 0.02), ("2 %", 0.02), (1, 1.0)])
def test_fraction(text: object, value: float) -> None:
    assert units.parse_fraction(text, field="fu") == pytest.approx(value)


@pytest.mark.parametrize("bad", [0, -0.1, 1.5, "2 mg", float("nan"), float("inf"), True, None])
def test_fraction_errors(bad: object) -> None:
    with pytest.raises(UnitError, match=r"^fu: "):
        units.parse_fraction(bad, field="fu")


def test_format_round_trip() -> None:
    for text, kind in (
        ("812 ng/mL", "concentration"),
        ("0.1 1/min", "rate"),
        ("1.617 L/min", "flow"),
        ("0.333333 uM", "concentration"),
    ):
        q = units.parse(text, kind, field="x")
        again = units.parse(units.format_quantity(q), kind, field="x")
        assert units.magnitude(again, str(q.units)) == units.magnitude(q, str(q.units))


@pytest.mark.parametrize(
    "text",
    ["812 ng/", "0.1 min^", "0.1 min-", "1 *", "1 **", "1 (", "1 )", "1 ()", "5 mg/(kg", "2 (mg)/", "1e-", "1 mg/ mL/"],
)
def test_half_typed_units_are_unit_errors(text: str) -> None:
    """What a user has typed halfway through a unit is a clear UnitError, never a parser crash."""
    with pytest.raises(UnitError, match=r"perpetrator\.cmax") as info:
        units.parse(text, "concentration", field="perpetrator.cmax")
    assert info.value.value == text


def test_implausible_sizes_are_refused() -> None:
    """Beyond these, ratios overflow floats (the fuzz test found fu_inc = 2.2e-308)."""
    with pytest.raises(UnitError, match=r"^fu_inc: .*below 1e-09"):
        units.check_fraction_size(2.2250738585072014e-308, "fu_inc", 2.2250738585072014e-308)
    with pytest.raises(UnitError, match="plausible range"):
        units.parse("1e-300 uM", "concentration", field="ki")
    with pytest.raises(UnitError, match="plausible range"):
        units.parse("1e300 mg", "dose", field="dose")
    assert units.parse_fraction(1e-6, field="fu") == 1e-6


def _registry_spellings() -> list[str]:
    """Every unit the registry defines, under every prefix (names, symbols, aliases), alone and in the compound
    forms the tool reads and writes: amount or mass per volume, volume per time, 1 per time, mass per amount."""
    from interact.units import ureg

    singles = []
    for name in sorted(set(ureg._units)):
        for prefix in sorted(set(ureg._prefixes) | {""}):
            text = prefix + name
            try:
                units._parse_text(f"1 {text}", "f", "")
            except UnitError:
                continue
            singles.append(text)
    dims = {s: units._parse_text(f"1 {s}", "f", "").dimensionality for s in singles}
    of = {k: [s for s in singles if dims[s] == units._DIM(k)] for k in ("[mass]", "[substance]", "[length]**3", "[time]")}
    compounds = [f"{a}/{v}" for a in of["[mass]"] + of["[substance]"] for v in of["[length]**3"][::9]]
    compounds += [f"{v}/{t}" for v in of["[length]**3"][::9] for t in of["[time]"][::2]]
    compounds += [f"1/{t}" for t in of["[time]"]] + [f"{m}/{n}" for m in of["[mass]"][::4] for n in of["[substance]"][::4]]
    return singles + compounds


def test_every_spelling_the_tool_writes_reads_back() -> None:
    """Issue 11: 108 of 1,986 spellings written by format_quantity could not be read back (e.g. "1.5 cdm")."""
    spellings = _registry_spellings()
    assert len(spellings) > 1500  # the whole registry, not a sample
    failures = []
    for text in spellings:
        q = units._parse_text(f"1.5 {text}", "f", "")
        written = units.format_quantity(q)
        try:
            back = units._parse_text(written, "f", "")
            same = back.dimensionality == q.dimensionality and float(back.to(q.units).magnitude) == pytest.approx(1.5, rel=1e-12)
        except UnitError:
            same = False
        if not same:
            failures.append((text, written))
    assert not failures, failures[:20]


# The fast mass <-> molar conversion (cached factors, units.py) is checked against pint's own "chemistry" context
# (defined in interact/units.txt, the library's way: a context with the molar mass passed in), over random values.
_MASS_CONC = ("ng/mL", "ug/mL", "mg/L", "ug/L", "g/L", "mg/dL")
_MOLAR_MASS = ("g/mol", "kg/mol", "mg/mmol")


@settings(max_examples=200, deadline=None)
@given(
    value=st.floats(1e-6, 1e6),
    unit=st.sampled_from(_MASS_CONC),
    mw=st.floats(10.0, 5000.0),
    mw_unit=st.sampled_from(_MOLAR_MASS),
)
def test_fast_molar_conversion_matches_pints_chemistry_context(value: float, unit: str, mw: float, mw_unit: str) -> None:
    q = units.ureg.Quantity(value, unit)
    molar_mass = units.ureg.Quantity(mw, mw_unit)
    through_pint = q.to("uM", "chemistry", mw=molar_mass).magnitude
    assert units.concentration_um(q, molar_mass, field="f") == pytest.approx(through_pint, rel=1e-12)


@settings(max_examples=100, deadline=None)
@given(value=st.floats(1e-6, 1e6), unit=st.sampled_from(("mg", "ug", "g", "ng")), mw=st.floats(10.0, 5000.0))
def test_fast_amount_conversion_matches_pints_chemistry_context(value: float, unit: str, mw: float) -> None:
    q = units.ureg.Quantity(value, unit)
    molar_mass = units.ureg.Quantity(mw, "g/mol")
    through_pint = q.to("umol", "chemistry", mw=molar_mass).magnitude
    assert units.amount_umol(q, molar_mass, field="f") == pytest.approx(through_pint, rel=1e-12)
