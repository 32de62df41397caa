"""Reading one field of a TOML input: the checks every reader of user files shares.

:class:`FieldReader` converts a value at a dotted key path (text, names, quantities with units, fractions,
bounded numbers, flags, lists, intervals), records each problem with its key path and, when the text is known,
its line (:class:`KeyLines`), and never raises for bad input.  The scenario reader (:mod:`interact.scenario`)
and the rule-set reader (:mod:`interact.tables`) build on it.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterator
from typing import Any, Final, TypeVar

import pint

from . import units
from .errors import InputError, Problem
from .tables import load_targets, resolve_target

__all__ = ["FieldReader", "KeyLines", "brief"]

MAX_ITEMS: Final = 200
MAX_NAME: Final = 200

Q = pint.Quantity
T = TypeVar("T")


class FieldReader:
    """Converts the fields of raw data (as read from TOML), collecting problems with their key paths."""

    def __init__(self, text: str | None) -> None:
        self.problems: list[Problem] = []
        self._lines = KeyLines(text) if text else None

    def fail(self, path: str, message: str) -> None:
        line = self._lines.find(path) if self._lines else None
        self.problems.append(Problem(field=path, message=message, line=line))

    def attempt(self, path: str, fn: Callable[[], T]) -> T | None:
        """Run a conversion; record its InputError as a problem at ``path``."""
        try:
            return fn()
        except InputError as exc:
            self.fail(path, f"{brief(exc.value)} {exc.expected}" if exc.field == path else str(exc))
            return None

    def table(self, data: object, path: str, allowed: tuple[str, ...]) -> dict[str, Any] | None:
        if not isinstance(data, dict):
            self.fail(path, f"{brief(data)} is not a table; expected a [{path}] table")
            return None
        for key in data:
            if key not in allowed:
                self.fail(f"{path}.{key}" if path else key, f"is not a known key; expected one of {', '.join(allowed)}")
        return data

    def required(self, data: dict[str, Any], key: str, path: str) -> Any:
        if key not in data:
            self.fail(f"{path}.{key}" if path else key, "is missing")
            return None
        return data[key]

    def text(self, data: dict[str, Any], key: str, path: str, *, required: bool = False, default: str = "") -> str:
        value = self.required(data, key, path) if required else data.get(key, default)
        full = f"{path}.{key}" if path else key
        if value is None:
            return default
        if not isinstance(value, str):
            self.fail(full, f"{brief(value)} is not text; expected a quoted string")
            return default
        if len(value) > MAX_NAME * 10:
            self.fail(full, f"is {len(value)} characters long; expected at most {MAX_NAME * 10}")
            return value[: MAX_NAME * 10]
        return value

    def name(self, data: dict[str, Any], key: str, path: str) -> str:
        value = self.text(data, key, path, required=True)
        if key in data and isinstance(data[key], str) and (not value.strip() or len(value) > MAX_NAME):
            self.fail(f"{path}.{key}", f"expected a name of 1 to {MAX_NAME} characters")
        return value

    def quantity(self, data: dict[str, Any], key: str, path: str, kind: str, *, required: bool = False) -> Q | None:
        full = f"{path}.{key}"
        if key not in data:
            if required:
                self.fail(full, "is missing")
            return None
        return self.attempt(full, lambda: units.parse(data[key], kind, field=full))

    def fraction(
        self, data: dict[str, Any], key: str, path: str, *, required: bool = False, allow_zero: bool = False, upper: float = 1.0
    ) -> float | None:
        full = f"{path}.{key}"
        if key not in data:
            if required:
                self.fail(full, "is missing")
            return None
        return self.attempt(full, lambda: units.parse_fraction(data[key], field=full, allow_zero=allow_zero, upper=upper))

    def number(self, data: dict[str, Any], key: str, path: str, *, low: float, high: float, low_open: bool = True) -> float | None:
        full = f"{path}.{key}"
        if key not in data:
            return None
        value = data[key]
        span = f"{'(' if low_open else '['}{low:g}, {high:g}]"
        if isinstance(value, int) and not isinstance(value, bool) and abs(value) > high:
            self.fail(full, f"{brief(value)} is outside {span}")  # before math.isfinite: a huge integer overflows a float
            return None
        if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
            self.fail(full, f"{brief(value)} is not a finite number; expected a number in {span}")
            return None
        if value < low or value > high or (low_open and value == low):
            self.fail(full, f"{brief(value)} is outside {span}")
            return None
        return float(value)

    def flag(self, data: dict[str, Any], key: str, path: str) -> bool:
        value = data.get(key, False)
        if not isinstance(value, bool):
            self.fail(f"{path}.{key}", f"{brief(value)} is not true or false")
            return False
        return value

    def quantities(self, data: dict[str, Any], key: str, path: str, kind: str, *, example: str, like: Q | None = None) -> tuple[Q, ...]:
        """A list of quantities of one kind (and, with ``like``, of the same dimension as ``like``)."""
        raw = data.get(key, [])
        if not isinstance(raw, list):
            self.fail(f"{path}.{key}", f"{brief(raw)} is not a list; expected e.g. {example}")
            return ()
        if len(raw) > MAX_ITEMS:
            self.fail(f"{path}.{key}", f"has {len(raw)} entries; expected at most {MAX_ITEMS}")
        out: list[Q] = []
        for i, item in enumerate(raw[:MAX_ITEMS]):
            at = f"{path}.{key}[{i}]"
            q = self.attempt(at, lambda item=item, at=at: units.parse(item, kind, field=at))  # type: ignore[misc]
            if q is None:
                continue
            if like is not None and q.dimensionality != like.dimensionality:
                self.fail(at, f'"{units.format_quantity(q)}" is not in the same kind of unit as the dose')
                continue
            if kind == "dose" and too_small_strength(q):
                self.fail(at, f'"{units.format_quantity(q)}" is below {_MIN_STRENGTH_TEXT}; expected a tablet or capsule strength')
                continue
            out.append(q)
        return tuple(out)

    def boundary(self, data: dict[str, Any], key: str, path: str) -> tuple[float, float] | None:
        """A [lower, upper] pair of ratios with 0 < lower <= 1 <= upper, or None when absent or wrong."""
        if key not in data:
            return None
        b = data[key]
        if (
            isinstance(b, list)
            and len(b) == 2
            and all(isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x) for x in b)
            and 0 < b[0] <= 1 <= b[1]
        ):
            return float(b[0]), float(b[1])
        self.fail(f"{path}.{key}", f"{brief(b)} is not a [lower, upper] pair of ratios with 0 < lower <= 1 <= upper, e.g. [0.8, 1.25]")
        return None

    def items(self, data: dict[str, Any], key: str, path: str) -> Iterator[tuple[int, Any]]:
        value = data.get(key, [])
        if not isinstance(value, list):
            self.fail(f"{path}.{key}", f"{brief(value)} is not a list; expected [[{path}.{key}]] tables")
            return
        if len(value) > MAX_ITEMS:
            self.fail(f"{path}.{key}", f"has {len(value)} entries; expected at most {MAX_ITEMS}")
            value = value[:MAX_ITEMS]
        yield from enumerate(value)

    def target_name(self, data: dict[str, Any], key: str, path: str) -> str | None:
        raw = self.text(data, key, path, required=True)
        if not raw:
            return None
        target = resolve_target(raw)
        if target is None:
            known = ", ".join(t.name for t in load_targets())
            self.fail(f"{path}.{key}", f'"{raw[:60]}" is not a known enzyme or transporter; expected one of {known}')
            return None
        return target.name

    def interval(self, data: dict[str, Any], key: str, path: str, kind: str, point: Any) -> Any:
        """``<key>_ci``: two values, lower <= upper, above zero, around the point value when both are given."""
        name = f"{key}_ci"
        full = f"{path}.{name}"
        if name not in data:
            return None
        raw = data[name]
        if not isinstance(raw, list) or len(raw) != 2:
            self.fail(full, f'{brief(raw)} is not a list of two values; expected e.g. ["63.3 uM", "82.3 uM"]')
            return None
        if point is None and key not in data:
            self.fail(full, f"is given without {key}; expected the interval beside the constant it belongs to")
            return None
        ends: list[Any]
        if kind:
            ends = [self.attempt(full, lambda v=v: units.parse(v, kind, field=full)) for v in raw]  # type: ignore[misc]
        else:
            ends = []
            for v in raw:
                if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or v < 0:
                    self.fail(full, f"{brief(v)} is not a finite number of at least 0")
                    return None
                ends.append(float(v))
        if any(e is None for e in ends):
            return None
        lo: Any = ends[0]
        hi: Any = ends[1]
        try:
            ref = point.units if kind and point is not None else (lo.units if kind else None)
            lo_v, hi_v = (lo.to(ref).magnitude, hi.to(ref).magnitude) if kind else (lo, hi)
            pt = point.to(ref).magnitude if kind and point is not None else point
        except pint.errors.DimensionalityError:  # mass vs molar: needs the molar mass, checked where it is converted
            return (lo, hi)
        if not (0 < lo_v <= hi_v):
            self.fail(full, f"{brief(raw)} is not an interval with 0 < lower <= upper")
            return None
        if pt is not None and not (lo_v * (1 - 1e-9) <= pt <= hi_v * (1 + 1e-9)):
            self.fail(full, f"{brief(raw)} does not contain {key} = {brief(data.get(key))}; expected an interval around the value")
            return None
        return (lo, hi)

    def mass_conc_needs_mw(self, q: Q | None, mw: Q | None, path: str) -> None:
        if q is not None and mw is None and q.dimensionality != units.KINDS["molar_concentration"][0][0]:
            self.fail(
                path,
                f'"{units.format_quantity(q)}" is a mass concentration; give molar_mass (e.g. "452.5 g/mol") or a molar value such as "1.8 uM"',  # noqa: E501
            )


#: the smallest strength accepted (1 ng, or 1 pmol for a molar amount): below it a dose suggestion rounds to nothing
_MIN_STRENGTH_TEXT: Final = "1 ng (1 pmol)"


def too_small_strength(q: Q) -> bool:
    unit = "mg" if q.dimensionality == units.parse("1 mg", "dose", field="unit").dimensionality else "umol"
    return bool(units.magnitude(q, unit) < 1e-6)


def brief(value: object) -> str:
    text = f'"{value}"' if isinstance(value, str) else repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


class KeyLines:
    """Finds the line of a dotted key path in TOML text (best effort)."""

    _HEADER = re.compile(r"^\s*(\[\[?)\s*([A-Za-z0-9_.\-]+)\s*\]\]?")
    _KEY = re.compile(r"^\s*([A-Za-z0-9_\-]+)\s*=")

    def __init__(self, text: str) -> None:
        self._map: dict[str, int] = {}
        counts: dict[str, int] = {}
        table = ""
        for number, line in enumerate(text.splitlines(), start=1):
            header = self._HEADER.match(line)
            if header:
                name = header.group(2)
                if header.group(1) == "[[":
                    parent, _, leaf = name.rpartition(".")
                    parent_path = self._indexed(parent, counts)
                    base = f"{parent_path}.{leaf}" if parent_path else leaf
                    counts[name] = counts.get(name, -1) + 1
                    table = f"{base}[{counts[name]}]"
                else:
                    table = self._indexed(name, counts)
                self._map.setdefault(table, number)
                continue
            key = self._KEY.match(line)
            if key:
                full = f"{table}.{key.group(1)}" if table else key.group(1)
                self._map.setdefault(full, number)

    @staticmethod
    def _indexed(name: str, counts: dict[str, int]) -> str:
        """Rewrite ``a.b`` to ``a.b[k]`` for parts that are arrays of tables."""
        if not name:
            return ""
        parts = name.split(".")
        out = []
        for i in range(len(parts)):
            prefix = ".".join(parts[: i + 1])
            out.append(f"{parts[i]}[{counts[prefix]}]" if prefix in counts else parts[i])
        return ".".join(out)

    def find(self, path: str) -> int | None:
        probe = path
        while probe:
            if probe in self._map:
                return self._map[probe]
            probe = re.sub(r"(\[\d+\]|\.[^.\[]*)$", "", probe) if ("." in probe or "[" in probe) else ""
        return None
