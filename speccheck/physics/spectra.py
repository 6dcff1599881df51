"""Widths and transform limit of a measured spectrum.

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
* Widths are full widths at half maximum between the *outermost* half-maximum
  points (a spectrum that dips below half maximum between two peaks keeps its
  whole width, and says so).

Method
------
1-3. Input, baseline, noise and smoothing: ``trace_cleaning``.
4. Frequency: ν = c/λ, S(ν) = S(λ) λ²/c.  FWHMs come from the outermost
   half-maximum crossings of the smoothed data, found on the cubic Hermite
   curve through the samples (``curves.crossings``).
5. Transform limit (``transform_limit``): the spectrum is kept above a
   threshold k σ_s and transformed with a flat phase.
6. What lies under the noise is not known, so the limit is computed both ways:
   *cut* (the spectrum ends where it enters the noise: too long a pulse) and
   *wings* (beyond the kept samples it goes on falling exponentially, at the
   rate it falls at its edges: too short a pulse for a Gaussian, close for a
   sech²).  The reported limit is the geometric mean of the two at k = 3;
   ``transform_limited_low`` and ``..._high`` span thresholds k =
   ``THRESHOLDS``, wings two standard errors slower, resampling the power
   instead of the amplitude, the unsmoothed data, the other reading of the
   baseline (and, when no baseline was found, the lowest value as baseline),
   widened by ``NUMERICAL_MARGIN``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from speccheck.physics.curves import crossings, trapezoid
from speccheck.physics.trace_cleaning import (NUMERICAL_MARGIN, SPECTRUM_BASELINE_FLOOR, Cleaned, DataProblem, clean,
                                              percent, prepare)
from speccheck.physics.transform_limit import pulse_fwhm, support

__all__ = ["DataProblem", "SpectrumAnalysis", "analyse_spectrum"]

THRESHOLDS = (1.5, 2.0, 3.0, 5.0, 8.0)  # transform-limit thresholds, in σ_s
CENTRAL_THRESHOLD = 3.0
THRESHOLD_FLOOR = 1e-6  # of the peak: the threshold on noiseless data
WING_THRESHOLDS = (2.0, 3.0, 5.0)  # thresholds at which the wings are continued


@dataclass(frozen=True)
class SpectrumAnalysis:
    fwhm_wavelength: float  # m, of S(λ)
    fwhm_frequency: float  # Hz, of S(ν) = S(λ) λ²/c
    centre_wavelength: float  # m, intensity-weighted mean of S(λ) over the spectrum above the noise
    transform_limited_duration: float  # s, intensity FWHM of the flat-phase pulse
    transform_limited_low: float  # s
    transform_limited_high: float  # s
    warnings: tuple[str, ...]
    # the spectral amplitude √S(ω) on an even grid of angular frequencies (rad/s, ascending), zero where
    # the spectrum is below the noise: the field's amplitude on a beam path
    field_omega: tuple[float, ...] = ()
    field_amplitude: tuple[float, ...] = ()


def analyse_spectrum(wavelength_m, counts, c: float) -> SpectrumAnalysis:
    """Widths, centre and transform limit of a spectrum S(λ) (counts per unit wavelength)."""
    try:
        c = float(c)
    except (TypeError, ValueError):
        raise ValueError("c must be a speed in m/s, a plain number") from None
    if not (math.isfinite(c) and c > 0):
        raise ValueError("c must be a positive finite speed")
    lam, s_raw, repeated = prepare(wavelength_m, counts, "wavelengths", "counts")
    if lam[0] <= 0:
        raise DataProblem("the wavelengths must be positive")
    warnings: list[str] = []
    if repeated:
        warnings.append(f"{repeated} wavelengths appear more than once; their counts were averaged.")
    cl = clean(lam, s_raw, "spectrum", SPECTRUM_BASELINE_FLOOR)
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
    cross_nu = crossings(nu, s_nu, float(s_nu.max()) / 2.0)
    if cross_nu.left is None or cross_nu.right is None:
        raise DataProblem("the spectrum per unit frequency does not fall to half its peak inside the window")
    fwhm_nu = cross_nu.right - cross_nu.left

    def keep(k: float, s: np.ndarray = cl.smooth, floor: float = THRESHOLD_FLOOR) -> np.ndarray:
        return support(s, cl.peak, max(k * cl.sigma_s, floor), cl.sigma_s)[::-1]

    raw_nu = np.clip(cl.y, 0.0, None)[::-1] * jac
    noise_s, noise_raw = cl.sigma_s * jac, cl.sigma * jac

    # smoothing shares each sample's noise with about (σ / σ_s)² neighbours
    shared = (cl.sigma / cl.sigma_s) ** 2 if cl.sigma_s > 0 else 1.0

    def limit(k, wings, spectrum=s_nu, noise=noise_s, on_amplitude=True, kept=None, correlated=shared):
        return pulse_fwhm(nu, spectrum, keep(k) if kept is None else kept, fwhm_nu, on_amplitude, wings, noise,
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
    centre = trapezoid(lam * weights, lam) / trapezoid(weights, lam)

    if samples < 5:
        warnings.append(f"only {samples} samples lie above half maximum: the widths are uncertain by about a "
                        "sample spacing.")
    if high - low > 0.2 * duration:
        warnings.append(f"the noise makes the transform limit uncertain: between {low * 1e15:.3g} fs and "
                        f"{high * 1e15:.3g} fs depending on where the spectrum is cut from the noise.")
    omega, amplitude = _field_amplitude(nu, s_nu, keep(CENTRAL_THRESHOLD))
    return SpectrumAnalysis(float(fwhm_lam), float(fwhm_nu), float(centre), float(duration), float(low),
                            float(high), tuple(warnings), omega, amplitude)


def _field_amplitude(nu: np.ndarray, s_nu: np.ndarray, kept: np.ndarray, points: int = 1024):
    """√S on an even grid of ω = 2πν over the samples kept above the noise (and a tenth of their span
    either side, where it is zero), at most ``points`` samples: what the field is built from."""
    inside = nu[kept]
    span = float(inside[-1] - inside[0])
    grid = np.linspace(inside[0] - 0.1 * span, inside[-1] + 0.1 * span, points)
    s = np.interp(grid, nu, np.where(kept, np.clip(s_nu, 0.0, None), 0.0), left=0.0, right=0.0)
    s = np.where((grid >= inside[0]) & (grid <= inside[-1]), s, 0.0)
    amp = np.sqrt(s / s.max())
    return tuple(float(x) for x in 2.0 * math.pi * grid), tuple(float(x) for x in amp)


def _spectrum_warnings(lam: np.ndarray, s_raw: np.ndarray, cl: Cleaned, warnings: list[str]) -> None:
    if not any(cl.baseline_sides):
        warnings.append("the baseline could not be established: too little of the window lies clear of the "
                        "spectrum, so no baseline was subtracted (a constant offset would widen it).")
    elif not all(cl.baseline_sides):
        have, lack = ("short", "long") if cl.baseline_sides[0] else ("long", "short")
        warnings.append(f"the baseline comes from the {have}-wavelength side only: the window ends too close "
                        f"to the spectrum on its {lack}-wavelength side.")
    elif cl.sloped:
        warnings.append(f"the baseline differs between the two sides of the spectrum "
                        f"({percent(cl.side_levels[0])} and {percent(cl.side_levels[1])} of the peak); a straight "
                        "line between them was subtracted.")
    elif abs(cl.side_levels[0] - cl.side_levels[1]) > max(3.0 * cl.sigma, SPECTRUM_BASELINE_FLOOR):
        warnings.append(f"the baseline differs between the two sides of the spectrum "
                        f"({percent(cl.side_levels[0])} and {percent(cl.side_levels[1])} of the peak) and no straight "
                        "line joins them; the lower was subtracted.")
    edge_level = max(CENTRAL_THRESHOLD * cl.sigma_s, 1e-3)
    for level, side, at in ((cl.wing_levels[0], "short", lam[0]), (cl.wing_levels[1], "long", lam[-1])):
        if level > edge_level:
            warnings.append(f"the spectrum touches the {side}-wavelength edge of the window: it is still at "
                            f"{percent(level)} of its peak at {at * 1e9:.1f} nm, so part of it may be missing "
                            "from its widths and transform limit.")
    if crossings(lam, cl.smooth, 0.5, 3.0 * cl.sigma_s).dips:
        warnings.append("the spectrum dips below half maximum between its outermost half-maximum points: its "
                        "FWHM spans all its peaks.")
    top = float(np.max(s_raw))
    at_top = np.flatnonzero(s_raw == top)
    if at_top.size >= 3 and np.all(np.diff(at_top) == 1):
        warnings.append(f"the highest count is reached by {at_top.size} neighbouring samples: the detector may "
                        "be saturated, which flattens the peak and widens the spectrum.")
    if float(cl.y.min()) < -max(8.0 * cl.sigma, 0.02):
        warnings.append(f"the counts fall to {percent(-float(cl.y.min()))} of the peak below the baseline: a dark "
                        "spectrum may have been over-subtracted.")
    if cl.sigma_s > 0.02:
        warnings.append(f"the noise is {percent(cl.sigma_s)} of the peak even after smoothing.")

