"""The pulse as a field (physics/field.py, physics/pulse.py), each number against a reference
outside the code that computes it."""

from __future__ import annotations

import math

import numpy as np
import pytest

from speccheck.physics import broadening as B
from speccheck.physics import field as F
from speccheck.physics import phase_terms as T
from speccheck.physics import materials
from speccheck.physics import pulse as P

FS = 1e-15
C = 299792458.0
W800 = 2 * math.pi * C / 800e-9
LN2 = math.log(2.0)


def gaussian_closed_form(tl: float, gdd: float) -> float:
    # τ = τ0 √(1 + (4 ln2 φ2/τ0²)²): the Fourier transform of a Gaussian with quadratic phase, done by
    # hand (A. M. Weiner, Ultrafast Optics, Wiley 2009, ch. 4; J.-C. Diels & W. Rudolph, ch. 2)
    return tl * math.sqrt(1 + (4 * LN2 * gdd / tl**2) ** 2)


@pytest.mark.parametrize("gdd_fs2", [0.0, 100.0, 500.0, -2000.0, 10_000.0, 100_000.0])
def test_a_gaussian_with_gdd_matches_the_closed_form(gdd_fs2):
    m = F.measure(F.Envelope(30 * FS, "gaussian"), (T.Poly(2, gdd_fs2 * FS**2),), W800)
    assert m.duration == pytest.approx(gaussian_closed_form(30 * FS, gdd_fs2 * FS**2), rel=1e-6)
    # a chirped Gaussian stays Gaussian: P_pk τ/E = 2 √(ln2/π) (the shape table's closed form)
    assert m.peak_factor == pytest.approx(2 * math.sqrt(LN2 / math.pi), rel=1e-6)
    assert m.main_peak == pytest.approx(1.0, abs=1e-9)


def test_the_flat_phase_sech2_pulse_has_its_shape_factors():
    m = F.measure(F.Envelope(30 * FS, "sech2"), (), W800)
    assert m.duration == pytest.approx(30 * FS, rel=1e-6)
    assert m.peak_factor == pytest.approx(math.log(1 + math.sqrt(2)), rel=1e-6)  # ∫sech² = 2T, FWHM 1.7627 T


@pytest.mark.parametrize("ratio", [50.0, 200.0])
def test_a_strongly_chirped_sech2_pulse_approaches_the_stationary_phase_asymptote(ratio):
    # For GDD ≫ τ0² the pulse maps its spectrum onto time: τ → |GDD| Δω_FWHM (stationary phase; Weiner
    # ch. 4).  The spectral intensity of a sech² pulse is sech²(π Δω T/2), whose FWHM is
    # Δω = 2·1.7627/(π T/2)·… computed here from the closed form: 4 acosh(√2) / (π T).
    tl = 100 * FS
    t_width = tl / (2 * math.acosh(math.sqrt(2)))
    dw_fwhm = 4 * math.acosh(math.sqrt(2)) / (math.pi * t_width)
    gdd = ratio * tl**2
    m = F.measure(F.Envelope(tl, "sech2"), (T.Poly(2, gdd),), W800)
    asymptote = gdd * dw_fwhm
    # the asymptote's relative error falls as (τ0²/GDD)²: measured 1.6e-4 at 50 τ0², 1e-5 at 200 τ0²
    assert m.duration == pytest.approx(asymptote, rel=2.0 / ratio**2 + 1e-5)


def test_a_150_fs_sech2_pulse_after_80000_fs2_lasts_1_12_ps_not_1_49():
    m = F.measure(F.Envelope(150 * FS, "sech2"), (T.Poly(2, 80_000 * FS**2),), W800)
    assert m.duration == pytest.approx(1.12e-12, rel=5e-3)
    assert gaussian_closed_form(150 * FS, 80_000 * FS**2) == pytest.approx(1.49e-12, rel=5e-3)


def _direct_quadrature_intensity(tl: float, tod: float, t: np.ndarray) -> np.ndarray:
    """|E(t)|² by trapezoidal quadrature of the Fourier integral ∫ A(ω) e^{iφ(ω)} e^{−iωt} dω on a dense
    frequency grid: no FFT."""
    w = np.linspace(-12 / tl, 12 / tl, 3001)
    spec = np.exp(-(w * tl) ** 2 / (8 * LN2)) * np.exp(1j * tod * w**3 / 6)
    field = np.concatenate([np.trapezoid(spec[None, :] * np.exp(-1j * np.outer(part, w)), w, axis=1)
                            for part in np.array_split(t, 16)])
    return np.abs(field) ** 2


