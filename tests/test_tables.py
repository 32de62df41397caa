"""Reference tables: every value carries a source and a known status; rule sets load by name or path."""

from __future__ import annotations

import tomllib
from pathlib import Path

import pytest

from interact.errors import InputError
from interact.tables import (
    STATUSES,
    load_classes,
    load_physiology,
    load_rules,
    load_targets,
    resolve_target,
    rule_set_names,
    tables_dir,
)


def _walk(node: object, path: str = ""):
    if isinstance(node, dict):
        if "value" in node or "lower" in node or "upper" in node:
            yield path, node
        for k, v in node.items():
            yield from _walk(v, f"{path}.{k}" if path else k)
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield from _walk(v, f"{path}[{i}]")


@pytest.mark.parametrize("path", sorted(p for p in Path(tables_dir()).rglob("*.toml") if p.name != "sources.toml"), ids=lambda p: p.name)
def test_every_value_has_source_and_status(path: Path) -> None:
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    entries = list(_walk(data))
    assert entries, f"{path} holds no sourced values"
    for where, entry in entries:
        if where.endswith(("gut_wall_source",)):
            continue
        assert isinstance(entry.get("source"), str) and entry["source"].strip(), f"{path.name}:{where} has no source"
        assert entry.get("status") in STATUSES, f"{path.name}:{where} has status {entry.get('status')!r}"


def test_rule_sets_present_and_default() -> None:
    assert {"ich-m12-2024", "fda-2020"} <= set(rule_set_names())
    assert load_rules().id == "ich-m12-2024"


def test_guidance_values_as_published() -> None:
    # S1 (Biomolecules 2024;14:99), FDA 2020: R1 >= 1.02, R2 >= 1.25 with 50 x Imax,u (seen in source)
    fda = {c.id: c for c in load_rules("fda-2020").criteria}
    assert fda["reversible-liver"].cutoff.value == 1.02
    assert fda["tdi-liver"].cutoff.value == 1.25
    assert fda["tdi-liver"].multiplier is not None and fda["tdi-liver"].multiplier.value == 50.0
    # S8 (JPET verinurad paper, Table 2): Igut/Ki >= 10 for CYP3A (all agencies); OATP R >= 1.1 (FDA 2020);
    # FDA 2020 P-gp/BCRP systemic: total Imax/IC50 >= 0.1 (seen in source)
    assert fda["reversible-gut"].cutoff.value == 11.0
    assert fda["hepatic-uptake"].cutoff.value == 1.1
    assert fda["efflux-systemic"].cutoff.value == 0.1 and fda["efflux-systemic"].concentration == "total-cmax"
    # S2/S3: ICH M12 uses 5 x Imax,u in R2 (seen in source)
    m12 = {c.id: c for c in load_rules("ich-m12-2024").criteria}
    assert m12["tdi-liver"].multiplier is not None and m12["tdi-liver"].multiplier.value == 5.0
    assert m12["reversible-liver"].cutoff.value == 1.02


def test_physiology_defaults() -> None:
    phys = {p.name: p for p in load_physiology()}
    # S7/S8/S10: ka 0.1 min^-1, Fa*Fg = 1, 250 mL (seen in source)
    assert phys["absorption_rate"].value == "0.1 1/min" and phys["absorption_rate"].status == "seen in source"
    assert phys["fa_fg"].value == 1.0
    assert phys["gut_volume"].value == "250 mL"
    # Qh 1.62 L/min (97 L/h): Drug Metab Dispos 2019;47:779, Table 8 (seen in source)
    assert phys["hepatic_blood_flow"].value == "97 L/h" and phys["hepatic_blood_flow"].status == "seen in source"
    assert phys["enterocytic_blood_flow"].status == "from memory"


def test_classes() -> None:
    c = load_classes()
    assert c.classify(5.0).name == "strong"
    assert c.classify(4.99).name == "moderate"
    assert c.classify(1.25).name == "weak"
    assert c.classify(1.1) is None
    assert c.classify(0.15).name == "strong"
    assert (c.no_effect_lower, c.no_effect_upper) == (0.8, 1.25)  # S6, ICH M12 5.3.1
    assert c.victim_study_fm.value == 0.25  # S1-S4


def test_targets_and_aliases() -> None:
    names = {t.name for t in load_targets()}
    assert {"CYP3A", "CYP2D6", "P-gp", "OATP1B1", "MATE2-K", "UGT1A1"} <= names
    assert resolve_target("cyp3a4").name == "CYP3A"
    assert resolve_target("MDR1").name == "P-gp"
    assert resolve_target("nonsense") is None


def test_custom_rule_file(tmp_path: Path) -> None:
    rules = load_rules(Path(__file__).parent / "data" / "rules-cpt2015.toml")
    assert rules.id == "cpt-2015-table-method"
    bad = tmp_path / "bad.toml"
    bad.write_text('id = "x"\ntitle = "x"\n[fu_plasma_floor]\nvalue = 0.01\n', encoding="utf-8")
    with pytest.raises(InputError, match=r"fu_plasma_floor\.source \(line 3\)"):
        load_rules(bad)
    with pytest.raises(InputError, match="neither a known rule set"):
        load_rules("no-such-rules")
