"""Global fit of a substrate x inhibitor grid to every inhibition model, and a verdict.

All models are fitted to all rows at once (a global fit, not one curve per
inhibitor level), by the least-squares engine in :mod:`.engine` with the
analytic Jacobians of the rate laws (:mod:`.ratelaws`).  Inhibition constants
are fitted as their reciprocals (1/Ki >= 0), so a constant the data cannot
bound runs onto the bound 1/Ki = 0 and is reported as unbounded instead of
receiving a fake standard error.

Model selection: AICc with Akaike weights (Burnham & Anderson, *Model
selection and multimodel inference*, 2nd ed. 2002, sections 2.4 and 2.9 -
from memory; the reading of delta-AICc below 2 as "substantial support" is
theirs) and the extra-sum-of-squares F test for nested pairs (Bates & Watts
1988, section 3.5; common practice in enzyme kinetics).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Final

import numpy as np
from numpy.typing import NDArray

from ..errors import FitError, InputError
from .data import IncubationData
from .engine import WEIGHTS, CurveModel, Estimate, FitResult, fit_curve

__all__ = [
    "MODELS",
    "FTest",
    "ModelComparison",
    "RankedModel",
    "Verdict",
    "fit_inhibition",
    "fit_substrate_inhibition",
    "guess_inhibition",
    "guess_michaelis_menten",
    "inhibition_model",
]

Array = NDArray[np.float64]

#: the models of a global fit; "none" is Michaelis-Menten without inhibition
MODELS: Final = ("none", "competitive", "noncompetitive", "uncompetitive", "mixed")
LABELS: Final = {
    "none": "no inhibition (Michaelis-Menten)",
    "competitive": "competitive",
    "noncompetitive": "noncompetitive",
    "uncompetitive": "uncompetitive",
    "mixed": "mixed",
}
EQUATIONS: Final = {
    "none": "v = Vmax S / (Km + S)",
    "competitive": "v = Vmax S / (Km (1 + I/Ki) + S)",
    "noncompetitive": "v = Vmax S / ((Km + S)(1 + I/Ki))",
    "uncompetitive": "v = Vmax S / (Km + S (1 + I/Ki))",
    "mixed": "v = Vmax S / (Km (1 + I/Kic) + S (1 + I/Kiu))",
}
#: nested pairs (reduced, full) for the extra-sum-of-squares F test
NESTED: Final = (
    ("none", "competitive"),
    ("none", "noncompetitive"),
    ("none", "uncompetitive"),
    ("competitive", "mixed"),
    ("noncompetitive", "mixed"),
    ("uncompetitive", "mixed"),
)
OUTLIER_T: Final = 3.0  # |externally studentised residual| flagged as a possible outlier (common practice)
DEPLETION_KINETIC_PCT: Final = 10.0  # Lee et al. 2024: < 10 % turnover for kinetic constants (seen)
DEPLETION_LIMIT_PCT: Final = 20.0  # FDA: substrate depletion <= 20 % (from memory)


# --------------------------------------------------------------------------- models


def _kappas(name: str, u: Array) -> tuple[float, float]:
    if name == "none":
        return 0.0, 0.0
    if name == "competitive":
        return u[2], 0.0
    if name == "noncompetitive":
        return u[2], u[2]
    if name == "uncompetitive":
        return 0.0, u[2]
    return u[2], u[3]


class _Grid:
    """The grid's arrays and their product S x I, computed once per data set (x is never modified)."""

    __slots__ = ("i", "s", "si", "x")

    def __init__(self) -> None:
        self.x: Array | None = None

    def of(self, x: Array) -> _Grid:
        if self.x is not x:
            self.x, self.s, self.i = x, x[0], x[1]
            self.si = self.s * self.i
        return self


