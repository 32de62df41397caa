"""Probabilistic screens (interact.batch_probability): probabilities per pair under sampled inputs.

Invariants (hypothesis, random small tables of invented compounds): every probability lies in [0, 1]; the class
probabilities of a pair sum to 1; the same seed gives the same numbers; the chunk size and the table's cut (a chunk
seeded by its first row) do not change them; with nothing varied each pair has probability 1 for its point class and
for a dose change exactly when the point action changes the dose (the point screen is held to assess() elsewhere);
on a dask.distributed LocalCluster the numbers equal the in-process run's.

Outside reference: with only Ki varied (lognormal, CV c) and a victim cleared wholly by one enzyme without a gut-wall
term, AUCR = 1 + I / Ki,u (Rowland and Matin 1973 form of the static model, common practice), so
P(AUCR >= b) = Phi(ln(I / ((b - 1) Ki,u)) / sigma), sigma^2 = ln(1 + c^2), with Phi from scipy.stats.norm; the
sampled fraction must lie within 4.5 binomial standard errors of it.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from test_batch_columnar import tables
from test_batch_routes import tables as route_tables

from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims, perpetrator_subset
from interact.batch_probability import Variation, parse_vary, probability_ranking, screen_probabilities, victims_drawn
from interact.cli import main
from interact.dosing import NO_CHANGE
from interact.errors import InputError

pytestmark = pytest.mark.filterwarnings("ignore::interact.errors.InteractWarning")

VARY = Variation(ki=0.4, conc=0.3, fm=0.2, fg=0.2)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(texts=tables(), samples=st.integers(1, 40), seed=st.integers(0, 2**31), chunk=st.sampled_from([None, 1, 64, 200]))
def test_probabilities_are_fractions_that_sum_to_one_and_repeat(texts: tuple[str, str], samples: int, seed: int, chunk: Any) -> None:
    perps, victims = loads_perpetrators(texts[0]), loads_victims(texts[1])
    r = screen_probabilities(perps, victims, VARY, samples=samples, seed=seed)
    cp, ch = r.class_probability, r.change_probability
    assert cp.shape == (len(perps.rows), len(victims.rows), len(r.point.band_names))
    assert ((cp >= 0) & (cp <= 1)).all() and ((ch >= 0) & (ch <= 1)).all()
    np.testing.assert_allclose(cp.sum(axis=-1), 1.0, rtol=0, atol=1e-12)
    np.testing.assert_allclose(cp * samples, np.round(cp * samples), rtol=0, atol=1e-9)  # counts of samples
    again = screen_probabilities(perps, victims, VARY, samples=samples, seed=seed, rows_per_chunk=chunk)
    assert again.class_probability.tobytes() == cp.tobytes() and again.change_probability.tobytes() == ch.tobytes()
    # a cut of the table, seeded by its first row, gives that cut's rows
    if len(perps.rows) > 1:
        part = screen_probabilities(perpetrator_subset(perps, slice(1, None)), victims, VARY, samples=samples, seed=seed, first_row=1)
        assert part.class_probability.tobytes() == cp[1:].tobytes()


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(texts=tables())
def test_nothing_varied_gives_the_point_screen(texts: tuple[str, str]) -> None:
    perps, victims = loads_perpetrators(texts[0]), loads_victims(texts[1])
    r = screen_probabilities(perps, victims, Variation(), samples=3)
    point = evaluate_pairs(perps, victims)
    n_c = len(point.band_names)
    np.testing.assert_array_equal(r.class_probability, np.eye(n_c)[point.band])
    np.testing.assert_array_equal(r.change_probability, (point.action != NO_CHANGE).astype(float))
    order = probability_ranking(r)
    assert np.all(np.diff(r.change_probability.ravel()[order]) <= 0)  # most probable dose change first


def test_sampled_class_probability_matches_the_lognormal_cdf() -> None:
    from scipy.stats import norm

    # invented compounds: Ki on CYP2D6 only (no gut-wall term), a victim cleared wholly by CYP2D6
    perps = loads_perpetrators("name,dose (umol),cmax (uM),fu_p,ki CYP2D6 (uM)\nP1,100,2,0.5,0.8\n")
    victims = loads_victims("name,dose (mg),interval (h),fm CYP2D6\nV1,10,24,1\n")
    cv, samples = 0.5, 4000
    r = screen_probabilities(perps, victims, Variation(ki=cv), samples=samples, seed=7)
    inlet, ki_u = float(perps.inlet_um[0]), float(perps.ki_u_um[0, 0])
    assert r.point.total[0, 0] == pytest.approx(1 + inlet / ki_u, rel=1e-12)
    sigma = math.sqrt(math.log1p(cv**2))
    labels = r.point.band_names
    from interact.tables import load_classes

    bounds = sorted((b.bound for b in load_classes().inhibition), reverse=True)
    at_least = [norm.cdf(math.log(inlet / ((b - 1) * ki_u)) / sigma) for b in bounds]  # P(AUCR >= bound), strongest first
    expected = [at_least[0], *(at_least[k] - at_least[k - 1] for k in range(1, len(bounds)))]
    for k, p in enumerate(expected, start=1):
        got = float(r.class_probability[0, 0, k])
        se = math.sqrt(max(p * (1 - p), 1e-4) / samples)
        assert abs(got - p) < 4.5 * se, (labels[k], got, p)


def test_vary_declarations_are_read_or_refused_by_name() -> None:
    assert parse_vary("ki=30%, conc=0.2") == Variation(ki=0.3, conc=0.2)
    for bad in ("ki=30%,ki=10%", "kd=3", "ki=-1", "ki=300%", "ki=0", ""):
        with pytest.raises(InputError) as info:
            parse_vary(bad)
        assert info.value.field == "--vary"


def test_the_command_writes_probabilities(tmp_path: Any, capsys: pytest.CaptureFixture[str]) -> None:
    import pyarrow.parquet as pq

    p = tmp_path / "p.csv"
    p.write_text("name,dose (umol),cmax (uM),fu_p,ki CYP3A (uM),ki CYP2D6 (uM)\nP1,100,2,0.5,0.8,\nP2,50,1,0.2,,3\n")
    v = tmp_path / "v.csv"
    v.write_text("name,dose (mg),interval (h),fg,fm CYP3A,fm CYP2D6\nV1,10,24,0.5,0.9,0\nV2,10,24,,0.2,0.7\n")
    out = tmp_path / "out.parquet"
    assert main(["screen-batch", str(p), str(v), "--samples", "50", "--vary", "ki=30%", "--seed", "3", "-o", str(out), "-q"]) == 0
    table = pq.read_table(out)
    assert table.num_rows == 4 and "P(dose change)" in table.column_names
    perps, victims = loads_perpetrators(p.read_text()), loads_victims(v.read_text())
    r = screen_probabilities(perps, victims, Variation(ki=0.3), samples=50, seed=3)
    assert sorted(table.column("P(dose change)").to_pylist()) == sorted(r.change_probability.ravel().tolist())
    assert main(["screen-batch", str(p), str(v), "--samples", "50", "-o", str(tmp_path / "x.csv")]) == 2
    assert "--vary" in capsys.readouterr().err


def test_dask_equals_in_process() -> None:
    distributed = pytest.importorskip("dask.distributed")
    from interact.batch_dask import probabilities_dask

    rng = np.random.default_rng(5)
    lines = ["name,dose (umol),cmax (uM),fu_p,ki CYP3A (uM),ki CYP2D6 (uM)"]
    lines += [f"P{k},100,{rng.uniform(0.5, 5):.3g},0.3,{rng.uniform(0.1, 10):.3g},{rng.uniform(0.1, 10):.3g}" for k in range(150)]
    perps = loads_perpetrators("\n".join(lines) + "\n")
    victims = loads_victims("name,dose (mg),interval (h),fg,fm CYP3A,fm CYP2D6\nV1,10,24,0.5,0.9,0\nV2,10,24,,0.2,0.7\n")
    local = screen_probabilities(perps, victims, VARY, samples=20, seed=11)
    with (
        distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=False, dashboard_address=":0") as cluster,
        distributed.Client(cluster) as client,
    ):
        remote = probabilities_dask(perps, victims, VARY, samples=20, seed=11, client=client, rows_per_chunk=64)
    assert remote.class_probability.tobytes() == local.class_probability.tobytes()
    assert remote.change_probability.tobytes() == local.change_probability.tobytes()


ROUTES_VARIED = Variation(ki=0.3, fm=0.8, fg=0.5, route=1.5, renal=1.5)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(texts=route_tables())
def test_routes_nothing_varied_gives_the_point_screen_and_probabilities_sum_to_one(texts: tuple[str, str]) -> None:
    perps, victims = loads_perpetrators(texts[0]), loads_victims(texts[1])
    point = evaluate_pairs(perps, victims)
    n_c = len(point.band_names)
    r = screen_probabilities(perps, victims, Variation(), samples=2)
    np.testing.assert_array_equal(r.class_probability, np.eye(n_c)[point.band])
    np.testing.assert_array_equal(r.change_probability, (point.action != NO_CHANGE).astype(float))
    drawn = screen_probabilities(perps, victims, ROUTES_VARIED, samples=5, seed=3)
    np.testing.assert_allclose(drawn.class_probability.sum(axis=2), 1.0, rtol=0, atol=1e-12)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(texts=route_tables(), seed=st.integers(0, 2**31), only=st.sampled_from(["route", "renal", "both"]))
def test_route_and_renal_draws_keep_every_organ_sum(texts: tuple[str, str], seed: int, only: str) -> None:
    """The organ sums of the scenario reader (common practice: fractions of one clearance or one dose add up to at most
    the whole) hold for every draw: fm + uptake + renal <= 1, efflux <= Fg, secretion shares <= 1, each in [0, 1]."""
    victims = loads_victims(texts[1])
    variation = Variation(fm=0.8, fg=0.5, route=1.5 if only != "renal" else 0.0, renal=1.5 if only != "route" else 0.0)
    rng = np.random.default_rng(seed)
    n, e, k = len(victims.rows), len(victims.enzymes), len(victims.routes)
    for _ in range(20):
        factors = {
            "fm": np.exp(variation.sigma("fm") * rng.standard_normal((n, e))),
            "fg": np.exp(variation.sigma("fg") * rng.standard_normal(n)),
            "route": np.exp(variation.sigma("route") * rng.standard_normal((n, k))),
            "renal": np.exp(variation.sigma("renal") * rng.standard_normal(n)),
        }
        d = victims_drawn(victims, variation, factors)
        assert d.route_fraction is not None and d.renal is not None
        kind = np.array([route for _, route in victims.routes])
        rf = d.route_fraction
        for x in (d.fm, rf, d.renal, d.fg):
            assert np.all((x >= 0.0) & (x <= 1.0 + 1e-12))
        uptake = rf[:, kind == "hepatic uptake"].sum(axis=1)
        assert np.all(d.fm.sum(axis=1) + uptake + d.renal <= 1.0 + 1e-9)
        assert np.all(rf[:, kind == "intestinal efflux"].sum(axis=1) <= d.fg + 1e-9)
        secreted = rf[:, kind == "renal secretion"].sum(axis=1)  # renal fraction x shares: shares <= 1
        assert np.all(secreted <= d.renal + 1e-9)
        if only == "route":  # a renal fraction not varied keeps the table's value
            np.testing.assert_array_equal(d.renal, victims.renal)


def test_route_and_renal_are_read_by_name() -> None:
    v = parse_vary("route=20%, renal=0.1")
    assert v.route == pytest.approx(0.2) and v.renal == pytest.approx(0.1)
    assert "route CV 20 %" in v.describe() and "renal CV 10 %" in v.describe()
