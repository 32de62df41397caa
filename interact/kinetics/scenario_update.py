"""Carry a fitted Ki into a scenario file's text, keeping everything else as written.

Works on the TOML text (tomlkit keeps comments, order and layout): the
``[[perpetrator.inhibits]]`` entry for the target is updated, or created when
absent.  Values that are replaced stay visible in a comment on the new line;
keys that a Ki makes contradictory (``ic50``, ``substrate_conc``, ``km``) are
removed and recorded in a comment too, so nothing the user wrote is lost.
The result is validated with :func:`interact.scenario.loads_scenario` before
it is returned; writing the file (atomically) is the caller's job.
"""

from __future__ import annotations

import math
from typing import Any

import tomlkit
from tomlkit.exceptions import TOMLKitError
from tomlkit.items import AoT, Table, Whitespace

from ..errors import InputError
from ..scenario import MECHANISMS, loads_scenario
from ..tables import load_targets, resolve_target

__all__ = ["carry_constants_text", "inhibition_entry", "set_keeping_history", "update_inhibition_text"]

_CONFLICTING = ("ic50", "substrate_conc", "km")


def _shown(value: Any) -> str:
    return tomlkit.item(value).as_string() if not isinstance(value, str) else f'"{value}"'


def update_inhibition_text(
    text: str,
    *,
    target: str,
    ki_um: float,
    mechanism: str,
    origin: str,
    alpha: float | None = None,
    fu_inc: float | None = None,
    ki_ci_um: tuple[float, float] | None = None,
    source: str = "scenario",
) -> str:
    """The scenario text with the target's inhibition constant set to ``ki_um`` (uM).

    Parameters
    ----------
    text
        The scenario TOML as saved by the user.
    target
        Enzyme name or alias (``CYP3A``, ``3A4`` ...).
    ki_um
        The constant to carry: Ki, or Kic for mixed inhibition, in uM.
    mechanism
        One of competitive, noncompetitive, uncompetitive, mixed.
    origin
        Provenance written to the entry's ``origin`` key (file, model, date).
    alpha
        Kiu/Kic for mixed inhibition.
    fu_inc
        Written when given; otherwise an existing ``fu_inc`` is kept.
    ki_ci_um
        The interval of the carried constant (uM), written as ``ki_ci``; an older ``ki_ci`` that
        belongs to the replaced Ki is removed (and recorded in a comment) when none is given.

    Raises
    ------
    InputError
        Unreadable TOML, unknown target, a value out of range, or an update
        that would make the scenario invalid (the message lists the problems).
    """
    if not (isinstance(ki_um, float | int) and math.isfinite(ki_um) and ki_um > 0):
        raise InputError("ki", ki_um, "is not a finite constant above zero; an unbounded Ki cannot be carried into a scenario")
    if mechanism not in MECHANISMS:
        raise InputError("mechanism", mechanism, f"is not one of {', '.join(MECHANISMS)}")
    if mechanism == "mixed" and (alpha is None or not math.isfinite(alpha) or alpha <= 0):
        raise InputError("alpha", alpha, "is needed (finite, above zero) for a mixed mechanism")
    if fu_inc is not None and not (math.isfinite(fu_inc) and 0 < fu_inc <= 1):
        raise InputError("fu_inc", fu_inc, "is not in (0, 1]")
    values: dict[str, Any] = {"ki": f"{ki_um:.6g} uM", "mechanism": mechanism}
    if mechanism == "mixed" and alpha is not None:
        values["alpha"] = float(f"{alpha:.6g}")
    if ki_ci_um is not None:
        low, high = ki_ci_um
        if not (math.isfinite(low) and math.isfinite(high) and 0 < low <= ki_um <= high):
            raise InputError("ki_ci", ki_ci_um, f"is not a finite interval around ki = {ki_um:.6g} uM")
        values["ki_ci"] = [f"{low:.6g} uM", f"{high:.6g} uM"]
    if fu_inc is not None:
        values["fu_inc"] = float(f"{fu_inc:.6g}")
    # keys a Ki makes contradictory or stale go, recorded in a comment
    stale = (*_CONFLICTING, *(("alpha",) if mechanism != "mixed" else ()), *(("ki_ci",) if ki_ci_um is None else ()), "ic50_ci", "km_ci")
    return carry_constants_text(
        text, target=target, values=values, origin=origin, source=source, remove=stale, purpose="to carry the fitted Ki into"
    )


