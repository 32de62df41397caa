"""The interaction model, written once: site concentrations to the victim's AUC ratio.

Net-effect mechanistic static model (Fahmi et al., Drug Metab Dispos 2008;36:1698; structure seen
in Guengerich 2022, Fig. 17; the equations below are from memory, algebra checked).  For each
target t that clears the victim, the fraction of its activity that remains at a site is the
product of three terms, named by meaning, summed over the perpetrator's constants j on t:

- reversible   = 1 / (1 + sum_j [I]_j / Ki,u,j)
- inactivation = kdeg / (kdeg + sum_j kinact_j [I]_j / (KI,u,j + [I]_j))
- induction    = 1 + sum_j d_j Emax_j [I]_j / (EC50,u,j + [I]_j)

and the organ ratios are

- liver: AUCR_h = 1 / (sum_e fm_e x activity_h,e + (1 - sum_e fm_e))    ("fraction" form)
- gut:   AUCR_g = 1 / (activity_g x (1 - Fg) + Fg), for the gut-wall enzyme (CYP3A)   ("availability" form)
- total: AUCR = AUCR_g x AUCR_h  (the product over :data:`ORGANS` in their order)

with [I] at the liver the unbound hepatic inlet concentration Iin,max,u and at the gut the
enterocyte concentration I,ent (see :mod:`interact.exposure`).

**Arrays.** Every number may be a Python float or a numpy array; arrays broadcast against each other, so one
call evaluates one scenario (floats: ``assess``), samples (a leading sample axis:
:class:`interact.uncertainty.ScenarioModel`) or pairs (perpetrators along axis 0, victims along
axis 1: :func:`interact.batch.pair_ratios`).  What acts on what is structure, given as tuples
(one :class:`Acting` per perpetrator constant, one :class:`Pathway` per victim pathway); the sums
over constants and over pathways run in that order, term by term, so that every caller gets the
same result to the last bit.  An absent constant is ``None`` (structure); a constant absent for
some rows of an array only is given as ``inf`` for Ki,u (its term is then exactly 0).

**Adding a pathway kind or an organ** (for example transporters: intestinal efflux, hepatic uptake,
renal secretion, and a kidney ratio) is data, not a new code path:

1. a site is a name in the ``concentrations`` mapping given to :func:`evaluate`, holding one
   unbound concentration per perpetrator species ("liver" = Iin,max,u, "gut" = I,ent; add for
   example "systemic" = Imax,u);
2. an organ is an entry of :data:`ORGANS`: the site its pathways see and the form of its ratio
   (``"fraction"``: 1/(sum f x activity + 1 - sum f); ``"availability"``: 1/(activity x (1 - F) + F));
   a kidney is ``Organ(site="systemic", form="fraction")`` with the renal fractions as pathways;
   the total is the product of the organ ratios in the order of :data:`ORGANS`;
3. a victim pathway is a :class:`Pathway` (target index, organ name, fraction): a transporter
   route is a pathway whose target is the transporter; the perpetrator's constants on that
   target (an :class:`Acting` with the same target index) act on it at the organ's site.
   A new organ form (one the two above do not express) is one more branch in :func:`organ_ratio`.

**Transporter routes** (:mod:`interact.transporters`, issue 13) are such data.  Intestinal efflux is a
pathway of the gut organ whose fraction is the availability it governs (1 - the fraction of the oral
dose it returns to the lumen); several gut pathways are parallel losses of one dose,
1/(sum (1 - F) x activity + 1 - sum (1 - F)), which for the one CYP3A pathway is the form above.
Hepatic uptake is a liver pathway (a fraction of systemic clearance).  Renal secretion is a pathway of
the kidney organ (site "kidney" = Imax,u), whose form ``"shared"`` makes its ratio the factor it adds to
the liver's: liver and kidney share one systemic clearance, so liver x kidney = 1/(sum over both of
f x activity + 1 - sum f) exactly.  With the hepatic clearances given, the liver organ has the form
``"extended"`` (:class:`Organ` carries PS_inf, PS_eff, CLmet, CLbile and the hepatic fraction): its
"uptake" pathways are shares of PS_inf, the others shares of CLmet, and the activity of the hepatic
fraction is CLint,all with the precipitant over CLint,all without
(:func:`interact.transporters.extended_clearance_activity`).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any, Final, NamedTuple

from .transporters import extended_clearance_activity

__all__ = [
    "MECHANISMS",
    "ORGANS",
    "Acting",
    "Bound",
    "Evaluation",
    "Model",
    "Organ",
    "Pathway",
    "Terms",
    "evaluate",
    "organ_ratio",
    "remaining",
]

#: the mechanisms, each of which can be switched off (the mechanism parts of a prediction)
MECHANISMS: Final = ("reversible", "time-dependent", "induction")


@dataclass(frozen=True, slots=True, kw_only=True)
class Organ:
    """An organ's ratio: the site whose concentrations its pathways see, and the form of the ratio."""

    site: str
    form: str  # "fraction", "availability", "shared" (the factor added to the organ ``shares``) or "extended"
    shares: str | None = None  # "shared": the organ whose systemic clearance it shares
    clearances: tuple[Any, Any, Any, Any] | None = None  # "extended": PS_inf, PS_eff, CLmet, CLbile (one unit)
    fraction: Any = 1.0  # "extended": the organ's share of systemic clearance