def _denominator(name: str, grid: _Grid, u: list[float]) -> tuple[Array, Array | None]:
    """D = Km (1 + I/Kic) + S (1 + I/Kiu) in 1/K form, and (1 + I/Kic) when it is not 1."""
    km = u[1]
    if name == "none":
        return grid.s + km, None
    if name == "competitive":
        a = grid.i * u[2]
        a += 1.0
        return a * km + grid.s, a
    if name == "uncompetitive":
        d = grid.si * u[2]
        d += grid.s
        d += km
        return d, None
    kc = u[2]
    ku = u[2] if name == "noncompetitive" else u[3]
    a = grid.i * kc
    a += 1.0
    d = a * km
    d += grid.si * ku
    d += grid.s
    return d, a


def _function(name: str):  # type: ignore[no-untyped-def]
    grid = _Grid()

    def f(u: Array, x: Array) -> Array:
        g = grid.of(x)
        ul = u.tolist()
        d, _ = _denominator(name, g, ul)
        return (ul[0] * g.s) / d

    return f


def _jacobian(name: str):  # type: ignore[no-untyped-def]
    both = _fused(name)

    def jac(u: Array, x: Array) -> Array:
        return both(u, x)[1]

    return jac


def _fused(name: str):  # type: ignore[no-untyped-def]
    grid = _Grid()
    p = 2 if name == "none" else (4 if name == "mixed" else 3)

    def both(u: Array, x: Array) -> tuple[Array, Array]:
        gr = grid.of(x)
        ul = u.tolist()
        d, a = _denominator(name, gr, ul)
        out = np.empty((p, d.size))
        g = np.divide(gr.s, d, out=out[0])
        f = g * ul[0]
        fd = f / d
        if a is None:
            np.negative(fd, out=out[1])
        else:
            np.multiply(fd, a, out=out[1])
            np.negative(out[1], out=out[1])
        if name == "competitive":
            np.multiply(fd, gr.i, out=out[2])
            out[2] *= -ul[1]
        elif name == "uncompetitive":
            np.multiply(fd, gr.si, out=out[2])
            np.negative(out[2], out=out[2])
        elif name == "noncompetitive":
            np.multiply(fd, gr.i * ul[1] + gr.si, out=out[2])
            np.negative(out[2], out=out[2])
        elif name == "mixed":
            np.multiply(fd, gr.i, out=out[2])
            out[2] *= -ul[1]
            np.multiply(fd, gr.si, out=out[3])
            np.negative(out[3], out=out[3])
        return f, out.T

    return both


_NPAR: Final = {"none": 2, "competitive": 3, "noncompetitive": 3, "uncompetitive": 3, "mixed": 4}


def inhibition_model(
    name: str, velocity_unit: str = "", *, vmax_max: float = math.inf, km_max: float = math.inf, kappa_max: float = math.inf
) -> CurveModel:
    """The fitting model for ``name`` (one of :data:`MODELS`), in 1/Ki form.

    Fitting parameters: Vmax, Km (uM) and, per inhibition route, 1/Ki (1/uM);
    the estimates are reported as Vmax, Km, Ki (or Kic, Kiu for mixed), in uM.
    ``vmax_max``, ``km_max`` and ``kappa_max`` (on 1/Ki) cap the parameters, so that a
    model the data drive towards a degenerate limit (Km and Ki to zero, say) stops on
    a cap and is reported as not identifiable.
    """
    if name not in MODELS:
        raise InputError("models", name, f"is not one of {', '.join(MODELS)}")
    const = {"none": (), "competitive": ("Ki",), "noncompetitive": ("Ki",), "uncompetitive": ("Ki",), "mixed": ("Kic", "Kiu")}[name]
    p = 2 + len(const)
    return CurveModel(
        name=name,
        parameters=("vmax", "km", *(f"1/{c}" for c in const)),
        function=_function(name),
        jacobian=_jacobian(name),
        lower=(0.0,) * p,
        upper=(vmax_max, km_max, *(kappa_max,) * len(const)),
        reported=("value", "value", *("inverse",) * len(const)),
        reported_names=("Vmax", "Km", *const),
        units=(velocity_unit, "uM", *("uM",) * len(const)),
        equation=EQUATIONS[name],
        function_jacobian=_fused(name),
    )


