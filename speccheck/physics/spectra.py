"""Widths and transform limits of measured spectra and autocorrelation traces.

Pure numerical functions on numpy arrays: no file reading, no findings.  Data
that cannot be analysed raise ``DataProblem`` with a sentence saying why;
anything the numbers do not settle is said in the result's ``warnings``.

Conventions
-----------
* A spectrum's counts are a spectral density **per unit wavelength**, S(λ),
  which is what spectrometer software exports for a grating spectrometer
  (pixels nearly even in λ).  Counts per pixel on a markedly nonuniform grid
  should be divided by the pixel width first.  The spectrum per unit frequency
  is S(ν) = S(λ) λ²/c (the Jacobian |dλ/dν|).
* The grid may be unsorted and nonuniform; repeated abscissae are averaged.
* Widths are full widths at half maximum between the *outermost* half-maximum
  points (a spectrum that dips below half maximum between two peaks keeps its
  whole width, and says so); the pulse's FWHM is that of its main peak.

Method
------
1. Counts are divided by their largest magnitude first (so values near 1e308
   cannot overflow); the abscissae are sorted.
2. Baseline (iterated with the width): the data farther than ``FAR`` × FWHM
   beyond the half-maximum points, on each side, are cut into up to eight
   blocks.  A straight line is fitted to the blocks' medians of both sides;
   while a block lies off it by more than three standard errors, the
   innermost block of the worse side is dropped as a wing not yet down (two
   must remain per side).  Sides that differ by less than the noise of one
   sample give a flat baseline at the lower (the line then widens the
   transform limit's interval), sides farther apart the line.  Without a line,
   each side on its own is the lowest block with the blocks that agree with
   it, and a side where none agrees is a wing still falling, not a baseline;
   the lower side is subtracted.  When neither side qualifies, nothing is
   subtracted (a spectrum that fills the window is not eaten) and a warning
   says so.  The noise σ is each sample's robust deviation from the line
   through its two neighbours (1.4826 × MAD), which a smooth signal hardly
   adds to, taken on the baseline where there is one.
3. Smoothing is tied to the data's own width, never to the number of
   samples: three passes of the exact running mean of the piecewise-linear
   data over ±FWHM/``SMOOTH_PER_FWHM`` (close to a Gaussian kernel of
   σ = FWHM/40, which widens a Gaussian peak by 0.17 %), on any grid.  Data
   sampled more coarsely than twice that width are not smoothed.  The
   smoothed noise σ_s is measured by passing seeded white noise through the
   same smoother on the same grid.
4. Frequency: ν = c/λ, S(ν) = S(λ) λ²/c.  FWHMs come from the outermost
   half-maximum crossings of the smoothed data, found on the cubic Hermite
   curve through the samples.
5. Transform limit: the spectrum is kept where its smoothed value is above a
   threshold k σ_s (the run of samples around the peak, and any other run of
   three or more samples that rises 6 σ_s above the threshold); elsewhere it
   is zero, so noise on the wings cannot lift √S over the whole window.
   Negatives are clipped before any square root.  The amplitude √S(ν) is
   resampled (cubic Hermite) on an even frequency grid whose step comes from
   the spectrum's own width (at least 64 points across its FWHM and 1024
   across what is kept, no coarser than the data), zero-padded until the
   pulse's half width spans ``HALF_WIDTH_SAMPLES`` samples, Fourier
   transformed with a flat phase; the FWHM of |E(t)|² comes from the cubic
   through the samples at its half-maximum crossing.
6. What lies under the noise is not known, so the limit is computed both ways:
   *cut* (the spectrum ends where it enters the noise: too long a pulse) and
   *wings* (beyond the kept samples it goes on falling exponentially, at the
   rate a weighted fit of ln S finds at its edges, never slower than the chord
   from the peak: too short a pulse for a Gaussian, close for a sech²).  The
   reported limit is the geometric mean of the two at k = 3;
   ``transform_limited_low`` and ``..._high`` span thresholds k =
   ``THRESHOLDS``, wings two standard errors slower, resampling the power
   instead of the amplitude, the unsmoothed data, the other reading of the
   baseline (and, when no baseline was found, the lowest value as baseline),
   widened by ``NUMERICAL_MARGIN``.

Autocorrelation traces use the same steps 1-3.  The peak's height comes from a
fit to the logarithm of the top half, each half-maximum point from a cubic
fitted to the raw samples between 20 % and 80 % of the peak (the Hermite
crossing of the smoothed trace where there are too few samples).  The interval
is two standard errors of those fits, the spread over fitting bands
``AC_BANDS`` (and, when a wing does not reach the baseline, the trace above
its lowest value), and ``NUMERICAL_MARGIN``.  A trace that falls below half
maximum on one side only is mirrored about its peak (an autocorrelation is
symmetric), with a warning.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

MIN_POINTS = 8
FAR = 1.0  # baseline points lie this many FWHM beyond the half-maximum points
MIN_SIDE = 5  # samples needed on one side to establish the baseline there
# of the peak: blocks of a baseline this close to the lowest agree with it.  A transform limit
# feels the spectrum's wings far below the half maximum that sets an autocorrelation's width.
SPECTRUM_BASELINE_FLOOR = 1e-5
TRACE_BASELINE_FLOOR = 1e-3
MIN_PEAK_SIGMAS = 6.0  # a peak must stand this many σ_s above the baseline
SMOOTH_PER_FWHM = 40.0  # running-mean half-width = FWHM / this
THRESHOLDS = (1.5, 2.0, 3.0, 5.0, 8.0)  # transform-limit thresholds, in σ_s
CENTRAL_THRESHOLD = 3.0
THRESHOLD_FLOOR = 1e-6  # of the peak: the threshold on noiseless data
SIDE_RUN_RISE = 6.0  # a side run of the spectrum must rise this many σ_s above the threshold
WING_THRESHOLDS = (2.0, 3.0, 5.0)  # thresholds at which the wings are continued
AC_BANDS = ((0.2, 0.8), (0.3, 0.7), (0.15, 0.85))  # levels fitted at an autocorrelation's crossings
NUMERICAL_MARGIN = 0.005  # the interval also allows this much for the computation itself
HALF_WIDTH_SAMPLES = 16  # time samples across half the transform-limited pulse's FWHM
MAX_SUPPORT_POINTS = 1 << 16
MAX_FFT = 1 << 21
_PROBES = 4
_MAD = 1.4826  # σ / MAD for Gaussian noise


class DataProblem(ValueError):
    """Data that cannot be analysed; the message is a plain sentence."""


@dataclass(frozen=True)
class SpectrumAnalysis:
    fwhm_wavelength: float  # m, of S(λ)
    fwhm_frequency: float  # Hz, of S(ν) = S(λ) λ²/c
    centre_wavelength: float  # m, intensity-weighted mean of S(λ) over the spectrum above the noise
    transform_limited_duration: float  # s, intensity FWHM of the flat-phase pulse
    transform_limited_low: float  # s
    transform_limited_high: float  # s
    warnings: tuple[str, ...]


@dataclass(frozen=True)
class AutocorrelationAnalysis:
    fwhm: float  # s
    low: float  # s
    high: float  # s
    warnings: tuple[str, ...]


# ----------------------------------------------------------------- input
def _prepare(x, y, x_name: str, y_name: str) -> tuple[np.ndarray, np.ndarray, int]:
    """Finite 1-D float arrays sorted by x, repeated x averaged, y divided by max |y|."""
    try:
        x = np.asarray(x, dtype=float)
        y = np.asarray(y, dtype=float)
    except (TypeError, ValueError):
        raise DataProblem(f"the {x_name} and {y_name} must be numbers") from None
    if x.ndim != 1 or y.ndim != 1:
        raise DataProblem(f"the {x_name} and {y_name} must be one column each")
    if x.shape != y.shape:
        raise DataProblem(f"there are {x.size} {x_name} values but {y.size} {y_name} values")
    if not np.all(np.isfinite(x)):
        raise DataProblem(f"the {x_name} contain NaN or infinite values")
    if not np.all(np.isfinite(y)):
        raise DataProblem(f"the {y_name} contain NaN or infinite values")
    scale = float(np.max(np.abs(y))) if y.size else 0.0
    if scale == 0.0:
        raise DataProblem(f"the {y_name} are all zero")
    y = y / scale
    order = np.argsort(x, kind="stable")
    x, y = x[order], y[order]
    repeated = 0
    if x.size > 1 and np.any(x[1:] == x[:-1]):
        ux, inverse, count = np.unique(x, return_inverse=True, return_counts=True)
        y = np.bincount(inverse, weights=y) / count
        repeated = int(np.sum(count > 1))
        x = ux
    if x.size < MIN_POINTS:
        raise DataProblem(f"{x.size} distinct data points; at least {MIN_POINTS} are needed for a width")
    return x, y, repeated


# ------------------------------------------------------- interpolation
def _slopes(x: np.ndarray, y: np.ndarray) -> np.ndarray:
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


def _hermite(x: np.ndarray, y: np.ndarray, d: np.ndarray, q: np.ndarray) -> np.ndarray:
    """Cubic Hermite interpolation of (x, y) with node slopes d at q (inside [x0, xn])."""
    j = np.clip(np.searchsorted(x, q, side="right") - 1, 0, x.size - 2)
    h = x[j + 1] - x[j]
    t = (q - x[j]) / h
    t2 = t * t
    t3 = t2 * t
    return ((2 * t3 - 3 * t2 + 1) * y[j] + (t3 - 2 * t2 + t) * h * d[j]
            + (3 * t2 - 2 * t3) * y[j + 1] + (t3 - t2) * h * d[j + 1])


# ------------------------------------------------------------- smoothing
def _running_mean(x: np.ndarray, y: np.ndarray, h: float) -> np.ndarray:
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


def _smooth(x: np.ndarray, y: np.ndarray, h: float) -> np.ndarray:
    for _ in range(3):
        y = _running_mean(x, y, h)
    return y


def _noise_gain(x: np.ndarray, h: float, centre: float, reach: float) -> float:
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
        total += float(np.mean(_smooth(xs, rng.standard_normal(xs.size), h)[near] ** 2))
    return math.sqrt(total / _PROBES)


def _neighbour_residuals(x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Each sample's deviation from the line through its two neighbours, scaled to the σ of one
    sample's noise; a smooth signal hardly adds to it."""
    if x.size < 3:
        return np.zeros(0)
    a = (x[2:] - x[1:-1]) / (x[2:] - x[:-2])
    b = 1.0 - a
    return (y[1:-1] - a * y[:-2] - b * y[2:]) / np.sqrt(1.0 + a * a + b * b)