#: the organs, in the order of the product that gives the total ratio
ORGANS: Final[Mapping[str, Organ]] = {
    "gut": Organ(site="gut", form="availability"),
    "liver": Organ(site="liver", form="fraction"),
    "kidney": Organ(site="kidney", form="shared", shares="liver"),
}


class Acting(NamedTuple):
    """One unbound constant of the perpetrator on one target (uM, 1/h; ``None`` where not given).

    Immutable records (named tuples rather than frozen dataclasses: a scenario builds them on every call,
    and a named tuple is built about four times faster).
    """

    target: int  # index of the target it acts on
    species: int  # index of the perpetrator species whose concentrations it sees
    ki_u: Any = None
    kinact: Any = None
    ki_inact_u: Any = None
    emax: Any = None
    ec50_u: Any = None
    calibration: Any = 1.0


class Pathway(NamedTuple):
    """One pathway of the victim: the target it depends on, in which organ, with which fraction.

    ``fraction`` is fm for a "fraction" organ and the availability (Fg) for an "availability" organ;
    ``scale`` (a phenotype's activity) multiplies fm in the weighted sum, not in (1 - sum fm).
    """

    target: int
    organ: str
    fraction: Any
    scale: Any = None
    role: str = ""  # "uptake": a share of PS_inf in an "extended" organ


class Terms(NamedTuple):
    """The three terms for one target at one site (each a float or an array)."""

    reversible: Any
    inactivation: Any
    induction: Any

    @property
    def activity(self) -> Any:
        return self.reversible * self.inactivation * self.induction


class Evaluation(NamedTuple):
    """The organ ratios, their product and the terms they came from (keyed by (target, site))."""

    organs: dict[str, Any]
    total: Any
    terms: dict[tuple[int, str], Terms]

    @property
    def gut(self) -> Any:
        return self.organs["gut"]

    @property
    def liver(self) -> Any:
        return self.organs["liver"]

    @property
    def kidney(self) -> Any:
        return self.organs["kidney"]


def reversible(sum_ratio: Any) -> Any:
    """1/(1 + sum [I]/Ki,u) on floats or arrays."""
    return 1.0 / (1.0 + sum_ratio)


def inactivation(kobs_per_h: Any, kdeg_per_h: Any) -> Any:
    """kdeg/(kdeg + kobs) on floats or arrays."""
    return kdeg_per_h / (kdeg_per_h + kobs_per_h)


def induction(effect: Any, calibration: Any = 1.0) -> Any:
    """1 + d x effect on floats or arrays."""
    return 1.0 + calibration * effect


def _switches(include: Sequence[str]) -> tuple[bool, bool, bool]:
    return ("reversible" in include, "time-dependent" in include, "induction" in include)


_ALL_ON: Final = (True, True, True)


_FORMS: Final = ("fraction", "availability", "shared", "extended")


