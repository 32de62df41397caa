"""The rule set's words: under ICH M12 the outputs say "precipitant" and "object drug", under FDA 2020 "perpetrator"
and "victim"; scenario files accept [precipitant]/[object] as well and are written back in the spelling they used.

The M12 terms: two secondary comparisons of the final ICH M12 text (Evotec summary, ICH M12 vs FDA 2020; see
reference_tables/sources.toml).  The scenarios are the built-in invented demo and an invented minimal file.
"""

from __future__ import annotations

import json
import re

import pytest
from hypothesis import given
from hypothesis import strategies as st

from interact import assess, demo_path, loads_scenario
from interact.errors import ScenarioError
from interact.kinetics import update_inhibition_text
from interact.report.assessment import format_assessment, user_text
from interact.report.document import speak
from interact.scenario import dumps_scenario, scenario_to_dict
from interact.tables import Terms, load_rules

DEMO = demo_path().read_text(encoding="utf-8")
OLD = re.compile(r"(?<![\[.\w])(perpetrators?|victims?)(?![.\w])", re.IGNORECASE)
NEW = re.compile(r"\b(precipitants?|object drugs?)\b", re.IGNORECASE)


def _aliased(text: str) -> str:
    """The demo with the ICH M12 table names (keys only; the text of values untouched)."""
    return re.sub(r"^\[(\[?)perpetrator", r"[\1precipitant", re.sub(r"^\[(\[?)victim", r"[\1object", text, flags=re.M), flags=re.M)


def _body(text: str, a) -> str:  # type: ignore[no-untyped-def]
    """The output without what the user typed and without the references (which quote source titles)."""
    for cut in ("\nReferences\n==========", "\n## References\n", '"references"'):
        if cut in text:
            text = text[: text.index(cut)]
    for s in user_text(a):
        text = text.replace(s, "").replace(json.dumps(s)[1:-1], "")
    return text


@pytest.mark.parametrize("fmt", ["text", "markdown", "json"])
def test_m12_outputs_say_precipitant_and_object_drug(fmt: str) -> None:
    a = assess(loads_scenario(DEMO), rules="ich-m12-2024")
    assert a.rules.terms.precipitant == "precipitant" and a.rules.terms.object == "object drug"
    body = _body(format_assessment(a, fmt), a)
    assert not OLD.findall(body), sorted(set(OLD.findall(body)))
    assert re.search(r"precipitant", body, re.I) and re.search(r"object drug", body, re.I)


@pytest.mark.parametrize("fmt", ["text", "markdown", "json"])
def test_fda_2020_outputs_keep_perpetrator_and_victim(fmt: str) -> None:
    a = assess(loads_scenario(DEMO), rules="fda-2020")
    body = _body(format_assessment(a, fmt), a)
    assert not NEW.findall(body), sorted(set(NEW.findall(body)))
    assert re.search(r"perpetrator", body, re.I) and re.search(r"victim", body, re.I)


def test_user_text_and_file_keys_are_never_reworded() -> None:
    text = DEMO.replace('title = "', 'title = "victim study of a perpetrator: ', 1)
    a = assess(loads_scenario(text), rules="ich-m12-2024")
    out = format_assessment(a, "text", width=10_000)
    assert "victim study of a perpetrator: " in out
    terms = load_rules("ich-m12-2024").terms
    assert speak("set perpetrator.half_life in [victim]", terms) == "set perpetrator.half_life in [victim]"


@given(st.lists(st.sampled_from(["perpetrator", "Perpetrators", "victim", "Victim's", "victim drug", "drug", ", ", " "]), max_size=12))
def test_speak_replaces_every_old_word_and_keeps_protected_text(words: list[str]) -> None:
    terms = Terms(precipitant="precipitant", object="object drug")
    protected = "the victim named by the user"
    text = " ".join(words) + " " + protected + " " + " ".join(reversed(words))
    out = speak(text, terms, (protected,))
    assert protected in out
    assert not OLD.findall(out.replace(protected, ""))
    # the older words are the identity
    assert speak(text, Terms(), (protected,)) == text


def test_scenario_file_accepts_the_m12_table_names_and_writes_them_back() -> None:
    aliased = _aliased(DEMO)
    assert "[precipitant]" in aliased and "[[precipitant.inhibits]]" in aliased and "[object]" in aliased
    s_old, s_new = loads_scenario(DEMO), loads_scenario(aliased)
    assert s_new.spelling == ("precipitant", "object") and s_old.spelling == ("perpetrator", "victim")
    assert s_new.perpetrator == s_old.perpetrator and s_new.victim == s_old.victim
    assert assess(s_new).prediction == assess(s_old).prediction
    data = scenario_to_dict(s_new)
    assert "precipitant" in data and "object" in data and "perpetrator" not in data and "victim" not in data
    again = loads_scenario(dumps_scenario(s_new))
    assert again == s_new
    assert "[perpetrator]" in dumps_scenario(s_old)


def test_both_spellings_in_one_file_are_refused_with_the_field_named() -> None:
    both = DEMO + '\n[precipitant]\nname = "Twice (invented)"\n'
    with pytest.raises(ScenarioError) as info:
        loads_scenario(both)
    assert any(p.field == "precipitant" and "[perpetrator]" in p.message for p in info.value.problems)


def test_problems_in_an_aliased_file_name_its_own_keys() -> None:
    bad = _aliased(DEMO).replace("fu_plasma = 0.04", "fu_plasma = 4", 1)
    with pytest.raises(ScenarioError) as info:
        loads_scenario(bad)
    assert any(p.field.startswith("precipitant.fu_plasma") for p in info.value.problems)
    missing = re.sub(r"(?s)\[object\].*", "", _aliased(DEMO))
    with pytest.raises(ScenarioError) as info:
        loads_scenario(missing)
    assert any(p.field == "victim" and "[object]" in p.message for p in info.value.problems)


def test_fit_into_keeps_the_files_spelling() -> None:
    text = update_inhibition_text(_aliased(DEMO), target="CYP2D6", ki_um=3.0, mechanism="competitive", origin="fit of x.csv")
    assert "[[precipitant.inhibits]]" in text and "perpetrator" not in text.replace("Perpetrator", "")
    inh = next(i for i in loads_scenario(text).perpetrator.inhibits if i.target == "CYP2D6")
    assert inh.ki is not None


def test_a_rule_set_with_bad_terms_is_refused_with_the_field_named(tmp_path) -> None:  # type: ignore[no-untyped-def]
    from interact.errors import InputError
    from interact.tables import tables_dir

    text = (tables_dir() / "rules" / "ich-m12-2024.toml").read_text(encoding="utf-8")
    bad = tmp_path / "mine.toml"
    bad.write_text(text.replace('object = "object drug"', 'object = "object drug; rm"'), encoding="utf-8")
    with pytest.raises(InputError) as info:
        load_rules(bad)
    assert "terms.object (line " in str(info.value)  # the field and its line in the file
    plain = tmp_path / "plain.toml"  # no [terms]: the older words
    plain.write_text(re.sub(r"(?s)\[terms\].*?\n\n", "", text), encoding="utf-8")
    assert load_rules(plain).terms == Terms()
