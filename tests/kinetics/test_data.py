"""The incubation CSV reader: columns, units, replicates, and errors that name the line."""

from __future__ import annotations

import pytest

from interact.errors import InputError
from interact.kinetics import parse_incubation_csv, read_incubation_csv

from .conftest import DATA


def test_reads_units_from_headers_and_converts_to_micromolar() -> None:
    text = (
        "# invented example rows\nSubstrate (nM),inhibitor [uM],velocity (pmol/min/mg),depletion "
        "(%)\n500,0,10.5,3\n500,0,10.9,4\n\n2000,1.5,12,8\n"
    )
    data = parse_incubation_csv(text)
    assert data.substrate_um == (0.5, 0.5, 2.0)
    assert data.inhibitor_um == (0.0, 0.0, 1.5)
    assert data.velocity_unit == "pmol/min/mg"
    assert data.depletion_pct == (3.0, 4.0, 8.0)
    assert data.lines == (3, 4, 6)


def test_reads_the_vmkmki_file_with_units_given() -> None:
    data = read_incubation_csv(DATA / "nlstools_vmkmki.csv", substrate_unit="uM", inhibitor_unit="uM")
    assert data.n == 72 and len(data.inhibitor_levels) == 6


@pytest.mark.parametrize(
    ("text", "needle"),
    [
        ("substrate (uM),inhibitor (uM),velocity\n1,0,2\n2,0,x\n", "line 3, velocity"),
        ("substrate (uM),inhibitor (uM),velocity\n1,-1,2\n", "line 2"),
        ("substrate (uM),inhibitor (uM)\n1,0\n", "lacks the column velocity"),
        ("substrate,inhibitor (uM),velocity\n1,0,2\n", "substrate unit"),
        ("substrate (uM),inhibitor (ng/mL),velocity\n1,0,2\n", "molar concentration"),  # Ki must be molar; a substrate need not
        ("substrate (uM),inhibitor (uM),velocity\n1,0\n", "line 2"),
        ("substrate (uM),inhibitor (uM),velocity\n1,0,nan\n", "finite"),
        ("", "empty"),
    ],
)
def test_bad_input_names_the_line_and_the_field(text: str, needle: str) -> None:
    with pytest.raises(InputError) as info:
        parse_incubation_csv(text)
    assert needle in str(info.value)


def test_missing_file_is_an_input_error(tmp_path) -> None:
    with pytest.raises(InputError, match="could not be read"):
        read_incubation_csv(tmp_path / "absent.csv")


def test_kinetics_all_is_sorted_and_complete() -> None:
    import interact.kinetics as k

    assert k.__all__ == sorted(k.__all__)
    assert all(hasattr(k, name) for name in k.__all__)
