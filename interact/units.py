"""The one unit registry of interact, and parsing of user text into quantities.

The registry is built once, here, from a trimmed definitions file
(``units.txt`` beside this module) so that it loads in milliseconds.  Shells
parse text with :func:`parse`; core modules convert a quantity once to a bare
float in a canonical unit with :func:`magnitude` (or the molar helpers) and do
their arithmetic on floats and numpy arrays.

Canonical units (the suffixes used in float names across the core):
``_um`` micromolar, ``_umol`` micromole, ``_mg`` milligram, ``_per_min`` 1/min,
``_l_per_min`` L/min, ``_l`` litre, ``_h`` hour, ``_g_per_mol`` g/mol.
"""

from __future__ import annotations

import math
import re
import tokenize
from functools import lru_cache
from pathlib import Path
from typing import Any, Final

import pint

from .errors import UnitError

__all__ = [
    "KINDS",
    "Quantity",
    "amount_umol",
    "concentration_um",
    "format_quantity",
    "magnitude",
    "parse",
    "parse_fraction",
    "same_quantity_text",
    "unit_text",
    "ureg",
]

ureg: Final[pint.UnitRegistry] = pint.UnitRegistry(  # type: ignore[type-arg]
    str(Path(__file__).with_name("units.txt")),
    cache_folder=None,
    autoconvert_offset_to_baseunit=False,
)
Quantity = ureg.Quantity

_DIM = ureg.get_dimensionality
# looked up once: pint parses the text on every call (about 3 us), and the core converts some 16 values per assessment
_MOLAR: Final = _DIM("[substance]/[length]**3")
_AMOUNT: Final = _DIM("[substance]")
# kind -> (accepted dimensionalities, phrase, examples)
KINDS: Final[dict[str, tuple[tuple[Any, ...], str, str]]] = {
    "concentration": (
        (_DIM("[substance]/[length]**3"), _DIM("[mass]/[length]**3")),
        "a concentration",
        '"1.8 uM" or "812 ng/mL"',
    ),
    "molar_concentration": ((_DIM("[substance]/[length]**3"),), "a molar concentration", '"1.8 uM"'),
    "dose": ((_DIM("[mass]"), _DIM("[substance]")), "a dose (mass or amount)", '"200 mg" or "450 umol"'),
    "mass": ((_DIM("[mass]"),), "a mass", '"200 mg"'),
    "molar_mass": ((_DIM("[mass]/[substance]"),), "a molar mass", '"452.5 g/mol"'),
    "rate": ((_DIM("1/[time]"),), "a rate constant", '"0.1 1/min" or "0.03 1/h"'),
    "flow": ((_DIM("[length]**3/[time]"),), "a flow", '"97 L/h" or "1.5 L/min"'),
    "volume": ((_DIM("[length]**3"),), "a volume", '"250 mL"'),
    "time": ((_DIM("[time]"),), "a time", '"24 h" or "30 min"'),
    "velocity": (
        (_DIM("[substance]/[time]/[mass]"), _DIM("[substance]/[time]/[length]**3"), _DIM("[substance]/[time]")),
        "a reaction velocity",
        '"120 pmol/min/mg"',
    ),
    "protein": ((_DIM("[mass]/[length]**3"),), "a protein concentration", '"0.5 mg/mL"'),
}

_NAMES: Final = {
    _DIM("[mass]"): "a mass",
    _DIM("[substance]"): "an amount",
    _DIM("[time]"): "a time",
    _DIM("1/[time]"): "a rate constant",
    _DIM("[length]**3"): "a volume",
    _DIM("[length]**3/[time]"): "a flow",
    _DIM("[substance]/[length]**3"): "a molar concentration",
    _DIM("[mass]/[length]**3"): "a mass concentration",
    _DIM("[mass]/[substance]"): "a molar mass",
    _DIM(""): "a plain number",
}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_UNIT_CHARS = re.compile(r"^[A-Za-zµμ0-9/*^ ().%-]*$")
_DASH_POWER = re.compile(r"([A-Za-zµμ])\s*-\s*(\d)\b")  # "min-1" -> "min**-1"
_MAX_TEXT = 80
#: the smallest fraction and the magnitude range accepted; beyond them ratios such as
#: Igut / (Ki x fu,inc) overflow floating point (every path: assess, batch, uncertainty)
MIN_FRACTION: Final = 1e-9
MAGNITUDE_RANGE: Final = (1e-30, 1e30)


