"""Unbound in vitro constants per inhibitory species and target.

Turns each :class:`~interact.scenario.Inhibition` into floats in canonical
units: Ki,u (uM) from Ki or from IC50 by Cheng-Prusoff, times fu,inc; and,
when given, kinact (1/h) with KI,u (uM) and Emax with EC50,u (uM) and d.
"""

from __future__ import annotations

from dataclasses import dataclass

import pint

from . import units
from .exposure import Setting
from .kinetics.conversion import CHENG_PRUSOFF_SOURCE, ki_from_ic50
from .scenario import Inhibition, Scenario
from .tables import Sourced, load_physiology, resolve_target

__all__ = ["Constant", "kdeg_per_h", "resolve_constants"]


@dataclass(frozen=True, slots=True, kw_only=True)
class Constant:
    """One species' action on one target, in canonical units (None where not given)."""

    species: str
    species_index: int
    target: str
    group: str
    kind: str
    gut_wall: bool
    ki_um: float | None
    ki_u_um: float | None
    ki_route: str
    fu_inc: float
    fu_inc_origin: str
    mechanism: str
    kinact_per_h: float | None = None
    ki_inact_u_um: float | None = None
    emax: float | None = None
    ec50_u_um: float | None = None
    calibration: float = 1.0
    calibration_origin: str = "default"
    origin: str = ""
    #: in vitro KI and EC50 (uM), the binding applied to each (fraction unbound) and where it comes from
    ki_inact_um: float | None = None
    ki_inact_fu: float = 1.0
    ki_inact_fu_origin: str = ""
    ec50_um: float | None = None
    ec50_fu: float = 1.0
    ec50_fu_origin: str = ""
    #: the in vitro Ki's interval (uM) when the scenario gives ``ki_ci`` beside ``ki``
    ki_ci_um: tuple[float, float] | None = None


def _one(item: Inhibition, species: str, index: int, mw: pint.Quantity | None, path: str) -> Constant:
    target = resolve_target(item.target)
    assert target is not None  # validated in scenario
    fu_default = float(next(p for p in load_physiology() if p.name == "fu_inc").value)
    fu = item.fu_inc if item.fu_inc is not None else fu_default
    ki_um: float | None = None
    route = ""
    if item.ki is not None:
        ki_um = units.concentration_um(item.ki, mw, field=f"{path}.ki")
        route = "Ki given"
    elif item.ic50 is not None:
        ic50 = units.concentration_um(item.ic50, mw, field=f"{path}.ic50")
        if target.kind == "transporter":
            ki_um, route = ic50, "IC50 taken as Ki (transporter, as guidance does)"
        elif item.mechanism == "noncompetitive":
            ki_um, route = ic50, f"Cheng-Prusoff, noncompetitive: Ki = IC50 ({CHENG_PRUSOFF_SOURCE})"
        else:
            s = units.concentration_um(item.substrate_conc, mw, field=f"{path}.substrate_conc") if item.substrate_conc else None
            km = units.concentration_um(item.km, mw, field=f"{path}.km") if item.km else None
            ki_um = float(ki_from_ic50(ic50, item.mechanism, s, km, item.alpha))
            route = (
                f"Cheng-Prusoff, {item.mechanism}: IC50 {ic50:.4g} uM, [S] {s:.4g} uM, Km {km:.4g} uM"
                + (f", alpha {item.alpha:g}" if item.mechanism == "mixed" else "")
                + f" ({CHENG_PRUSOFF_SOURCE})"
            )
    ki_ci = None
    if item.ki is not None and item.ki_ci is not None:
        ki_ci = (
            units.concentration_um(item.ki_ci[0], mw, field=f"{path}.ki_ci"),
            units.concentration_um(item.ki_ci[1], mw, field=f"{path}.ki_ci"),
        )
    kinact = units.magnitude(item.kinact, "1/h") if item.kinact is not None else None
    ki_inact = units.concentration_um(item.ki_inact, mw, field=f"{path}.ki_inact") if item.ki_inact is not None else None
    ec50 = units.concentration_um(item.ec50, mw, field=f"{path}.ec50") if item.ec50 is not None else None
    shared = "fu_inc (given, shared with Ki)" if item.fu_inc is not None else "fu_inc (default)"
    fu_kinact = item.fu_inc_ki_inact if item.fu_inc_ki_inact is not None else fu
    fu_ec50 = item.fu_inc_ec50 if item.fu_inc_ec50 is not None else fu
    return Constant(
        species=species,
        species_index=index,
        target=target.name,
        group=target.group,
        kind=target.kind,
        gut_wall=target.gut_wall,
        ki_um=ki_um,
        ki_u_um=None if ki_um is None else ki_um * fu,
        ki_route=route,
        fu_inc=fu,
        fu_inc_origin="given" if item.fu_inc is not None else "default",
        mechanism=item.mechanism,
        kinact_per_h=kinact,
        ki_inact_u_um=None if ki_inact is None else ki_inact * fu_kinact,
        emax=item.emax,
        ec50_u_um=None if ec50 is None else ec50 * fu_ec50,
        calibration=1.0 if item.calibration is None else item.calibration,
        calibration_origin="default" if item.calibration is None else "given",
        origin=item.origin,
        ki_ci_um=ki_ci,
        ki_inact_um=ki_inact,
        ki_inact_fu=fu_kinact,
        ki_inact_fu_origin="fu_inc_ki_inact (given)" if item.fu_inc_ki_inact is not None else shared,
        ec50_um=ec50,
        ec50_fu=fu_ec50,
        ec50_fu_origin="fu_inc_ec50 (given)" if item.fu_inc_ec50 is not None else shared,
    )


