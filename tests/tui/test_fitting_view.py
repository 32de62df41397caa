"""The fitting view: CSV in, fits in a worker, verdict shown, Ki carried into the scenario.

The data are the nlstools 'vmkmki' incubations (tests/data, source line in the
file). The reference is the core's own fit_inhibition on the same file: the
view must show and carry exactly what the core computes.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from pilot_helpers import asynctest, text_of

from interact import assess
from interact.kinetics import fit_inhibition, read_incubation_csv
from interact.tui.app import InteractApp
from interact.tui.fitting_view import FitPane

# Scenarios here trigger model warnings (Fg not given, fu,inc = 1, kdeg from memory ...) as a side effect of
# what they test; the warnings themselves are checked in tests/api/test_warnings.py and where a test asks for one.
pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

DATA = Path(__file__).resolve().parents[1] / "data" / "nlstools_vmkmki.csv"


@asynctest
async def test_fit_in_worker_then_accept_ki_into_the_scenario() -> None:
    reference = fit_inhibition(read_incubation_csv(DATA, substrate_unit="uM", inhibitor_unit="uM"))
    assert reference.ki is not None and reference.verdict.mechanism is not None
    app = InteractApp()
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await pilot.press("f4", "f4")  # answer -> plots -> fitting
        await pilot.pause()
        app.query_one("#fit-path").value = str(DATA)  # type: ignore[attr-defined]
        app.query_one("#fit-unit").value = "uM"  # type: ignore[attr-defined]
        assert app.query_one("#fit-target").value == "CYP3A"  # type: ignore[attr-defined]
        app.query_one("#fit-run").press()  # type: ignore[attr-defined]
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert app.query_one(FitPane).fit is not None
        assert app.query_one(FitPane).fit.verdict.model == reference.verdict.model
        body = text_of(app, "#fit-body")
        assert reference.verdict.text.split(":")[0] in body
        assert "Double reciprocal" in body
        assert "Double reciprocal" in str(app.query_one("#plot-fit").content)  # type: ignore[attr-defined]
        before = app.assessment
        app.query_one("#fit-accept").press()  # type: ignore[attr-defined]
        await pilot.pause()
        entry = app.data["perpetrator"]["inhibits"][0]
        assert entry["target"] == "CYP3A"
        assert float(entry["ki"].split()[0]) == pytest.approx(reference.ki.value, rel=1e-5)
        assert entry["mechanism"] == reference.verdict.mechanism
        assert "fitted:" in entry["origin"]
        assert app.valid and app.assessment is not before and "unsaved" in app.sub_title
        assert app.scenario is not None
        c = next(c for c in assess(app.scenario).constants if c.target == "CYP3A" and c.species_index == 0)
        assert c.ki_um == pytest.approx(reference.ki.value, rel=1e-5)
        assert app.field("perpetrator.inhibits[0].ki").text == entry["ki"]
        # the interval travels with the Ki, as with `fit --into` (issue 14)
        assert c.ki_ci_um == pytest.approx((reference.ki.profile_low, reference.ki.profile_high), rel=1e-5)


@asynctest
async def test_unreadable_csv_gives_an_error_and_changes_nothing(tmp_path: Path) -> None:
    bad = tmp_path / "bad.csv"
    bad.write_text("substrate (uM),inhibitor (uM),velocity\n1,0,abc\n", encoding="utf-8")
    app = InteractApp()
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        before = dict(app.data)
        app.query_one("#fit-path").value = str(bad)  # type: ignore[attr-defined]
        app.query_one("#fit-run").press()  # type: ignore[attr-defined]
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        status = str(app.query_one("#fit-status").content)  # type: ignore[attr-defined]
        assert status.startswith("error:") and "abc" in status
        assert app.query_one(FitPane).fit is None and app.data == before
        assert app.query_one("#fit-accept").disabled  # type: ignore[attr-defined]