def parse(
    text: object,
    expect: str,
    *,
    field: str,
    allow_zero: bool = False,
) -> pint.Quantity:
    """Parse ``text`` such as ``"812 ng/mL"`` into a quantity of kind ``expect``.

    Parameters
    ----------
    text
        The user's text: a number followed by a unit.  A quantity already of
        the right kind is checked and returned.
    expect
        One of :data:`KINDS` (``"concentration"``, ``"dose"``, ``"rate"`` ...).
    field
        Dotted key path used in error messages.
    allow_zero
        Accept a value of exactly zero (for example a zero inhibitor level).

    Raises
    ------
    UnitError
        Unparseable text, unknown unit, wrong dimension, non-finite, negative
        or (unless ``allow_zero``) zero value.  The message names ``field``.
    """
    dims, phrase, examples = KINDS[expect]
    wanted = f"expected {phrase} such as {examples}"
    if isinstance(text, pint.Quantity):
        quantity = text if text._REGISTRY is ureg else _from_other_registry(text, field, wanted)
    elif isinstance(text, str):
        quantity = _parse_text(text, field, wanted)
    else:
        raise UnitError(field, text, f"is not text with a unit; {wanted}")
    if quantity.dimensionality not in dims:
        what = _NAMES.get(quantity.dimensionality, "of another dimension")
        raise UnitError(field, _shown(text), f"is {what}; {wanted}")
    _check_magnitude(float(quantity.magnitude), field, _shown(text), phrase, allow_zero)
    return quantity


def _from_other_registry(q: pint.Quantity, field: str, wanted: str) -> pint.Quantity:
    """A quantity of another pint registry rebuilt in :data:`ureg` from its magnitude and unit text.

    The unit is tried by symbol (``uM``), then by name (``micromolar``); a unit
    this registry does not define, or a magnitude that is not one number,
    is refused with a :class:`~interact.errors.UnitError` naming ``field``.
    """
    try:
        value = float(q.magnitude)
    except (TypeError, ValueError):
        raise UnitError(field, str(q), f"is not a single number with a unit; {wanted}") from None
    for text in (f"{q.units:~}", str(q.units)):
        try:
            return Quantity(value, _unit(text.replace(" ", "")))
        except (pint.PintError, SyntaxError, ValueError, TypeError, AttributeError, KeyError, AssertionError, tokenize.TokenError):
            continue
    raise UnitError(field, f"{value!r} {q.units}", f"has a unit interact does not define ({q.units}); {wanted}")


def parse_fraction(text: object, *, field: str, allow_zero: bool = False, upper: float = 1.0) -> float:
    """Parse a dimensionless fraction: ``0.02``, ``"0.02"`` or ``"2 %"``.

    The value must lie in (0, upper] (or [0, upper] with ``allow_zero``).
    """
    span = f"[0, {upper:g}]" if allow_zero else f"(0, {upper:g}]"
    wanted = f'expected a number in {span} (a fraction, or a percentage such as "2 %")'
    value: float
    if isinstance(text, bool):
        raise UnitError(field, text, f"is not a number; {wanted}")
    if isinstance(text, (int, float)):
        try:
            value = float(text)
        except OverflowError:  # an integer beyond the float range
            raise UnitError(field, text, f"is not a finite number; {wanted}") from None
    elif isinstance(text, str):
        match = _NUMBER.match(text) if len(text) <= _MAX_TEXT else None
        if not match or match.group(2) not in ("", "%"):
            raise UnitError(field, text, f"is not a plain number; {wanted}")
        value = float(match.group(1)) / (100.0 if match.group(2) == "%" else 1.0)
    else:
        raise UnitError(field, text, f"is not a number; {wanted}")
    if not math.isfinite(value):
        raise UnitError(field, text, f"is not a finite number; {wanted}")
    if value < 0 or value > upper or (value == 0 and not allow_zero):
        raise UnitError(field, text, f"is outside {span}; {wanted}")
    return value


def check_fraction_size(value: float, field: str, shown: object) -> None:
    """Refuse a divisor fraction (fu,inc) above zero but below :data:`MIN_FRACTION`: no binding is that tight."""
    if 0 < value < MIN_FRACTION:
        raise UnitError(field, shown, f"is below {MIN_FRACTION:g}; expected a fraction of plausible size")


@lru_cache(maxsize=512)
def _kind(container: Any) -> str:
    """Whether a unit is "molar" (a concentration), an "amount" or neither (""), remembered: pint's own lookup and
    the comparison of dimensionalities cost about 1.5 us a value."""
    dim = Quantity(1.0, container).dimensionality
    return "molar" if dim == _MOLAR else "amount" if dim == _AMOUNT else ""


def magnitude(quantity: pint.Quantity, unit: str) -> float:
    """The magnitude of ``quantity`` in ``unit`` as a float (cached factor)."""
    return float(quantity.magnitude) * _factor(quantity._units, unit)


def concentration_um(quantity: pint.Quantity, molar_mass: pint.Quantity | None, *, field: str) -> float:
    """A concentration in micromolar; a mass concentration needs the molar mass.

    Mass to molar by cached factors (a few microseconds) rather than pint's ``chemistry`` context (``units.txt``,
    a few hundred microseconds a call); ``tests/test_units.py`` holds the two equal over random values.
    """
    if _kind(quantity._units) == "molar":
        return magnitude(quantity, "uM")
    if molar_mass is None:
        raise UnitError(
            field,
            format_quantity(quantity),
            'is a mass concentration; give the compound\'s molar_mass (e.g. "452.5 g/mol") or a molar value such as "1.8 uM"',
        )
    per = _ratio_factor(quantity._units, molar_mass._units, "uM")
    return float(quantity.magnitude) / float(molar_mass.magnitude) * per