# --------------------------------------------------------------------------- starting values


def guess_michaelis_menten(substrate_um: Sequence[float] | Array, velocity: Sequence[float] | Array) -> tuple[float, float]:
    """Starting (Vmax, Km) from the Hanes-Woolf line S/v = S/Vmax + Km/Vmax.

    Falls back to (1.1 max v, median S) when the line is unusable.
    """
    s = np.asarray(substrate_um, dtype=float)
    v = np.asarray(velocity, dtype=float)
    ok = (v > 0) & (s > 0)
    fallback = (1.1 * float(np.max(v)) if np.any(ok) else 1.0, float(np.median(s)))
    if np.count_nonzero(ok) < 2 or np.unique(s[ok]).size < 2:
        return fallback
    slope, intercept = np.polyfit(s[ok], s[ok] / v[ok], 1)
    if slope <= 0 or intercept <= 0:
        return fallback
    return float(1.0 / slope), float(intercept / slope)


def guess_inhibition(data: IncubationData) -> dict[str, tuple[tuple[float, ...], ...]]:
    """Starting vectors (fitting scale, 1/Ki) for every model, from linear forms.

    The double-reciprocal form of the mixed law is linear in its coefficients,
    1/v = (Km/Vmax)(1/S) + 1/Vmax + (Km/(Vmax Kic))(I/S) + (1/(Vmax Kiu)) I,
    so one weighted linear regression (rows weighted by v, the usual
    correction for the reciprocal transform) gives every model a start; a
    second start per model uses 1/Ki = 1/(median inhibitor level).
    """
    s, i, v = data.arrays()
    ok = (v > 0) & (s > 0)
    base = i == np.min(i)
    vmax, km = guess_michaelis_menten(s[base], v[base])
    nonzero = i[i > 0]
    k_typ = 1.0 / float(np.median(nonzero)) if nonzero.size else 1.0
    kc = ku = k_typ
    if np.count_nonzero(ok) >= 4 and nonzero.size:
        a = np.column_stack((1.0 / s[ok], np.ones(np.count_nonzero(ok)), i[ok] / s[ok], i[ok])) * v[ok, None]
        coef, *_ = np.linalg.lstsq(a, v[ok] / v[ok], rcond=None)
        c_s, c_0, c_is, c_i = (float(c) for c in coef)
        if c_0 > 0 and c_s > 0:
            vmax, km = 1.0 / c_0, c_s / c_0
            kc = c_is / c_s if c_is > 0 else 0.01 * k_typ
            ku = c_i / c_0 if c_i > 0 else 0.01 * k_typ
    both = 0.5 * (kc + ku)
    return {
        "none": ((vmax, km),),
        "competitive": ((vmax, km, max(kc, 0.01 * k_typ)), (vmax, km, k_typ)),
        "noncompetitive": ((vmax, km, both), (vmax, km, k_typ)),
        "uncompetitive": ((vmax, km, max(ku, 0.01 * k_typ)), (vmax, km, k_typ)),
        "mixed": ((vmax, km, kc, ku), (vmax, km, k_typ, k_typ)),
    }


# --------------------------------------------------------------------------- results


@dataclass(frozen=True, slots=True, kw_only=True)
class RankedModel:
    """A model's place in the comparison."""

    model: str
    aicc: float
    delta_aicc: float
    weight: float
    bic: float
    rss: float
    n_params: int


@dataclass(frozen=True, slots=True, kw_only=True)
class FTest:
    """Extra-sum-of-squares F test of a reduced model against a fuller one."""

    reduced: str
    full: str
    f: float
    df_num: int
    df_den: int
    p_value: float

    @property
    def significant(self) -> bool:
        return self.p_value < 0.05


@dataclass(frozen=True, slots=True, kw_only=True)
class Verdict:
    """The mechanism the data support, how strongly, and what is not identifiable."""

    model: str
    mechanism: str | None
    strength: str
    support: float
    text: str
    unidentifiable: tuple[str, ...] = ()


