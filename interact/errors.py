"""The error tree of interact.

Every error a user can cause descends from :class:`InteractError`; input
problems are also :class:`ValueError`, fitting failures also
:class:`RuntimeError`.  A message always names the field, the value received
and what was expected, so that a shell can print it as one line.
"""

from __future__ import annotations

import warnings as _warnings
from collections.abc import Iterable
from dataclasses import dataclass

__all__ = [
    "AssumptionWarning",
    "FitError",
    "FitWarning",
    "FromMemoryWarning",
    "InputError",
    "InteractError",
    "InteractWarning",
    "ModelLimitWarning",
    "Problem",
    "ScenarioError",
    "UnitError",
    "WarningList",
    "emit_warnings",
]


class InteractWarning(UserWarning):
    """Root of the model warnings interact emits through Python's :mod:`warnings`.

    The same texts stay on the results (``Assessment.warnings`` and the like);
    the command line and the terminal app print them from there and do not
    emit them.  Filter by topic with the subclasses, e.g.
    ``warnings.simplefilter("ignore", interact.FromMemoryWarning)``.
    """


class AssumptionWarning(InteractWarning):
    """A value was not given and a default was assumed (Fg = 1, fu,inc = 1, a default boundary ...)."""


class FromMemoryWarning(InteractWarning):
    """A value used comes from memory (not verified against its source): check it before relying on it."""


class ModelLimitWarning(InteractWarning):
    """The model's own limits bear on this result (uncompetitive Ki, a net ratio hiding inhibition or induction ...)."""


class FitWarning(InteractWarning):
    """An incubation design or fit weakness (too few levels, depletion, a constant the data do not bound ...)."""


def emit_warnings(items: Iterable[tuple[type[InteractWarning], str]], stacklevel: int = 3) -> None:
    """Emit each (category, text) through :func:`warnings.warn`, pointing at the caller's caller by default."""
    for category, text in items:
        _warnings.warn(text, category, stacklevel=stacklevel)


class InteractError(Exception):
    """Root of every error raised on purpose by interact."""


class InputError(InteractError, ValueError):
    """A value given by the user is unusable.

    Parameters
    ----------
    field
        Dotted key path of the offending input, e.g. ``perpetrator.cmax``.
    value
        The value as received (shown with ``repr`` when not a string).
    expected
        What would have been accepted, in plain words.
    """

    def __init__(self, field: str, value: object, expected: str) -> None:
        self.field = field
        self.value = value
        self.expected = expected
        super().__init__(f"{field}: {_show(value)} {expected}")


class UnitError(InputError):
    """A value has the wrong dimension, an unknown unit or cannot be parsed."""


class FitError(InteractError, RuntimeError):
    """A fit could not be attempted (bad data shape), as opposed to not converging."""


@dataclass(frozen=True, slots=True, kw_only=True)
class Problem:
    """One validation problem: where it is and what is wrong."""

    field: str
    message: str
    line: int | None = None

    def __str__(self) -> str:
        where = f"{self.field} (line {self.line})" if self.line else self.field
        return f"{where}: {self.message}"


class ScenarioError(InputError):
    """A scenario has one or more problems; all of them are listed."""

    def __init__(self, problems: tuple[Problem, ...], source: str = "scenario") -> None:
        self.problems = problems
        self.source = source
        first = problems[0]
        InteractError.__init__(self, self._text())
        self.field = first.field
        self.value = None
        self.expected = first.message

    def _text(self) -> str:
        n = len(self.problems)
        head = f"{self.source}: {n} problem{'s' if n != 1 else ''}"
        return head + "".join(f"\n  - {p}" for p in self.problems)


def _show(value: object) -> str:
    """Render a received value for an error message, briefly."""
    text = f'"{value}"' if isinstance(value, str) else repr(value)
    if len(text) > 80:
        text = text[:77] + "..."
    return text


class WarningList(list[str]):
    """The assessment's warning texts, each with its :class:`~interact.errors.InteractWarning` category."""

    def __init__(self) -> None:
        super().__init__()
        self.categories: list[type[InteractWarning]] = []

    def append(self, text: str, category: type[InteractWarning] = AssumptionWarning) -> None:  # type: ignore[override]
        super().append(text)
        self.categories.append(category)
