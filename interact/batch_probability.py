"""Probabilistic batch screens: per pair, the probability of each class and of a dose change under uncertain inputs.

The inputs of the pair model vary between samples as lognormal factors with the median at the table's value (common
practice for positive quantities known to a coefficient of variation, CV: sigma = sqrt(ln(1 + CV^2))), declared once
for the whole screen (:class:`Variation`, ``--vary`` on the command line):

- ``ki``: every unbound inhibition constant Ki,u of a perpetrator (one factor per perpetrator and target);
- ``conc``: the perpetrator's site concentrations (Imax,u, Iin,max,u and I,ent, one factor per perpetrator);
- ``fm``: each fraction metabolised of a victim (one factor per victim and enzyme; kept at most 1, and the sum at
  most 1 by scaling the fractions down together);
- ``fg``: the victim's intestinal availability Fg where the table gives it (kept at most 1);
- ``route``: each transporter route fraction of a victim (efflux, uptake, and the secretion share of the renal
  clearance; one factor per victim and route; each kept at most 1);
- ``renal``: the victim's renal fraction where the table gives it (kept at most 1).

The varied fractions then keep the scenario reader's organ sums (fm, hepatic uptake and renal fraction at most 1,
efflux at most Fg, secretion shares at most 1) by the rule of the single-scenario uncertainty run: the varied members
of a broken sum are scaled down together (:func:`interact.uncertainty.scale_to_room`), the others keep their values.

Each sample is one screen of the chunk's pairs through :func:`interact.batch.evaluate_pairs` (the one pair model, the
class bands and the dose rule); the probability of a class (or of a dose change, any action but "no change") is the
fraction of samples in it.  The random numbers of a row depend only on the seed, the table (perpetrators or victims)
and the row's block of :data:`SEED_BLOCK` rows, so results are the same for any chunking and on Dask.
"""

from __future__ import annotations

import dataclasses
import math
import re
from collections.abc import Callable
from dataclasses import dataclass
from typing import Final

import numpy as np
from numpy.typing import NDArray

from .batch import BatchResult, PerpetratorTable, VictimTable, check_pair_budget, evaluate_pairs, perpetrator_subset
from .dosing import NO_CHANGE
from .errors import InputError
from .prediction import liver_ratio
from .tables import RuleSet, load_rules

__all__ = ["SEED_BLOCK", "ProbabilityResult", "Variation", "parse_vary", "probability_ranking", "screen_probabilities"]

#: rows drawn from one random generator (a perpetrator chunk is a whole number of these blocks)
SEED_BLOCK: Final = 64
#: the quantities ``--vary`` takes, and what each varies
VARY_KEYS: Final = {
    "ki": "every unbound Ki of a perpetrator",
    "conc": "a perpetrator's site concentrations (Imax,u, Iin,max,u, I,ent)",
    "fm": "each fm of a victim",
    "fg": "a victim's Fg",
    "route": "each transporter route fraction of a victim (efflux, uptake, secretion share)",
    "renal": "a victim's renal fraction",
}
#: at most this CV (a factor of about 7 at one standard deviation is beyond what a screen can say anything about)
MAX_CV: Final = 2.0
MAX_SAMPLES: Final = 100_000


@dataclass(frozen=True, slots=True, kw_only=True)
class Variation:
    """Coefficients of variation (fractions: 0.3 for 30 %) of the pair model's inputs; 0 keeps a quantity fixed."""

    ki: float = 0.0
    conc: float = 0.0
    fm: float = 0.0
    fg: float = 0.0
    route: float = 0.0
    renal: float = 0.0

    def sigma(self, key: str) -> float:
        """The lognormal sigma of ``key``: sqrt(ln(1 + CV^2))."""
        return math.sqrt(math.log1p(float(getattr(self, key)) ** 2))

    def describe(self) -> str:
        """'ki CV 30 %, conc CV 20 %' (the quantities that vary)."""
        return ", ".join(f"{k} CV {100 * getattr(self, k):g} %" for k in VARY_KEYS if getattr(self, k)) or "nothing varies"


def parse_vary(text: str, field: str = "--vary") -> Variation:
    """``"ki=30%, conc=0.2"``: quantity=CV pairs (a percentage or a fraction) separated by commas.

    Raises
    ------
    InputError
        Naming ``field``, the part and what is expected.
    """
    values: dict[str, float] = {}
    for part in (p.strip() for p in str(text).split(",")):
        if not part:
            continue
        m = re.fullmatch(r"([a-z_]+)\s*=\s*([0-9]*\.?[0-9]+(?:[eE][-+]?\d+)?)\s*(%?)", part)
        if m is None or m.group(1) not in VARY_KEYS:
            raise InputError(field, part, f"is not quantity=CV; expected e.g. ki=30%, with a quantity among {', '.join(VARY_KEYS)}")
        cv = float(m.group(2)) / (100.0 if m.group(3) else 1.0)
        if not (math.isfinite(cv) and 0.0 <= cv <= MAX_CV):
            raise InputError(field, part, f"has a CV outside 0 to {MAX_CV:g} ({100 * MAX_CV:g} %)")
        if m.group(1) in values:
            raise InputError(field, part, f"repeats {m.group(1)}; give each quantity once")
        values[m.group(1)] = cv
    if not any(values.values()):
        raise InputError(field, text, f"varies nothing; expected at least one of {', '.join(VARY_KEYS)} with a CV above 0, e.g. ki=30%")
    return Variation(**values)


