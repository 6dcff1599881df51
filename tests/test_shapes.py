"""The Lorentzian row of the pulse-shape table, derived numerically from its one definition.

The table defines the Lorentzian by its intensity, I ∝ 1/(1 + (2t/τ)²) with FWHM τ, and its
flat-phase field as √I.  The code states closed forms (2/π, 2, no transform limit); these tests
get each factor from the profile by a different method: quadrature on a sinh-mapped grid (the
profile's 1/t² tails make a plain uniform grid converge slowly) and a bisection for the
autocorrelation's half-maximum, and the FFT of the field for the spectrum.  Then the callers of
a missing transform limit are run through the checker.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from speccheck.physics.shapes import PULSE_SHAPES

from conftest import cell, rules_of

LORENTZIAN = PULSE_SHAPES["lorentzian"]
_SECH_X = 2 * math.acosh(math.sqrt(2))  # sech²(_SECH_X t) has FWHM 1

# t = sinh(u): fine steps near the peak, exponentially long ones in the tails, so the trapezoid
# rule in u covers |t| up to 1e17 τ with an integrand that falls off like e^-|u|.
_U = np.linspace(-40.0, 40.0, 32001)
_T = np.sinh(_U)
_DT_DU = np.cosh(_U)


def intensity(t):
    return 1.0 / (1.0 + (2.0 * t) ** 2)  # FWHM 1


def _integral(values):
    return float(np.trapezoid(values * _DT_DU, _U))


def test_the_profile_has_unit_fwhm():
    assert intensity(0.5) == pytest.approx(0.5 * intensity(0.0))


def test_lorentzian_peak_power_factor_by_quadrature():
    # Independent numerical method: P_peak τ / E = I(0) τ / ∫ I dt, by quadrature (τ = 1).
    assert 1.0 / _integral(intensity(_T)) == pytest.approx(LORENTZIAN.peak_power_factor, rel=1e-9)


def test_lorentzian_autocorrelation_factor_by_quadrature_and_bisection():
    # Independent numerical method: the intensity autocorrelation A(s) = ∫ I(t) I(t + s) dt by
    # quadrature, and its half-maximum delay by bisection; τ_ac / τ = 2 s_half.
    def autocorrelation(s):
        return _integral(intensity(_T) * intensity(_T + s))

    top = autocorrelation(0.0)
    low, high = 0.0, 5.0
    for _ in range(50):
        mid = 0.5 * (low + high)
        low, high = (mid, high) if autocorrelation(mid) > top / 2 else (low, mid)
    assert 2.0 * low == pytest.approx(LORENTZIAN.autocorrelation_factor, rel=1e-7)


def _spectral_fwhm(field, dt):
    """FWHM of |FFT(field)|² (in cycles per unit of t), linear interpolation at both edges, and
    the spectral density at its centre."""
    spectrum = np.abs(np.fft.fftshift(np.fft.fft(field)) * dt) ** 2
    nu = np.fft.fftshift(np.fft.fftfreq(field.size, dt))
    half = spectrum.max() / 2
    above = np.flatnonzero(spectrum >= half)
    i, j = above[0], above[-1]
    left = np.interp(half, [spectrum[i - 1], spectrum[i]], [nu[i - 1], nu[i]])
    right = np.interp(half, [spectrum[j + 1], spectrum[j]], [nu[j + 1], nu[j]])
    return right - left, spectrum.max()


def _window(half_width, dt=0.05):
    n = 2 * int(half_width / dt)
    return (np.arange(n) - n // 2) * dt, dt


def test_the_lorentzian_field_has_no_finite_transform_limit():
    # Independent numerical method: FFT of the flat-phase field √I over ever longer windows ±L.
    # Its spectrum at the centre is |∫E dt|² = asinh²(2L) (closed-form integral of
    # 1/√(1 + 4t²)), unbounded, and the spectral FWHM shrinks without limit, so Δν·τ has no
    # positive lower bound and the table says None.  Measured: Δν·τ = 0.0115, 0.0020, 0.00040 for
    # L = 100, 1000, 10000 (each decade about 10^-1/√2, as the centre's logarithmic growth gives).
    widths = []
    for half_width in (1e2, 1e3, 1e4):
        t, dt = _window(half_width)
        width, centre = _spectral_fwhm(np.sqrt(intensity(t)), dt)
        assert centre == pytest.approx(math.asinh(2 * half_width) ** 2, rel=2e-3)
        widths.append(width)
    assert widths[1] < widths[0] / 4 and widths[2] < widths[1] / 4
    assert widths[2] < 1e-3
    assert LORENTZIAN.transform_limit is None


@pytest.mark.parametrize("shape, profile", [
    ("gaussian", lambda t: np.exp(-4 * math.log(2) * t**2)),
    ("sech2", lambda t: (2 * np.exp(-_SECH_X * np.abs(t)) / (1 + np.exp(-2 * _SECH_X * np.abs(t)))) ** 2),
])
def test_the_same_procedure_converges_for_shapes_that_have_a_transform_limit(shape, profile):
    # Control for the test above: with a field that is integrable, the same windows give one
    # Δν·τ, the table's (the FWHM's own resolution, 1/(2L), is the tolerance).
    for half_width in (1e2, 1e3):
        t, dt = _window(half_width)
        width, _ = _spectral_fwhm(np.sqrt(profile(t)), dt)
        assert width == pytest.approx(PULSE_SHAPES[shape].transform_limit, rel=3e-3)


# ------------------------------------------------------- callers of a missing transform limit

def test_a_lorentzian_pulse_is_not_held_to_a_transform_limit(check):
    # Δν·τ = 0.01 would be far below any shape's limit; for the Lorentzian none applies, and the
    # product is still derived.
    result = check("laser: {wavelength: 800 nm, spectral_bandwidth: 0.1 THz, pulse_duration: 100 fs, "
                   "pulse_shape: lorentzian}")
    assert cell(result, "time_bandwidth_product").value == pytest.approx(0.01)
    assert not {"below-transform-limit", "strongly-chirped"} & {rule for rule, _ in rules_of(result)}


def test_the_same_spec_as_a_gaussian_is_below_its_transform_limit(check):
    # Control for the test above: the limit check runs for a shape that has one.
    result = check("laser: {wavelength: 800 nm, spectral_bandwidth: 0.1 THz, pulse_duration: 100 fs, "
                   "pulse_shape: gaussian}")
    assert "below-transform-limit" in {rule for rule, _ in rules_of(result)}


def test_a_lorentzian_pulse_with_a_bandwidth_goes_through_a_path(check):
    # The path takes the transform-limited duration from the bandwidth and the shape's limit;
    # without a limit it takes the stated duration as transform-limited, and GDD broadens it
    # (Gaussian broadening model of physics/stages.py: τ = τ0 √(1 + (4 ln2 φ/τ0²)²)).
    result = check("""
        laser: {wavelength: 800 nm, spectral_bandwidth: 10 THz, pulse_duration: 30 fs,
                pulse_shape: lorentzian, pulse_energy: 1 nJ}
        path:
          - {name: stretch, kind: dispersion, gdd: 1000 fs^2}
        """)
    tau0, phi = 30e-15, 1000e-30
    assert cell(result, "pulse_duration", "stretch").value == pytest.approx(
        tau0 * math.sqrt(1 + (4 * math.log(2) * phi / tau0**2) ** 2), rel=1e-6)
