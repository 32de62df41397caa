"""One set of header rules for every "column (unit)" table (interact/columns.py).

Invariants, not pictures: the same header cell means the same column with the same unit in every reader,
`name (unit)` and `name [unit]` read alike, a generic concentration name is refused where it is
ambiguous, and every error names the source, the line and the column.  The tables are invented inputs.
"""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from interact.batch import loads_perpetrators
from interact.columns import ALIASES, find_columns, name_key, split_header
from interact.errors import InputError
from interact.kinetics.carry import parse_fold_change_csv, parse_preincubation_csv
from interact.kinetics.data import parse_ic50_csv, parse_incubation_csv

_names = st.text(st.sampled_from("abcdefgh _-"), min_size=1, max_size=12).filter(lambda t: t.strip(" _-"))
_units = st.sampled_from(["uM", "nM", "ng/mL", "1/min", "%", "pmol/min/mg", "h"])


@given(name=_names, unit=_units, pad=st.sampled_from(["", " ", "  "]))
def test_parentheses_and_brackets_give_the_same_name_and_unit(name: str, unit: str, pad: str) -> None:
    round_ = split_header(f"{name}{pad}({pad}{unit}{pad})")
    square = split_header(f"{name}{pad}[{pad}{unit}{pad}]")
    assert round_ == square == (name.strip(), unit)
    assert split_header(name) == (name.strip(), None)


@given(alias=st.sampled_from([(c, a) for c, names in ALIASES.items() for a in names]), case=st.sampled_from([str.upper, str.title]))
def test_every_alias_is_found_whatever_its_case_and_separators(alias: tuple[str, str], case) -> None:  # type: ignore[no-untyped-def]
    column, name = alias
    spelled = case(name[:1] + "_" + name[1:]) if len(name) > 1 else case(name)
    found = find_columns(["x", f"{spelled} (uM)"], list(ALIASES), source="t.csv", line=1)
    assert found[column].index == 1 and found[column].unit == "uM"
    assert name_key(spelled) == name


def _grid(header_s: str, header_i: str) -> str:
    return f"{header_s},{header_i},velocity\n1,0,2\n2,0.5,3\n4,1,5\n"


@pytest.mark.parametrize("brackets", ["({})", "[{}]"])
def test_every_reader_takes_both_unit_forms(brackets: str) -> None:
    nm = brackets.format("nM")
    grid = parse_incubation_csv(_grid(f"substrate {nm}", f"inhibitor {nm}"))
    assert grid.substrate_um == pytest.approx((0.001, 0.002, 0.004)) and grid.inhibitor_um == pytest.approx((0.0, 0.0005, 0.001))
    ic50 = parse_ic50_csv(f"inhibitor {nm},response\n0,100\n1000,50\n")
    assert ic50.inhibitor_um == pytest.approx((0.0, 1.0))
    tdi = parse_preincubation_csv(f"inhibitor {nm},time {brackets.format('h')},activity\n500,0.5,80\n")
    assert tdi.columns["inhibitor"] == pytest.approx((0.5,)) and tdi.columns["time"] == pytest.approx((30.0,))
    ind = parse_fold_change_csv(f"inducer {nm},fold_change\n2000,3\n")
    assert ind.columns["concentration"] == pytest.approx((2.0,))
    mm = brackets.format("g/mol")
    batch = loads_perpetrators(
        f"name,dose (mg),molar mass {mm},cmax {brackets.format('uM')},fu_p,ki CYP3A {brackets.format('uM')}\nA,10,400,1,0.5,2\n"
    )
    assert batch.targets == ("CYP3A",) and batch.imax_u_um[0] == pytest.approx(0.5)


def test_the_same_alias_means_the_same_column_in_every_kinetics_reader() -> None:
    # "i" and "remaining" were accepted by one reader and not another; now by all that have the column
    ic50 = parse_ic50_csv("i (uM),remaining\n0,100\n1,50\n")
    tdi = parse_preincubation_csv("i (uM),t (min),remaining\n1,0,100\n1,5,80\n")
    assert ic50.inhibitor_um == (0.0, 1.0) and tdi.columns["inhibitor"] == (1.0, 1.0)
    assert tdi.columns["activity"] == (100.0, 80.0) and ic50.response == (100.0, 50.0)


@pytest.mark.parametrize("generic", ["conc", "Concentration", "c"])
def test_a_generic_concentration_name_is_the_only_concentration_or_refused(generic: str) -> None:
    assert parse_preincubation_csv(f"{generic} (uM),time,activity\n2,0,100\n").columns["inhibitor"] == (2.0,)
    assert parse_fold_change_csv(f"{generic},fold\n3,2\n").columns["concentration"] == (3.0,)
    assert parse_ic50_csv(f"{generic} (uM),response\n0,100\n4,40\n").inhibitor_um == (0.0, 4.0)
    with pytest.raises(InputError) as info:  # two concentrations: which one is meant cannot be known
        parse_incubation_csv(f"{generic} (uM),inhibitor (uM),velocity\n1,0,2\n")
    message = str(info.value)
    assert generic in message and "ambiguous" in message and "substrate: substrate, s" in message and "inhibitor: inhibitor, i" in message


@pytest.mark.parametrize(
    ("parse", "text", "needles"),
    [
        (parse_incubation_csv, "# note\nsubstrate (uM),inhibitor (uM),velocity\n\n1,0,2\n2,0,abc\n", ("f.csv line 5", "velocity", "abc")),
        (parse_ic50_csv, "inhibitor [uM],response\n0,100\n# c\n1,x\n", ("f.csv line 4", "response", '"x"')),
        (parse_preincubation_csv, "# c\n# c\ninhibitor,time,activity\n1,0,100\n1,5,\n", ("f.csv line 5", "activity")),
        (parse_fold_change_csv, "conc,fold\n1,2\n3\n", ("f.csv line 3", "fields")),
        (parse_preincubation_csv, "inhibitor,activity\n1,2\n", ("f.csv header (line 1)", "time: time, t")),
        (parse_incubation_csv, "s (uM),substrate (uM),i (uM),v\n1,1,0,1\n", ("f.csv header (line 1)", "substrate column again")),
    ],
)
def test_errors_name_the_file_the_line_and_the_column(parse, text: str, needles: tuple[str, ...]) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(InputError) as info:
        parse(text, source="f.csv")
    for needle in needles:
        assert needle in str(info.value)


def test_the_fit_command_names_the_file_and_the_ambiguous_column(tmp_path, capsys) -> None:  # type: ignore[no-untyped-def]
    from interact.cli import main

    path = tmp_path / "grid.csv"
    path.write_text("conc (uM),inhibitor (uM),velocity\n1,0,2\n", encoding="utf-8")
    assert main(["fit", str(path)]) == 2
    err = capsys.readouterr().err
    assert "grid.csv header (line 1)" in err and "conc (uM)" in err and "substrate: substrate, s" in err