@dataclass(frozen=True, slots=True, kw_only=True)
class ProbabilityResult:
    """Per pair (perpetrators x victims): the point screen, and the probabilities under the sampled inputs."""

    point: BatchResult  # the screen at the table's values
    variation: Variation
    samples: int
    seed: int
    class_probability: NDArray[np.float64]  # (perpetrators, victims, classes): classes as point.band_names
    change_probability: NDArray[np.float64]  # (perpetrators, victims): any action but "no change"

    @property
    def pairs(self) -> int:
        return self.point.pairs


def _factors(seed: int, side: int, first: int, n: int, samples: int, columns: int) -> NDArray[np.float64]:
    """Standard normal draws (n rows from ``first``, samples, columns), row by row the same for any ``first``/``n`` split."""
    out = np.empty((n, samples, columns))
    b0, b1 = first // SEED_BLOCK, (first + n - 1) // SEED_BLOCK
    for block in range(b0, b1 + 1):
        rng = np.random.default_rng([seed, side, block])
        z = rng.standard_normal((SEED_BLOCK, samples, columns))
        lo, hi = max(first, block * SEED_BLOCK), min(first + n, (block + 1) * SEED_BLOCK)
        out[lo - first : hi - first] = z[lo - block * SEED_BLOCK : hi - block * SEED_BLOCK]
    return out