def _fwhm(t: np.ndarray, inten: np.ndarray) -> float:
    """The outermost half-maximum crossings, linearly interpolated between samples."""
    half = inten.max() / 2
    above = np.flatnonzero(inten >= half)
    lo, hi = above[0], above[-1]
    t_lo = t[lo - 1] + (half - inten[lo - 1]) / (inten[lo] - inten[lo - 1]) * (t[lo] - t[lo - 1])
    t_hi = t[hi] + (half - inten[hi]) / (inten[hi + 1] - inten[hi]) * (t[hi + 1] - t[hi])
    return t_hi - t_lo


def test_pure_tod_matches_direct_quadrature_of_the_fourier_integral():
    tl, tod = 20 * FS, 3000 * FS**3
    m = F.measure(F.Envelope(tl, "gaussian"), (T.Poly(3, tod),), W800)
    t = np.linspace(-200 * FS, 300 * FS, 4001)
    inten = _direct_quadrature_intensity(tl, tod, t)
    width = _fwhm(t, inten)
    assert m.duration == pytest.approx(width, rel=1e-3)
    dt = t[1] - t[0]
    assert m.peak_factor == pytest.approx(inten.max() * width / (inten.sum() * dt), rel=2e-3)
    # TOD makes satellites: the energy between the minima that bound the main peak, from the quadrature
    k = int(np.argmax(inten))
    left = k
    while left > 0 and not (inten[left - 1] > inten[left] and inten[left] < inten[k] / 2):
        left -= 1
    right = k
    while right < len(t) - 1 and not (inten[right + 1] > inten[right] and inten[right] < inten[k] / 2):
        right += 1
    main = inten[left:right + 1].sum() / inten.sum()
    assert main < 0.99
    assert m.main_peak == pytest.approx(main, abs=2e-3)


def test_a_12_fs_pulse_through_15_mm_of_fused_silica_and_a_matched_gdd_compressor_is_13_5_fs():
    # The glass's exact phase (Malitson's Sellmeier equation) less its GDD leaves its TOD (and higher):
    # the pulse is about 13.5 fs, not 12 fs.
    glass = T.glass("fused_silica", 15e-3, C)
    gdd = materials.gdd("fused_silica", 800e-9, 15e-3, C)
    m = F.measure(F.Envelope(12 * FS, "gaussian"), (glass, T.Poly(2, -gdd)), W800)
    assert m.duration == pytest.approx(13.5 * FS, rel=0.01)
    # without the glass's TOD (a pure-GDD compressor on a pure-GDD glass) the pulse is back to 12 fs
    assert F.measure(F.Envelope(12 * FS, "gaussian"), (T.Poly(2, gdd), T.Poly(2, -gdd)), W800).duration == \
        pytest.approx(12 * FS, rel=1e-6)


def test_the_glass_phase_fod_is_the_frequency_derivative_of_the_sellmeier_tod():
    # FOD = dTOD/dω: a central difference of the analytic TOD (materials.tod) across ω, against the field's
    # seven-point stencil on the exact phase
    glass = T.glass("fused_silica", 10e-3, C)
    _, _, fod = glass.taylor(W800)
    h = 1e-3 * W800
    tod = [materials.tod("fused_silica", 2 * math.pi * C / w, 10e-3, C) for w in (W800 - h, W800 + h)]
    assert fod == pytest.approx((tod[1] - tod[0]) / (2 * h), rel=2e-3)


def test_the_glass_phase_has_the_sellmeier_gdd_and_tod():
    # The exact phase's derivatives at the carrier (finite differences) against the analytic derivatives of
    # the Sellmeier equation (materials.gdd / materials.tod): two different computations.
    glass = T.glass("fused_silica", 10e-3, C)
    gdd, tod, _ = glass.taylor(W800)
    assert gdd == pytest.approx(materials.gdd("fused_silica", 800e-9, 10e-3, C), rel=1e-5)
    assert tod == pytest.approx(materials.tod("fused_silica", 800e-9, 10e-3, C), rel=1e-4)
    # 10 mm of fused silica at 800 nm: about 361 fs² and 275 fs³ (from memory)
    assert gdd / FS**2 == pytest.approx(361, rel=0.01)
    assert tod / FS**3 == pytest.approx(275, rel=0.02)


