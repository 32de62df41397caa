"""Benchmark (run by hand, not a test): cold start and assess() latency.

    python tests/bench/bench_core.py

Cold start of `interact demo --format json` (a fresh process) as a ratio to
`python -c "import numpy, pint; pint.UnitRegistry()"` measured in the same run
(goal: at most 1.0), and the in-process median latency of assess() on the
demo scenario (goal: under 1 ms), with its ratio to a plain-float floor measured
in the same run, alternated (goal: at most 10x).

The floor does the demo's arithmetic in plain Python floats from its canonical
inputs (already converted numbers, read once from an Assessment; Ki after any
IC50 conversion): fu,p floor, Imax,u, Iin,max,u and I,ent, Ki,u = Ki x fu,inc,
the basic R1 value per target, the gut and liver ratios of the net-effect model,
the perpetrator-dose ceiling by the same bracketing and Illinois root search, and
the class band.  It reads no file, converts no unit, builds no record and writes
no text: what assess() does beyond it is validation of the path taken,
provenance, warnings, the dose advice and its text.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import time


def _cold(cmd: list[str], runs: int) -> float:
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def _floor_inputs(a):  # type: ignore[no-untyped-def]
    """The demo's canonical numbers, read once (reversible inhibition only, as the demo is)."""
    s = {st.name: st.value for st in a.settings}
    p, v = a.scenario.perpetrator, a.scenario.victim
    species = [
        (sp.cmax_um, fu, sp.is_parent, sp.dose_umol)
        for sp, fu in zip(a.species, [p.fu_plasma, *(m.fu_plasma for m in p.metabolites)], strict=True)
    ]
    from interact.tables import load_classes

    consts = [(c.target, c.species_index, c.ki_um, c.fu_inc) for c in a.constants if c.ki_um is not None]
    floor_fu = float(a.rules.fu_plasma_floor.value)
    upper = a.dose.boundary[1]
    bands = [(b.bound, b.name) for b in sorted(load_classes().inhibition, key=lambda b: -b.bound)]
    return {
        "s": s,
        "species": species,
        "consts": consts,
        "fu_floor": floor_fu,
        "pathways": [(pw.enzyme, pw.fm) for pw in v.pathways],
        "fg": v.fg,
        "gut": a.prediction.gut_enzyme,
        "upper": upper,
        "bands": bands,
    }


def _floor(d):  # type: ignore[no-untyped-def]
    """Plain floats: the demo's concentrations, constants, basic R1, model ratios, dose ceiling and band."""
    s = d["s"]
    inlet, ent, imax = [], [], []
    for cmax, fu, parent, dose in d["species"]:
        fu = max(fu, d["fu_floor"])
        imax_u = fu * cmax
        imax.append(imax_u)
        if parent:
            inlet.append(fu * (cmax + s["fa_fg"] * s["absorption_rate"] * dose / (s["hepatic_blood_flow"] * s["blood_plasma_ratio"])))
            ent.append(s["fu_gut"] * s["fraction_absorbed"] * s["absorption_rate"] * dose / s["enterocytic_blood_flow"])
        else:
            inlet.append(imax_u)
            ent.append(imax_u)
    ki_u = [(t, j, ki * fu_inc) for t, j, ki, fu_inc in d["consts"]]
    r1 = {}
    for t, j, k in ki_u:
        r1[t] = r1.get(t, 1.0) + imax[j] / k

    def total(scale: float) -> float:
        def act(target: str, conc: list[float]) -> float:
            ratio = 0.0
            for t, j, k in ki_u:
                if t == target:
                    ratio += scale * conc[j] / k
            return 1.0 / (1.0 + ratio)

        weighted = fm_sum = 0.0
        for e, fm in d["pathways"]:
            weighted += fm * act(e, inlet)
            fm_sum += fm
        gut = 1.0
        if d["gut"] is not None:
            fg = d["fg"]
            gut = 1.0 / (act(d["gut"], ent) * (1.0 - fg) + fg)
        return gut / (weighted + (1.0 - fm_sum))

    aucr = total(1.0)
    upper = d["upper"]
    lo, hi = 0.0, 1.0
    while total(hi) < upper and hi < 1e40:
        lo, hi = hi, hi * 4.0
    f_lo, f_hi = total(lo) - upper, total(hi) - upper
    side, mid = 0, hi
    for _ in range(200):
        mid = (lo * f_hi - hi * f_lo) / (f_hi - f_lo)
        f_mid = total(mid) - upper
        if f_mid == 0.0 or hi - lo <= 1e-12 * hi:
            break
        if (f_mid > 0) == (f_hi > 0):
            hi, f_hi = mid, f_mid
            f_lo = f_lo / 2.0 if side == -1 else f_lo
            side = -1
        else:
            lo, f_lo = mid, f_mid
            f_hi = f_hi / 2.0 if side == 1 else f_hi
            side = 1
    band = next((name for bound, name in d["bands"] if aucr >= bound), None)
    return aucr, (mid, band, r1)


def main() -> None:
    runs = 7
    floor = _cold([sys.executable, "-c", "import numpy, pint; pint.UnitRegistry()"], runs)
    tool = _cold([sys.executable, "-m", "interact", "demo", "--format", "json"], runs)
    print(f"cold start: interact demo --format json {tool * 1e3:.0f} ms; numpy+pint floor {floor * 1e3:.0f} ms; ratio {tool / floor:.2f}")

    from interact import assess, load_scenario
    from interact.scenario import demo_path

    s = load_scenario(demo_path())
    a = assess(s)
    d = _floor_inputs(a)
    aucr, _ = _floor(d)
    lat, flo = [], []
    for _ in range(2000):  # alternated: a change in machine load affects both alike
        t0 = time.perf_counter()
        assess(s)
        t1 = time.perf_counter()
        _floor(d)
        t2 = time.perf_counter()
        lat.append(t1 - t0)
        flo.append(t2 - t1)
    lat.sort()
    med, fmed = statistics.median(lat), statistics.median(flo)
    print(f"assess(): median {med * 1e3:.3f} ms, p95 {lat[int(0.95 * len(lat))] * 1e3:.3f} ms over {len(lat)} calls")
    print(
        f"plain-float floor (same arithmetic, AUCR {aucr:.6g} vs assess {a.prediction.total:.6g}): median {fmed * 1e6:.1f} us; "
        f"assess() is {med / fmed:.1f}x the floor (goal <= 10x)"
    )


if __name__ == "__main__":
    main()
