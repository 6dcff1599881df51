"""Preparing and cleaning a measured trace (a spectrum or an autocorrelation): input checks,
baseline, noise and the smoothing width.

Pure numerical functions on numpy arrays: no file reading, no findings.  Data
that cannot be analysed raise ``DataProblem`` with a sentence saying why.

1. ``prepare``: the grid may be unsorted and nonuniform; the abscissae are
   sorted and repeated ones averaged.  Values are divided by their largest
   magnitude first, so values near 1e308 cannot overflow.
2. ``clean``, the baseline (iterated with the width): the data farther than
   ``FAR`` × FWHM beyond the half-maximum points, on each side, are cut into up
   to eight blocks.  A straight line is fitted to the blocks' medians of both
   sides; while a block lies off it by more than three standard errors, the
   innermost block of the worse side is dropped as a wing not yet down (two
   must remain per side).  Sides that differ by less than the noise of one
   sample give a flat baseline at the lower (the line is kept as the other
   reading, ``Cleaned.alternative``), sides farther apart the line.  Without a
   line, each side on its own is the lowest block with the blocks that agree
   with it, and a side where none agrees is a wing still falling, not a
   baseline; the lower side is subtracted.  When neither side qualifies,
   nothing is subtracted (a spectrum that fills the window is not eaten).  The
   noise σ is each sample's robust deviation from the line through its two
   neighbours (``curves.neighbour_sigma``), taken on the baseline where there
   is one.
3. Smoothing is tied to the data's own width, never to the number of samples:
   the running mean of ``curves.smooth`` over ±FWHM/``SMOOTH_PER_FWHM`` (close
   to a Gaussian kernel of σ = FWHM/40, which widens a Gaussian peak by
   0.17 %).  Data sampled more coarsely than twice that width are not
   smoothed.  The smoothed noise σ_s comes from ``curves.noise_gain``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from speccheck.physics.curves import MAD, Crossings, crossings, neighbour_residuals, neighbour_sigma, noise_gain, smooth

MIN_POINTS = 8
FAR = 1.0  # baseline points lie this many FWHM beyond the half-maximum points
MIN_SIDE = 5  # samples needed on one side to establish the baseline there
# of the peak: blocks of a baseline this close to the lowest agree with it.  A transform limit
# feels the spectrum's wings far below the half maximum that sets an autocorrelation's width.
SPECTRUM_BASELINE_FLOOR = 1e-5
TRACE_BASELINE_FLOOR = 1e-3
MIN_PEAK_SIGMAS = 6.0  # a peak must stand this many σ_s above the baseline
SMOOTH_PER_FWHM = 40.0  # running-mean half-width = FWHM / this
NUMERICAL_MARGIN = 0.005  # the interval also allows this much for the computation itself


class DataProblem(ValueError):
    """Data that cannot be analysed; the message is a plain sentence."""


# ----------------------------------------------------------------- input
def prepare(x, y, x_name: str, y_name: str) -> tuple[np.ndarray, np.ndarray, int]:
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
class Cleaned:
    y: np.ndarray  # raw data minus the baseline, over the smoothed peak
    smooth: np.ndarray  # smoothed, minus the baseline, over its peak (peak = 1)
    h: float  # smoothing half-width
    sigma: float  # noise σ of the raw data, over the peak
    sigma_s: float  # noise σ of the smoothed data near the peak, over the peak
    peak: int
    cross: Crossings
    baseline_sides: tuple[bool, bool]  # established below / above the peak
    side_levels: tuple[float, float] | None  # the baseline on both sides, over the peak
    sloped: bool  # a straight line between the two sides was subtracted (else a constant)
    alternative: np.ndarray | None  # add to ``smooth`` for the other reading of the two sides
    wing_levels: tuple[float, float]  # the smoothed data at the two ends, over the peak


def _width(x: np.ndarray, peak: int, cross: Crossings) -> tuple[float, float]:
    lo = cross.left if cross.left is not None else 2 * x[peak] - cross.right
    hi = cross.right if cross.right is not None else 2 * x[peak] - cross.left
    return lo, hi


def _peak(x: np.ndarray, s: np.ndarray, what: str) -> tuple[int, float, Crossings]:
    peak = int(np.argmax(s))
    top = float(s[peak])
    if not top > 0:
        raise DataProblem(f"the {what} has no peak above its baseline")
    if peak in (0, s.size - 1):
        raise DataProblem(f"the {what} is highest at the end of its range: no peak lies inside the data")
    cross = crossings(x, s, top / 2.0)
    if cross.left is None and cross.right is None:
        raise DataProblem(f"the {what} does not fall to half its highest value on either side: there is no clear "
                          "peak whose width could be measured")
    return peak, top, cross


def clean(x: np.ndarray, y: np.ndarray, what: str, floor: float) -> Cleaned:
    """Baseline, noise and smoothing (see the module's docstring); ``floor`` (of the peak) is how
    far blocks of the baseline may differ and still agree."""
    base = np.full_like(y, np.quantile(y, 0.05))
    h = 0.0
    sides = (False, False)
    levels = None
    sigma = None
    for _ in range(8):
        peak, top, cross = _peak(x, smooth(x, y - base, h), what)
        lo, hi = _width(x, peak, cross)
        width = hi - lo
        if not width > 0:
            raise DataProblem(f"the {what} has no peak wider than its sampling")
        far = (np.flatnonzero(x < lo - FAR * width), np.flatnonzero(x > hi + FAR * width))
        # blocks of each side, innermost (nearest the peak) last; the noise from all their samples
        blocks = [_blocks(x, y, far[0]) if far[0].size >= 2 * MIN_SIDE else [],
                  _blocks(x, y, far[1][::-1]) if far[1].size >= 2 * MIN_SIDE else []]
        residuals = [neighbour_residuals(x[f], y[f]) for f, bl in zip(far, blocks) if bl]
        pooled = float(MAD * np.median(np.abs(np.concatenate(residuals)))) if residuals else 0.0
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
    s = smooth(x, y0, h)
    peak, top, cross = _peak(x, s, what)
    if sigma is None:
        sigma = neighbour_sigma(x, y0)
    lo, hi = _width(x, peak, cross)
    sigma_s = sigma * noise_gain(x, h, float(x[peak]), 3.0 * (hi - lo))
    y0, s = y0 / top, s / top
    sigma, sigma_s = sigma / top, sigma_s / top
    if 1.0 < MIN_PEAK_SIGMAS * sigma_s:
        raise DataProblem(f"the {what} has no peak that stands above its noise "
                          f"(the noise is {percent(sigma_s)} of the highest point)")
    if levels is not None:
        levels = (levels[0] / top, levels[1] / top)
    shift = None if alternative is None else (base - alternative) / top
    return Cleaned(y0, s, h, sigma, sigma_s, peak, cross, sides, levels, sloped, shift,
                    (float(s[0]), float(s[-1])))


def percent(v: float) -> str:
    v *= 100.0
    return f"{v:.2g} %" if v < 10 else f"{v:.0f} %"

