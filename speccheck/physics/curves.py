"""Sampled curves on any grid: interpolation, smoothing, noise and half-maximum crossings.

Pure functions on numpy arrays whose abscissae ascend without repeats (see
``trace_cleaning.prepare``), shared by the analyses of spectra and of
autocorrelation traces.

* Interpolation: the cubic Hermite curve through the samples, with node slopes
  from the parabola through each sample and its neighbours (any spacing).
* Smoothing: three passes of the exact running mean of the piecewise-linear
  data over ±h (close to a Gaussian kernel of σ = h, on any grid).  The noise
  it leaves is measured by passing seeded white noise through the same
  smoother on the same grid (``noise_gain``), so results never vary run to run.
* Noise of one sample: each sample's deviation from the line through its two
  neighbours, which a smooth signal hardly adds to; σ = 1.4826 × MAD.
* Crossings: the outermost crossings of a level, found on the Hermite curve.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

_PROBES = 4
MAD = 1.4826  # σ / MAD for Gaussian noise


# ------------------------------------------------------- interpolation
def slopes(x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Node slopes of the parabola through each sample and its neighbours (any spacing)."""
    dx = np.diff(x)
    s = np.diff(y) / dx
    d = np.empty_like(y)
    if y.size < 3:
        d[:] = s[0]
        return d
    h0, h1 = dx[:-1], dx[1:]
    d[1:-1] = (h1 * s[:-1] + h0 * s[1:]) / (h0 + h1)
    d[0] = ((2 * dx[0] + dx[1]) * s[0] - dx[0] * s[1]) / (dx[0] + dx[1])
    d[-1] = ((2 * dx[-1] + dx[-2]) * s[-1] - dx[-1] * s[-2]) / (dx[-1] + dx[-2])
    return d


def hermite(x: np.ndarray, y: np.ndarray, d: np.ndarray, q: np.ndarray) -> np.ndarray:
    """Cubic Hermite interpolation of (x, y) with node slopes d at q (inside [x0, xn])."""
    j = np.clip(np.searchsorted(x, q, side="right") - 1, 0, x.size - 2)
    h = x[j + 1] - x[j]
    t = (q - x[j]) / h
    t2 = t * t
    t3 = t2 * t
    return ((2 * t3 - 3 * t2 + 1) * y[j] + (t3 - 2 * t2 + t) * h * d[j]
            + (3 * t2 - 2 * t3) * y[j + 1] + (t3 - t2) * h * d[j + 1])


# ------------------------------------------------------------- smoothing
def running_mean(x: np.ndarray, y: np.ndarray, h: float) -> np.ndarray:
    """Exact mean of the piecewise-linear interpolant of (x, y) over [x-h, x+h] within the data."""
    if not h > 0:
        return y
    dx = np.diff(x)
    slope = np.diff(y) / dx
    cum = np.concatenate(([0.0], np.cumsum(0.5 * (y[1:] + y[:-1]) * dx)))

    def integral(q: np.ndarray) -> np.ndarray:
        j = np.clip(np.searchsorted(x, q, side="right") - 1, 0, x.size - 2)
        u = q - x[j]
        return cum[j] + y[j] * u + 0.5 * slope[j] * u * u

    lo = np.maximum(x - h, x[0])
    hi = np.minimum(x + h, x[-1])
    return (integral(hi) - integral(lo)) / (hi - lo)


def smooth(x: np.ndarray, y: np.ndarray, h: float) -> np.ndarray:
    for _ in range(3):
        y = running_mean(x, y, h)
    return y


def noise_gain(x: np.ndarray, h: float, centre: float, reach: float) -> float:
    """RMS of smoothed unit white noise within ``reach`` of ``centre``."""
    if not h > 0:
        return 1.0
    sub = np.abs(x - centre) <= reach + 6.0 * h  # the smoother reaches 3 h: the rest is not needed
    xs = x[sub]
    near = np.abs(xs - centre) <= reach
    if xs.size < 3 or near.sum() < 1:
        return 1.0
    rng = np.random.default_rng(20240531)  # fixed: the result must not vary from run to run
    total = 0.0
    for _ in range(_PROBES):
        total += float(np.mean(smooth(xs, rng.standard_normal(xs.size), h)[near] ** 2))
    return math.sqrt(total / _PROBES)


def neighbour_residuals(x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Each sample's deviation from the line through its two neighbours, scaled to the σ of one
    sample's noise; a smooth signal hardly adds to it."""
    if x.size < 3:
        return np.zeros(0)
    a = (x[2:] - x[1:-1]) / (x[2:] - x[:-2])
    b = 1.0 - a
    return (y[1:-1] - a * y[:-2] - b * y[2:]) / np.sqrt(1.0 + a * a + b * b)


def neighbour_sigma(x: np.ndarray, y: np.ndarray) -> float:
    """σ of the noise, robustly (1.4826 × the median absolute neighbour residual)."""
    r = neighbour_residuals(x, y)
    return float(MAD * np.median(np.abs(r))) if r.size else 0.0


# ---------------------------------------------------------------- widths
@dataclass(frozen=True)
class Crossings:
    left: float | None  # None: does not fall below the level on that side
    right: float | None
    first: int  # first and last sample at or above the level
    last: int
    dips: bool  # falls (clearly) below the level between first and last


def crossings(x: np.ndarray, y: np.ndarray, level: float, dip: float = 0.0) -> Crossings:
    """The outermost crossings of ``level``, on the cubic through the samples; ``dips`` says
    whether the samples between them fall more than ``dip`` below it."""
    above = y >= level
    first = int(np.argmax(above))
    last = int(y.size - 1 - np.argmax(above[::-1]))
    d = slopes(x, y)

    def at(i: int) -> float:  # the crossing between samples i and i + 1
        a, b = float(x[i]), float(x[i + 1])
        rising = y[i + 1] > y[i]
        for _ in range(3):  # each round narrows the bracket 32-fold
            q = np.linspace(a, b, 33)
            v = hermite(x, y, d, q) - level
            k = int(np.argmax(v >= 0) if rising else np.argmax(v < 0))
            k = min(max(k, 1), 32)
            a, b = float(q[k - 1]), float(q[k])
        va = float(hermite(x, y, d, np.array([a]))[0] - level)
        vb = float(hermite(x, y, d, np.array([b]))[0] - level)
        return a if vb == va else a + (b - a) * va / (va - vb)

    left = at(first - 1) if first > 0 else None
    right = at(last) if last < y.size - 1 else None
    return Crossings(left, right, first, last, bool(np.any(y[first:last + 1] < level - dip)))


def trapezoid(y: np.ndarray, x: np.ndarray) -> float:
    return float(np.sum(0.5 * (y[1:] + y[:-1]) * np.diff(x)))