@dataclass(frozen=True, slots=True, kw_only=True)
class ModelComparison:
    """Every model fitted to one data set, ranked, tested and judged."""

    data: IncubationData
    weights: str
    fits: tuple[FitResult, ...]
    ranking: tuple[RankedModel, ...]
    f_tests: tuple[FTest, ...]
    verdict: Verdict
    warnings: tuple[str, ...]
    substrate_inhibition: FitResult | None = None
    substrate_inhibition_test: FTest | None = None
    level: float = 0.95

    def fit(self, model: str) -> FitResult:
        for f in self.fits:
            if f.model == model:
                return f
        raise KeyError(model)

    @property
    def models(self) -> tuple[str, ...]:
        return tuple(f.model for f in self.fits)

    @property
    def chosen(self) -> FitResult:
        return self.fit(self.verdict.model)

    @property
    def ki(self) -> Estimate | None:
        """The inhibition constant to carry forward: Ki, or Kic for mixed (None without inhibition)."""
        chosen = self.chosen
        for name in ("Ki", "Kic"):
            if name in chosen.names:
                return chosen.estimate(name)
        return None

    @property
    def alpha(self) -> float | None:
        """Kiu / Kic for a mixed verdict, else None."""
        if self.verdict.model != "mixed":
            return None
        c = self.chosen
        return c.value("Kiu") / c.value("Kic")


# --------------------------------------------------------------------------- fitting


def _check_design(data: IncubationData, models: Sequence[str]) -> None:
    s, i, _ = data.arrays()
    if np.unique(s).size < 3:
        raise FitError(
            f"{data.source or 'data'}: {np.unique(s).size} substrate level(s); a Michaelis-Menten fit needs at least "
            f"3 distinct substrate concentrations"
        )
    if any(m != "none" for m in models) and np.unique(i).size < 2:
        raise FitError(
            f"{data.source or 'data'}: one inhibitor level only ({i[0]:g} uM); inhibition models need at least two (a "
            f"control without inhibitor and one or more levels)"
        )


def fit_inhibition(
    data: IncubationData,
    models: Sequence[str] = MODELS,
    *,
    weights: str = "none",
    level: float = 0.95,
    profile: bool = True,
) -> ModelComparison:
    """Fit every requested model to the whole grid and compare them.

    Parameters
    ----------
    data
        Substrate and inhibitor in uM, velocities in any unit.
    models
        Names from :data:`MODELS` (default: all five).
    weights
        One of :data:`~interact.kinetics.engine.WEIGHTS`.
    level
        Confidence level of the intervals (default 0.95).
    profile
        Compute profile-likelihood intervals for the inhibition constants.

    Returns
    -------
    ModelComparison
        Fits, AICc ranking with Akaike weights, F tests, verdict, design warnings.

    Raises
    ------
    InputError
        Unknown model or weighting, weights needing positive velocities.
    FitError
        A design that cannot be fitted (fewer than 3 substrate levels, one inhibitor level).
    """
    chosen_models = tuple(dict.fromkeys(models))
    if not chosen_models:
        raise InputError("models", "none given", f"expected one or more of {', '.join(MODELS)}")
    for m in chosen_models:
        if m not in MODELS:
            raise InputError("models", m, f"is not one of {', '.join(MODELS)}")
    if weights not in WEIGHTS:
        raise InputError("weights", weights, f"is not one of {', '.join(WEIGHTS)}")
    _check_design(data, chosen_models)
    s, i, v = data.arrays()
    x = np.vstack((s, i))
    starts = guess_inhibition(data)
    hints = _step_hints(i)
    # caps far outside any sensible value (10^4 x the data): reaching one means "not identifiable", not a result
    positive_i = i[i > 0]
    caps = (
        1e4 * float(np.max(np.abs(v))) or math.inf,
        1e4 * float(np.max(s)),
        1e4 / float(np.min(positive_i)) if positive_i.size else math.inf,
    )
    fits: dict[str, FitResult] = {}
    order = [m for m in MODELS if m in chosen_models]
    for name in order:
        model = inhibition_model(name, data.velocity_unit, vmax_max=caps[0], km_max=caps[1], kappa_max=caps[2])
        st = list(starts[name])
        if name == "mixed":
            st.extend(_mixed_starts(fits))
        prof = tuple(range(2, len(model.parameters))) if profile else ()
        fits[name] = fit_curve(
            model,
            x,
            v,
            st,
            weights=weights,
            profile=prof,
            level=level,
            step_hints=(1.0, 1.0, *([hints] * (len(model.parameters) - 2))),
        )
    fit_tuple = tuple(fits[m] for m in order)
    ranking = _rank(fit_tuple)
    f_tests = _f_tests(fits)
    verdict = _verdict(fits, ranking, f_tests)
    sub_fit, sub_test = fit_substrate_inhibition(data, weights=weights) if np.count_nonzero(i == np.min(i)) >= 5 else (None, None)
    warnings = _design_warnings(data, fits, verdict, weights, sub_fit, sub_test)
    return ModelComparison(
        data=data,
        weights=weights,
        fits=fit_tuple,
        ranking=ranking,
        f_tests=f_tests,
        verdict=verdict,
        warnings=warnings,
        substrate_inhibition=sub_fit,
        substrate_inhibition_test=sub_test,
        level=level,
    )


