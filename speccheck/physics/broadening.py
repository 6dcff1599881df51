"""How a pulse of a shape broadens under GDD alone: the table ``broadening_data.py`` (written by FFT
of the field, ``broadening_rows``), its interpolation (``broadened``) and its inverse, the GDD that
gives a duration (``gdd_for_duration``; the Gaussian's closed form for a Gaussian)."""

from __future__ import annotations

import bisect
import math
from functools import lru_cache

import numpy as np

from speccheck.physics.field import _LN2, Envelope, measure
from speccheck.physics.phase_terms import Poly

BROADENING_X = (0.0,) + tuple(float(x) for x in np.geomspace(1e-3, 1e3, 121))


def broadening_rows(shape: str) -> tuple[tuple[float, float, float, float], ...]:
    """(x, τ/τ0, P_pk·τ/E, main-peak energy) of a pulse of the shape after GDD = x·τ0², by FFT: what
    ``broadening_data.py`` holds (``write_broadening_data`` writes it again).  Every row by FFT, even
    where a check would take the stationary-phase mapping, so the mapping can be tested against it."""
    env = Envelope(1.0, shape)
    rows = []
    for x in BROADENING_X:
        m = measure(env, (Poly(2, x),), 1e3, max_points=1 << 20)
        rows.append((x, m.duration, m.peak_factor, m.main_peak))
    return tuple(rows)


def write_broadening_data() -> None:  # pragma: no cover - regenerates physics/broadening_data.py
    from pathlib import Path

    path = Path(__file__).with_name("broadening_data.py")
    text = path.read_text(encoding="utf-8")
    body = "TABLES = {\n"
    for shape in ("sech2", "flat_top"):
        body += f"    {shape!r}: (\n" + "".join(
            f"        ({float(x)!r}, {float(r)!r}, {float(a)!r}, {float(m)!r}),\n" for x, r, a, m in broadening_rows(shape))
        body += "    ),\n"
    path.write_text(text[: text.index("TABLES = {")] + body + "}\n", encoding="utf-8")


@lru_cache(maxsize=8)
def _table(shape: str):
    from speccheck.physics.broadening_data import TABLES

    rows = np.array(TABLES[shape])
    return rows[:, 0], rows[:, 1], rows[:, 2], rows[:, 3]


@lru_cache(maxsize=8)
def _log_rows(shape: str) -> tuple[list, list, list, list]:
    """The table's rows beyond x = 0 as Python lists (a scalar lookup needs no array): ln x, ln τ/τ0,
    the peak-power factor and the main peak."""
    xs, ratios, factors, mains = _table(shape)
    return ([math.log(x) for x in xs[1:]], [math.log(r) for r in ratios[1:]], [float(f) for f in factors[1:]],
            [float(m) for m in mains[1:]])


def _interp(at: float, xs: list, ys: list) -> float:
    k = min(max(bisect.bisect_right(xs, at), 1), len(xs) - 1)
    x0, x1 = xs[k - 1], xs[k]
    return ys[k - 1] + (ys[k] - ys[k - 1]) * (at - x0) / (x1 - x0)


def broadened(shape: str, tl: float, gdd: float) -> tuple[float, float, float]:
    """(duration, P_pk·τ/E, main-peak energy) of a flat-phase pulse of the shape after a pure GDD,
    interpolated in the table (log x; beyond x = 1e3, the stationary-phase asymptote τ ∝ GDD)."""
    xs, ratios, factors, mains = _table(shape)
    x = abs(gdd) / (tl * tl)
    if x <= xs[1]:
        k = x / xs[1]
        return tl * (ratios[0] + k * (ratios[1] - ratios[0])), factors[0] + k * (factors[1] - factors[0]), mains[0]
    if x >= xs[-1]:
        return tl * ratios[-1] * x / xs[-1], float(factors[-1]), float(mains[-1])
    lx, lr, fs, ms = _log_rows(shape)
    at = math.log(x)
    return tl * math.exp(_interp(at, lx, lr)), _interp(at, lx, fs), _interp(at, lx, ms)


def gdd_for_duration(shape: str, tl: float, duration: float) -> float:
    """|GDD| that stretches a flat-phase pulse of the shape from τ0 to ``duration``."""
    if shape == "gaussian":  # the closed form, τ = τ0 √(1 + (4 ln2 φ/τ0²)²)
        r = max(duration / tl, 1.0)
        return tl * tl / (4.0 * _LN2) * math.sqrt(r * r - 1.0)
    xs, ratios, _, _ = _table(shape)
    r = duration / tl
    if r <= ratios[0]:
        return 0.0
    if r > ratios[-1]:
        return xs[-1] * tl * tl * r / ratios[-1]
    ratios = np.maximum.accumulate(ratios)
    k = int(np.searchsorted(ratios, r))
    if k <= 1:
        return float(np.interp(r, ratios[:2], xs[:2])) * tl * tl
    return float(np.exp(np.interp(math.log(r), np.log(ratios[1:]), np.log(xs[1:])))) * tl * tl
