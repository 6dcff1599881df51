"""Measured spectra and autocorrelation traces.

References: the transform-limited time-bandwidth products of a Gaussian
(2 ln2/π = 0.441) and a sech² (0.315) pulse (published pulse-shape tables),
reproduced here by spectra built analytically in frequency; the sech²
autocorrelation factor 1.543 (same tables).
"""

import math

import numpy as np
import pytest

from speccheck.checking.document import Checker
from speccheck.files import read_beside
from speccheck.reading.measured import DataProblem, analyse_autocorrelation, analyse_spectrum, read_table

C = 299792458.0  # exact (SI)


def gaussian_spectrum(centre_nm=800.0, fwhm_thz=5.0, points=801, noise=0.0, baseline=0.0, seed=1):
    nu0, dnu = C / (centre_nm * 1e-9), fwhm_thz * 1e12
    nu = np.linspace(nu0 - 4 * dnu, nu0 + 4 * dnu, points)
    s_nu = np.exp(-4 * math.log(2) * ((nu - nu0) / dnu) ** 2)
    lam = C / nu
    s_lam = s_nu * C / lam**2  # Jacobian: S(λ) = S(ν) c/λ²
    s_lam = s_lam / s_lam.max() + baseline + np.random.default_rng(seed).normal(0, noise, points)
    return lam, s_lam, dnu


def test_a_gaussian_spectrum_gives_the_gaussian_transform_limit():
    lam, s, dnu = gaussian_spectrum()
    result = analyse_spectrum(lam, s, C)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=1e-3)
    # Transform limit of a Gaussian: Δν τ = 2 ln2 / π = 0.4413 (published pulse-shape tables).
    # (The 2% smoothing of measured spectra costs about 0.5% here.)
    assert result.transform_limited_duration * dnu == pytest.approx(2 * math.log(2) / math.pi, rel=1e-2)


def test_a_sech2_spectrum_gives_the_sech2_transform_limit():
    nu0, dnu = C / 1030e-9, 3e12
    nu = np.linspace(nu0 - 6 * dnu, nu0 + 6 * dnu, 1201)
    s_nu = 1 / np.cosh(2 * math.acosh(math.sqrt(2)) * (nu - nu0) / dnu) ** 2  # the spectrum of a sech² pulse
    lam = C / nu
    result = analyse_spectrum(lam, s_nu * C / lam**2, C)
    assert result.transform_limited_duration * dnu == pytest.approx(0.315, rel=3e-3)  # published: 0.315


def test_a_noisy_spectrum_on_a_baseline_still_gives_its_width():
    lam, s, dnu = gaussian_spectrum(noise=0.01, baseline=0.05)
    result = analyse_spectrum(lam, s, C)
    assert result.fwhm_frequency == pytest.approx(dnu, rel=0.03)
    # Noise of 1% of the peak limits how well any transform limit can be known: measured with
    # three noise seeds, the smoothed, soft-thresholded estimate is 4-10% long; 12% bounds it.
    assert result.transform_limited_duration * dnu == pytest.approx(0.441, rel=0.12)


def test_a_sech2_autocorrelation_width_is_1_543_times_the_pulse():
    t = np.linspace(-2000e-15, 2000e-15, 4001)
    pulse = 1 / np.cosh(2 * math.acosh(math.sqrt(2)) * t / 100e-15) ** 2  # 100 fs FWHM
    trace = np.fft.fftshift(np.fft.ifft(np.abs(np.fft.fft(pulse)) ** 2).real)
    assert analyse_autocorrelation(t, trace) == pytest.approx(1.543 * 100e-15, rel=2e-3)


def test_tables_with_header_comments_and_any_separator():
    text = "# comment\nwavelength,intensity\n1,2\n2;3\n3\t4\n4 5\n5,6\n6,7\n7,8\n8,9\n"
    x, y = read_table(text)
    assert list(x) == [1, 2, 3, 4, 5, 6, 7, 8] and y[0] == 2


@pytest.mark.parametrize("text, words", [
    ("1,2\n2,3\n", "at least 8"),
    ("1,2\n2,3\n3,nan\n4,1\n5,1\n6,1\n7,1\n8,1\n", "not finite"),
    ("a,b\n1,2\nx,y\n", "expected two numbers"),
])
def test_bad_tables_say_what_is_wrong(text, words):
    with pytest.raises(DataProblem, match=words):
        read_table(text)


def test_bad_axes_and_missing_peaks():
    x = np.arange(1.0, 11.0)
    with pytest.raises(DataProblem, match="strictly"):
        analyse_autocorrelation(np.array([1, 3, 2, 4, 5, 6, 7, 8.0]), np.ones(8))
    with pytest.raises(DataProblem, match="positive"):
        analyse_spectrum(x - 5, np.ones(10), C)
    with pytest.raises(DataProblem, match="peak"):
        analyse_autocorrelation(x, x)  # rises to the edge: no clear peak


@pytest.fixture
def spec_dir(tmp_path, units):
    lam, s, _ = gaussian_spectrum(centre_nm=800.0, fwhm_thz=10.0)
    (tmp_path / "spec.csv").write_text("\n".join(f"{a * 1e9:.5f},{b:.6f}" for a, b in zip(lam, s)))
    checker = Checker(units, read=read_beside)

    def run(laser: str):
        path = tmp_path / "s.yaml"
        path.write_text("spec_version: 1\nlaser:\n" + laser)
        return checker.check_text(path.read_bytes(), str(path))

    return run


def test_a_spectrum_file_fills_in_the_bandwidth_and_transform_limit(spec_dir):
    result = spec_dir("  spectrum: {file: spec.csv, wavelength_unit: nm}\n  pulse_shape: gaussian\n")
    sheet = result.sheet["laser"]
    assert sheet["spectral_bandwidth"].value == pytest.approx(10e12, rel=0.01)
    assert sheet["transform_limited_duration"].value == pytest.approx(0.4413 / 10e12, rel=0.01)
    assert [f.rule for f in result.findings if f.severity == "error"] == []


def test_a_duration_shorter_than_the_measured_transform_limit_is_an_error(spec_dir):
    # 0.4413 / 10 THz = 44 fs; 30 fs is impossible with this spectrum.
    result = spec_dir("  spectrum: {file: spec.csv}\n  pulse_duration: 30 fs\n  pulse_shape: gaussian\n")
    assert "below-transform-limit" in [f.rule for f in result.findings]


def test_a_stated_bandwidth_the_spectrum_contradicts(spec_dir):
    # By hand: 10 THz at 800 nm is Δλ = λ²Δν/c = 21.3 nm.
    result = spec_dir("  spectrum: {file: spec.csv}\n  spectral_bandwidth: 8 nm\n")
    (finding,) = [f for f in result.findings if f.rule == "measured-mismatch"]
    assert finding.line == 4 and "21.3" in finding.message


@pytest.mark.parametrize("entry, words", [
    ("{file: nothing.csv}", "cannot read"),
    ("{file: /etc/hostname}", "relative to the spec"),
    ("{file: ../outside.csv}", "relative to the spec"),
    ("{file: spec.csv, wavelength_unit: fs}", "not a unit of length"),
])
def test_data_files_that_cannot_be_used_are_findings(spec_dir, entry, words):
    result = spec_dir(f"  spectrum: {entry}\n")
    (finding,) = result.findings
    assert finding.rule == "measured-data" and words in finding.message and finding.line == 3


def test_without_a_reader_data_files_are_reported_not_read(check):
    (finding,) = check("laser:\n  spectrum: {file: x.csv}\n").findings
    assert finding.rule == "measured-data" and "not read" in finding.message