def _step_hints(i: Array) -> float:
    nonzero = i[i > 0]
    return 1.0 / float(np.median(nonzero)) if nonzero.size else 1.0


def _mixed_starts(fits: dict[str, FitResult]) -> list[tuple[float, ...]]:
    out: list[tuple[float, ...]] = []
    if "competitive" in fits and fits["competitive"].success:
        vm, km, kc = fits["competitive"].theta
        out.append((vm, km, kc, 0.0))  # on the bound: stays there unless the data pull it off
    if "uncompetitive" in fits and fits["uncompetitive"].success:
        vm, km, ku = fits["uncompetitive"].theta
        out.append((vm, km, 0.0, ku))
    if "noncompetitive" in fits and fits["noncompetitive"].success:
        vm, km, k = fits["noncompetitive"].theta
        out.append((vm, km, k, k))
    return out


def _substrate_model(velocity_unit: str) -> CurveModel:
    def f(u: Array, s: Array) -> Array:
        return u[0] * s / (u[1] + s * (1.0 + s * u[2]))

    def jac(u: Array, s: Array) -> Array:
        d = u[1] + s * (1.0 + s * u[2])
        v = u[0] * s / d
        return np.column_stack((s / d, -v / d, -v * s**2 / d))

    def both(u: Array, s: Array) -> tuple[Array, Array]:
        d = u[1] + s * (1.0 + s * u[2])
        g = s / d
        v = u[0] * g
        out = np.empty((s.size, 3))
        out[:, 0] = g
        out[:, 1] = -v / d
        out[:, 2] = out[:, 1] * s**2
        return v, out

    return CurveModel(
        name="substrate-inhibition",
        parameters=("vmax", "km", "1/Ksi"),
        function=f,
        jacobian=jac,
        function_jacobian=both,
        lower=(0.0, 0.0, 0.0),
        upper=(math.inf,) * 3,
        reported=("value", "value", "inverse"),
        reported_names=("Vmax", "Km", "Ksi"),
        units=(velocity_unit, "uM", "uM"),
        equation="v = Vmax S / (Km + S (1 + S/Ksi))",
    )