def amount_umol(quantity: pint.Quantity, molar_mass: pint.Quantity | None, *, field: str) -> float:
    """A dose in micromole; a mass dose needs the molar mass."""
    if _kind(quantity._units) == "amount":
        return magnitude(quantity, "umol")
    if molar_mass is None:
        raise UnitError(
            field,
            format_quantity(quantity),
            'is a mass; give the compound\'s molar_mass (e.g. "452.5 g/mol") or an amount in umol',
        )
    per = _ratio_factor(quantity._units, molar_mass._units, "umol")
    return float(quantity.magnitude) / float(molar_mass.magnitude) * per


def same_quantity_text(a: str, b: str) -> bool:
    """True when two texts such as ``"1.6 ug/mL"`` and ``"1.6 µg/mL"`` are the same quantity."""
    try:
        qa = _parse_text(a, "", "")
        qb = _parse_text(b, "", "")
    except UnitError:
        return False
    if qa.dimensionality != qb.dimensionality:
        return False
    return bool(float(qa.magnitude) * _factor(qa._units, str(qb.units)) == float(qb.magnitude))


def format_quantity(quantity: pint.Quantity) -> str:
    """Text that :func:`parse` reads back to an equal quantity (lossless)."""
    return f"{_number(float(quantity.magnitude))} {unit_text(quantity)}"


def unit_text(quantity: pint.Quantity) -> str:
    """The compact unit symbol of ``quantity``, e.g. ``ng/mL``."""
    return _unit_text(quantity._units)


@lru_cache(maxsize=512)
def _unit_text(container: Any) -> str:
    """The compact symbol when it reads back to the same unit, else the full names (``"1.5 cdm"`` would not read back:
    it is written ``"centidecimeter"``); every spelling written here is one :func:`parse` reads."""
    units = Quantity(1.0, container).units
    for spec in ("~", ""):
        text = f"{units:{spec}}".replace(" / ", "/").replace(" * ", "*").replace(" ** ", "**")
        try:
            if _unit(_DASH_POWER.sub(r"\1**-\2", text.replace("^", "**"))) == units:
                return text
        except Exception:  # pint raises many kinds for a spelling it cannot read; try the next form
            continue
    return f"{units}"  # pragma: no cover - the full names always read back (tested over the registry)


def _number(value: float) -> str:
    if value.is_integer() and abs(value) < 1e15:
        return str(int(value))
    return repr(value)


def _shown(text: object) -> object:
    return format_quantity(text) if isinstance(text, pint.Quantity) else text


@lru_cache(maxsize=512)
def _unit(text: str) -> pint.Unit:
    return ureg.Unit(text)


@lru_cache(maxsize=512)
def _factor(units: Any, target: str) -> float:
    return float(Quantity(1.0, units).m_as(_unit(target)))


@lru_cache(maxsize=512)
def _ratio_factor(num: Any, den: Any, target: str) -> float:
    return float((Quantity(1.0, num) / Quantity(1.0, den)).m_as(_unit(target)))


def _parse_text(text: str, field: str, wanted: str) -> pint.Quantity:
    if len(text) > _MAX_TEXT:
        raise UnitError(field, text, f"is too long to be a value; {wanted}")
    match = _NUMBER.match(text)
    if not match:
        raise UnitError(field, text, f"does not start with a number; {wanted}")
    number, unit_text = match.groups()
    if not unit_text:
        raise UnitError(field, text, f"has no unit; {wanted}")
    if not _UNIT_CHARS.match(unit_text):
        raise UnitError(field, text, f'has an unreadable unit "{unit_text}"; {wanted}')
    normal = _DASH_POWER.sub(r"\1**-\2", unit_text.replace("^", "**"))
    try:
        unit = _unit(normal)
    except pint.UndefinedUnitError as exc:
        names = ", ".join(f'"{n}"' for n in getattr(exc, "unit_names", ())) or f'"{unit_text}"'
        raise UnitError(field, text, f"has an unknown unit {names}; {wanted}") from None
    except (
        pint.PintError,
        SyntaxError,
        ValueError,
        TypeError,
        AttributeError,
        KeyError,
        OverflowError,
        AssertionError,
        IndexError,
        tokenize.TokenError,
    ):  # pint's parser asserts on text such as "ng/"
        raise UnitError(field, text, f'has an unreadable unit "{unit_text}"; {wanted}') from None
    return Quantity(float(number), unit)


def _check_magnitude(value: float, field: str, shown: object, phrase: str, allow_zero: bool) -> None:
    if not math.isfinite(value):
        raise UnitError(field, shown, f"is not a finite number; expected {phrase}")
    if value < 0:
        raise UnitError(field, shown, f"is negative; expected {phrase} above zero")
    if value == 0 and not allow_zero:
        raise UnitError(field, shown, f"is zero; expected {phrase} above zero")
    low, high = MAGNITUDE_RANGE
    if value and not low <= value <= high:
        raise UnitError(field, shown, f"is beyond the plausible range ({low:g} to {high:g} in the unit given); expected {phrase}")
