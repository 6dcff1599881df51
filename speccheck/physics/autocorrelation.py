"""The width of a measured intensity autocorrelation trace, with an interval from its noise.

Pure numerical functions on numpy arrays: no file reading, no findings.  Data
that cannot be analysed raise ``DataProblem``; anything the numbers do not
settle is said in the result's ``warnings``.

The trace is prepared and cleaned as a spectrum is (``trace_cleaning``: input,
baseline, noise, smoothing).  The peak's height comes from a fit to the
logarithm of the top half, each half-maximum point from a cubic fitted to the
raw samples between 20 % and 80 % of the peak (the Hermite crossing of the
smoothed trace where there are too few samples).  The interval is two standard
errors of those fits, the spread over fitting bands ``AC_BANDS`` (and, when a
wing does not reach the baseline, the trace above its lowest value), and
``NUMERICAL_MARGIN``.  A trace that falls below half maximum on one side only
is mirrored about its peak (an autocorrelation is symmetric), with a warning.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from speccheck.physics.curves import crossings
from speccheck.physics.trace_cleaning import (NUMERICAL_MARGIN, TRACE_BASELINE_FLOOR, DataProblem, clean, percent,
                                              prepare)

__all__ = ["AutocorrelationAnalysis", "DataProblem", "analyse_autocorrelation"]

AC_BANDS = ((0.2, 0.8), (0.3, 0.7), (0.15, 0.85))  # levels fitted at an autocorrelation's crossings


@dataclass(frozen=True)
class AutocorrelationAnalysis:
    fwhm: float  # s
    low: float  # s
    high: float  # s
    warnings: tuple[str, ...]

def _run(s: np.ndarray, peak: int, level: float) -> tuple[int, int]:
    """First and last index of the run of samples at or above ``level`` around ``peak``."""
    below = np.flatnonzero(s[:peak] < level)
    first = int(below[-1]) + 1 if below.size else 0
    below = np.flatnonzero(s[peak:] < level)
    last = peak + int(below[0]) - 1 if below.size else s.size - 1
    return first, last


def _fit_peak(x: np.ndarray, y: np.ndarray, s: np.ndarray, peak: int) -> tuple[float, float, float]:
    """(height, position, σ of ln height) of the peak: a quartic (a parabola with five to eight
    samples) fitted to ln y over the top half, weighted by y (the σ of ln y is σ / y), exact for a
    Gaussian; the smoothed maximum if that cannot be done."""
    first, last = _run(s, peak, 0.5)
    idx = np.arange(first, last + 1)
    deg = 4 if idx.size >= 9 else 2 if idx.size >= 5 else None
    if deg is not None and np.all(y[idx] > 0):
        t = x[idx] - x[peak]
        c, cov = np.polyfit(t, np.log(y[idx]), deg, w=y[idx], cov=True)
        fine = np.linspace(t[0], t[-1], 801)
        ln = np.polyval(c, fine)
        i = int(np.argmax(ln))
        if 0 < i < fine.size - 1:
            g = fine[i] ** np.arange(deg, -1, -1)
            return float(np.exp(ln[i])), float(x[peak] + fine[i]), float(math.sqrt(max(g @ cov @ g, 0.0)))
    return float(s[peak]), float(x[peak]), 0.0


def _fit_crossing(x: np.ndarray, y: np.ndarray, s: np.ndarray, peak: int, side: int, half: float,
                  guess: float, sigma: float, band: tuple[float, float]) -> tuple[float, float]:
    """(crossing, its σ) of ``half`` on one side (-1 left, +1 right) of the peak: a cubic (or, with
    five to seven samples, a parabola) fitted to the samples whose smoothed level lies in ``band``
    (fractions of the peak); where there are fewer, the crossing ``guess`` of the smoothed trace
    and ``sigma`` (its noise) over its slope."""
    lo, hi = band
    first, last = _run(s, peak, lo * 2 * half)
    idx = np.arange(first, peak) if side < 0 else np.arange(peak + 1, last + 1)
    idx = idx[(s[idx] >= lo * 2 * half) & (s[idx] <= hi * 2 * half)]
    deg = 3 if idx.size >= 8 else 2 if idx.size >= 5 else None
    j = int(np.clip(np.searchsorted(x, guess) - 1, 0, x.size - 2))
    slope = abs(float((s[j + 1] - s[j]) / (x[j + 1] - x[j])))  # of the segment that crosses
    fallback = (guess, sigma / slope if slope > 0 else 0.0)
    if deg is None:
        return fallback
    t = x[idx] - guess
    c, cov = np.polyfit(t, y[idx], deg, cov=True)
    roots = np.roots(np.polyadd(c, [-half]))
    roots = roots[np.abs(roots.imag) < 1e-12].real
    roots = roots[(roots >= t.min()) & (roots <= t.max())]
    if roots.size == 0:
        return fallback
    r = float(roots[np.argmin(np.abs(roots))])
    g = r ** np.arange(deg, -1, -1)
    fit_slope = abs(float(np.polyval(np.polyder(c), r)))
    if not fit_slope > 0:
        return fallback
    return guess + r, float(math.sqrt(max(g @ cov @ g, 0.0))) / fit_slope


def analyse_autocorrelation(delay_s, counts) -> AutocorrelationAnalysis:
    """FWHM of an intensity autocorrelation trace, with an interval from its noise."""
    x, y, repeated = prepare(delay_s, counts, "delays", "counts")
    scale = float(max(abs(x[0]), abs(x[-1])))
    x = x / scale  # delays near the float limits cannot overflow their differences
    warnings: list[str] = []
    if repeated:
        warnings.append(f"{repeated} delays appear more than once; their counts were averaged.")
    cl = clean(x, y, "autocorrelation trace", TRACE_BASELINE_FLOOR)
    height, centre, ln_sigma = _fit_peak(x, cl.y, cl.smooth, cl.peak)
    half = height / 2.0
    cross = crossings(x, cl.smooth, half, 3.0 * cl.sigma_s)
    if cross.left is None and cross.right is None:
        raise DataProblem("the autocorrelation trace does not fall to half its peak on either side: no width can "
                          "be measured")
    if cross.left is None or cross.right is None:
        side = "negative" if cross.left is None else "positive"
        warnings.append(f"the trace is cut off: it does not fall below half maximum on its {side}-delay side, so "
                        "its FWHM is taken as twice the half width on the other side (an autocorrelation is "
                        "symmetric).")

    estimates, spreads = [], []
    for band in AC_BANDS:
        ends, var = [], 0.0
        for side, guess in ((-1, cross.left), (1, cross.right)):
            if guess is None:
                ends.append(None)
                continue
            at, err = _fit_crossing(x, cl.y, cl.smooth, cl.peak, side, half, guess, cl.sigma_s, band)
            ends.append(at)
            var += err * err
        width = _ac_width(centre, ends[0], ends[1])
        if None in ends:
            var *= 4.0  # twice a half width
        estimates.append(width)
        spreads.append(math.sqrt(var))
    fwhm = estimates[0]
    # two standard errors of the crossings, and of the peak's height: a relative error ε of the
    # height moves both crossings by ε · half / slope, about ε × FWHM / 2.8 each (2.8 for a Gaussian)
    spread = 2.0 * max(spreads) + 2.0 * (2.0 * ln_sigma * fwhm / 2.8)
    sides = cl.baseline_sides
    lowest = float(cl.smooth.min())
    if not all(sides) and lowest > 0:
        # a wing that never reaches the baseline leaves it anywhere between the baseline found (or
        # zero) and the lowest value of the trace: the narrower trace above that lowest value too
        shifted = (cl.smooth - lowest) / (1.0 - lowest)
        cr = crossings(x, shifted, 0.5)
        if cr.left is not None or cr.right is not None:
            estimates.append(_ac_width(centre, cr.left, cr.right))
    low = (min(estimates) - spread) * (1.0 - NUMERICAL_MARGIN)
    high = (max(estimates) + spread) * (1.0 + NUMERICAL_MARGIN)

    for ok, side, level in ((sides[0], "negative", cl.wing_levels[0]), (sides[1], "positive", cl.wing_levels[1])):
        if not ok:
            warnings.append(f"the trace's wings do not reach the baseline on its {side}-delay side (it ends at "
                            f"{percent(max(level, 0.0))} of its peak): a longer scan would fix the baseline.")
    if not any(sides):
        warnings.append("no baseline could be established, so none was subtracted: an offset under the trace "
                        "would make its FWHM too large.")
    if cross.left is not None and cross.right is not None:
        hl, hr = centre - cross.left, cross.right - centre
        if abs(hl - hr) > 0.2 * (hl + hr):
            warnings.append(f"the trace is not symmetric about its peak: its half-maximum points lie "
                            f"{hl * scale * 1e15:.3g} fs and {hr * scale * 1e15:.3g} fs from it.")
    if cross.dips:
        warnings.append("the trace dips below half maximum between its outermost half-maximum points.")
    if cl.sigma_s > 0.02:
        warnings.append(f"the noise is {percent(cl.sigma_s)} of the peak even after smoothing.")
    return AutocorrelationAnalysis(fwhm * scale, max(low, 0.0) * scale, high * scale, tuple(warnings))


def _ac_width(centre: float, left: float | None, right: float | None) -> float:
    if left is not None and right is not None:
        return float(right - left)
    if left is not None:
        return 2.0 * (centre - left)
    return 2.0 * (right - centre)