def _weighted(weights: Sequence[Any], activities: Sequence[Any], where: Sequence[int]) -> Any:
    """sum f x activity, in pathway order (``weights`` from :func:`_prepare`: f scaled by a phenotype's activity; the
    activity of pathway k at ``activities[where[k]]``)."""
    weighted: Any = None
    for f, k in zip(weights, where, strict=True):
        weighted = f * activities[k] if weighted is None else weighted + f * activities[k]
    return weighted


def remaining(pathways: Sequence[Pathway], activities: Sequence[Any]) -> Any:
    """The share of a clearance the precipitant leaves: sum f x activity + (1 - sum f) (1 without pathways)."""
    if not pathways:
        return 1.0
    _, weights, f_sum = _prepare("fraction", pathways)
    return _weighted(weights, activities, range(len(pathways))) + (1.0 - f_sum)


def organ_ratio(form: str, pathways: Sequence[Pathway], activities: Sequence[Any], *, base: Any = 1.0, organ: Organ | None = None) -> Any:
    """One organ's AUC ratio from its pathways and the activity left on each, in pathway order.

    ``"fraction"``: 1/(sum f x activity + (1 - sum f)), with (1 - sum f) added after the weighted sum
    (exact when sum f = 1, however small the activity); ``"availability"``: 1/(activity x (1 - F) + F)
    for the organ's one pathway, and for several (parallel losses of one dose, loss = 1 - F)
    1/(sum loss x activity + (1 - sum loss)); ``"shared"``: the factor the organ adds to ``base``, the ratio
    of the organ whose clearance it shares, 1/(1 - base x sum f (1 - activity)); ``"extended"``: the
    extended clearance concept with ``organ``'s clearances (see the module notes).  An organ without
    pathways has a ratio of exactly 1.
    """
    if form not in _FORMS:
        raise ValueError(f"organ form {form!r}: expected one of {', '.join(_FORMS)}")
    if not pathways:
        return 1.0
    if len(activities) != len(pathways):
        raise ValueError(f"{len(activities)} activities for {len(pathways)} pathways: expected one per pathway")
    return _apply(_prepare(form, pathways), activities, range(len(pathways)), base, organ)


#: what an organ's ratio needs of its pathways, worked out once (:func:`_prepare`): (kind, weights, sum)
_Prepared = tuple[str, tuple[Any, ...], Any]


def _prepare(form: str, pathways: Sequence[Pathway]) -> _Prepared:
    """An organ's pathways reduced to what its ratio needs (a Model does this once, not per evaluation).

    "one" (availability, one pathway): the weight 1 - F and F; "fraction" and "shared": the weights f x scale and
    sum f, in pathway order (several availability pathways are losses 1 - F of the fraction form); "extended": the
    pathways themselves.
    """
    if form == "availability" and len(pathways) == 1:
        (pw,) = pathways
        return "one", (1.0 - pw.fraction,), pw.fraction
    if form == "extended":
        return form, tuple(pathways), None
    if form == "availability":
        form, pathways = "fraction", [pw._replace(fraction=1.0 - pw.fraction) for pw in pathways]
    f_sum: Any = None
    for pw in pathways:
        f_sum = pw.fraction if f_sum is None else f_sum + pw.fraction
    return form, tuple(pw.fraction if pw.scale is None else pw.fraction * pw.scale for pw in pathways), f_sum


def _apply(prepared: _Prepared, activities: Sequence[Any], where: Sequence[int], base: Any, organ: Organ | None) -> Any:
    """The organ ratio from :func:`_prepare` and the activity of each pathway, pathway k's at ``activities[where[k]]``
    (the arithmetic of every form, once)."""
    kind, weights, f_sum = prepared
    if kind == "one":
        return 1.0 / (activities[where[0]] * weights[0] + f_sum)
    if kind == "extended":
        activities = [activities[k] for k in where]
        if organ is None or organ.clearances is None:
            raise ValueError("an 'extended' organ needs its clearances")
        uptake = [(pw, a) for pw, a in zip(weights, activities, strict=True) if pw.role == "uptake"]
        other = [(pw, a) for pw, a in zip(weights, activities, strict=True) if pw.role != "uptake"]
        left = [remaining([p for p, _ in part], [a for _, a in part]) for part in (uptake, other)]
        act = extended_clearance_activity(*organ.clearances, left[0], left[1])
        return organ_ratio("fraction", (Pathway(target=-1, organ="liver", fraction=organ.fraction),), (act,))
    weighted = _weighted(weights, activities, where)
    if kind == "shared":
        return 1.0 / (1.0 - base * (f_sum - weighted))
    return 1.0 / (weighted + (1.0 - f_sum))