def fit_substrate_inhibition(data: IncubationData, *, weights: str = "none") -> tuple[FitResult | None, FTest | None]:
    """Substrate inhibition on the uninhibited curve (rows at the lowest inhibitor level).

    Fits the Haldane form v = Vmax S/(Km + S(1 + S/Ksi)) and tests it against
    Michaelis-Menten on the same rows with the F test.  Returns (None, None)
    when there are too few rows or substrate levels.
    """
    s, i, v = data.arrays()
    base = i == np.min(i)
    sb, vb = s[base], v[base]
    if np.unique(sb).size < 4 or sb.size < 5:
        return None, None
    vmax, km = guess_michaelis_menten(sb, vb)
    model = _substrate_model(data.velocity_unit)
    starts = [(vmax, km, 0.1 / float(np.max(sb))), (vmax, km, 1.0 / float(np.max(sb)))]
    sub = fit_curve(model, sb, vb, starts, weights=weights)
    mm = fit_curve(inhibition_model("none", data.velocity_unit), np.vstack((sb, np.zeros_like(sb))), vb, [(vmax, km)], weights=weights)
    if not (sub.success and mm.success) or sub.df < 1:
        return sub, None
    return sub, _f_test("none", mm, "substrate-inhibition", sub)


def _f_test(reduced_name: str, reduced: FitResult, full_name: str, full: FitResult) -> FTest:
    from scipy.special import fdtrc

    df_num = reduced.df - full.df
    drop = max(reduced.rss - full.rss, 0.0)
    f_val = (drop / df_num) / (full.rss / full.df) if full.rss > 0 else math.inf
    p_val = float(fdtrc(df_num, full.df, f_val)) if math.isfinite(f_val) else 0.0
    return FTest(reduced=reduced_name, full=full_name, f=f_val, df_num=df_num, df_den=full.df, p_value=p_val)


def _f_tests(fits: dict[str, FitResult]) -> tuple[FTest, ...]:
    out = []
    for reduced, full in NESTED:
        if reduced in fits and full in fits and fits[reduced].success and fits[full].success:
            out.append(_f_test(reduced, fits[reduced], full, fits[full]))
    return tuple(out)


def _rank(fits: tuple[FitResult, ...]) -> tuple[RankedModel, ...]:
    ok = [f for f in fits if f.success and f.aicc < math.inf]
    if not ok:
        return ()
    best = min(f.aicc for f in ok)
    if best == -math.inf:  # exact fits (noise-free data): share the weight among them
        rel = [1.0 if f.aicc == best else 0.0 for f in ok]
    else:
        rel = [math.exp(-0.5 * (f.aicc - best)) for f in ok]
    total = sum(rel)
    ranked = [
        RankedModel(
            model=f.model,
            aicc=f.aicc,
            delta_aicc=0.0 if f.aicc == best else f.aicc - best,
            weight=r / total,
            bic=f.bic,
            rss=f.rss,
            n_params=f.n_params,
        )
        for f, r in zip(ok, rel, strict=True)
    ]
    return tuple(sorted(ranked, key=lambda r: r.aicc))


def _at_bound(fit: FitResult, name: str) -> bool:
    e = fit.estimate(name)
    return e.at_bound or e.value == math.inf


