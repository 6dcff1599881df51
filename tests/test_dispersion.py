"""Tests for speccheck.physics.dispersion: Gaussian broadening and chirped pulses."""

from __future__ import annotations

import math

import numpy as np
import pytest

from speccheck.physics import dispersion as d

FS = 1e-15  # femtosecond in s (unit conversion)
FS2 = 1e-30  # fs^2 in s^2 (unit conversion)


def _fwhm(t: np.ndarray, y: np.ndarray) -> float:
    """Full width at half maximum of a single-peaked curve (linear interpolation)."""
    half = y.max() / 2.0
    above = np.nonzero(y >= half)[0]
    i0, i1 = above[0], above[-1]
    left = t[i0 - 1] + (half - y[i0 - 1]) * (t[i0] - t[i0 - 1]) / (y[i0] - y[i0 - 1])
    right = t[i1] + (half - y[i1]) * (t[i1 + 1] - t[i1]) / (y[i1 + 1] - y[i1])
    return float(right - left)


def _numeric_duration(tau0: float, total_gdd: float) -> float:
    """FWHM of a Gaussian of transform limit tau0 after spectral phase gdd w^2/2.

    Built directly with numpy FFT: Gaussian spectral amplitude whose
    transform-limited intensity FWHM is tau0, quadratic spectral phase,
    inverse FFT, intensity FWHM measured on the time grid.
    """
    n, dt = 2**16, 0.02 * FS
    w = 2 * np.pi * np.fft.fftfreq(n, dt)
    spectrum = np.exp(-(w**2) * tau0**2 / (8 * math.log(2)))
    field = np.fft.fftshift(np.fft.ifft(spectrum * np.exp(0.5j * total_gdd * w**2)))
    t = (np.arange(n) - n // 2) * dt
    return _fwhm(t, np.abs(field) ** 2)


def test_gaussian_tbp_constant() -> None:
    # 2 ln2 / pi = 0.4413 (Gaussian time-bandwidth product, published pulse-shape tables).
    assert d.GAUSSIAN_TBP == pytest.approx(0.4413, abs=1e-4)


def test_broadening_hand_example() -> None:
    # 10 fs transform-limited Gaussian through 100 fs^2, by hand:
    # 4 ln2 * 100 / 10^2 = 2.7726; 1 + 2.7726^2 = 8.6872; sqrt = 2.9474;
    # tau_out = 10 fs * 2.9474 = 29.474 fs.
    ln2 = math.log(2)
    factor = 4 * ln2 * 100 / 10**2
    expected = 10 * math.sqrt(1 + factor**2)
    assert expected == pytest.approx(29.474, abs=1e-3)
    assert d.broadened_duration(10 * FS, 100 * FS2) / FS == pytest.approx(
        expected, rel=1e-12
    )


def test_broadening_sign_symmetric_and_vectorised() -> None:
    gdd = np.array([-200.0, 0.0, 200.0]) * FS2
    out = d.broadened_duration(20 * FS, gdd)
    assert isinstance(out, np.ndarray) and out.shape == (3,)
    assert out[0] == pytest.approx(out[2])
    assert out[1] == pytest.approx(20 * FS)


@pytest.mark.parametrize("gdd_fs2", [0.0, 50.0, -120.0, 400.0])
def test_broadening_matches_fft(gdd_fs2: float) -> None:
    tau0 = 10 * FS
    numeric = _numeric_duration(tau0, gdd_fs2 * FS2)
    assert d.broadened_duration(tau0, gdd_fs2 * FS2) == pytest.approx(numeric, rel=1e-3)


def test_optimal_compensation_is_negative_net() -> None:
    assert d.optimal_compensation(360 * FS2) == pytest.approx(-360 * FS2)
    np.testing.assert_allclose(
        d.optimal_compensation(np.array([1.0, -2.0])), [-1.0, 2.0]
    )


def test_intrinsic_gdd_reproduces_input_duration() -> None:
    # A pulse carrying phi_in must have duration tau_in (checked by FFT).
    tau0, tau_in = 10 * FS, 25 * FS
    phi_in = d.intrinsic_gdd(tau_in, tau0)
    assert phi_in > 0
    assert _numeric_duration(tau0, phi_in) == pytest.approx(tau_in, rel=1e-3)
    assert d.intrinsic_gdd(tau_in, tau0, chirp_sign=-1) == pytest.approx(-phi_in)


@pytest.mark.parametrize("chirp_sign", [1, -1])
@pytest.mark.parametrize("gdd_fs2", [-150.0, -40.0, 0.0, 80.0, 300.0])
def test_chirped_formula_matches_fft(chirp_sign: int, gdd_fs2: float) -> None:
    tau0, tau_in = 10 * FS, 25 * FS
    phi_in = d.intrinsic_gdd(tau_in, tau0, chirp_sign)
    numeric = _numeric_duration(tau0, phi_in + gdd_fs2 * FS2)
    formula = d.chirped_output_duration(
        tau_in, gdd_fs2 * FS2, tau_tl_s=tau0, chirp_sign=chirp_sign
    )
    assert formula == pytest.approx(numeric, rel=1e-3)


def test_chirped_via_tbp() -> None:
    # Stated TBP 2.5x the Gaussian limit -> tau0 = tau_in / 2.5 = 10 fs.
    tau_in = 25 * FS
    tbp = 2.5 * d.GAUSSIAN_TBP
    assert d.transform_limited_duration(tau_in, tbp) == pytest.approx(10 * FS)
    via_tbp = d.chirped_output_duration(tau_in, 80 * FS2, tbp=tbp)
    via_tau0 = d.chirped_output_duration(tau_in, 80 * FS2, tau_tl_s=10 * FS)
    assert via_tbp == pytest.approx(via_tau0)


def test_chirped_compensation_recovers_transform_limit() -> None:
    tau0, tau_in = 10 * FS, 25 * FS
    needed = d.optimal_compensation(d.intrinsic_gdd(tau_in, tau0))
    assert d.chirped_output_duration(
        tau_in, needed, tau_tl_s=tau0
    ) == pytest.approx(tau0)


def test_chirped_reduces_to_transform_limited_case() -> None:
    tau0 = 12 * FS
    assert d.chirped_output_duration(
        tau0, 150 * FS2, tbp=d.GAUSSIAN_TBP
    ) == pytest.approx(d.broadened_duration(tau0, 150 * FS2))


def test_invalid_inputs() -> None:
    with pytest.raises(ValueError):
        d.transform_limited_duration(20 * FS, 0.3)  # below Gaussian limit
    with pytest.raises(ValueError):
        d.chirped_output_duration(20 * FS, 0.0)  # neither tau_tl_s nor tbp
    with pytest.raises(ValueError):
        d.chirped_output_duration(20 * FS, 0.0, tau_tl_s=10 * FS, tbp=0.5)
    with pytest.raises(ValueError):
        d.intrinsic_gdd(5 * FS, 10 * FS)  # shorter than transform limit
    with pytest.raises(ValueError):
        d.broadened_duration(-1 * FS, 0.0)


def test_the_duration_interval_after_glass_and_compressor_holds_every_combination_of_their_tolerances(check) -> None:
    # A 10 fs pulse through 10 mm ± 0.5 mm of fused silica and a compressor of -361 fs² ± 18 fs², -270 fs³ ±
    # 30 fs³: the sheet's interval must hold the duration at every combination of the stage tolerances,
    # each checked on its own with that combination exact (a sweep by re-checking, not the window corners).
    # Its ends come from the field's corners; the sweep samples the box (ends and midpoints).
    def spec(thick: str, gdd: str, tod: str) -> str:
        return ("laser:\n  wavelength: 800 nm\n  pulse_duration: 10 fs\n  spectral_bandwidth_wavelength: 94 nm\n"
                "  pulse_energy: 1 uJ\n  pulse_shape: gaussian\n  chirp: positive\n"
                f"path:\n  - {{name: glass, kind: material, material: fused_silica, thickness: '{thick}'}}\n"
                f"  - {{name: comp, kind: dispersion, gdd: '{gdd}', tod: '{tod}'}}\n")
    whole = check(spec("10 mm ± 0.5 mm", "-361 fs^2 ± 18 fs^2", "-270 fs^3 ± 30 fs^3")).sheet["comp"]["pulse_duration"]
    swept = [check(spec(f"{th} mm ± 0 mm", f"{g} fs^2 ± 0 fs^2", f"{t} fs^3 ± 0 fs^3")).sheet["comp"]["pulse_duration"].value
             for th in (9.5, 10.0, 10.5) for g in (-379, -361, -343) for t in (-300, -270, -240)]
    assert whole.low <= min(swept) * (1 + 1e-6) and max(swept) <= whole.high * (1 + 1e-6)
    assert max(swept) > 1.2 * min(swept)  # the tolerances matter here: the check can fail