def resolve_constants(scenario: Scenario) -> tuple[Constant, ...]:
    """All constants of the parent (species 0) and its metabolites (1, 2, ...)."""
    p = scenario.perpetrator
    out = [_one(item, p.name, 0, p.molar_mass, f"perpetrator.inhibits[{i}]") for i, item in enumerate(p.inhibits)]
    for j, m in enumerate(p.metabolites, start=1):
        out.extend(
            _one(item, m.name, j, m.molar_mass, f"perpetrator.metabolites[{j - 1}].inhibits[{i}]") for i, item in enumerate(m.inhibits)
        )
    return tuple(out)


def kdeg_per_h(
    scenario: Scenario, constants: tuple[Constant, ...], enzymes: set[str] | None = None
) -> tuple[dict[str, tuple[float | None, float | None]], list[Setting]]:
    """kdeg per enzyme (liver, gut) in 1/h: the scenario's override, else the targets table.

    ``enzymes`` defaults to the targets inactivated by the perpetrator (the static
    model needs kdeg only there); the time course also asks for induced ones.
    """
    out: dict[str, tuple[float | None, float | None]] = {}
    used: list[Setting] = []
    needed = {c.target for c in constants if c.kinact_per_h is not None} if enzymes is None else set(enzymes)
    overrides = {t.enzyme: t for t in scenario.turnover}
    for enzyme in sorted(needed):
        target = resolve_target(enzyme)
        values: list[float | None] = []
        for site in ("liver", "gut"):
            given = getattr(overrides.get(enzyme), f"kdeg_{site}", None)
            table: Sourced | None = getattr(target, f"kdeg_{site}", None) if target else None
            if given is not None:
                v = units.magnitude(given, "1/h")
                used.append(Setting(name=f"kdeg_{site}", label=f"kdeg {enzyme} ({site})", value=v, unit="1/h", origin="override"))
            elif table is not None:
                v = units.magnitude(units.parse(table.value, "rate", field=f"targets.{enzyme}.kdeg_{site}"), "1/h")
                used.append(
                    Setting(
                        name=f"kdeg_{site}",
                        label=f"kdeg {enzyme} ({site})",
                        value=v,
                        unit="1/h",
                        origin="default",
                        source=table.source,
                        status=table.status,
                    )
                )
            else:
                v = None
            values.append(v)
        out[enzyme] = (values[0], values[1])
    return out, used