@pytest.mark.parametrize("terms", [
    (T.Poly(2, 5000 * FS**2),),
    (T.Poly(3, 20000 * FS**3),),
    (T.glass("fused_silica", 20e-3, C),),
])
def test_phase_only_stages_conserve_energy(terms):
    # Parseval: Σ|E(t)|² dt = (1/2π)·N·Σ|E(ω)|² dω for the discrete transform; a phase changes neither
    env = F.Envelope(15 * FS, "gaussian")
    half, window, n = F.sample(env, terms, W800)
    step = 2 * math.pi / window
    dw = np.fft.fftfreq(n, 1 / (n * step))
    spec = env.at(dw) * np.exp(1j * T.total_phase(terms, W800, dw))
    e_t = np.fft.fft(spec)
    flat = np.fft.fft(env.at(dw))
    assert np.sum(np.abs(e_t) ** 2) == pytest.approx(np.sum(np.abs(flat) ** 2), rel=1e-12)
    assert np.sum(np.abs(e_t) ** 2) == pytest.approx(n * np.sum(np.abs(spec) ** 2), rel=1e-12)


def test_a_second_harmonic_of_a_chirped_gaussian_halves_its_gdd_and_shortens_it_by_root_two():
    # E(t)² of a Gaussian with complex parameter A: A/2, i.e. τ0/√2, φ2/2 and τ/√2 (by hand)
    pulse = P.Pulse(F.Envelope(30 * FS, "gaussian"), W800, (30 * FS,) * 3, (T.Poly(2, 1000 * FS**2),), shaped=True)
    shg = pulse.harmonic(2)
    assert shg.envelope.tl == pytest.approx(30 * FS / math.sqrt(2), rel=1e-5)
    assert shg.taylor[0] == pytest.approx(500 * FS**2, rel=1e-3)
    assert shg.numbers.duration[1] == pytest.approx(pulse.numbers.duration[1] / math.sqrt(2), rel=1e-4)


@pytest.mark.parametrize("gdd_fs2", [1e4, 3e4, 1e5, 1e6])
def test_the_harmonic_of_a_stretched_gaussian_halves_its_gdd_at_any_chirp(gdd_fs2):
    # the same by-hand result as above, for a pump stretched 30× to 3000×: on a grid up to 3e4 fs², by
    # stationary phase beyond (the grid would need more than 2^16 points)
    pulse = P.Pulse(F.Envelope(30 * FS, "gaussian"), W800, (30 * FS,) * 3, (T.Poly(2, gdd_fs2 * FS**2),),
                    shaped=True)
    shg = pulse.harmonic(2)
    assert shg.taylor[0] == pytest.approx(gdd_fs2 / 2 * FS**2, rel=1e-6)
    expected = gaussian_closed_form(30 * FS / math.sqrt(2), gdd_fs2 / 2 * FS**2)
    assert shg.numbers.duration[1] == pytest.approx(expected, rel=1e-4)


def test_the_harmonic_on_a_grid_and_by_stationary_phase_agree_where_both_hold(monkeypatch):
    # a sech² pump stretched to 100 τ0²: E(t)² by FFT on a grid, then the same with the grid forbidden
    # (the stationary-phase harmonic A(Δω)² at 2Δω with phase 2φ(Δω)); two methods, one answer
    from speccheck.physics import harmonics as H

    pump = P.Pulse(F.Envelope(40 * FS, "sech2"), W800, (40 * FS,) * 3, (T.Poly(2, 100 * (40 * FS) ** 2),),
                   shaped=True)
    on_grid = pump.harmonic(2).numbers.duration[1]
    monkeypatch.setattr(H, "MAX_POINTS", 256)
    stationary = pump.harmonic(2).numbers.duration[1]
    assert stationary == pytest.approx(on_grid, rel=0.01)


def test_a_gdd_interval_that_spans_zero_contains_the_transform_limit():
    pulse = P.Pulse(F.Envelope(30 * FS, "gaussian"), W800, (30 * FS,) * 3).adding(
        (T.Poly(2, 0.0),), (-2000 * FS**2, 2000 * FS**2))
    low, typ, high = pulse.numbers.duration
    assert low == pytest.approx(30 * FS, rel=1e-9)
    assert high == pytest.approx(gaussian_closed_form(30 * FS, 2000 * FS**2), rel=1e-6)  # 187 fs