def _verdict(fits: dict[str, FitResult], ranking: tuple[RankedModel, ...], tests: tuple[FTest, ...]) -> Verdict:
    if not ranking:
        first = next(iter(fits.values()))
        return Verdict(
            model=first.model,
            mechanism=None,
            strength="none",
            support=0.0,
            text="No model could be fitted to these data; see the warnings.",
        )
    weight = {r.model: r.weight for r in ranking}
    best = ranking[0].model
    notes: list[str] = []
    unidentifiable: list[str] = []
    chosen = best
    support = weight[best]
    if best == "mixed":
        mixed = fits["mixed"]
        if _at_bound(mixed, "Kic") and "uncompetitive" in weight:
            chosen = "uncompetitive"
            unidentifiable.append("Kic")
            support = weight["mixed"] + weight["uncompetitive"]
            notes.append(
                "The mixed fit collapses onto the uncompetitive model: its competitive constant Kic runs to infinity "
                "(unbounded), so it is not identifiable."
            )
        elif _at_bound(mixed, "Kiu") and "competitive" in weight:
            chosen = "competitive"
            unidentifiable.append("Kiu")
            support = weight["mixed"] + weight["competitive"]
            notes.append(
                "The mixed fit collapses onto the competitive model: its uncompetitive constant Kiu runs to infinity "
                "(unbounded), so it is not identifiable."
            )
        else:
            simpler = [t for t in tests if t.full == "mixed" and not t.significant and t.reduced in weight]
            if simpler:
                pick = min(simpler, key=lambda t: fits[t.reduced].aicc)
                if weight[pick.reduced] > 0 and ranking[[r.model for r in ranking].index(pick.reduced)].delta_aicc < 2.0:
                    chosen = pick.reduced
                    support = weight[pick.reduced] + weight["mixed"]
                    notes.append(
                        f"The mixed model fits slightly better by AICc but not significantly better than {pick.reduced} "
                        f"(F test p = {pick.p_value:.2g}); the simpler mechanism is reported."
                    )
    elif best != "none" and "mixed" in fits and fits["mixed"].success:
        mixed = fits["mixed"]
        collapse = {"uncompetitive": "Kic", "competitive": "Kiu"}.get(best)
        if collapse and _at_bound(mixed, collapse):
            support = weight[best] + weight.get("mixed", 0.0)
            unidentifiable.append(collapse)
            notes.append(f"The mixed fit collapses onto this model ({collapse} unbounded).")
    if chosen == "none":
        alt = ranking[1].model if len(ranking) > 1 else None
        text = "No inhibition detected: the model without inhibition has the lowest AICc"
        text += f" (next: {alt}, delta AICc {ranking[1].delta_aicc:.1f})." if alt else "."
        return Verdict(model="none", mechanism=None, strength=_strength(support), support=support, text=text)
    fit = fits[chosen]
    strength = _strength(support)
    others = [r for r in ranking if r.model not in (chosen, "mixed" if unidentifiable or chosen != best else "")]
    runner = others[0] if others else None
    text = f"{LABELS[chosen].capitalize()} inhibition: {strength} support (Akaike weight {support:.2f})"
    if runner is not None:
        delta = runner.aicc - fits[chosen].aicc
        if math.isfinite(delta):
            text += f"; next best {LABELS[runner.model]} at delta AICc {delta:.1f}"
        else:
            text += f"; {LABELS[runner.model]} fits exactly too (noise-free data cannot separate them)"
    text += "."
    if strength == "weak" and runner is not None:
        text += (
            f" The data do not clearly separate {chosen} from {runner.model}; more substrate levels around Km and "
            "inhibitor levels around Ki would help."
        )
    for name in ("Ki", "Kic", "Kiu"):
        if name in fit.names:
            e = fit.estimate(name)
            if e.at_bound and math.isfinite(e.value) and name not in unidentifiable:
                unidentifiable.append(name)
                notes.append(f"{name} ran to zero and stopped at the fitting cap: the {chosen} model degenerates on these data.")
            elif e.profile_high == math.inf and name not in unidentifiable:
                unidentifiable.append(name)
                notes.append(
                    f"{name} has no upper confidence limit (profile never crosses): inhibition is too weak at the "
                    f"concentrations tested to bound it."
                )
    if notes:
        text += " " + " ".join(notes)
    return Verdict(model=chosen, mechanism=chosen, strength=strength, support=support, text=text, unidentifiable=tuple(unidentifiable))


def _strength(weight: float) -> str:
    """Words for an Akaike weight (thresholds are this tool's convention)."""
    if weight >= 0.9:
        return "strong"
    if weight >= 0.7:
        return "moderate"
    return "weak"


def _lines(data: IncubationData, idx: Sequence[int]) -> str:
    shown = [str(data.line_of(k)) for k in idx[:8]]
    return ", ".join(shown) + (" ..." if len(idx) > 8 else "")


