"""The transform-limited pulse of a spectrum per unit frequency: what is kept of the
spectrum, the wings continued beyond it, and the FWHM of the flat-phase pulse.

* ``support``: the spectrum is kept where its smoothed value is above a
  threshold (the run of samples around the peak, and any other run of three or
  more samples that rises ``SIDE_RUN_RISE`` σ_s above the threshold);
  elsewhere it is zero, so noise on the wings cannot lift √S over the whole
  window.
* ``pulse_fwhm``: negatives are clipped before any square root.  Optionally the
  spectrum goes on beyond the kept samples, falling exponentially at the rate a
  weighted fit of ln S finds at its edges, never slower than the chord from the
  peak.  The amplitude √S(ν) (or the power, resampled and then rooted) is
  resampled (cubic Hermite) on an even frequency grid whose step comes from
  the spectrum's own width (at least 64 points across its FWHM and 1024 across
  what is kept, no coarser than the data), zero-padded until the pulse's half
  width spans ``HALF_WIDTH_SAMPLES`` samples, Fourier transformed with a flat
  phase; the FWHM of |E(t)|² comes from the cubic through the samples at its
  half-maximum crossing.
"""

from __future__ import annotations

import math

import numpy as np

from speccheck.physics.curves import crossings, hermite, slopes
from speccheck.physics.trace_cleaning import DataProblem

SIDE_RUN_RISE = 6.0  # a side run of the spectrum must rise this many σ_s above the threshold
HALF_WIDTH_SAMPLES = 16  # time samples across half the transform-limited pulse's FWHM
MAX_SUPPORT_POINTS = 1 << 16
MAX_FFT = 1 << 21


def support(s: np.ndarray, peak: int, threshold: float, sigma_s: float) -> np.ndarray:
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


def pulse_fwhm(nu: np.ndarray, p: np.ndarray, keep: np.ndarray, dnu_fwhm: float, on_amplitude: bool,
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
        v = np.clip(hermite(xs, ys, slopes(xs, ys), grid[inner]), 0.0, None)
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
    cross = crossings(np.arange(i, j + 1) / (n * step), power[i:j + 1], 0.5 * float(power[0]))
    return 2.0 * float(cross.right)  # |E(t)| of a real, nonnegative amplitude spectrum is even in t