def test_an_unknown_chirp_sign_covers_both_signs():
    # 35 fs with a 31.4 fs transform limit carries ±175 fs² (closed form); 360 fs² of glass then gives
    # 31.4 fs·√(1 + (4 ln2·535/31.4²)²) for positive chirp and …·185 fs² for negative
    tl = 31.4 * FS
    phi = tl**2 / (4 * LN2) * math.sqrt((35 / 31.4) ** 2 - 1)
    pulse, notes = P.at_laser("gaussian", (tl,) * 3, (35 * FS,) * 3, W800, None, None, None)
    assert notes and "both signs" in notes[0]
    after = pulse.adding((T.Poly(2, 360 * FS**2),))
    low, typ, high = after.numbers.duration
    assert typ == pytest.approx(gaussian_closed_form(tl, phi + 360 * FS**2), rel=1e-6)
    assert high == pytest.approx(typ, rel=1e-9)
    assert low == pytest.approx(gaussian_closed_form(tl, 360 * FS**2 - phi), rel=1e-6)
    known, _ = P.at_laser("gaussian", (tl,) * 3, (35 * FS,) * 3, W800, "negative", None, None)
    assert known.adding((T.Poly(2, 360 * FS**2),)).numbers.duration[1] == pytest.approx(low, rel=1e-6)


def test_the_laser_gdd_that_reproduces_a_sech2_duration_is_found_from_the_field():
    tl = 30 * FS
    gdd = B.gdd_for_duration("sech2", tl, 60 * FS)
    assert F.measure(F.Envelope(tl, "sech2"), (T.Poly(2, gdd),), W800).duration == pytest.approx(60 * FS, rel=2e-3)


def test_the_compensation_for_a_glass_is_its_negative_gdd_and_tod():
    pulse = P.Pulse(F.Envelope(12 * FS, "gaussian"), W800, (12 * FS,) * 3).adding((T.glass("fused_silica", 15e-3, C),))
    gdd, tod = pulse.compensation()
    assert gdd == pytest.approx(-materials.gdd("fused_silica", 800e-9, 15e-3, C), rel=0.05)
    assert tod == pytest.approx(-materials.tod("fused_silica", 800e-9, 15e-3, C), rel=0.1)
    best = F.measure(pulse.envelope, pulse.terms, W800, 1.0, (gdd, tod))
    assert best.duration == pytest.approx(12 * FS, rel=0.01)


def test_a_stretcher_uses_the_stationary_phase_mapping():
    m = F.measure(F.Envelope(30 * FS, "gaussian"), (T.Poly(2, 3e6 * FS**2),), W800)
    assert m.method == "stationary-phase"
    assert m.duration == pytest.approx(gaussian_closed_form(30 * FS, 3e6 * FS**2), rel=1e-3)