def carry_constants_text(
    text: str,
    *,
    target: str,
    values: dict[str, Any],
    origin: str,
    source: str = "scenario",
    remove: tuple[str, ...] = (),
    purpose: str = "",
) -> str:
    """The scenario text with ``values`` (ki, kinact, ec50 ...) set on the target's inhibition entry: the one writer of fits.

    The entry is created when absent.  Every replaced value is kept in a comment beside the new one
    (:func:`set_keeping_history`), followed by the comment its line had; ``origin`` records where the
    numbers came from (the previous origin stays in a comment).  Keys in ``remove`` that ``values``
    does not set (a contradictory route, an older fit's interval) are deleted and recorded, with their
    comments, in one ``# replaced by the new fit (<stamp>): ...`` line.  Raises :class:`InputError` for
    unreadable TOML, an unknown target or an update that would make the scenario invalid.
    """
    doc, entry, created = inhibition_entry(text, target=target, source=source, purpose=purpose)
    body = entry.value.body
    trail: list[Any] = []
    while body and body[-1][0] is None and isinstance(body[-1][1], Whitespace):
        trail.insert(0, body.pop())
    stamp = origin.split(",")[-1].strip() if "," in origin else "fit"
    removed = []
    for key in remove:
        if key in entry and key not in values:
            old = entry[key]
            note = _comment_of(old)
            removed.append(f"{key} = {_shown(old.unwrap() if hasattr(old, 'unwrap') else old)}" + (f" ({note})" if note else ""))
            del entry[key]
    for key, value in (*values.items(), ("origin", origin)):
        set_keeping_history(entry, key, value, stamp)
    if removed:
        entry.add(tomlkit.comment(f"replaced by the new fit ({stamp}): " + "; ".join(removed)))
    body.extend(trail)
    if created:
        entry.add(tomlkit.nl())
    new_text = tomlkit.dumps(doc)
    loads_scenario(new_text, source=source)  # raises ScenarioError (an InputError) listing problems
    return new_text


def _comment_of(item: Any) -> str:
    trivia = getattr(item, "trivia", None)
    return trivia.comment.lstrip("#").strip() if trivia is not None and trivia.comment else ""


def set_keeping_history(entry: Table, key: str, value: Any, stamp: str) -> None:
    """Set ``entry[key] = value`` without losing what the user wrote on that line.

    A changed value leaves ``# <stamp>: was <old>`` beside the new one, followed by the comment the old
    line carried; an unchanged value keeps its comment as it was.  ``origin`` is treated the same way,
    so the provenance of every earlier fit stays in the file.
    """
    old = entry.get(key)
    note = _comment_of(old) if old is not None else ""
    entry[key] = value
    if old is None:
        return
    old_shown = _shown(old.unwrap() if hasattr(old, "unwrap") else old)
    if old_shown != _shown(value):
        entry[key].trivia.comment = f"# {stamp}: was {old_shown}" + (f"; {note}" if note else "")
    elif note:
        entry[key].trivia.comment = f"# {note}"
    else:
        return
    entry[key].trivia.comment_ws = "  "


def inhibition_entry(text: str, *, target: str, source: str = "scenario", purpose: str = "") -> tuple[Any, Table, bool]:
    """Parse scenario ``text`` and find the ``[[perpetrator.inhibits]]`` entry for ``target``.

    The entry is created (holding only ``target``) when absent.  Returns the
    tomlkit document, the entry and whether it was created; raises :class:`InputError` for an unknown
    target, unreadable TOML or a file without a ``[perpetrator]`` table.
    """
    resolved = resolve_target(target)
    if resolved is None:
        known = ", ".join(t.name for t in load_targets())
        raise InputError("target", target, f"is not a known enzyme or transporter; expected one of {known}")
    try:
        doc = tomlkit.parse(text)
    except TOMLKitError as exc:
        raise InputError(source, "TOML", f"could not be parsed: {exc}") from None
    key = "precipitant" if "precipitant" in doc and "perpetrator" not in doc else "perpetrator"  # the file's own spelling
    perp = doc.get(key)
    if not isinstance(perp, Table):
        raise InputError(f"{source}: {key}", None, f"is missing; expected a [{key}] table" + (f" {purpose}" if purpose else ""))
    inhibits = perp.get("inhibits")
    if inhibits is None:
        inhibits = tomlkit.aot()
        perp.append("inhibits", inhibits)
    if not isinstance(inhibits, AoT):
        raise InputError(f"{source}: {key}.inhibits", "value", f"is not a list of [[{key}.inhibits]] tables")
    for item in inhibits:
        name = item.get("target")
        found = resolve_target(str(name)) if name is not None else None
        if found is not None and found.name == resolved.name:
            return doc, item, False
    entry = tomlkit.table()
    entry["target"] = resolved.name
    inhibits.append(entry)
    return doc, entry, True