def _neighbour_sigma(x: np.ndarray, y: np.ndarray) -> float:
    """σ of the noise, robustly (1.4826 × the median absolute neighbour residual)."""
    r = _neighbour_residuals(x, y)
    return float(_MAD * np.median(np.abs(r))) if r.size else 0.0


# ---------------------------------------------------------------- widths
@dataclass(frozen=True)
class _Crossings:
    left: float | None  # None: does not fall below the level on that side
    right: float | None
    first: int  # first and last sample at or above the level
    last: int
    dips: bool  # falls (clearly) below the level between first and last


def _crossings(x: np.ndarray, y: np.ndarray, level: float, dip: float = 0.0) -> _Crossings:
    """The outermost crossings of ``level``, on the cubic through the samples; ``dips`` says
    whether the samples between them fall more than ``dip`` below it."""
    above = y >= level
    first = int(np.argmax(above))
    last = int(y.size - 1 - np.argmax(above[::-1]))
    d = _slopes(x, y)

    def at(i: int) -> float:  # the crossing between samples i and i + 1
        a, b = float(x[i]), float(x[i + 1])
        rising = y[i + 1] > y[i]
        for _ in range(3):  # each round narrows the bracket 32-fold
            q = np.linspace(a, b, 33)
            v = _hermite(x, y, d, q) - level
            k = int(np.argmax(v >= 0) if rising else np.argmax(v < 0))
            k = min(max(k, 1), 32)
            a, b = float(q[k - 1]), float(q[k])
        va = float(_hermite(x, y, d, np.array([a]))[0] - level)
        vb = float(_hermite(x, y, d, np.array([b]))[0] - level)
        return a if vb == va else a + (b - a) * va / (va - vb)

    left = at(first - 1) if first > 0 else None
    right = at(last) if last < y.size - 1 else None
    return _Crossings(left, right, first, last, bool(np.any(y[first:last + 1] < level - dip)))