def test_a_few_cycle_pulse_through_a_long_crystal_agrees_with_a_brute_force_fft():
    # 6 fs sech² at 800 nm through 100 mm of sapphire, by the check's own grid and by the
    # stationary-phase mapping; a brute-force FFT on 2^18 points over a window that holds every wing's
    # delay is the reference.  The
    # spectrum reaches past sapphire's zero-dispersion wavelength, where the delay turns back, and past
    # the range of its formula (NaN), neither of which may spoil the figures or warn.
    env, terms = F.Envelope(6.11 * FS, "sech2"), (T.glass("sapphire", 0.1, C),)
    with np.errstate(all="raise"):
        import warnings

        with warnings.catch_warnings():
            warnings.simplefilter("error")
            m = F.measure(env, terms, W800)
            mapped = F.stationary_phase(env, terms, W800, 1.0, (0.0, 0.0), 0.95 * W800)
    window, n = 1.0010624e-10, 1 << 18
    with np.errstate(invalid="ignore"):
        dw, spec, phi = F._spectrum(env, terms, W800, 1.0, (0.0, 0.0), window, n)
    intensity = np.abs(np.fft.fftshift(np.fft.fft(spec))) ** 2
    dt = window / n
    ref = F._measures((np.arange(n) - n // 2) * dt, intensity, dt, spec, dw, phi)
    assert ref.duration == pytest.approx(1.876e-12, rel=2e-3)  # GDD alone: 5804 fs² × Δω_FWHM = 1.879 ps
    assert m.duration == pytest.approx(ref.duration, rel=2e-3)
    assert m.peak_factor == pytest.approx(ref.peak_factor, rel=5e-3)
    # the stationary-phase mapping over the whole spectrum, past the turning delay: the same figures
    assert mapped.duration == pytest.approx(ref.duration, rel=2e-3)
    assert mapped.peak_factor == pytest.approx(ref.peak_factor, rel=5e-3)


@pytest.mark.parametrize("shape", ["sech2", "flat_top"])
def test_the_broadening_table_is_what_the_fft_gives(shape):
    # rows of physics/broadening_data.py against a fresh FFT of the field, and the interpolation between
    # rows against the FFT at points that are not rows
    from speccheck.physics.broadening_data import TABLES

    rows = TABLES[shape]
    env = F.Envelope(1.0, shape)
    for x, ratio, factor, main in rows[::20]:
        m = F.measure(env, (T.Poly(2, x),), 1e3, max_points=1 << 20)
        assert (m.duration, m.peak_factor, m.main_peak) == pytest.approx((ratio, factor, main), rel=1e-9)
    # the last rows, beyond 2^16 points, against the stationary-phase mapping a check takes there
    for x, ratio, factor, _ in rows[-3:]:
        m = F.measure(env, (T.Poly(2, x),), 1e3)
        assert m.method == "stationary-phase"
        assert (m.duration, m.peak_factor) == pytest.approx((ratio, factor), rel=2e-3)
    for x in (0.0037, 0.41, 7.7, 333.0):
        m = F.measure(F.Envelope(40 * FS, shape), (T.Poly(2, x * (40 * FS) ** 2),), W800)
        duration, factor, _ = B.broadened(shape, 40 * FS, x * (40 * FS) ** 2)
        # a chirped flat top rings (its peak moves between the ripples), so between rows its factor is
        # known less well: measured up to 2.4 %, against 0.01 % for sech²
        assert duration == pytest.approx(m.duration, rel=3e-4)
        assert factor == pytest.approx(m.peak_factor, rel=2e-4 if shape == "sech2" else 3e-2)


def test_a_spec_whose_path_never_changes_the_pulse_never_imports_numpy():
    import subprocess
    import sys
    from pathlib import Path

    root = Path(__file__).resolve().parent.parent
    code = ("import io, sys\nfrom speccheck.cli import run\n"
            "for name in ('oscillator-consistent.yaml', 'mirror-damage.yaml'):\n"
            "    run(['check', '--format', 'json', '--no-config', 'example_specs/' + name], io.StringIO(), io.StringIO())\n"
            "print('numpy' in sys.modules)\n")
    # the first run may fill the table of pint's answers, and pint imports numpy; the second reads it
    subprocess.run([sys.executable, "-c", code], cwd=root, capture_output=True, text=True, check=True)
    out = subprocess.run([sys.executable, "-c", code], cwd=root, capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_a_compressed_pulse_with_a_large_tod_is_not_taken_as_stretched():
    # 31.4 fs (30 nm at 800 nm) after a grating pair that leaves 1.98e6 fs³ of TOD: the far wings' delays
    # span ~100 ps, but the pulse is ~335 fs (a brute-force FFT over a window holding all of them)
    tl = 0.4413 / (C * 30e-9 / 800e-9**2)
    env, terms = F.Envelope(tl, "gaussian"), (T.Poly(3, 1.978e6 * FS**3),)
    window, n = 400e-12, 1 << 19
    dw, spec, phi = F._spectrum(env, terms, W800, 1.0, (0.0, 0.0), window, n)
    intensity = np.abs(np.fft.fftshift(np.fft.fft(spec))) ** 2
    ref = F._measures((np.arange(n) - n // 2) * window / n, intensity, window / n, spec, dw, phi)
    for extra_gdd in (0.0, -6.07e4 * FS**2, 6.07e4 * FS**2):  # the corners of a ±6 % GDD tolerance too
        m = F.measure(env, terms, W800, 1.0, (extra_gdd, 0.0))
        assert m.duration > 10 * tl
    assert F.measure(env, terms, W800).duration == pytest.approx(ref.duration, rel=2e-3)


def _chirped_rectangle(tl: float, gdd: float):
    """Duration and P_pk·τ/E of a rectangle of width tl after a GDD, in time: E(t) = ∫ rect(s) h(t − s) ds
    with the chirp's impulse response h(t) = exp(−i t²/(2 GDD))/√(2πi GDD) (a Fresnel integral), by
    direct quadrature over s — no spectrum, no FFT, no cut in frequency.  The energy is the rectangle's,
    tl (h keeps it: Parseval), since its far-flung edges' energy lies beyond any window in time."""
    s = np.linspace(-tl / 2, tl / 2, 6001)
    t = np.linspace(-3 * tl, 3 * tl, 3001)
    field = np.trapezoid(np.exp(-1j * (t[:, None] - s[None, :]) ** 2 / (2 * gdd)), s, axis=1)
    inten = np.abs(field) ** 2 / (2 * np.pi * gdd)
    hot = t[inten >= inten.max() / 2]
    duration = hot[-1] - hot[0]
    return duration, inten.max() * duration / tl


def test_a_chirped_flat_top_agrees_with_a_direct_quadrature_in_time():
    tl = 0.8859 / (C * 30e-9 / 800e-9**2)  # 30 nm at 800 nm: 63 fs
    duration, factor = _chirped_rectangle(tl, 1000 * FS**2)
    m = F.measure(F.Envelope(tl, "flat_top"), (T.Poly(2, 1000 * FS**2),), W800)
    assert m.duration == pytest.approx(duration, rel=3e-3)
    assert m.peak_factor == pytest.approx(factor, rel=5e-3)
    # unchirped: the rectangle's own factors, to what the cut spectrum leaves
    m = F.measure(F.Envelope(tl, "flat_top"), (), W800)
    assert m.duration == pytest.approx(tl, rel=0.015)
    assert m.peak_factor == pytest.approx(1.0, rel=0.005)


def test_with_a_large_fod_the_compensation_is_the_best_of_a_brute_force_grid():
    # 31.4 fs with −6.22e6 fs⁴ (a grating pair's FOD, uncompensated): the negatives of the net GDD and TOD
    # are far from the best; a 21 × 21 grid of GDD and TOD (an exhaustive scan, not a search) is the
    # reference for the highest peak power
    tl = 0.4413 / (C * 30e-9 / 800e-9**2)
    pulse = P.Pulse(F.Envelope(tl, "gaussian"), W800, (tl,) * 3).adding((T.Poly(4, -6.22e6 * FS**4),))
    g, t = pulse.compensation()

    def peak(gg, tt):
        m = F.measure(pulse.envelope, pulse.terms, W800, 1.0, (gg, tt))
        return m.peak_factor / m.duration

    grid = max(peak(gg * FS**2, tt * FS**3) for gg in np.linspace(-1000, 5000, 21) for tt in np.linspace(0, 24000, 21))
    assert peak(g, t) >= 0.98 * grid
    assert peak(g, t) > 1.3 * peak(0.0, 0.0)


def test_the_measures_of_all_rows_at_once_are_those_of_each_row_alone():
    # measure_set measures every corner's intensity together (_row_measures); each row must give what
    # the one-row measure gives it: a Gaussian, a TOD-ringed pulse (satellites, minima between them), a
    # pulse on a pedestal and one at the window's edge
    t = np.linspace(-40.0, 40.0, 4096)
    dt = float(t[1] - t[0])
    rows = np.array([
        np.exp(-4.0 * math.log(2.0) * t**2),
        np.exp(-4.0 * math.log(2.0) * t**2) + 0.6 * np.exp(-((t - 3.0) / 0.8) ** 2) + 0.2 * np.exp(-((t + 5) / 0.5) ** 2),
        np.exp(-4.0 * math.log(2.0) * (t / 7.0) ** 2) * (1.0 + 0.3 * np.cos(3.0 * t)) ** 2,
        0.02 * np.exp(-((t / 15.0) ** 2)) + np.exp(-4.0 * math.log(2.0) * (t / 0.9) ** 2),
        np.exp(-4.0 * math.log(2.0) * ((t - 39.0) / 2.0) ** 2) + 1e-9,
    ])
    together = F._row_measures(t, rows, dt)
    for row, (duration, factor, share) in zip(rows, together):
        alone = F._measures(t, row, dt, None, None, None)
        assert (duration, factor, share) == (alone.duration, alone.peak_factor, alone.main_peak)
    # and the independent reference for the first row: a Gaussian's FWHM 1 and P_pk·τ/E = 2√(ln2/π)
    assert together[0][0] == pytest.approx(1.0, rel=1e-6)
    assert together[0][1] == pytest.approx(2.0 * math.sqrt(math.log(2.0) / math.pi), rel=1e-6)
