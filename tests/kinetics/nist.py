"""The 27 NIST StRD nonlinear regression problems: reading the .dat files and the published model formulas.

Source: NIST/ITL Statistical Reference Datasets, nonlinear regression
(https://www.itl.nist.gov/div898/strd/nls/nls_main.shtml); files in tests/data/nist_strd (NIST's own format).
Each model below is the formula printed in its file's header; Nelson's response is log(y), as there.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import numpy as np

DIR = Path(__file__).resolve().parents[1] / "data" / "nist_strd"
Array = np.ndarray


def _rational3(b: Array, x: Array) -> Array:
    return (b[0] + b[1] * x + b[2] * x**2 + b[3] * x**3) / (1 + b[4] * x + b[5] * x**2 + b[6] * x**3)


def _gauss(b: Array, x: Array) -> Array:
    return b[0] * np.exp(-b[1] * x) + b[2] * np.exp(-((x - b[3]) ** 2) / b[4] ** 2) + b[5] * np.exp(-((x - b[6]) ** 2) / b[7] ** 2)


def _lanczos(b: Array, x: Array) -> Array:
    return b[0] * np.exp(-b[1] * x) + b[2] * np.exp(-b[3] * x) + b[4] * np.exp(-b[5] * x)


MODELS: dict[str, Callable[[Array, Array], Array]] = {
    "Misra1a": lambda b, x: b[0] * (1 - np.exp(-b[1] * x)),
    "Chwirut2": lambda b, x: np.exp(-b[0] * x) / (b[1] + b[2] * x),
    "Chwirut1": lambda b, x: np.exp(-b[0] * x) / (b[1] + b[2] * x),
    "Lanczos3": _lanczos,
    "Gauss1": _gauss,
    "Gauss2": _gauss,
    "DanWood": lambda b, x: b[0] * x ** b[1],
    "Misra1b": lambda b, x: b[0] * (1 - (1 + b[1] * x / 2) ** (-2)),
    "Kirby2": lambda b, x: (b[0] + b[1] * x + b[2] * x**2) / (1 + b[3] * x + b[4] * x**2),
    "Hahn1": _rational3,
    "Nelson": lambda b, x: b[0] - b[1] * x[0] * np.exp(-b[2] * x[1]),
    "MGH17": lambda b, x: b[0] + b[1] * np.exp(-x * b[3]) + b[2] * np.exp(-x * b[4]),
    "Lanczos1": _lanczos,
    "Lanczos2": _lanczos,
    "Gauss3": _gauss,
    "Misra1c": lambda b, x: b[0] * (1 - (1 + 2 * b[1] * x) ** (-0.5)),
    "Misra1d": lambda b, x: b[0] * b[1] * x * (1 + b[1] * x) ** (-1),
    "Roszman1": lambda b, x: b[0] - b[1] * x - np.arctan(b[2] / (x - b[3])) / math.pi,
    "ENSO": lambda b, x: (
        b[0]
        + b[1] * np.cos(2 * math.pi * x / 12)
        + b[2] * np.sin(2 * math.pi * x / 12)
        + b[4] * np.cos(2 * math.pi * x / b[3])
        + b[5] * np.sin(2 * math.pi * x / b[3])
        + b[7] * np.cos(2 * math.pi * x / b[6])
        + b[8] * np.sin(2 * math.pi * x / b[6])
    ),
    "MGH09": lambda b, x: b[0] * (x**2 + x * b[1]) / (x**2 + x * b[2] + b[3]),
    "Thurber": _rational3,
    "BoxBOD": lambda b, x: b[0] * (1 - np.exp(-b[1] * x)),
    "Rat42": lambda b, x: b[0] / (1 + np.exp(b[1] - b[2] * x)),
    "MGH10": lambda b, x: b[0] * np.exp(b[1] / (x + b[2])),
    "Eckerle4": lambda b, x: (b[0] / b[1]) * np.exp(-0.5 * ((x - b[2]) / b[1]) ** 2),
    "Rat43": lambda b, x: b[0] / ((1 + np.exp(b[1] - b[2] * x)) ** (1 / b[3])),
    "Bennett5": lambda b, x: b[0] * (b[1] + x) ** (-1 / b[2]),
}


@dataclass(frozen=True)
class Problem:
    name: str
    x: Array
    y: Array
    starts: tuple[tuple[float, ...], tuple[float, ...]]
    certified: tuple[float, ...]
    certified_sd: tuple[float, ...]
    certified_rss: float


def read(name: str) -> Problem:
    """Parse a NIST .dat file: the header says on which lines the values and the data stand."""
    lines = (DIR / f"{name}.dat").read_text(encoding="ascii").splitlines()
    header = "\n".join(lines[:12])
    first, last = (int(v) for v in re.search(r"Certified Values\s+\(lines\s+(\d+)\s+to\s+(\d+)\)", header).groups())  # type: ignore[union-attr]
    data_first = int(re.search(r"Data\s+\(lines\s+(\d+)\s+to", header).group(1))  # type: ignore[union-attr]
    s1, s2, cert, sd = [], [], [], []
    rss = math.nan
    for line in lines[first - 1 : last]:
        m = re.match(r"\s*b\d+\s*=\s*(\S+)\s+(\S+)\s+(\S+)\s+(\S+)", line)
        if m:
            a, b, c, d = (float(v) for v in m.groups())
            s1.append(a)
            s2.append(b)
            cert.append(c)
            sd.append(d)
        elif line.strip().startswith("Residual Sum of Squares"):
            rss = float(line.split(":")[1])
    rows = np.array([[float(v) for v in ln.split()] for ln in lines[data_first - 1 :] if ln.strip()])
    y = rows[:, 0]
    x = rows[:, 1] if rows.shape[1] == 2 else rows[:, 1:].T
    if name == "Nelson":
        y = np.log(y)
    return Problem(name, x, y, (tuple(s1), tuple(s2)), tuple(cert), tuple(sd), rss)


def lre(value: float, certified: float) -> float:
    """Log relative error, the number of matching significant digits (NIST StRD practice)."""
    if value == certified:
        return 15.0
    return -math.log10(abs(value - certified) / abs(certified))