# --------------------------------------------------------------- baseline
def _blocks(x: np.ndarray, y: np.ndarray, idx: np.ndarray) -> list[tuple[np.ndarray, float, float]]:
    """The side ``idx`` (ordered outermost first) cut into up to eight blocks, innermost last:
    (indices, centre, median)."""
    parts = np.array_split(idx, min(8, idx.size // MIN_SIDE))
    return [(p, float(np.median(x[p])), float(np.median(y[p]))) for p in parts]


def _tolerance(sigma: float, n: int, floor: float) -> float:
    """Three standard errors of the median of n samples of noise σ (1.2533 σ/√n), at least floor."""
    return max(3.0 * 1.2533 * sigma / math.sqrt(n), floor)


def _side_level(x: np.ndarray, y: np.ndarray, blocks, sigma: float, floor: float) -> tuple[float, float, int] | None:
    """(abscissa, level, samples) of the baseline on one side, or None: the median of the lowest
    block and of the blocks that agree with it.  A side where no other block agrees with the
    lowest is a wing still falling (or too short to tell), not a baseline."""
    if len(blocks) < 2:
        return None
    medians = np.array([b[2] for b in blocks])
    agree = medians <= medians.min() + _tolerance(sigma, min(b[0].size for b in blocks), floor)
    if agree.sum() < 2:
        return None
    chosen = np.concatenate([b[0] for b, ok in zip(blocks, agree) if ok])
    return float(np.median(x[chosen])), float(np.median(y[chosen])), int(chosen.size)


def _line(left, right, sigma: float, floor: float) -> tuple[float, float, float] | None:
    """(level, slope, abscissa of the level) of a straight baseline through the blocks of both
    sides (each list innermost last), or None: weighted least squares; while some block lies off
    the line by more than its tolerance, the innermost block of the side that lies farthest off is
    dropped, as a wing not yet down.  Two blocks must remain on each side."""
    left, right = list(left), list(right)
    while len(left) >= 2 and len(right) >= 2:
        blocks = left + right
        xc = np.array([b[1] for b in blocks])
        med = np.array([b[2] for b in blocks])
        tol = np.array([_tolerance(sigma, b[0].size, floor) for b in blocks])
        w = 1.0 / tol**2
        xm = float(np.sum(w * xc) / np.sum(w))
        level = float(np.sum(w * med) / np.sum(w))
        slope = float(np.sum(w * (xc - xm) * (med - level)) / np.sum(w * (xc - xm) ** 2))
        off = np.abs(med - (level + slope * (xc - xm))) / tol
        if np.all(off <= 1.0):
            return level, slope, xm
        if off[: len(left)].max() >= off[len(left):].max():
            left.pop()
        else:
            right.pop()
    return None


@dataclass(frozen=True)
class _Cleaned:
    y: np.ndarray  # raw data minus the baseline, over the smoothed peak
    smooth: np.ndarray  # smoothed, minus the baseline, over its peak (peak = 1)
    h: float  # smoothing half-width
    sigma: float  # noise σ of the raw data, over the peak
    sigma_s: float  # noise σ of the smoothed data near the peak, over the peak
    peak: int
    cross: _Crossings
    baseline_sides: tuple[bool, bool]  # established below / above the peak
    side_levels: tuple[float, float] | None  # the baseline on both sides, over the peak
    sloped: bool  # a straight line between the two sides was subtracted (else a constant)
    alternative: np.ndarray | None  # add to ``smooth`` for the other reading of the two sides
    wing_levels: tuple[float, float]  # the smoothed data at the two ends, over the peak


def _width(x: np.ndarray, peak: int, cross: _Crossings) -> tuple[float, float]:
    lo = cross.left if cross.left is not None else 2 * x[peak] - cross.right
    hi = cross.right if cross.right is not None else 2 * x[peak] - cross.left
    return lo, hi


def _peak(x: np.ndarray, s: np.ndarray, what: str) -> tuple[int, float, _Crossings]:
    peak = int(np.argmax(s))
    top = float(s[peak])
    if not top > 0:
        raise DataProblem(f"the {what} has no peak above its baseline")
    if peak in (0, s.size - 1):
        raise DataProblem(f"the {what} is highest at the end of its range: no peak lies inside the data")
    cross = _crossings(x, s, top / 2.0)
    if cross.left is None and cross.right is None:
        raise DataProblem(f"the {what} does not fall to half its highest value on either side: there is no clear "
                          "peak whose width could be measured")
    return peak, top, cross


def _clean(x: np.ndarray, y: np.ndarray, what: str, floor: float) -> _Cleaned:
    """Baseline, noise and smoothing (see the module's docstring); ``floor`` (of the peak) is how
    far blocks of the baseline may differ and still agree."""
    base = np.full_like(y, np.quantile(y, 0.05))
    h = 0.0
    sides = (False, False)
    levels = None
    sigma = None
    for _ in range(8):
        peak, top, cross = _peak(x, _smooth(x, y - base, h), what)
        lo, hi = _width(x, peak, cross)
        width = hi - lo
        if not width > 0:
            raise DataProblem(f"the {what} has no peak wider than its sampling")
        far = (np.flatnonzero(x < lo - FAR * width), np.flatnonzero(x > hi + FAR * width))
        # blocks of each side, innermost (nearest the peak) last; the noise from all their samples
        blocks = [_blocks(x, y, far[0]) if far[0].size >= 2 * MIN_SIDE else [],
                  _blocks(x, y, far[1][::-1]) if far[1].size >= 2 * MIN_SIDE else []]
        residuals = [_neighbour_residuals(x[f], y[f]) for f, bl in zip(far, blocks) if bl]
        pooled = float(_MAD * np.median(np.abs(np.concatenate(residuals)))) if residuals else 0.0
        line = _line(blocks[0], blocks[1], pooled, floor * top) if blocks[0] and blocks[1] else None
        alternative = None
        sloped = False
        if line is not None:
            level, slope, xm = line
            sigma = pooled
            sides = (True, True)
            x0, x1 = float(np.median(x[far[0]])), float(np.median(x[far[1]]))
            levels = (level + slope * (x0 - xm), level + slope * (x1 - xm))
            sloped_base = level + slope * (x - xm)
            flat = np.full_like(y, min(levels))
            # two sides that differ by less than the noise of one sample are one flat baseline
            # (the higher may be a wing not yet down), and the line is kept as an alternative;
            # sides farther apart than that are joined by the line
            sloped = abs(levels[1] - levels[0]) > max(3.0 * sigma, floor * top)
            new_base, alternative = (sloped_base, None) if sloped else (flat, sloped_base)
        else:
            found = [_side_level(x, y, bl, pooled, floor * top) for bl in blocks]
            sides = (found[0] is not None, found[1] is not None)
            found = [f for f in found if f is not None]
            levels = (found[0][1], found[1][1]) if len(found) == 2 else None
            if len(found) == 2 and abs(found[0][1] - found[1][1]) <= _tolerance(
                    pooled, 1, 0.0) * math.sqrt(1.0 / found[0][2] + 1.0 / found[1][2]) + floor * top:
                # two sides that agree within their standard errors: their weighted mean
                weights = np.array([f[2] for f in found], float)
                new_base = np.full_like(y, float(np.sum(weights * [f[1] for f in found]) / weights.sum()))
                sigma = pooled
            elif found:
                # one side, or two that disagree and no straight line joins: the lower, as a constant
                new_base = np.full_like(y, min(f[1] for f in found))
                sigma = pooled
            else:
                new_base = np.zeros_like(y)
                sigma, levels = None, None
        new_h = width / SMOOTH_PER_FWHM
        # a running mean narrower than the sampling would only blur the straight lines between
        # samples: data that coarse are not smoothed
        core = (x >= lo) & (x <= hi)
        if core.sum() < 2 or new_h < 2.0 * float(np.median(np.diff(x[core]))):
            new_h = 0.0
        converged = np.allclose(new_base, base, rtol=0, atol=1e-9) and abs(new_h - h) <= 1e-3 * max(new_h, h)
        base, h = new_base, new_h
        if converged:
            break
    y0 = y - base
    s = _smooth(x, y0, h)
    peak, top, cross = _peak(x, s, what)
    if sigma is None:
        sigma = _neighbour_sigma(x, y0)
    lo, hi = _width(x, peak, cross)
    sigma_s = sigma * _noise_gain(x, h, float(x[peak]), 3.0 * (hi - lo))
    y0, s = y0 / top, s / top
    sigma, sigma_s = sigma / top, sigma_s / top
    if 1.0 < MIN_PEAK_SIGMAS * sigma_s:
        raise DataProblem(f"the {what} has no peak that stands above its noise "
                          f"(the noise is {_pct(sigma_s)} of the highest point)")
    if levels is not None:
        levels = (levels[0] / top, levels[1] / top)
    shift = None if alternative is None else (base - alternative) / top
    return _Cleaned(y0, s, h, sigma, sigma_s, peak, cross, sides, levels, sloped, shift,
                    (float(s[0]), float(s[-1])))


def _trapezoid(y: np.ndarray, x: np.ndarray) -> float:
    return float(np.sum(0.5 * (y[1:] + y[:-1]) * np.diff(x)))


def _pct(v: float) -> str:
    v *= 100.0
    return f"{v:.2g} %" if v < 10 else f"{v:.0f} %"


# --------------------------------------------------------- transform limit
def _support(s: np.ndarray, peak: int, threshold: float, sigma_s: float) -> np.ndarray:
    """Samples kept for the transform: the run above ``threshold`` around the peak, and
    other runs of three or more samples that rise clearly above it."""
    above = s > threshold
    edges = np.flatnonzero(np.diff(np.concatenate(([0], above.astype(np.int8), [0]))))
    keep = np.zeros(s.size, bool)
    rise = threshold + SIDE_RUN_RISE * sigma_s
    for start, stop in zip(edges[::2], edges[1::2]):
        if start <= peak < stop or (stop - start >= 3 and s[start:stop].max() > rise):
            keep[start:stop] = True
    return keep


def _wing(nu: np.ndarray, p: np.ndarray, noise: np.ndarray, keep: np.ndarray, edge: int, inward: int,
          slower: float, correlated: float) -> float | None:
    """The rate d ln p / dν at which the spectrum falls outward through its edge sample: a
    straight-line fit of ln p, weighted by (p / noise)², over the kept samples up to 5 (or 10)
    times the edge's value, made ``slower`` standard errors slower.  ``correlated`` is the number
    of neighbouring samples that share their noise (after smoothing)."""
    for factor in (5.0, 10.0):
        idx = [edge]
        j = edge + inward
        while 0 <= j < p.size and keep[j] and 0 < p[j] <= factor * p[edge]:
            idx.append(j)
            j += inward
        if len(idx) >= 3:
            break
    if len(idx) < 2 or not p[edge] > 0:
        return None
    x, ln = nu[idx] - nu[edge], np.log(p[idx])
    noisy = bool(np.all(noise[idx] > 0))
    w = np.maximum(noise[idx] / p[idx], 1e-8) ** -2 if noisy else np.ones(len(idx))  # (p / σ)², finite
    ln = ln + 0.5 / w  # E[ln(p + n)] ≈ ln p - σ²/2p²: noise alone would steepen the wing
    xm = float(np.sum(w * x) / np.sum(w))
    sxx = float(np.sum(w * (x - xm) ** 2))
    if not sxx > 0:
        return None
    rate = float(np.sum(w * (x - xm) * ln) / sxx) * inward  # > 0: falls outward
    if slower and noisy:
        rate -= slower * math.sqrt(correlated / sxx)
    # no slower than the chord from the peak to the edge: wings that fall more slowly than the
    # spectrum falls on average are not continued from a few noisy samples
    top = int(np.argmax(p))
    if top != edge:
        rate = max(rate, math.log(p[top] / p[edge]) / abs(nu[edge] - nu[top]))
    return rate if rate > 0 else None


def _pulse_fwhm(nu: np.ndarray, p: np.ndarray, keep: np.ndarray, dnu_fwhm: float, on_amplitude: bool,
                wings: float | None, noise: np.ndarray, correlated: float = 1.0) -> float:
    """Intensity FWHM of the flat-phase pulse of the spectrum ``p`` (per unit frequency, on the
    ascending grid ``nu``), zero outside ``keep``.  Unless ``wings`` is None the spectrum
    continues beyond the outermost kept samples, falling exponentially at the rate it falls there
    (``wings`` standard errors slower); ``noise`` is the σ of each sample of ``p``, shared by
    ``correlated`` neighbouring samples."""
    p = np.where(keep, np.clip(p, 0.0, None), 0.0)
    inside = np.flatnonzero(keep)
    first, last = int(inside[0]), int(inside[-1])
    rates = ((_wing(nu, p, noise, keep, first, 1, wings, correlated),
              _wing(nu, p, noise, keep, last, -1, wings, correlated))
             if wings is not None else (None, None))
    reach = 10.0 * dnu_fwhm
    # the data used: the kept samples, and a zero beyond them where no wing continues them
    i0 = first if rates[0] is not None else max(first - 1, 0)
    i1 = last if rates[1] is not None else min(last + 1, nu.size - 1)
    # a continued wing is followed until its amplitude is 1e-5 of the peak's (or for 10 FWHM)
    start, stop = nu[i0], nu[i1]
    if rates[0]:
        start -= min(max(math.log(math.sqrt(p[first]) / 1e-5), 0.0) / (rates[0] / 2), reach)
    if rates[1]:
        stop += min(max(math.log(math.sqrt(p[last]) / 1e-5), 0.0) / (rates[1] / 2), reach)
    band = stop - start
    spacing = float(np.median(np.diff(nu[i0:i1 + 1]))) if i1 > i0 else band
    step = min(dnu_fwhm / 64.0, band / 1024.0, spacing)
    if band / step > MAX_SUPPORT_POINTS:
        step = band / MAX_SUPPORT_POINTS
    grid = start + step * np.arange(int(math.ceil(band / step)) + 1)
    a = np.zeros_like(grid)
    xs, ps = nu[i0:i1 + 1], p[i0:i1 + 1]
    inner = (grid >= xs[0]) & (grid <= xs[-1])
    if xs.size >= 2:
        ys = np.sqrt(ps) if on_amplitude else ps
        v = np.clip(_hermite(xs, ys, _slopes(xs, ys), grid[inner]), 0.0, None)
        a[inner] = v if on_amplitude else np.sqrt(v)
    else:
        a[np.argmin(np.abs(grid - xs[0]))] = math.sqrt(ps[0])
    if rates[0]:
        below = grid < xs[0]
        a[below] = math.sqrt(p[first]) * np.exp(-0.5 * rates[0] * (xs[0] - grid[below]))
    if rates[1]:
        beyond = grid > xs[-1]
        a[beyond] = math.sqrt(p[last]) * np.exp(-0.5 * rates[1] * (grid[beyond] - xs[-1]))
    return _flat_phase_fwhm(a, step, dnu_fwhm)


def _flat_phase_fwhm(a: np.ndarray, step: float, dnu_fwhm: float) -> float:
    """FWHM of |Σ a_k exp(-2πi k step t)|² (a ≥ 0, so its peak is at t = 0): an FFT zero-padded
    until the half width spans ``HALF_WIDTH_SAMPLES`` samples, the crossing on the cubic through
    them."""
    guess = 0.25 / dnu_fwhm
    n = 1 << max(int(math.ceil(math.log2(max(2 * a.size, 2 * HALF_WIDTH_SAMPLES / (guess * step))))), 4)
    while True:
        n = min(n, MAX_FFT)
        power = np.abs(np.fft.fft(a, n)[: n // 2]) ** 2  # at t_j = j / (n step)
        below = np.flatnonzero(power < 0.5 * power[0])
        if below.size == 0:
            raise DataProblem("the transform-limited pulse does not fall to half its peak inside the computed window")
        if below[0] >= HALF_WIDTH_SAMPLES or n >= MAX_FFT:
            break
        n *= 2
    j = int(below[0])  # the first sample below half maximum; the window ends there
    i = max(j - 3, 0)
    cross = _crossings(np.arange(i, j + 1) / (n * step), power[i:j + 1], 0.5 * float(power[0]))
    return 2.0 * float(cross.right)  # |E(t)| of a real, nonnegative amplitude spectrum is even in t


# ------------------------------------------------------------ the analyses
def analyse_spectrum(wavelength_m, counts, c: float) -> SpectrumAnalysis:
    """Widths, centre and transform limit of a spectrum S(λ) (counts per unit wavelength)."""
    try:
        c = float(c)
    except (TypeError, ValueError):
        raise ValueError("c must be a speed in m/s, a plain number") from None
    if not (math.isfinite(c) and c > 0):
        raise ValueError("c must be a positive finite speed")
    lam, s_raw, repeated = _prepare(wavelength_m, counts, "wavelengths", "counts")
    if lam[0] <= 0:
        raise DataProblem("the wavelengths must be positive")
    warnings: list[str] = []
    if repeated:
        warnings.append(f"{repeated} wavelengths appear more than once; their counts were averaged.")
    cl = _clean(lam, s_raw, "spectrum", SPECTRUM_BASELINE_FLOOR)
    if cl.cross.left is None or cl.cross.right is None:
        side = "short" if cl.cross.left is None else "long"
        raise DataProblem(f"the spectrum does not fall to half its peak at the {side}-wavelength edge of the "
                          "window: its width cannot be measured")
    _spectrum_warnings(lam, s_raw, cl, warnings)
    fwhm_lam = cl.cross.right - cl.cross.left
    samples = int(cl.cross.last - cl.cross.first + 1)

    # per unit frequency, ascending; the Jacobian λ²/c relative to the peak's wavelength
    nu = c / lam[::-1]
    if not np.all(np.isfinite(nu)) or not np.all(np.diff(nu) > 0):
        raise DataProblem("the wavelengths are too small to be turned into frequencies")
    jac = (lam[::-1] / lam[cl.peak]) ** 2
    s_nu = cl.smooth[::-1] * jac
    cross_nu = _crossings(nu, s_nu, float(s_nu.max()) / 2.0)
    if cross_nu.left is None or cross_nu.right is None:
        raise DataProblem("the spectrum per unit frequency does not fall to half its peak inside the window")
    fwhm_nu = cross_nu.right - cross_nu.left

    def keep(k: float, s: np.ndarray = cl.smooth, floor: float = THRESHOLD_FLOOR) -> np.ndarray:
        return _support(s, cl.peak, max(k * cl.sigma_s, floor), cl.sigma_s)[::-1]

    raw_nu = np.clip(cl.y, 0.0, None)[::-1] * jac
    noise_s, noise_raw = cl.sigma_s * jac, cl.sigma * jac

    # smoothing shares each sample's noise with about (σ / σ_s)² neighbours
    shared = (cl.sigma / cl.sigma_s) ** 2 if cl.sigma_s > 0 else 1.0

    def limit(k, wings, spectrum=s_nu, noise=noise_s, on_amplitude=True, kept=None, correlated=shared):
        return _pulse_fwhm(nu, spectrum, keep(k) if kept is None else kept, fwhm_nu, on_amplitude, wings, noise,
                           correlated)

    limits = {}
    for k in THRESHOLDS:
        limits["cut", k] = limit(k, None)
    for k in WING_THRESHOLDS:
        limits["wings", k] = limit(k, 0.0)
    k = CENTRAL_THRESHOLD
    for kw in WING_THRESHOLDS[1:]:
        limits["slow wings", kw] = limit(kw, 2.0)
    limits["power", k] = limit(k, None, on_amplitude=False)
    if cl.h > 0:  # the smoothing widens the spectrum a little: the data as measured too
        limits["raw cut", k] = limit(k, None, raw_nu, noise_raw, correlated=1.0)
        limits["raw wings", k] = limit(k, 0.0, raw_nu, noise_raw, correlated=1.0)
    if cl.alternative is not None:  # the two sides of the baseline read the other way
        other = cl.smooth + cl.alternative
        # nothing below the difference between the two readings is known either
        kept = keep(k, other, max(THRESHOLD_FLOOR, float(np.abs(cl.alternative).max())))
        limits["other baseline", k] = limit(k, None, other[::-1] * jac, kept=kept)
        limits["other baseline wings", k] = limit(k, 0.0, other[::-1] * jac, kept=kept)
    if not any(cl.baseline_sides):
        # the true baseline lies somewhere between zero and the lowest smoothed value
        lowest = float(cl.smooth.min())
        if lowest > 0:
            shifted = (cl.smooth - lowest) / (1.0 - lowest)
            limits["lowest baseline", k] = limit(k, None, shifted[::-1] * jac, kept=keep(k, shifted))
    # between a spectrum that ends where it enters the noise and one whose wings go on falling
    # as they fell there, the geometric mean
    duration = math.sqrt(limits["cut", k] * limits["wings", k])
    low = min(limits.values()) * (1.0 - NUMERICAL_MARGIN)
    high = max(limits.values()) * (1.0 + NUMERICAL_MARGIN)

    central_keep = keep(CENTRAL_THRESHOLD)[::-1]
    weights = np.where(central_keep, np.clip(cl.smooth, 0.0, None), 0.0)
    centre = _trapezoid(lam * weights, lam) / _trapezoid(weights, lam)

    if samples < 5:
        warnings.append(f"only {samples} samples lie above half maximum: the widths are uncertain by about a "
                        "sample spacing.")
    if high - low > 0.2 * duration:
        warnings.append(f"the noise makes the transform limit uncertain: between {low * 1e15:.3g} fs and "
                        f"{high * 1e15:.3g} fs depending on where the spectrum is cut from the noise.")
    return SpectrumAnalysis(float(fwhm_lam), float(fwhm_nu), float(centre), float(duration), float(low),
                            float(high), tuple(warnings))


def _spectrum_warnings(lam: np.ndarray, s_raw: np.ndarray, cl: _Cleaned, warnings: list[str]) -> None:
    if not any(cl.baseline_sides):
        warnings.append("the baseline could not be established: too little of the window lies clear of the "
                        "spectrum, so no baseline was subtracted (a constant offset would widen it).")
    elif not all(cl.baseline_sides):
        have, lack = ("short", "long") if cl.baseline_sides[0] else ("long", "short")
        warnings.append(f"the baseline comes from the {have}-wavelength side only: the window ends too close "
                        f"to the spectrum on its {lack}-wavelength side.")
    elif cl.sloped:
        warnings.append(f"the baseline differs between the two sides of the spectrum "
                        f"({_pct(cl.side_levels[0])} and {_pct(cl.side_levels[1])} of the peak); a straight "
                        "line between them was subtracted.")
    elif abs(cl.side_levels[0] - cl.side_levels[1]) > max(3.0 * cl.sigma, SPECTRUM_BASELINE_FLOOR):
        warnings.append(f"the baseline differs between the two sides of the spectrum "
                        f"({_pct(cl.side_levels[0])} and {_pct(cl.side_levels[1])} of the peak) and no straight "
                        "line joins them; the lower was subtracted.")
    edge_level = max(CENTRAL_THRESHOLD * cl.sigma_s, 1e-3)
    for level, side, at in ((cl.wing_levels[0], "short", lam[0]), (cl.wing_levels[1], "long", lam[-1])):
        if level > edge_level:
            warnings.append(f"the spectrum touches the {side}-wavelength edge of the window: it is still at "
                            f"{_pct(level)} of its peak at {at * 1e9:.1f} nm, so part of it may be missing "
                            "from its widths and transform limit.")
    if _crossings(lam, cl.smooth, 0.5, 3.0 * cl.sigma_s).dips:
        warnings.append("the spectrum dips below half maximum between its outermost half-maximum points: its "
                        "FWHM spans all its peaks.")
    top = float(np.max(s_raw))
    at_top = np.flatnonzero(s_raw == top)
    if at_top.size >= 3 and np.all(np.diff(at_top) == 1):
        warnings.append(f"the highest count is reached by {at_top.size} neighbouring samples: the detector may "
                        "be saturated, which flattens the peak and widens the spectrum.")
    if float(cl.y.min()) < -max(8.0 * cl.sigma, 0.02):
        warnings.append(f"the counts fall to {_pct(-float(cl.y.min()))} of the peak below the baseline: a dark "
                        "spectrum may have been over-subtracted.")
    if cl.sigma_s > 0.02:
        warnings.append(f"the noise is {_pct(cl.sigma_s)} of the peak even after smoothing.")


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
    x, y, repeated = _prepare(delay_s, counts, "delays", "counts")
    scale = float(max(abs(x[0]), abs(x[-1])))
    x = x / scale  # delays near the float limits cannot overflow their differences
    warnings: list[str] = []
    if repeated:
        warnings.append(f"{repeated} delays appear more than once; their counts were averaged.")
    cl = _clean(x, y, "autocorrelation trace", TRACE_BASELINE_FLOOR)
    height, centre, ln_sigma = _fit_peak(x, cl.y, cl.smooth, cl.peak)
    half = height / 2.0
    cross = _crossings(x, cl.smooth, half, 3.0 * cl.sigma_s)
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
        cr = _crossings(x, shifted, 0.5)
        if cr.left is not None or cr.right is not None:
            estimates.append(_ac_width(centre, cr.left, cr.right))
    low = (min(estimates) - spread) * (1.0 - NUMERICAL_MARGIN)
    high = (max(estimates) + spread) * (1.0 + NUMERICAL_MARGIN)

    for ok, side, level in ((sides[0], "negative", cl.wing_levels[0]), (sides[1], "positive", cl.wing_levels[1])):
        if not ok:
            warnings.append(f"the trace's wings do not reach the baseline on its {side}-delay side (it ends at "
                            f"{_pct(max(level, 0.0))} of its peak): a longer scan would fix the baseline.")
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
        warnings.append(f"the noise is {_pct(cl.sigma_s)} of the peak even after smoothing.")
    return AutocorrelationAnalysis(fwhm * scale, max(low, 0.0) * scale, high * scale, tuple(warnings))


def _ac_width(centre: float, left: float | None, right: float | None) -> float:
    if left is not None and right is not None:
        return float(right - left)
    if left is not None:
        return 2.0 * (centre - left)
    return 2.0 * (right - centre)
