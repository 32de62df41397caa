"""NIST StRD nonlinear suite: 27 problems x 2 starts, digits reached by interact's fit_curve and by scipy.

Run by hand: ``python tests/bench/bench_nist.py``.  Prints, per run, the smallest log relative error (LRE) over
the parameters for interact (finite-difference Jacobian, as a user's model without one gets), scipy
``least_squares`` method ``lm`` and ``trf`` (2-point and 3-point finite-difference Jacobians, tolerances 1e-15), and the count of runs
with at least 6 correct digits.  Certified values: NIST/ITL StRD (tests/data/nist_strd).
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np
from scipy.optimize import least_squares

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "kinetics"))
import nist

from interact.kinetics.engine import CurveModel, fit_curve


def digits(theta, cert) -> float:  # type: ignore[no-untyped-def]
    return min(nist.lre(float(a), float(b)) if np.isfinite(a) else 0.0 for a, b in zip(theta, cert, strict=True))


def main() -> None:
    methods = (("lm", "2-point"), ("trf", "2-point"), ("lm", "3-point"), ("trf", "3-point"))
    keys = [f"{m}/{j[0]}pt" for m, j in methods]
    counts = dict.fromkeys(["interact", *keys], 0)
    times = dict.fromkeys(["interact", *keys], 0.0)
    for name, f in nist.MODELS.items():
        p = nist.read(name)
        row = [f"{name:9s}"]
        for k, start in enumerate(p.starts):
            model = CurveModel(name=name, parameters=tuple(f"b{j + 1}" for j in range(len(start))), function=f)
            t0 = time.perf_counter()
            res = fit_curve(model, p.x, p.y, [start])
            times["interact"] += time.perf_counter() - t0
            d = {"interact": digits(res.theta, p.certified) if res.success else 0.0}
            for key, (method, jac) in zip(keys, methods, strict=True):
                t0 = time.perf_counter()
                try:
                    r = least_squares(
                        lambda b, f=f, p=p: f(b, p.x) - p.y,
                        start,
                        jac=jac,
                        method=method,
                        xtol=1e-15,
                        ftol=1e-15,
                        gtol=1e-15,
                        max_nfev=20000,
                    )
                    d[key] = digits(r.x, p.certified)
                except (ValueError, np.linalg.LinAlgError):
                    d[key] = 0.0
                times[key] += time.perf_counter() - t0
            for key, val in d.items():
                counts[key] += val >= 6
            row.append(f"start {k + 1}: " + " ".join(f"{key} {val:4.1f}" for key, val in d.items()))
        print("  ".join(row))
    print("runs with >= 6 digits (of 54):", counts)
    print("total seconds:", {k: round(v, 2) for k, v in times.items()})


if __name__ == "__main__":
    main()