def screen_probabilities(
    perpetrators: PerpetratorTable,
    victims: VictimTable,
    variation: Variation,
    rules: RuleSet | str | None = None,
    *,
    samples: int = 1000,
    seed: int = 0,
    first_row: int = 0,
    rows_per_chunk: int | None = None,
    progress: Callable[[int, int], None] | None = None,
) -> ProbabilityResult:
    """Probability of each class and of a dose change for every pair, over ``samples`` draws of the varied inputs.

    Parameters
    ----------
    variation
        The CVs of the varied quantities (:class:`Variation`).
    samples, seed
        Draws per pair and the seed; the same seed gives the same probabilities.
    first_row
        The table row of the first perpetrator given (a chunk of a larger table: its random numbers are those rows').
    rows_per_chunk
        Perpetrators evaluated at once (rounded up to :data:`SEED_BLOCK`); does not change the result.
    """
    if not (isinstance(samples, int) and 1 <= samples <= MAX_SAMPLES):
        raise InputError("--samples", samples, f"is not a whole number from 1 to {MAX_SAMPLES:,}")
    rule_set = rules if isinstance(rules, RuleSet) else load_rules(rules)
    # the counts (and then the probabilities) take about as much memory as the point screen's results
    check_pair_budget(len(perpetrators.rows), 2 * len(victims.rows))
    point = evaluate_pairs(perpetrators, victims, rule_set)
    n_p, n_v, n_c = len(perpetrators.rows), len(victims.rows), len(point.band_names)
    n_t, n_e = len(perpetrators.targets), len(victims.enzymes)
    counts = np.zeros(n_p * n_v * n_c, dtype=np.int64)  # pair by pair, class by class
    changes = np.zeros(n_p * n_v, dtype=np.int64)
    # victims: the same draws for every chunk of perpetrators
    zv = _factors(seed, 1, 0, n_v, samples, n_e + 1)
    fm_f = np.exp(variation.sigma("fm") * zv[:, :, :n_e])  # (n_v, S, E)
    fg_f = np.exp(variation.sigma("fg") * zv[:, :, n_e])  # (n_v, S)
    n_r = len(victims.routes)
    # routes and renal fraction from their own stream, so fm and Fg draw the same numbers as before they existed
    zr = _factors(seed, 2, 0, n_v, samples, n_r + 1) if variation.route or variation.renal else np.zeros((n_v, samples, n_r + 1))
    route_f = np.exp(variation.sigma("route") * zr[:, :, :n_r])  # (n_v, S, R)
    renal_f = np.exp(variation.sigma("renal") * zr[:, :, n_r])  # (n_v, S)
    step = max(SEED_BLOCK, -(-(rows_per_chunk or 4 * SEED_BLOCK) // SEED_BLOCK) * SEED_BLOCK)
    for a in range(0, n_p, step):
        b = min(n_p, a + step)
        chunk = perpetrator_subset(perpetrators, slice(a, b))
        zp = _factors(seed, 0, first_row + a, b - a, samples, n_t + 1)
        conc_f = np.exp(variation.sigma("conc") * zp[:, :, 0])  # (rows, S)
        ki_f = np.exp(variation.sigma("ki") * zp[:, :, 1:])  # (rows, S, targets)
        pairs = (b - a) * n_v
        offsets = np.arange(pairs, dtype=np.int64) * n_c
        for s in range(samples):
            factors = {"fm": fm_f[:, s], "fg": fg_f[:, s], "route": route_f[:, s], "renal": renal_f[:, s]}
            drawn = _perpetrators_drawn(chunk, conc_f[:, s], ki_f[:, s]), victims_drawn(victims, variation, factors)
            r = evaluate_pairs(*drawn, rule_set)
            counts[a * n_v * n_c : b * n_v * n_c] += np.bincount(offsets + r.band.ravel(), minlength=pairs * n_c)
            changes[a * n_v : b * n_v] += r.action.ravel() != NO_CHANGE
        if progress is not None:
            progress(b * n_v, n_p * n_v)
    return ProbabilityResult(
        point=point,
        variation=variation,
        samples=samples,
        seed=seed,
        class_probability=(counts / samples).reshape(n_p, n_v, n_c),
        change_probability=(changes / samples).reshape(n_p, n_v),
    )


def _perpetrators_drawn(table: PerpetratorTable, conc: NDArray[np.float64], ki: NDArray[np.float64]) -> PerpetratorTable:
    """The perpetrators with their site concentrations x ``conc`` (per row) and Ki,u x ``ki`` (per row and target)."""
    return dataclasses.replace(
        table,
        imax_u_um=table.imax_u_um * conc,
        inlet_um=table.inlet_um * conc,
        enterocyte_um=table.enterocyte_um * conc,
        ki_u_um=table.ki_u_um * ki,
    )


def victims_drawn(table: VictimTable, variation: Variation, factors: dict[str, NDArray[np.float64]]) -> VictimTable:
    """The victims with their fractions times ``factors`` (``fm`` (n, enzymes), ``fg`` (n,), ``route`` (n, routes),
    ``renal`` (n,)), each kept at most 1, then within the scenario reader's organ sums
    (:meth:`interact.uncertainty.ScenarioModel.fraction_groups`, no extended clearance in a table): fm, hepatic uptake
    and renal fraction add up to at most 1, efflux to at most Fg, the secretion shares of renal clearance to at most 1.
    Where a sum is broken, the members whose CV in ``variation`` is above 0 are scaled down together and the others keep
    their table values (:func:`interact.uncertainty.scale_to_room`, the single-scenario run's rule)."""
    from .uncertainty import scale_to_room  # the one implementation of the organ-sum rule

    n = len(table.rows)
    kinds = [route for _, route in table.routes]
    given = table.route_fraction if table.route_fraction is not None else np.zeros((n, 0))
    renal0 = table.renal if table.renal is not None else np.zeros(n)
    secretion = np.array([k == "renal secretion" for k in kinds], dtype=bool)
    # a secretion column holds renal fraction x share: vary the share, as the scenario's pathway fraction
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):  # a subnormal renal fraction: share at most 1
        share = np.minimum(np.where(renal0[:, None] > 0, given / renal0[:, None], 0.0), 1.0)
    base = np.where(secretion, share, given)
    fm = np.minimum(table.fm * factors["fm"], 1.0)
    fg = np.where(table.fg_given, np.minimum(table.fg * factors["fg"], 1.0), table.fg)
    routes = np.minimum(base * factors["route"], 1.0)
    renal = np.minimum(renal0 * factors["renal"], 1.0)
    cols = lambda kind: [routes[:, r] for r in range(len(kinds)) if kinds[r] == kind]  # noqa: E731
    fms = [fm[:, k] for k in range(fm.shape[1])]
    for members, limit in (
        ([*(("fm", c) for c in fms), *(("route", c) for c in cols("hepatic uptake")), ("renal", renal)], 1.0),
        ([("route", c) for c in cols("intestinal efflux")], fg),
        ([("route", c) for c in cols("renal secretion")], 1.0),
    ):
        moving = [c for key, c in members if getattr(variation, key)]
        if not moving:
            continue
        fixed = sum((c for key, c in members if not getattr(variation, key)), start=np.zeros(n))
        scaled, _ = scale_to_room(moving, np.maximum(limit - fixed, 0.0))
        for c, new in zip(moving, scaled, strict=True):
            c[...] = new  # the columns are views into fm, routes and renal
    moved = (renal != renal0)[:, None] | (routes != base)  # unchanged columns keep the table's bits exactly
    route_fraction = np.where(secretion & moved, renal[:, None] * routes, np.where(secretion, given, routes))
    return dataclasses.replace(
        table,
        fm=fm,
        fg=fg,
        route_fraction=route_fraction if table.route_fraction is not None else None,
        renal=renal if table.renal is not None else None,
        genotype=liver_ratio(fm, table.activity) if n else table.genotype,
    )


def probability_ranking(result: ProbabilityResult, top: int | None = None) -> NDArray[np.int64]:
    """Flat pair indices, most probable dose change first; ties by the point screen's severity, then table order."""
    severity = np.abs(np.log(result.point.exposure.ravel()))
    order = np.lexsort((np.arange(severity.size), -severity, -result.change_probability.ravel()))
    if top is not None:
        order = order[:top]
    return order.astype(np.int64)
