"""Measured data files: a spectrum or an autocorrelation trace, two columns of numbers.

Pure functions on text and numpy arrays (the checker injects the file
reading).  Every problem raises ``DataProblem`` with a message saying what was
expected; nothing here raises anything else on bad data.

* ``read_table``: two numeric columns, comma, semicolon, tab or whitespace
  separated, an optional header line, ``#`` comments.
* ``analyse_spectrum``: FWHM in wavelength and frequency, and the
  transform-limited duration: the spectrum is moved from wavelength to
  frequency with the Jacobian S(ν) = S(λ) λ²/c, resampled on an even frequency
  grid, its amplitude √S(ν) is Fourier transformed with a flat phase, and the
  FWHM of |E(t)|² is measured.
* ``analyse_autocorrelation``: FWHM of the trace.

A baseline is subtracted before any width is measured, and the noise on
the wings of a spectrum is soft-thresholded before its transform (see
``_baseline``).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

MIN_POINTS = 8
MAX_ROWS = 1_000_000
_SPLIT = re.compile(r"[,;\t ]+")


class DataProblem(ValueError):
    pass


@dataclass(frozen=True)
class Spectrum:
    centre_wavelength: float  # m, intensity-weighted
    fwhm_wavelength: float  # m
    fwhm_frequency: float  # Hz
    transform_limited_duration: float  # s, intensity FWHM of the flat-phase pulse


def read_table(text: str) -> tuple[np.ndarray, np.ndarray]:
    xs, ys = [], []
    header_allowed = True
    for number, raw in enumerate(text.splitlines(), start=1):
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        fields = [f for f in _SPLIT.split(line) if f]
        try:
            x, y = float(fields[0]), float(fields[1])
        except (ValueError, IndexError):
            if header_allowed:
                header_allowed = False
                continue
            raise DataProblem(f"line {number}: expected two numbers, got {raw.strip()[:40]!r}") from None
        header_allowed = False
        if not (np.isfinite(x) and np.isfinite(y)):
            raise DataProblem(f"line {number}: {raw.strip()[:40]!r} is not finite (NaN or infinite)")
        xs.append(x)
        ys.append(y)
        if len(xs) > MAX_ROWS:
            raise DataProblem(f"more than {MAX_ROWS} rows")
    if len(xs) < MIN_POINTS:
        raise DataProblem(f"{len(xs)} data points; at least {MIN_POINTS} are needed for a width")
    return np.asarray(xs, dtype=float), np.asarray(ys, dtype=float)


def _monotonic(x: np.ndarray, y: np.ndarray, what: str) -> tuple[np.ndarray, np.ndarray]:
    step = np.diff(x)
    if np.all(step > 0):
        return x, y
    if np.all(step < 0):
        return x[::-1], y[::-1]
    raise DataProblem(f"the {what} column is not strictly increasing or decreasing")


def _baseline(y: np.ndarray) -> tuple[np.ndarray, float]:
    """Subtract the baseline; return the cleaned data and the noise level σ.

    The baseline is the median of the first and last twentieth of the samples
    (a measured trace is recorded with room on both sides of its peak); σ is
    estimated from differences of neighbouring samples, 1.4826 × MAD(Δy) / √2,
    which a smooth, well-sampled signal hardly contributes to.
    """
    edge = max(len(y) // 20, 1)
    floor = np.median(np.concatenate((y[:edge], y[-edge:])))
    step = np.diff(y)
    sigma = float(1.4826 * np.median(np.abs(step - np.median(step))) / np.sqrt(2.0))
    return np.clip(y - floor, 0.0, None), sigma


SMOOTHING = 0.02  # moving-average window for spectra, as a fraction of the samples
NOISE_THRESHOLD = 3.0  # soft threshold on the smoothed spectrum, in units of its noise σ


def _smooth(y: np.ndarray, fraction: float) -> np.ndarray:
    """Moving average over ``fraction`` of the samples (odd window): noise on the wings would
    otherwise lift √S everywhere and shorten the transform-limited pulse."""
    window = max(1, int(len(y) * fraction)) | 1
    if window == 1:
        return y
    padded = np.pad(y, window // 2, mode="edge")
    return np.convolve(padded, np.ones(window) / window, mode="valid")


def fwhm(x: np.ndarray, y: np.ndarray) -> float:
    """Full width at half maximum of the main peak, edges linearly interpolated."""
    peak = int(np.argmax(y))
    top = y[peak]
    if not top > 0:
        raise DataProblem("no peak above the baseline")
    half = top / 2.0
    left = peak
    while left > 0 and y[left] > half:
        left -= 1
    right = peak
    while right < len(y) - 1 and y[right] > half:
        right += 1
    if y[left] > half or y[right] > half:
        raise DataProblem("the peak does not fall to half its height inside the data (no clear peak)")
    x_left = np.interp(half, [y[left], y[left + 1]], [x[left], x[left + 1]])
    x_right = np.interp(half, [y[right], y[right - 1]], [x[right], x[right - 1]])
    return float(x_right - x_left)


def analyse_spectrum(wavelength_m: np.ndarray, intensity: np.ndarray, c: float) -> Spectrum:
    if np.any(wavelength_m <= 0):
        raise DataProblem("wavelengths must be positive")
    lam, s_lam = _monotonic(wavelength_m, intensity, "wavelength")
    s_lam, sigma = _baseline(s_lam)
    smoothed = _smooth(s_lam, SMOOTHING)
    sigma_smoothed = sigma / np.sqrt(max(1, int(len(s_lam) * SMOOTHING)) | 1)
    width_lam = fwhm(lam, s_lam)
    weights = s_lam.sum()
    centre = float((lam * s_lam).sum() / weights)
    nu = c / lam[::-1]
    s_nu = (s_lam * lam**2 / c)[::-1]
    n = 1 << int(np.ceil(np.log2(max(4 * len(nu), 1024))))
    grid = np.linspace(nu[0], nu[-1], n)
    s_grid = np.interp(grid, nu, s_nu)
    width_nu = fwhm(grid, s_grid)
    pad = 8 * n  # zero padding: a fine time grid
    d_nu = grid[1] - grid[0]
    # Noise on the wings lifts √S across the whole band and shortens the pulse: the smoothed
    # spectrum, soft-thresholded at NOISE_THRESHOLD σ of its noise, is transformed instead.
    jacobian = lam[::-1] ** 2 / c
    s_clean = np.interp(grid, nu, (np.clip(smoothed - NOISE_THRESHOLD * sigma_smoothed, 0.0, None))[::-1] * jacobian)
    amplitude = np.sqrt(s_clean)
    field = np.fft.fftshift(np.fft.ifft(amplitude, pad))
    t = (np.arange(pad) - pad // 2) / (pad * d_nu)
    duration = fwhm(t, np.abs(field) ** 2)
    return Spectrum(centre, width_lam, width_nu, duration)


def analyse_autocorrelation(delay_s: np.ndarray, trace: np.ndarray) -> float:
    delay, values = _monotonic(delay_s, trace, "delay")
    return fwhm(delay, _baseline(values)[0])