#: one site's constants bound to its concentrations: (conc, Ki,u) pairs, (conc, kinact, KI,u) triples,
#: (conc, d x Emax, EC50,u) triples, each in the constants' order, and the site's kdeg (None: unknown)
_Site = tuple[tuple[tuple[Any, Any], ...], tuple[tuple[Any, Any, Any], ...], tuple[tuple[Any, Any, Any], ...], Any]


class Model:
    """The structure of the model for one set of constants and pathways, built once, evaluated many times.

    Which constants act on each pathway's target, and at which site, is worked out here; :meth:`bind`
    then gives it the concentrations (a :class:`Bound`, which does only the arithmetic: a perpetrator-dose
    scan evaluates the same inputs at many scales).
    """

    __slots__ = ("_organs", "_sites")

    def __init__(self, acting: Sequence[Acting], pathways: Sequence[Pathway], organs: Mapping[str, Organ] = ORGANS) -> None:
        """``organs``: :data:`ORGANS` unless an organ takes scenario data (the liver's clearances, form "extended")."""
        on: dict[int, list[Acting]] = {}
        for c in acting:
            on.setdefault(c.target, []).append(c)
        for pw in pathways:
            if pw.organ not in organs:
                raise ValueError(f"pathway organ {pw.organ!r}: expected one of {', '.join(organs)}")
        sites: dict[tuple[int, str], int] = {}  # (target, site) -> position of its terms, each computed once
        built = []
        for name, organ in organs.items():
            if organ.form not in _FORMS:
                raise ValueError(f"organ {name}: form {organ.form!r}, expected one of {', '.join(_FORMS)}")
            mine = [pw for pw in pathways if pw.organ == name]
            where = [sites.setdefault((pw.target, organ.site), len(sites)) for pw in mine]
            built.append((name, organ, _prepare(organ.form, mine) if mine else None, tuple(where)))
        self._organs = tuple(built)
        self._sites = tuple([(key, tuple(on.get(key[0], ()))) for key in sites])

    def evaluate(
        self,
        concentrations: Mapping[str, Sequence[Any]],
        kdeg_per_h: Mapping[tuple[int, str], Any],
        *,
        include: Sequence[str] = MECHANISMS,
        scale: Any = None,
    ) -> Evaluation:
        """The organ ratios and the total (arguments as for :func:`evaluate`)."""
        return self.bind(concentrations, kdeg_per_h).evaluate(include=include, scale=scale)

    def total(self, concentrations: Mapping[str, Sequence[Any]], kdeg_per_h: Mapping[tuple[int, str], Any], scale: Any = None) -> Any:
        """The total ratio alone, every mechanism on (the perpetrator-dose scan)."""
        return self.bind(concentrations, kdeg_per_h).total(scale)

    def bind(self, concentrations: Mapping[str, Sequence[Any]], kdeg_per_h: Mapping[tuple[int, str], Any]) -> Bound:
        """The model with its inputs (arguments as for :func:`evaluate`), ready to evaluate at any scale."""
        sites = []
        for key, on in self._sites:
            site = concentrations[key[1]]
            sites.append(
                (
                    tuple([(site[c.species], c.ki_u) for c in on if c.ki_u is not None]),
                    tuple([(site[c.species], c.kinact, c.ki_inact_u) for c in on if c.kinact is not None and c.ki_inact_u is not None]),
                    # d x Emax multiplied once: the same product as (d x Emax) x [I] in the loop
                    tuple([(site[c.species], c.calibration * c.emax, c.ec50_u) for c in on if c.emax is not None and c.ec50_u is not None]),
                    kdeg_per_h.get(key),
                )
            )
        return Bound(self, tuple(sites))

    def _combine(self, acts: Sequence[Any]) -> tuple[dict[str, Any], Any]:
        """The organ ratios from the activity at each (target, site), and their product."""
        organs: dict[str, Any] = {}
        total: Any = None
        for name, organ, prepared, where in self._organs:
            if prepared is None:  # no pathways: exactly 1
                value = 1.0
            else:
                value = _apply(prepared, acts, where, organs.get(organ.shares, 1.0) if organ.shares else 1.0, organ)
            organs[name] = value
            total = value if total is None else total * value
        return organs, total

    def ceilings(self, inhibited: set[int]) -> tuple[dict[str, Any], Any]:
        """The organ ratios and total with every target in ``inhibited`` completely inhibited (activity 0), the rest
        untouched: the complete-inhibition ceilings, from the same organ forms."""
        acts = [0.0 if key[0] in inhibited else 1.0 for key, _ in self._sites]
        return self._combine(acts)


