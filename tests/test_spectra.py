"""speccheck.physics.spectra and .autocorrelation: widths and transform limits of measured spectra and traces.

The spectra are built here in frequency, S(ν), so that the analytic values hold
exactly, and turned into counts per unit wavelength with the Jacobian
S(λ) = S(ν) c/λ².  The widths given in nm are nominal: the frequency FWHM is
Δν = c Δλ / λ0², and that Δν is the one the references are applied to.

References
* Time-bandwidth products of transform-limited pulses, Δν·τ = 0.441 (Gaussian)
  and 0.315 (sech²), and intensity-autocorrelation factors √2 (Gaussian) and
  1.543 (sech²): the pulse-shape tables of J.-C. Diels & W. Rudolph, *Ultrashort
  Laser Pulse Phenomena*, 2nd ed., ch. 9, and A. M. Weiner, *Ultrafast Optics*,
  ch. 3 (from memory; the same values are in speccheck/shapes.py).
* A sech² intensity sech²(t/T) has FWHM 2 arccosh(√2) T = 1.7627 T (closed form).
* The intensity autocorrelation of sech²(t/T) is 3 (u coth u − 1) / sinh² u with
  u = τ/T (from memory); ``test_the_sech2_autocorrelation_formula_matches_direct_quadrature``
  checks it against a direct numerical integral before the other tests use it.
* Independent method: ``test_the_transform_limit_agrees_with_direct_quadrature``
  evaluates the Fourier integral of √S(ν) by trapezoidal quadrature (no FFT) and
  finds its half-maximum point by bisection.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from speccheck.physics.autocorrelation import AutocorrelationAnalysis, analyse_autocorrelation
from speccheck.physics.spectra import DataProblem, SpectrumAnalysis, analyse_spectrum

C = 299792458.0  # m/s, exact (SI definition)
SECH2_FWHM = 2.0 * math.acosh(math.sqrt(2.0))  # FWHM of sech²(x) in x: 1.7627 (closed form)
TBP = {"gaussian": 0.441, "sech2": 0.315}  # published pulse-shape tables (see the docstring)
AC_FACTOR = {"gaussian": math.sqrt(2.0), "sech2": 1.543}  # published pulse-shape tables
# The tables round to three figures: 0.441 for 2 ln2/π = 0.44127 and 0.315 for (1.7627/π)² = 0.31481,
# 1.543 for 1.5427; the tolerances below are far wider than that rounding.

SURVEY = (350e-9, 1050e-9, 2048)  # a survey spectrometer: 350-1050 nm on 2048 pixels (common practice)


# ------------------------------------------------------------------ builders
def intensity_spectrum(shape: str, nu: np.ndarray, nu0: float, dnu: float) -> np.ndarray:
    """S(ν) with FWHM dnu: a Gaussian, or the sech² spectrum of a sech² pulse."""
    x = np.abs(nu - nu0) / dnu
    if shape == "gaussian":
        return np.exp(-4.0 * math.log(2.0) * x * x)
    e = np.exp(-SECH2_FWHM * x)  # sech²(1.7627 x) = 4 e^{-2a} / (1 + e^{-2a})², without overflow
    return 4.0 * e * e / (1.0 + e * e) ** 2


def wavelength_grid(kind: str, centre: float, width: float, rng: np.random.Generator) -> np.ndarray:
    lo, hi, n = SURVEY
    if kind == "survey":  # even in wavelength
        return np.linspace(lo, hi, n)
    if kind == "jittered":  # each pixel moved by up to ±45 % of a pixel, then shuffled
        grid = np.linspace(lo, hi, n)
        return rng.permutation(grid + rng.uniform(-0.45, 0.45, n) * (grid[1] - grid[0]))
    if kind == "frequency":  # even in frequency, so uneven in wavelength
        return C / np.linspace(C / hi, C / lo, 2 * n)
    if kind == "dense":  # ±5 FWHM around the centre, 4001 points
        return np.linspace(centre - 5 * width, centre + 5 * width, 4001)
    raise ValueError(kind)


def spectrum(shape, centre_nm, width_nm, grid, noise=0.0, baseline=0.0, seed=1):
    """(wavelengths in m, counts per unit wavelength, Δν in Hz)."""
    rng = np.random.default_rng(seed)
    centre, width = centre_nm * 1e-9, width_nm * 1e-9
    lam = wavelength_grid(grid, centre, width, rng)
    nu0, dnu = C / centre, C * width / centre**2
    s_lam = intensity_spectrum(shape, C / lam, nu0, dnu) * (centre / lam) ** 2  # S(λ) = S(ν) c/λ², scaled
    counts = s_lam / s_lam.max() + baseline + rng.normal(0.0, noise, lam.size)
    return lam, counts, dnu


def true_limit(shape: str, dnu: float) -> float:
    return TBP[shape] / dnu


def check_interval(result: SpectrumAnalysis, truth: float) -> None:
    assert result.transform_limited_low <= result.transform_limited_duration <= result.transform_limited_high
    assert result.transform_limited_low <= truth <= result.transform_limited_high


# ------------------------------------------------------------- clean spectra
CLEAN = [
    ("gaussian", 800, 2, "survey"), ("gaussian", 800, 10, "jittered"), ("gaussian", 800, 100, "survey"),
    ("gaussian", 1040, 2, "frequency"), ("gaussian", 1040, 10, "dense"), ("gaussian", 800, 100, "dense"),
    ("sech2", 800, 2, "survey"), ("sech2", 800, 10, "frequency"), ("sech2", 1040, 2, "jittered"),
    ("sech2", 1040, 10, "dense"), ("sech2", 800, 100, "dense"), ("sech2", 800, 30, "survey"),
]


@pytest.mark.parametrize("shape, centre, width, grid", CLEAN)
def test_a_clean_spectrum_gives_the_published_transform_limit(shape, centre, width, grid):
    lam, counts, dnu = spectrum(shape, centre, width, grid)
    result = analyse_spectrum(lam, counts, C)
    truth = true_limit(shape, dnu)
    assert result.transform_limited_duration == pytest.approx(truth, rel=0.03)
    check_interval(result, truth)
    # Δν is exact by construction; a 2 nm spectrum has only 4-6 samples in its FWHM on the
    # survey grids (one sample spacing is then 17-25 % of the width)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=0.03 if width == 2 and grid != "dense" else 0.005)


def test_the_frequency_grid_follows_the_spectrum_so_narrow_and_wide_are_alike():
    # the same shape 2 nm and 100 nm wide, each on a grid ±5 FWHM around it: the error of the
    # transform limit must not depend on the width
    errors = []
    for width in (2, 100):
        lam, counts, dnu = spectrum("gaussian", 800, width, "dense")
        errors.append(analyse_spectrum(lam, counts, C).transform_limited_duration / true_limit("gaussian", dnu) - 1)
    assert abs(errors[0]) < 0.005 and abs(errors[1]) < 0.005  # 0.441 is 2 ln2/π rounded (0.07 %)


@pytest.mark.parametrize("shape", ["gaussian", "sech2"])
def test_a_broad_spectrum_is_moved_to_frequency_with_the_jacobian(shape):
    # 150 nm at 800 nm: λ² changes by a factor 1.9 between the half-maximum points, so counts per
    # unit wavelength taken for counts per unit frequency would be 0.8-1.6 % too wide
    centre, width = 800e-9, 150e-9
    nu0, dnu = C / centre, C * width / centre**2
    lam = np.linspace(450e-9, 1500e-9, 3000)
    counts = intensity_spectrum(shape, C / lam, nu0, dnu) * (centre / lam) ** 2
    result = analyse_spectrum(lam, counts, C)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=0.003)
    assert result.transform_limited_duration == pytest.approx(true_limit(shape, dnu), rel=0.03)
    check_interval(result, true_limit(shape, dnu))


def test_the_wavelength_width_and_centre_agree_with_the_analytic_spectrum():
    # independent values from the analytic S(λ): its half-maximum points by bisection, its
    # intensity-weighted mean wavelength by a trapezoidal integral on a fine grid
    shape, centre, width = "sech2", 1040e-9, 30e-9
    nu0, dnu = C / centre, C * width / centre**2

    def s_lam(lam):
        return intensity_spectrum(shape, C / np.asarray(lam), nu0, dnu) / np.asarray(lam) ** 2

    fine = np.linspace(centre - 6 * width, centre + 6 * width, 400001)
    values = s_lam(fine)
    peak = fine[np.argmax(values)]

    def half_point(a, b):
        level = values.max() / 2
        for _ in range(100):
            m = 0.5 * (a + b)
            if (s_lam(m) - level) * (s_lam(a) - level) > 0:
                a = m
            else:
                b = m
        return 0.5 * (a + b)

    fwhm = half_point(peak, peak + 3 * width) - half_point(peak, peak - 3 * width)
    mean = np.sum(fine * values) / np.sum(values)
    lam, counts, _ = spectrum(shape, 1040, 30, "dense")
    result = analyse_spectrum(lam, counts, C)
    assert result.fwhm_wavelength == pytest.approx(fwhm, rel=0.005)
    assert result.centre_wavelength == pytest.approx(mean, rel=1e-5)


# ------------------------------------------------------------- noisy spectra
NOISY = [
    ("gaussian", 800, 2, "survey"), ("gaussian", 800, 10, "frequency"), ("gaussian", 1040, 2, "jittered"),
    ("gaussian", 800, 100, "dense"), ("gaussian", 800, 30, "survey"),
    ("sech2", 800, 2, "survey"), ("sech2", 800, 10, "jittered"), ("sech2", 1040, 2, "survey"),
    ("sech2", 1040, 10, "dense"), ("sech2", 800, 100, "dense"), ("sech2", 800, 10, "frequency"),
]


@pytest.mark.parametrize("shape, centre, width, grid", NOISY)
def test_noise_of_a_thousandth_on_a_baseline_costs_at_most_ten_percent(shape, centre, width, grid):
    lam, counts, dnu = spectrum(shape, centre, width, grid, noise=1e-3, baseline=0.05, seed=7)
    result = analyse_spectrum(lam, counts, C)
    truth = true_limit(shape, dnu)
    assert result.transform_limited_duration == pytest.approx(truth, rel=0.10)
    check_interval(result, truth)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=0.03 if width == 2 and grid != "dense" else 0.01)


@pytest.mark.parametrize("shape, centre, width, grid", [
    ("gaussian", 800, 10, "survey"), ("sech2", 800, 10, "survey"), ("gaussian", 1040, 2, "survey"),
    ("sech2", 800, 100, "dense"),
])
def test_noise_of_a_hundredth_widens_the_interval_around_the_true_limit(shape, centre, width, grid):
    lam, counts, dnu = spectrum(shape, centre, width, grid, noise=1e-2, baseline=0.05, seed=11)
    result = analyse_spectrum(lam, counts, C)
    truth = true_limit(shape, dnu)
    check_interval(result, truth)
    assert result.transform_limited_high - result.transform_limited_low > 0.1 * truth
    assert any("uncertain" in w for w in result.warnings)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=0.03)


def test_noise_on_a_wide_survey_window_does_not_collapse_the_limit():
    # a narrow sech² spectrum on 350-1050 nm with 0.1 % noise: √(noise) over the whole window
    # would otherwise make a pulse of a few femtoseconds
    lam, counts, dnu = spectrum("sech2", 1030, 2, "survey", noise=1e-3, seed=3)
    result = analyse_spectrum(lam, counts, C)
    truth = true_limit("sech2", dnu)  # 0.315 / 0.566 THz = 557 fs
    assert result.transform_limited_duration == pytest.approx(truth, rel=0.10)
    check_interval(result, truth)


def test_the_transform_limit_agrees_with_direct_quadrature():
    # a spectrum no table covers: a Gaussian with a 40 % shoulder 1.1 FWHM to its blue side
    centre = 800e-9
    nu0, dnu = C / centre, C * 10e-9 / centre**2

    def s_nu(nu):
        return (intensity_spectrum("gaussian", nu, nu0, dnu)
                + 0.4 * intensity_spectrum("gaussian", nu, nu0 + 1.1 * dnu, 0.6 * dnu))

    # |E(t)|² = |∫ √S(ν) exp(-2πi ν t) dν|², trapezoidal rule over ±8 FWHM, no FFT
    nu = np.linspace(nu0 - 8 * dnu, nu0 + 8 * dnu, 8001)
    weights = np.full(nu.size, nu[1] - nu[0])
    weights[[0, -1]] /= 2
    amplitude = np.sqrt(s_nu(nu))

    def intensity(t):
        return abs(np.sum(weights * amplitude * np.exp(-2j * np.pi * (nu - nu0) * t))) ** 2

    a, b, half = 0.0, 2.0 / dnu, intensity(0.0) / 2
    for _ in range(80):  # bisection for the half-maximum time (the pulse is even in t)
        m = 0.5 * (a + b)
        a, b = (m, b) if intensity(m) > half else (a, m)
    reference = a + b  # twice the half-maximum time

    lam = np.linspace(*SURVEY)
    counts = s_nu(C / lam) * (centre / lam) ** 2
    clean = analyse_spectrum(lam, counts / counts.max(), C)
    assert clean.transform_limited_duration == pytest.approx(reference, rel=0.005)
    noisy_counts = counts / counts.max() + np.random.default_rng(5).normal(0.0, 1e-3, lam.size)
    noisy = analyse_spectrum(lam, noisy_counts, C)
    assert noisy.transform_limited_duration == pytest.approx(reference, rel=0.05)
    check_interval(noisy, reference)


# --------------------------------------------------- grids, order, scaling
def test_unsorted_wavelengths_give_the_same_answer_as_sorted():
    lam, counts, _ = spectrum("sech2", 800, 10, "jittered", noise=1e-3, seed=2)  # shuffled
    order = np.argsort(lam)
    assert analyse_spectrum(lam, counts, C) == analyse_spectrum(lam[order], counts[order], C)


def test_repeated_wavelengths_are_averaged_and_said():
    lam, counts, dnu = spectrum("gaussian", 800, 10, "survey")
    result = analyse_spectrum(np.concatenate((lam, lam[:3])), np.concatenate((counts, counts[:3])), C)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=0.005)
    assert any("3 wavelengths appear more than once" in w for w in result.warnings)


@pytest.mark.parametrize("scale", [1e-300, 1e300, 1.7e308])
def test_the_scale_of_the_counts_does_not_matter(scale):
    lam, counts, _ = spectrum("gaussian", 800, 10, "survey", noise=1e-3, baseline=0.05)
    reference = analyse_spectrum(lam, counts, C)
    counts = counts / np.abs(counts).max()  # the largest magnitude 1, so scale stays below the float limit
    scaled = analyse_spectrum(lam, counts * scale, C)
    for field in ("fwhm_wavelength", "fwhm_frequency", "centre_wavelength", "transform_limited_duration",
                  "transform_limited_low", "transform_limited_high"):
        assert getattr(scaled, field) == pytest.approx(getattr(reference, field), rel=1e-9)


# ---------------------------------------------------- baseline and window
def test_a_spectrum_filling_the_window_is_not_eaten_by_its_baseline():
    # a Gaussian 100 nm wide seen from 700 to 900 nm: it is still at several % of its peak at
    # both edges, and no part of the window is baseline
    centre, width = 800e-9, 100e-9
    nu0, dnu = C / centre, C * width / centre**2
    lam = np.linspace(700e-9, 900e-9, 1500)
    counts = intensity_spectrum("gaussian", C / lam, nu0, dnu) * (centre / lam) ** 2
    result = analyse_spectrum(lam, counts, C)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=0.005)
    assert any("baseline could not be established" in w for w in result.warnings)
    assert any("touches the short-wavelength edge" in w for w in result.warnings)
    assert any("touches the long-wavelength edge" in w for w in result.warnings)
    # the edges cut off part of the spectrum, so the computed pulse is longer, never shorter
    assert result.transform_limited_high >= true_limit("gaussian", dnu)


def test_a_constant_baseline_is_subtracted():
    lam, counts, dnu = spectrum("gaussian", 800, 30, "survey", baseline=0.2)
    result = analyse_spectrum(lam, counts, C)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=0.005)
    assert result.transform_limited_duration == pytest.approx(true_limit("gaussian", dnu), rel=0.01)
    assert not any("baseline" in w for w in result.warnings)


@pytest.mark.parametrize("shape", ["gaussian", "sech2"])
def test_a_sloping_baseline_is_subtracted_as_a_line(shape):
    lam, counts, dnu = spectrum(shape, 800, 10, "survey", noise=1e-3, seed=9)
    counts = counts + 0.05 + 0.1 * (lam - lam[0]) / (lam[-1] - lam[0])  # 5 % to 15 % of the peak
    result = analyse_spectrum(lam, counts, C)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=0.01)
    assert result.transform_limited_duration == pytest.approx(true_limit(shape, dnu), rel=0.10)
    check_interval(result, true_limit(shape, dnu))
    assert any("straight line" in w for w in result.warnings)


def test_two_peaks_a_saturated_peak_and_an_over_subtracted_dark_are_said():
    lam, blue, _ = spectrum("gaussian", 780, 10, "survey")
    red = spectrum("gaussian", 820, 10, "survey")[1]
    assert any("dips below half maximum" in w for w in analyse_spectrum(lam, blue + 0.8 * red, C).warnings)
    assert any("saturated" in w for w in analyse_spectrum(lam, np.minimum(blue, 0.7), C).warnings)
    dark = blue - 0.1 * np.exp(-(((lam - 600e-9) / 5e-9) ** 2))  # a 10 % hole far from the spectrum
    assert any("over-subtracted" in w for w in analyse_spectrum(lam, dark, C).warnings)


def test_a_narrow_line_finely_sampled_over_a_wide_window():
    # 0.1 nm at 1040 nm (a 16 ps Gaussian pulse) on 16001 samples across 80 nm
    centre, width = 1040e-9, 0.1e-9
    nu0, dnu = C / centre, C * width / centre**2
    lam = np.linspace(1000e-9, 1080e-9, 16001)
    counts = intensity_spectrum("gaussian", C / lam, nu0, dnu) * (centre / lam) ** 2
    result = analyse_spectrum(lam, counts, C)
    assert result.transform_limited_duration == pytest.approx(true_limit("gaussian", dnu), rel=0.01)
    check_interval(result, true_limit("gaussian", dnu))


def test_a_spectrum_cut_by_the_window_says_so():
    # 10 nm wide at 1040 nm: the survey window ends one FWHM beyond the centre
    lam, counts, _ = spectrum("gaussian", 1040, 10, "survey")
    warnings = analyse_spectrum(lam, counts, C).warnings
    assert any("touches the long-wavelength edge" in w for w in warnings)
    assert any("baseline comes from the short-wavelength side only" in w for w in warnings)


def test_a_spectrum_that_does_not_fall_to_half_its_peak_inside_the_window_is_refused():
    lam, counts, _ = spectrum("gaussian", 1040, 100, "survey")  # half maximum at about 1090 nm
    with pytest.raises(DataProblem, match="long-wavelength edge"):
        analyse_spectrum(lam, counts, C)


def test_an_ordinary_spectrum_gives_no_warnings():
    lam, counts, _ = spectrum("gaussian", 800, 10, "survey", noise=1e-3, baseline=0.05, seed=4)
    assert analyse_spectrum(lam, counts, C).warnings == ()


# ------------------------------------------------------------ bad spectra
GOOD_LAM, GOOD_COUNTS, _ = spectrum("gaussian", 800, 10, "survey")
TOP = int(np.argmax(GOOD_COUNTS))


@pytest.mark.parametrize("wavelengths, counts, words", [
    (GOOD_LAM[TOP - 3:TOP + 4], GOOD_COUNTS[TOP - 3:TOP + 4], "at least 8"),
    (GOOD_LAM, np.zeros_like(GOOD_LAM), "all zero"),
    (GOOD_LAM, np.where(np.arange(GOOD_LAM.size) == 100, np.nan, GOOD_COUNTS), "NaN or infinite"),
    (GOOD_LAM, np.where(np.arange(GOOD_LAM.size) == 100, np.inf, GOOD_COUNTS), "NaN or infinite"),
    (np.where(np.arange(GOOD_LAM.size) == 5, np.nan, GOOD_LAM), GOOD_COUNTS, "wavelengths contain NaN"),
    (GOOD_LAM - 500e-9, GOOD_COUNTS, "positive"),
    (GOOD_LAM, np.full_like(GOOD_LAM, 3.0), "no peak"),
    (GOOD_LAM, GOOD_LAM / GOOD_LAM.max(), "end of its range"),  # a ramp up to the window's edge
    (GOOD_LAM, -GOOD_COUNTS, "peak"),
    (GOOD_LAM[:100], GOOD_COUNTS, "100 wavelengths values but 2048 counts"),
    (GOOD_LAM.reshape(32, 64), GOOD_COUNTS.reshape(32, 64), "one column"),
    (GOOD_LAM, np.random.default_rng(1).normal(0.0, 1.0, GOOD_LAM.size), "peak"),  # noise alone
])
def test_data_that_cannot_be_analysed_raise_a_data_problem(wavelengths, counts, words):
    with pytest.raises(DataProblem, match=words):
        analyse_spectrum(wavelengths, counts, C)


def test_a_data_problem_is_a_value_error():
    assert issubclass(DataProblem, ValueError)


# ----------------------------------------------------------- autocorrelation
def autocorrelation(shape: str, tau: np.ndarray, pulse: float) -> np.ndarray:
    """The intensity autocorrelation of a pulse of intensity FWHM ``pulse``, peak 1."""
    if shape == "gaussian":  # the autocorrelation of a Gaussian is a Gaussian √2 wider (closed form)
        return np.exp(-4.0 * math.log(2.0) * (tau / (math.sqrt(2.0) * pulse)) ** 2)
    u = np.maximum(np.abs(tau) * SECH2_FWHM / pulse, 1e-4)  # τ/T
    return 3.0 * (u / np.tanh(u) - 1.0) / np.sinh(np.minimum(u, 300.0)) ** 2  # from memory, checked below


def trace(shape, grid="uniform", noise=0.0, baseline=0.0, seed=1, start=-4.0, stop=4.0, n=401, pulse=100e-15):
    """(delays in s, counts, the true autocorrelation FWHM by the published factor); the delays span
    start…stop autocorrelation widths."""
    rng = np.random.default_rng(seed)
    width = AC_FACTOR[shape] * pulse
    if grid == "uniform":
        delay = np.linspace(start * width, stop * width, n)
    else:  # random delays, unsorted
        delay = rng.uniform(start * width, stop * width, n)
    counts = autocorrelation(shape, delay, pulse) + baseline + rng.normal(0.0, noise, n)
    return delay, counts, width


def test_the_sech2_autocorrelation_formula_matches_direct_quadrature():
    # ∫ sech²(t) sech²(t - u) dt by the trapezoidal rule, normalised to 1 at u = 0
    t = np.linspace(-40.0, 40.0, 160001)
    u = np.array([0.0, 0.5, 1.0, 2.0, 4.0])
    dt = t[1] - t[0]
    direct = np.array([np.sum(np.cosh(t) ** -2 * np.cosh(t - s) ** -2) * dt for s in u])  # the ends are ~1e-69
    formula = autocorrelation("sech2", u * 100e-15 / SECH2_FWHM, 100e-15)
    assert formula == pytest.approx(direct / direct[0], rel=1e-6, abs=1e-9)


@pytest.mark.parametrize("shape", ["gaussian", "sech2"])
@pytest.mark.parametrize("grid, noise, tolerance", [
    ("uniform", 0.0, 0.005), ("random", 0.0, 0.005),
    ("uniform", 0.01, 0.02), ("random", 0.01, 0.02),
    ("uniform", 0.03, 0.05), ("random", 0.03, 0.05),
])
def test_an_autocorrelation_gives_the_published_factor(shape, grid, noise, tolerance):
    for seed in (13, 14, 15):  # three noise draws, each must pass
        delay, counts, width = trace(shape, grid, noise, baseline=0.02, seed=seed)
        result = analyse_autocorrelation(delay, counts)
        assert isinstance(result, AutocorrelationAnalysis)
        assert result.fwhm == pytest.approx(width, rel=tolerance)
        assert result.low <= result.fwhm <= result.high
        assert result.low <= width <= result.high
        assert not any("symmetric" in w or "baseline" in w or "cut off" in w for w in result.warnings)


@pytest.mark.parametrize("start, stop, side", [(-0.3, 4.0, "negative"), (-4.0, 0.3, "positive")])
def test_a_trace_cut_off_on_one_side_is_mirrored_and_said(start, stop, side):
    delay, counts, width = trace("sech2", start=start, stop=stop, noise=0.01)
    result = analyse_autocorrelation(delay, counts)
    assert any("cut off" in w and f"{side}-delay side" in w for w in result.warnings)
    assert result.fwhm == pytest.approx(width, rel=0.03)
    assert result.low <= width <= result.high


def test_a_trace_whose_wings_do_not_reach_the_baseline_says_so():
    delay, counts, width = trace("gaussian", start=-1.0, stop=1.0)
    result = analyse_autocorrelation(delay, counts)
    assert sum("wings do not reach the baseline" in w for w in result.warnings) == 2
    assert result.fwhm == pytest.approx(width, rel=0.005)  # no offset here, so none was missed


def test_the_delay_scale_does_not_matter():
    delay, counts, width = trace("gaussian", noise=0.01, baseline=0.02)
    reference = analyse_autocorrelation(delay, counts)
    scaled = analyse_autocorrelation(delay * 1e-290, counts * 1e307)
    assert scaled.fwhm == pytest.approx(reference.fwhm * 1e-290, rel=1e-9)
    assert scaled.high == pytest.approx(reference.high * 1e-290, rel=1e-9)


@pytest.mark.parametrize("delay, counts, words", [
    (np.arange(7.0), np.ones(7), "at least 8"),
    (np.arange(50.0), np.zeros(50), "all zero"),
    (np.arange(50.0), np.where(np.arange(50) == 3, np.nan, 1.0), "NaN or infinite"),
    (np.arange(50.0), np.arange(50.0), "end of its range"),  # rises to the end of the scan
    (np.arange(50.0), np.full(50, 2.0), "no peak"),
    (np.arange(300.0), np.random.default_rng(2).normal(0.0, 1.0, 300), "peak"),  # noise alone
])
def test_traces_that_cannot_be_analysed_raise_a_data_problem(delay, counts, words):
    with pytest.raises(DataProblem, match=words):
        analyse_autocorrelation(delay, counts)