def _design_warnings(
    data: IncubationData,
    fits: dict[str, FitResult],
    verdict: Verdict,
    weights: str,
    sub_fit: FitResult | None,
    sub_test: FTest | None,
) -> tuple[str, ...]:
    out: list[str] = []
    s, i, v = data.arrays()
    for f in fits.values():
        if not f.success:
            out.append(f"The {f.model} fit did not converge ({f.message}); it is left out of the comparison.")
    chosen = fits.get(verdict.model)
    km = chosen.value("Km") if chosen is not None and chosen.success else math.nan
    if math.isfinite(km) and km > 0:
        if s.min() > km:
            out.append(
                f"Lowest substrate concentration {s.min():.3g} uM is above Km ({km:.3g} uM): Km and the mechanism are "
                f"poorly defined; include concentrations below Km."
            )
        elif s.max() < km:
            out.append(
                f"Highest substrate concentration {s.max():.3g} uM is below Km ({km:.3g} uM): Vmax and the mechanism "
                f"are poorly defined; include concentrations above Km."
            )
        elif s.min() > 0.5 * km or s.max() < 2.0 * km:
            out.append(
                f"Substrate range {s.min():.3g}-{s.max():.3g} uM spans {s.min() / km:.2g}-{s.max() / km:.2g} x Km; "
                "about 0.2-5 x Km separates the mechanisms better (common practice)."
            )
    levels = np.unique(i[i > 0])
    if not np.any(i == 0):
        out.append("No control rows without inhibitor: the uninhibited curve is not measured directly.")
    if levels.size < 3:
        out.append(f"Only {levels.size} inhibitor level(s) above zero; at least 3 spanning Ki are common practice for a reliable Ki.")
    est = None
    if chosen is not None:
        for name in ("Ki", "Kic", "Kiu"):
            if name in chosen.names and math.isfinite(chosen.value(name)):
                est = chosen.estimate(name)
                break
    if est is not None and levels.size and levels.max() < est.value:
        out.append(
            f"Highest inhibitor concentration {levels.max():.3g} uM is below {est.name} ({est.value:.3g} uM): "
            f"inhibition is slight and {est.name} is poorly defined."
        )
    if data.depletion_pct is not None:
        dep = np.asarray(data.depletion_pct)
        hi = np.flatnonzero(dep > DEPLETION_KINETIC_PCT)
        if hi.size:
            worst = float(dep.max())
            limit = " and above the 20 % limit (FDA, from memory)" if worst > DEPLETION_LIMIT_PCT else ""
            out.append(
                f"Substrate depletion above 10 % on {hi.size} row(s) (lines {_lines(data, hi.tolist())}; up to "
                f"{worst:.3g} %){limit}: "
                "initial-rate conditions are doubtful there ([@lee2024]: keep turnover below 10 % for kinetic constants)."
            )
    else:
        out.append("No depletion column: substrate turnover was not checked (keep it below 10 % for kinetic constants, [@lee2024]).")
    if chosen is not None and chosen.success:
        t = np.asarray(chosen.studentized)
        flagged = np.flatnonzero(np.abs(t) > OUTLIER_T)
        if flagged.size:
            detail = "; ".join(f"line {data.line_of(k)}: v = {v[k]:g}, t = {t[k]:.1f}" for k in flagged[:6])
            out.append(f"Possible outlier(s) by externally studentised residual |t| > {OUTLIER_T:g} in the {chosen.model} fit: {detail}.")
    if sub_fit is not None and sub_test is not None and sub_test.significant and math.isfinite(sub_fit.value("Ksi")):
        out.append(
            f"Velocity falls at high substrate without inhibitor: substrate inhibition (Ksi {sub_fit.value('Ksi'):.3g} uM, "
            f"F test p = {sub_test.p_value:.2g}); the inhibition models assume none."
        )
    if weights == "poisson":
        out.append("With Poisson-like weights the weights depend on the fit, so AICc and F tests are approximate.")
    if weights in ("1/y", "1/y2") and np.any(v <= 0):
        out.append("Rows with zero velocity cannot be weighted by 1/y.")
    return tuple(out)