class Bound:
    """A :class:`Model` with its concentrations and kdeg bound (:meth:`Model.bind`): only the arithmetic is left."""

    __slots__ = ("_model", "_sites")

    def __init__(self, model: Model, sites: tuple[_Site, ...]) -> None:
        self._model = model
        self._sites = sites

    def evaluate(self, *, include: Sequence[str] = MECHANISMS, scale: Any = None) -> Evaluation:
        """The organ ratios, the total and the terms (``include``, ``scale`` as for :func:`evaluate`)."""
        terms, acts = self._terms(include, scale, True)
        organs, total = self._model._combine(acts)
        return Evaluation(organs, total, {key: Terms(*t) for (key, _), t in zip(self._model._sites, terms, strict=True)})

    def total(self, scale: Any = None) -> Any:
        """The total ratio alone, every mechanism on; the same arithmetic as :meth:`evaluate`, to the last bit
        (a scalar dose scan calls it some 14 times per scenario)."""
        return self._model._combine(self._terms(MECHANISMS, scale, False)[1])[1]

    def _terms(self, include: Sequence[str], scale: Any, keep: bool) -> tuple[list[tuple[Any, Any, Any]], list[Any]]:
        """(reversible, inactivation, induction) per site when ``keep``, and their products, the activities (plain
        loops: a scalar dose scan runs this some 14 times per scenario)."""
        rev_on, tdi_on, ind_on = _ALL_ON if include is MECHANISMS else _switches(include)
        out = []
        acts = []
        for rev, tdi, ind, kdeg in self._sites:
            ratio = kobs = effect = None
            if rev_on:
                for conc, ki in rev:  # sums over the constants on this target, in their order
                    conc = conc if scale is None else scale * conc
                    ratio = conc / ki if ratio is None else ratio + conc / ki
            if tdi_on and kdeg is not None:
                for conc, kinact, ki_inact in tdi:
                    conc = conc if scale is None else scale * conc
                    k = kinact * conc / (ki_inact + conc)
                    kobs = k if kobs is None else kobs + k
            if ind_on:
                for conc, d_emax, ec50 in ind:
                    conc = conc if scale is None else scale * conc
                    e = d_emax * conc / (ec50 + conc)
                    effect = e if effect is None else effect + e
            r = 1.0 if ratio is None else reversible(ratio)
            i = 1.0 if kobs is None else inactivation(kobs, kdeg)
            d = 1.0 if effect is None else 1.0 + effect
            if keep:
                out.append((r, i, d))
            acts.append(r * i * d)
        return out, acts


def evaluate(
    acting: Sequence[Acting],
    pathways: Sequence[Pathway],
    concentrations: Mapping[str, Sequence[Any]],
    kdeg_per_h: Mapping[tuple[int, str], Any],
    *,
    include: Sequence[str] = MECHANISMS,
    scale: Any = None,
) -> Evaluation:
    """The victim's organ ratios and total AUC ratio.

    Parameters
    ----------
    acting
        The perpetrator's unbound constants, each on a target index.
    pathways
        The victim's pathways, each on a target index in an organ of :data:`ORGANS`.
    concentrations
        site -> unbound concentration (uM) of each perpetrator species at that site.
    kdeg_per_h
        (target, site) -> the target's degradation rate constant (1/h) there; missing or ``None``: unknown.
    include
        The mechanisms switched on (all by default; a subset gives a mechanism part).
    scale
        Multiplier on every concentration (perpetrator-dose scan); ``None`` for none.
    """
    return Model(acting, pathways).evaluate(concentrations, kdeg_per_h, include=include, scale=scale)
